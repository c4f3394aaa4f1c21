/**
 * Guessing what the caller did not say: the delimiter (from how consistently each candidate splits
 * the first records) and whether the first record is a header (from how its cells compare with the
 * cells below them).
 */
import { CELL_MISSING, CELL_NUMBER, CELL_TEXT, CellRules } from './cellValue';

export const DELIMITERS = [',', '\t', ';', '|'] as const;

/** Records looked at when guessing. */
const SNIFF_RECORDS = 50;

/**
 * The candidate that splits the sampled records into the same number (≥ 2) of fields most
 * consistently; ties go to the one giving more fields, then to the order `,` tab `;` `|`.
 * `,` is no candidate when numbers are written with a decimal comma. When no candidate gives two
 * fields, `fallback` is used. Fields are counted on the bytes, outside double quotes, over the
 * records [starts[i], ends[i]) of `bytes`; quoting is validated later by the parser.
 */
export function sniffDelimiter(bytes: Uint8Array, starts: readonly number[], ends: readonly number[], fallback: string, decimalComma: boolean): string {
  const records = Math.min(starts.length, SNIFF_RECORDS);
  let best = { delimiter: fallback, share: 0, fields: 0 };
  for (const delimiter of DELIMITERS) {
    if (decimalComma && delimiter === ',') continue;
    const code = delimiter.charCodeAt(0);
    const counts = new Map<number, number>();
    for (let r = 0; r < records; r++) {
      let fields = 1;
      let inQuotes = false;
      for (let p = starts[r]; p < ends[r]; p++) {
        const c = bytes[p];
        if (c === 0x22) inQuotes = !inQuotes;
        else if (c === code && !inQuotes) fields++;
      }
      counts.set(fields, (counts.get(fields) ?? 0) + 1);
    }
    let fields = 0;
    let frequency = 0;
    for (const [length, times] of counts) {
      if (times > frequency || (times === frequency && length > fields)) {
        fields = length;
        frequency = times;
      }
    }
    if (fields < 2) continue;
    const share = frequency / records;
    if (share > best.share || (share === best.share && fields > best.fields)) best = { delimiter, share, fields };
  }
  return best.delimiter;
}

/**
 * Whether `records[0]` is a header. Columns whose cells below are numbers (at least 90% of the
 * non-missing ones) vote: a text first cell says "header", a numeric first cell says "data"; the
 * first record is a header when the header votes are at least the data votes. Without such
 * columns, text columns vote: a first cell that appears nowhere below says "header". With no
 * record below, the first record is a header when any of its cells is text.
 */
export function detectHeader(records: readonly string[][], rules: CellRules): boolean {
  const first = records[0];
  const body = records.slice(1, 1 + 200);
  const kindOf = (text: string): number => {
    rules.numberOf(text);
    return rules.lastKind;
  };
  if (body.length === 0) return first.some((cell) => kindOf(cell) === CELL_TEXT);
  let numericHeader = 0;
  let numericData = 0;
  let textHeader = 0;
  let textData = 0;
  for (let column = 0; column < first.length; column++) {
    let numbers = 0;
    let present = 0;
    const seen = new Set<string>();
    for (const record of body) {
      if (column >= record.length) continue;
      const kind = kindOf(record[column]);
      if (kind === CELL_MISSING) continue;
      present++;
      if (kind === CELL_NUMBER) numbers++;
      seen.add(record[column].trim());
    }
    const firstKind = kindOf(first[column]);
    if (firstKind === CELL_MISSING || present === 0) continue;
    if (numbers > 0 && numbers >= 0.9 * present) {
      if (firstKind === CELL_TEXT) numericHeader++;
      else numericData++;
    } else if (seen.has(first[column].trim())) textData++;
    else textHeader++;
  }
  if (numericHeader + numericData > 0) return numericHeader >= numericData;
  return textHeader > textData;
}
