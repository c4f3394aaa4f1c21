/**
 * Where a record of RFC 4180 text ends: at the first line feed outside double quotes. A doubled
 * quote inside a quoted field toggles the state twice, so counting quotes is enough.
 */
const QUOTE = 0x22;
const LINE_FEED = 0x0a;

export interface RecordEnd {
  /** Offset of the line feed that ends the record, or -1 when none lies before `end`. */
  lineFeed: number;
  /** Line feeds inside quoted fields before that line feed. */
  quotedLineFeeds: number;
  /** Whether the scan stopped inside an open quote (meaningful when lineFeed is -1). */
  insideQuotes: boolean;
}

export function findRecordEnd(bytes: Uint8Array, start: number, end: number): RecordEnd {
  let inQuotes = false;
  let quotedLineFeeds = 0;
  for (let p = start; p < end; p++) {
    const c = bytes[p];
    if (c === QUOTE) inQuotes = !inQuotes;
    else if (c === LINE_FEED) {
      if (!inQuotes) return { lineFeed: p, quotedLineFeeds, insideQuotes: false };
      quotedLineFeeds++;
    }
  }
  return { lineFeed: -1, quotedLineFeeds, insideQuotes: inQuotes };
}
