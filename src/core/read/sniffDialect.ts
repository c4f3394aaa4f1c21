/**
 * Guessing what the caller did not say: the delimiter (from how consistently each candidate splits
 * the first records) and whether the first record is a header (from how its cells compare with the
 * cells below them).
 */
import { CELL_MISSING, CELL_NUMBER, CELL_TEXT, CellRules } from './cellValue';
import { parseCsvRecords } from './csvRecords';

export const DELIMITERS = [',', '\t', ';', '|'] as const;

/** Records looked at when guessing. */
const SNIFF_RECORDS = 50;

/**
 * The candidate that splits the sampled records into the same number (≥ 2) of fields most
 * consistently; ties go to the one giving more fields, then to the order `,` tab `;` `|`.
 * `,` is no candidate when numbers are written with a decimal comma. When no candidate gives two
 * fields, the fallback (`,` for csv, tab for tsv) is used.
 */
export function sniffDelimiter(text: string, file: string, fallback: string, decimalComma: boolean, comment?: string): string {
  let best = { delimiter: fallback, share: 0, fields: 0 };
  for (const delimiter of DELIMITERS) {
    if (decimalComma && delimiter === ',') continue;
    let records: string[][];
    try {
      records = parseCsvRecords(text, { delimiter, comment }, file, []).slice(0, SNIFF_RECORDS);
    } catch {
      continue; // this candidate makes the quoting invalid, so it is not the delimiter
    }
    if (records.length === 0) continue;
    const counts = new Map<number, number>();
    for (const record of records) counts.set(record.length, (counts.get(record.length) ?? 0) + 1);
    let fields = 0;
    let frequency = 0;
    for (const [length, times] of counts) {
      if (times > frequency || (times === frequency && length > fields)) {
        fields = length;
        frequency = times;
      }
    }
    if (fields < 2) continue;
    const share = frequency / records.length;
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
