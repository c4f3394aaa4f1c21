/**
 * Streaming scan of delimited text in one pass with bounded memory.
 *
 * Rows are read from a buffer filled in chunks (MEASURED.md: 1–4 MiB). The fast path parses a row
 * straight from the bytes: numbers by numberBytes.ts, labels by their bytes (labelDictionary.ts),
 * simple quoted fields ("…" holding no quote and no line break) in place. A row the fast path
 * cannot take — a doubled quote, a quoted line break, a quote inside an unquoted field, a lone
 * carriage return — is handed whole to csv-parse (csvRecords.ts), the reference parser; both
 * paths read cells through the same rules (cellValue.ts). A row cut by the end of the buffer is
 * restarted after the refill; a row longer than `maxRowBytes` is an error naming its line.
 *
 * The last byte after the buffered data is always a line feed (a sentinel), so the byte loops
 * test byte values only; reaching the sentinel means "the row continues in the next chunk".
 */
import { CELL_TEXT, type CellRules } from './cellValue';
import { parseNumberBytes, plainNumberInto } from './numberBytes';
import { parseCsvRecords } from './csvRecords';
import { LabelDictionary } from './labelDictionary';
import { trimEnd, trimStart } from './missingTokens';
import { PassProgress } from './progress';
import { findRecordEnd } from './recordBoundary';
import { firstInvalidUtf8, hasUtf8Bom, invalidUtf8Error, utf8SequenceLength, UTF8_BOM_LENGTH } from './textEncoding';
import { isBlankLine, isCommentLine, rowTooLongError } from './textLines';
import { cellRulesFor, DEFAULT_TEXT_TUNING, type TextTuning } from './textOptions';
import { EXAMPLE_CHARACTERS, ScanTally } from './scanTally';
import type { ScanRequest, ScanSummary } from './types';
import { rowsBefore } from './textRange';

const LINE_FEED = 0x0a;
const CARRIAGE_RETURN = 0x0d;
const QUOTE = 0x22;

/** parseRow results besides "next row starts here". */
const NEED_MORE = -1;
const ODD_ROW = -2;

/** Label of the current row: pending new label (intern at commit). */
const LABEL_NEW = -2;

/**
 * One chunk buffer kept from a finished scan for the next: a parallel worker scans many ranges one
 * after another, and a fresh 4 MiB buffer for each would pile up, since typed-array memory lies
 * outside the JavaScript heap and the collector is slow to reclaim it. A scanner takes the spare
 * (leaving none for a scan running beside it) and gives it back when it ends.
 */
let spareBuffer: Uint8Array | null = null;

/** The batch arrays of a finished scan, kept for the next in the same way (0.6 MiB for 20 features). */
let spareBatch: { values: Float64Array; labels: Int32Array; lines: Int32Array } | null = null;

export async function scanDelimitedText(request: ScanRequest, tuning: TextTuning = DEFAULT_TEXT_TUNING): Promise<ScanSummary> {
  const scanner = new DelimitedTextScanner(request, tuning);
  return scanner.run();
}

class DelimitedTextScanner {
  private readonly file: string;
  private readonly rules: CellRules;
  private readonly delimiter: number;
  private readonly delimiterText: string;
  private readonly comment: Uint8Array | undefined;
  private readonly columnNames: string[];
  private readonly columnCount: number;
  private readonly featureCount: number;
  private readonly labelColumn: number;
  /** Feature slot of each file column, -1 when the column is not a feature. */
  private readonly slots: Int32Array;
  /** 1 for the bytes that end the unquoted-field loop: delimiter, LF, CR, quote, and bytes ≥ 0x80 (UTF-8 checks). */
  private readonly stops = new Uint8Array(256);
  /** Whether plain numbers may be read by the shortcut: no thousands separator, and no missing token that reads as a number. */
  private readonly plainNumbers: boolean;
  private readonly dictionary = new LabelDictionary();
  private readonly decoder = new TextDecoder('utf-8');

  // Buffer: bytes [0, bufferEnd) are file bytes [bufferOffset, bufferOffset + bufferEnd); buffer[bufferEnd] = LF.
  private buffer: Uint8Array;
  private bufferEnd = 0;
  private bufferOffset = 0;
  private readOffset = 0;
  private readonly readEnd: number;
  private eof = false;
  private position = 0;

  // Where the next row starts.
  private line = 1;
  private row = 0;
  private headerPending: boolean;
  private readonly stopAt: number;

  // The current batch.
  private readonly values: Float64Array;
  private readonly labels: Int32Array;
  private readonly lines: Int32Array;
  private batchCount = 0;
  private batchFirstRow = 0;

  // The row being parsed.
  private rowLabel = -1;
  private newLabelStart = 0;
  private newLabelEnd = 0;
  private readonly pendingText: Int32Array;
  private pendingTextCount = 0;

  private readonly tally: ScanTally;

  private readonly progress: PassProgress;

  constructor(
    private readonly request: ScanRequest,
    private readonly tuning: TextTuning,
  ) {
    const { inspection, plan, source } = request;
    this.file = source.name;
    const options = inspection.options;
    this.rules = cellRulesFor(options);
    this.delimiterText = inspection.delimiter ?? options.delimiter ?? ',';
    this.delimiter = this.delimiterText.charCodeAt(0);
    this.comment = options.comment === undefined ? undefined : new TextEncoder().encode(options.comment);
    this.columnNames = inspection.columns.map((column) => column.name);
    this.columnCount = inspection.columns.length;
    this.featureCount = plan.features.length;
    this.labelColumn = plan.label;
    this.slots = new Int32Array(this.columnCount).fill(-1);
    plan.features.forEach((column, slot) => {
      if (!Number.isInteger(column) || column < 0 || column >= this.columnCount) throw new RangeError(`scan plan: feature column ${column} is not a column of ${this.file}`);
      if (this.slots[column] >= 0) throw new RangeError(`scan plan: feature column ${column} is listed twice`);
      this.slots[column] = slot;
    });
    if (plan.label >= this.columnCount) throw new RangeError(`scan plan: label column ${plan.label} is not a column of ${this.file}`);
    for (const stop of [this.delimiter, LINE_FEED, CARRIAGE_RETURN, QUOTE]) this.stops[stop] = 1;
    for (let c = 0x80; c < 0x100; c++) this.stops[c] = 1;
    this.plainNumbers = this.rules.syntax.thousandsSeparator < 0 && !this.rules.missing.tokens.some((token) => this.readsAsNumber(token));

    const batchRows = Math.max(1, tuning.batchRows);
    if (spareBatch && spareBatch.labels.length === batchRows && spareBatch.values.length === batchRows * this.featureCount) {
      ({ values: this.values, labels: this.labels, lines: this.lines } = spareBatch);
      spareBatch = null;
    } else {
      this.values = new Float64Array(batchRows * this.featureCount);
      this.labels = new Int32Array(batchRows);
      this.lines = new Int32Array(batchRows);
    }
    this.pendingText = new Int32Array(3 * Math.max(1, this.featureCount));
    this.tally = new ScanTally(this.file, this.columnNames, this.featureCount);

    const range = request.range;
    this.readOffset = range ? Math.max(0, range.start) : 0;
    this.stopAt = range ? Math.min(range.end, source.size) : source.size;
    this.readEnd = source.size;
    this.headerPending = inspection.header && this.readOffset === 0;
    const bufferBytes = Math.max(16, tuning.chunkBytes) + 1;
    if (spareBuffer?.length === bufferBytes) {
      this.buffer = spareBuffer;
      spareBuffer = null;
    } else this.buffer = new Uint8Array(bufferBytes);
    this.progress = new PassProgress(request.control, request.pass ?? 'rows', Math.max(0, this.stopAt - this.readOffset));
  }

  async run(): Promise<ScanSummary> {
    try {
      return await this.scan();
    } finally {
      if (this.buffer.length === Math.max(16, this.tuning.chunkBytes) + 1) spareBuffer = this.buffer;
      spareBatch = { values: this.values, labels: this.labels, lines: this.lines };
    }
  }

  private async scan(): Promise<ScanSummary> {
    const range = this.request.range;
    if (range && range.start > 0 && range.origin) {
      // The caller aligned the range to a row start and knows its line and row.
      this.line = range.origin.line;
      this.row = range.origin.row;
      if (range.start >= this.stopAt) return this.summary();
    } else if (range && range.start > 0) {
      if (range.start >= this.stopAt) return this.summary();
      const before = await rowsBefore(this.request.source, range.start, this.request.inspection, this.comment, this.request.control);
      this.readOffset = before.offset;
      this.line = before.line;
      this.row = before.row;
    }
    this.bufferOffset = this.readOffset;
    const scanStart = this.readOffset;
    await this.fill();
    if (this.bufferOffset === 0 && hasUtf8Bom(this.buffer.subarray(0, Math.min(3, this.bufferEnd)))) this.position = UTF8_BOM_LENGTH;
    for (;;) {
      const done = this.parseBuffered();
      if (done || (this.eof && this.position >= this.bufferEnd)) break;
      await this.refill();
      this.progress.update(Math.min(this.readOffset, this.stopAt) - scanStart);
    }
    this.flush();
    this.progress.finish();
    if (this.tally.raggedRows > 0 && !this.request.inspection.options.skipRaggedRows) throw this.tally.raggedError();
    return this.summary();
  }

  /**
   * Parses the buffered rows; true when the scan is complete (range end reached). The row loop is
   * parseRows; storing the position and flushing a full batch happen here, out of it: V8 optimises
   * the loop while it runs the first buffer (on-stack replacement), and code in the loop's function
   * that first ran after that had no type feedback and deoptimized the loop (once per thread and
   * pass, or at every buffer for code after the loop).
   */
  private parseBuffered(): boolean {
    const stop = this.stopAt - this.bufferOffset;
    const limit = Math.min(this.bufferEnd, stop);
    let p = this.position;
    for (;;) {
      p = this.parseRows(p, limit);
      if (this.batchCount !== this.labels.length) break;
      this.flush();
    }
    this.position = p;
    return p >= stop;
  }

  /**
   * Rows starting before `limit` (the buffer's end or the range's), until the batch is full or a
   * row needs more bytes than are buffered: the position after the last row parsed.
   */
  private parseRows(p: number, limit: number): number {
    const buffer = this.buffer;
    const capacity = this.labels.length;
    while (p < limit && this.batchCount < capacity) {
      const blank = isBlankLine(buffer, p, this.bufferEnd + 1);
      if (blank > 0) {
        if (p + blank - 1 === this.bufferEnd && !this.eof) return p;
        this.line++;
        p += blank;
        continue;
      }
      if (this.comment !== undefined && isCommentLine(buffer, p, this.comment)) {
        const lineFeed = buffer.indexOf(LINE_FEED, p);
        if (lineFeed === this.bufferEnd && !this.eof) return p;
        this.line++;
        p = lineFeed + 1;
        continue;
      }
      let next: number;
      if (this.headerPending) next = this.skipHeader(p);
      else {
        next = this.fastRow(p);
        if (next === ODD_ROW) next = this.oddRow(p);
      }
      if (next === NEED_MORE) return p;
      p = next;
    }
    return p;
  }

  /** Whether a missing token, trimmed as cells are, follows the number grammar (then it must win over the number shortcut). */
  private readsAsNumber(token: string): boolean {
    const bytes = new TextEncoder().encode(token);
    const start = trimStart(bytes, 0, bytes.length);
    const end = trimEnd(bytes, start, bytes.length);
    return !Number.isNaN(parseNumberBytes(bytes, start, end, this.rules.syntax));
  }

  /** The fast path over one row starting at `start`: next row's start, NEED_MORE or ODD_ROW. */
  private fastRow(start: number): number {
    const buffer = this.buffer;
    const stops = this.stops;
    const delimiter = this.delimiter;
    const slots = this.slots;
    const columnCount = this.columnCount;
    const values = this.values;
    const rules = this.rules;
    const base = this.batchCount * this.featureCount;
    this.pendingTextCount = 0;
    this.rowLabel = -1;
    let p = start;
    let field = 0;
    const plainNumbers = this.plainNumbers;
    const decimal = this.rules.syntax.decimalSeparator;
    for (;;) {
      let fieldStart = p;
      let fieldEnd: number;
      let numberRead = false;
      let c = buffer[p];
      if (c === QUOTE) {
        // A simple quoted field: no quote and no line break inside, a delimiter or line end after.
        let q = p + 1;
        c = buffer[q];
        while (c !== QUOTE && c !== LINE_FEED) {
          if (c >= 0x80) {
            const length = this.checkUtf8(q, start);
            if (length < 0) return NEED_MORE;
            q += length;
          } else q++;
          c = buffer[q];
        }
        if (c !== QUOTE) return ODD_ROW;
        fieldStart = p + 1;
        fieldEnd = q;
        p = q + 1;
        c = buffer[p];
        if (c !== delimiter && c !== LINE_FEED && c !== CARRIAGE_RETURN) return ODD_ROW;
      } else {
        // The common feature cell, a plain number right before the delimiter or line end, is read
        // in the same pass that finds its end; anything else takes the general route below.
        if (plainNumbers && field < columnCount && slots[field] >= 0) {
          // Written in place; a cell that turns out not to end here is read again below.
          const end = plainNumberInto(buffer, p, decimal, values, base + slots[field]);
          if (end >= 0) {
            const after = buffer[end];
            if (after === delimiter || after === LINE_FEED || (after === CARRIAGE_RETURN && buffer[end + 1] === LINE_FEED)) {
              numberRead = true;
              p = end;
              c = after;
            }
          }
        }
        if (!numberRead) {
          while (stops[c] === 0) c = buffer[++p];
          while (c >= 0x80) {
            const length = this.checkUtf8(p, start);
            if (length < 0) return NEED_MORE;
            p += length;
            c = buffer[p];
            while (stops[c] === 0) c = buffer[++p];
          }
          if (c === QUOTE) return ODD_ROW;
        }
        fieldEnd = p;
      }
      if (c === CARRIAGE_RETURN && buffer[p + 1] !== LINE_FEED) return ODD_ROW;
      if (field < columnCount) {
        const slot = slots[field];
        if (slot >= 0 && !numberRead) {
          values[base + slot] = rules.numberAt(buffer, fieldStart, fieldEnd);
          if (rules.lastKind === CELL_TEXT) this.holdText(slot, fieldStart, fieldEnd);
        }
        if (field === this.labelColumn) this.takeLabel(fieldStart, fieldEnd);
      }
      field++;
      if (c === delimiter) {
        p++;
        continue;
      }
      const lineFeed = c === CARRIAGE_RETURN ? p + 1 : p;
      if (lineFeed >= this.bufferEnd && !this.eof) return NEED_MORE;
      this.commitRow(field, start, p, 1);
      return lineFeed + 1;
    }
  }

  /**
   * Checks the UTF-8 sequence at `p` (a byte ≥ 0x80) of the row starting at `rowStart`: its length,
   * or -1 when it may be cut by the end of the buffer; throws on invalid UTF-8.
   */
  private checkUtf8(p: number, rowStart: number): number {
    const length = utf8SequenceLength(this.buffer, p, this.bufferEnd);
    if (length > 0) return length;
    if (!this.eof && p + 4 > this.bufferEnd) return -1;
    let line = this.line;
    for (let i = rowStart; i < p; i++) if (this.buffer[i] === LINE_FEED) line++;
    throw invalidUtf8Error(this.file, this.bufferOffset + p, line);
  }

  private takeLabel(start: number, end: number): void {
    const buffer = this.buffer;
    start = trimStart(buffer, start, end);
    end = trimEnd(buffer, start, end);
    if (this.rules.missing.matches(buffer, start, end)) {
      this.rowLabel = -1;
      return;
    }
    const id = this.dictionary.find(buffer, start, end);
    if (id >= 0) this.rowLabel = id;
    else {
      this.rowLabel = LABEL_NEW;
      this.newLabelStart = start;
      this.newLabelEnd = end;
    }
  }

  /** Remembers a non-numeric feature cell of the current row (counted only when the row is kept). */
  private holdText(slot: number, start: number, end: number): void {
    const i = 3 * this.pendingTextCount++;
    this.pendingText[i] = slot;
    this.pendingText[i + 1] = start;
    this.pendingText[i + 2] = end;
  }

  /** Ends a row of `fields` fields spanning `lineCount` lines; the buffer bytes [start, end) are its text. */
  private commitRow(fields: number, start: number, end: number, lineCount: number): void {
    const row = this.row++;
    this.tally.rowsSeen++;
    const line = this.line;
    this.line += lineCount;
    if (fields !== this.columnCount) {
      this.ragged(row, line, fields, this.decoder.decode(this.buffer.subarray(start, Math.min(end, start + 4 * EXAMPLE_CHARACTERS))));
      return;
    }
    if (this.batchCount === 0) this.batchFirstRow = row;
    const n = this.batchCount;
    this.labels[n] = this.rowLabel === LABEL_NEW ? this.dictionary.intern(this.buffer, this.newLabelStart, this.newLabelEnd) : this.rowLabel;
    this.lines[n] = line;
    for (let i = 0; i < this.pendingTextCount; i++) {
      const slot = this.pendingText[3 * i];
      const text = this.tally.wantsExample(slot) ? this.decoder.decode(this.buffer.subarray(this.pendingText[3 * i + 1], this.pendingText[3 * i + 2])) : '';
      this.tally.nonNumericCell(slot, row, line, text);
    }
    this.batchCount = n + 1; // a full batch is flushed by parseBuffered, before the next row
  }

  private ragged(row: number, line: number, fields: number, text: string): void {
    const examplesComplete = this.tally.raggedRow(row, line, fields, text);
    if (this.request.inspection.options.skipRaggedRows) {
      // Keep batches contiguous in row numbers: a skipped row ends the batch.
      this.flush();
    } else if (examplesComplete) throw this.tally.raggedError();
  }

  /** A row left to csv-parse: quoted line breaks, doubled quotes, stray quotes, lone CR. */
  private oddRow(start: number): number {
    const buffer = this.buffer;
    const end = findRecordEnd(buffer, start, this.bufferEnd);
    if (end.lineFeed < 0 && !this.eof) return NEED_MORE;
    const textEnd = end.lineFeed < 0 ? this.bufferEnd : end.lineFeed > start && buffer[end.lineFeed - 1] === CARRIAGE_RETURN ? end.lineFeed - 1 : end.lineFeed;
    const invalid = firstInvalidUtf8(buffer, start, textEnd);
    if (invalid >= 0) {
      let line = this.line;
      for (let i = start; i < invalid; i++) if (buffer[i] === LINE_FEED) line++;
      throw invalidUtf8Error(this.file, this.bufferOffset + invalid, line);
    }
    const text = this.decoder.decode(buffer.subarray(start, textEnd));
    const records = parseCsvRecords(text, { delimiter: this.delimiterText }, this.file, [this.line], this.columnNames);
    // One record: the text ends at the record's line feed, found outside quotes.
    for (const record of records) this.commitRecord(record, start, textEnd);
    this.line += end.lineFeed < 0 ? end.quotedLineFeeds : end.quotedLineFeeds + 1;
    return end.lineFeed < 0 ? this.bufferEnd : end.lineFeed + 1;
  }

  /** Ends a row given as csv-parse's field texts; the buffer bytes [start, end) are its text. */
  private commitRecord(record: string[], start: number, end: number): void {
    if (record.length !== this.columnCount) {
      this.commitRow(record.length, start, end, 0);
      return;
    }
    const base = this.batchCount * this.featureCount;
    const rules = this.rules;
    this.pendingTextCount = 0;
    this.rowLabel = -1;
    const texts: [number, string][] = [];
    for (let field = 0; field < record.length; field++) {
      const slot = this.slots[field];
      if (slot >= 0) {
        this.values[base + slot] = rules.numberOf(record[field]);
        if (rules.lastKind === CELL_TEXT) texts.push([slot, record[field]]);
      }
      if (field === this.labelColumn) this.rowLabel = this.labelOf(record[field]);
    }
    const row = this.row;
    const line = this.line;
    this.commitRow(record.length, start, end, 0);
    for (const [slot, text] of texts) this.tally.nonNumericCell(slot, row, line, text);
  }

  private labelOf(text: string): number {
    const rules = this.rules;
    const length = rules.encode(text);
    const bytes = rules.bytes;
    const start = trimStart(bytes, 0, length);
    const end = trimEnd(bytes, start, length);
    if (rules.missing.matches(bytes, start, end)) return -1;
    return this.dictionary.intern(bytes, start, end);
  }

  /** Skips the header record (it may hold quoted line breaks). */
  private skipHeader(start: number): number {
    const end = findRecordEnd(this.buffer, start, this.bufferEnd);
    if (end.lineFeed < 0 && !this.eof) return NEED_MORE;
    this.headerPending = false;
    this.line += end.quotedLineFeeds + 1;
    return end.lineFeed < 0 ? this.bufferEnd : end.lineFeed + 1;
  }

  private flush(): void {
    const n = this.batchCount;
    if (n === 0) return;
    this.batchCount = 0;
    this.request.onBatch(
      {
        rows: n,
        firstRow: this.batchFirstRow,
        values: this.values.subarray(0, n * this.featureCount),
        labels: this.labels.subarray(0, n),
        lines: this.lines.subarray(0, n),
      },
      this.dictionary.labels,
    );
  }

  /** Fills the buffer after its valid bytes from the source. */
  private async fill(): Promise<void> {
    const source = this.request.source;
    while (this.bufferEnd < this.buffer.length - 1 && this.readOffset < this.readEnd) {
      const chunk = await source.read(this.readOffset, Math.min(this.buffer.length - 1 - this.bufferEnd, this.readEnd - this.readOffset));
      if (chunk.length === 0) break;
      const take = Math.min(chunk.length, this.buffer.length - 1 - this.bufferEnd);
      this.buffer.set(chunk.subarray(0, take), this.bufferEnd);
      this.bufferEnd += take;
      this.readOffset += take;
      if (this.bufferEnd >= this.tuning.chunkBytes) break;
    }
    this.eof = this.readOffset >= this.readEnd;
    this.buffer[this.bufferEnd] = LINE_FEED;
  }

  /** Keeps the unfinished row, grows the buffer when that row fills it, and reads on. */
  private async refill(): Promise<void> {
    const rest = this.bufferEnd - this.position;
    if (this.position === 0 && rest >= this.buffer.length - 1) {
      if (rest >= this.tuning.maxRowBytes) {
        const open = findRecordEnd(this.buffer, 0, this.bufferEnd).insideQuotes;
        throw rowTooLongError(this.file, this.line, this.tuning.maxRowBytes, open);
      }
      const grown = new Uint8Array(Math.min(2 * (this.buffer.length - 1), this.tuning.maxRowBytes) + 1);
      grown.set(this.buffer.subarray(0, this.bufferEnd));
      this.buffer = grown;
    } else {
      this.buffer.copyWithin(0, this.position, this.bufferEnd);
    }
    this.bufferOffset += this.position;
    this.bufferEnd = rest;
    this.position = 0;
    await this.fill();
  }

  private summary(): ScanSummary {
    return { ...this.tally.summary(this.dictionary.labels, this.request.inspection.notes ?? []), endLine: this.line };
  }
}

