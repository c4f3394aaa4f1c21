/**
 * A flat column chunk read as a cursor: each `next(maxRows)` hands over the next rows as a piece
 * (definition levels, and values or dictionary indexes), so the scan can advance every column of a
 * row group in lockstep, a batch of rows at a time, whatever the size of the group or its pages.
 *
 * Bytes come from the ByteSource through a window of `readBytes`. A page up to `streamPageBytes`
 * (compressed) is read and decoded whole, with hyparquet's published decoders
 * (`hyparquet/src/*.js`); a larger one is decoded as it is read (parquetStream.ts) when it is a v1
 * data page, uncompressed or snappy, of a column with definition levels 0 or 1, holding PLAIN
 * numbers or dictionary indexes; else whole. A large dictionary page of plain numbers is decoded
 * into its array as far as the indexes read so far reach (GrowingDictionary), any other one whole:
 * every index may point anywhere in it. So memory per column is its dictionary plus about two
 * windows (three while a dictionary grows).
 *
 * Why not hyparquet's column reader: it passes every value of a nullable column through its
 * nested-list assembly (assembleLists), which took about half the time of a scan (DuckDB output,
 * whose columns are nullable), and it decodes a column chunk at once. Nested columns are left to it.
 */
import type { CompressionCodec, Compressors, DecodedArray, Encoding, FileMetaData, SchemaElement } from 'hyparquet';
import { parquetHeader } from 'hyparquet/src/column.js';
import { convert, convertWithDictionary, DEFAULT_PARSERS } from 'hyparquet/src/convert.js';
import { decompressPage, readDataPage, readDataPageV2 } from 'hyparquet/src/datapage.js';
import { readRleBitPackedHybrid } from 'hyparquet/src/encoding.js';
import { readPlain } from 'hyparquet/src/plain.js';
import { getMaxDefinitionLevel, getSchemaPath, isFlatColumn } from 'hyparquet/src/schema.js';
import type { ByteSource } from '../source';
import { HybridStream, PlainPageBytes, SnappyPageBytes, SourceWindow, StreamDamaged, StreamFallback, type PageBytes } from './parquetStream';

export interface CursorTuning {
  /** Bytes read from the source at a time, per column. */
  readBytes: number;
  /** A data page larger than this (compressed) is decoded as it is read, when it can be. */
  streamPageBytes: number;
  /** Snappy output kept for copies while streaming (default 64 KiB; tests set less to force the whole-page fallback). */
  snappyHistoryBytes?: number;
}

/** Rows handed over by `next`: arrays are read from their start offsets and may be reused by the next call. */
export interface ColumnPiece {
  rows: number;
  /** Definition level per row from levelStart, or null when every row of the piece has a value. */
  levels: ArrayLike<number> | null;
  levelStart: number;
  /** The definition level of a present value. */
  presentLevel: number;
  /** The present values in row order from valueStart (converted: decimals, dates, strings); null when `indexes` is set. */
  values: DecodedArray | null;
  /** Dictionary indexes of the present values from valueStart, into `dictionary`. */
  indexes: Int32Array | null;
  dictionary: DecodedArray | null;
  valueStart: number;
}

/** The typed arrays hyparquet decodes number columns into (INT64 aside: BigInt64Array, which needs converting). */
export type NumberArray = Float64Array | Float32Array | Int32Array | Uint32Array;

export const isNumberArray = (values: unknown): values is NumberArray =>
  values instanceof Float64Array || values instanceof Float32Array || values instanceof Int32Array || values instanceof Uint32Array;

/**
 * The fast path of storing a piece as doubles: when every row of the piece has a value and the values
 * (or the dictionary its indexes point into) are a number array, writes row i of the piece to
 * out[(at + i) · stride + offset] and returns true; otherwise writes nothing and returns false, and
 * the caller converts value by value (missing values, text, BigInt).
 */
export function copyNumbers(piece: ColumnPiece, out: Float64Array, at: number, stride: number, offset: number): boolean {
  const { indexes, valueStart, rows } = piece;
  const numbers = indexes ? piece.dictionary : piece.values;
  if (piece.levels || !isNumberArray(numbers)) return false;
  if (indexes) for (let i = 0; i < rows; i++) out[(at + i) * stride + offset] = numbers[indexes[valueStart + i]!]!;
  else for (let i = 0; i < rows; i++) out[(at + i) * stride + offset] = numbers[valueStart + i]!;
  return true;
}

/** Calls visit(row, value) for each row of a piece (null for a missing value), `first` being the row of its first. */
export function forEachValue(piece: ColumnPiece, first: number, visit: (row: number, value: unknown) => void): void {
  const { levels, levelStart, presentLevel, values, indexes, dictionary } = piece;
  let next = piece.valueStart;
  for (let i = 0; i < piece.rows; i++) {
    if (levels && levels[levelStart + i] !== presentLevel) {
      visit(first + i, null);
      continue;
    }
    visit(first + i, indexes ? dictionary![indexes[next]] : values![next]);
    next++;
  }
}

type RowGroup = FileMetaData['row_groups'][number];
type Decoder = Parameters<typeof readDataPage>[2];
type PageHeader = ReturnType<typeof parquetHeader>;

interface WholePage {
  rows: number;
  rowAt: number;
  valueAt: number;
  levels: ArrayLike<number> | null;
  values: DecodedArray | null;
  indexes: Int32Array | null;
}

interface StreamedPage {
  rows: number;
  rowAt: number;
  /** File offset of the page's (compressed) data and its header, to decode it whole after a StreamFallback. */
  dataOffset: number;
  header: PageHeader;
  bytes: PageBytes;
  levels: HybridStream | null;
  indexes: HybridStream | null;
}

/** Bytes of a growing dictionary decoded at a time (at least; GrowingDictionary). */
const DICTIONARY_PIECE = 64 * 1024;

/** Rows of a streamed page skipped at a time (bounds the levels and page bytes held for a skip). */
const SKIP_ROWS = 16_384;

const NUMBER_ARRAYS = { DOUBLE: Float64Array, FLOAT: Float32Array, INT32: Int32Array, INT64: BigInt64Array } as const;
type StreamedType = keyof typeof NUMBER_ARRAYS;

/** Signed integers and floats, which hyparquet's `convert` leaves as they are stored (not unsigned, dates, decimals, times). */
const SIGNED_INTEGERS = new Set([undefined, 'INT_8', 'INT_16', 'INT_32', 'INT_64']);
export function plainNumbers(element: SchemaElement): boolean {
  const logical = element.logical_type;
  return SIGNED_INTEGERS.has(element.converted_type) && (logical === undefined || (logical.type === 'INTEGER' && logical.isSigned));
}

/** Bytes over an array already in memory (the definition levels of a streamed page). */
class MemoryBytes implements PageBytes {
  position = 0;
  constructor(readonly bytes: Uint8Array) {}
  get end(): number {
    return this.bytes.length;
  }
  get left(): number {
    return this.bytes.length - this.position;
  }
  async ensure(n: number): Promise<void> {
    if (n > this.left) throw new StreamDamaged('definition levels run past their section');
  }
}

/**
 * The working memory of a column's cursors, handed from one row group's cursor to the next (a scan
 * of many row groups would otherwise allocate a read window and a decompression buffer for each
 * column of each group, all garbage a group later).
 */
export class ColumnBuffers {
  window: Uint8Array | null = null;
  snappy: Uint8Array | null = null;
  levels = new Uint8Array(0);
  indexes = new Int32Array(0);
  values: Float64Array | Float32Array | Int32Array | BigInt64Array | null = null;
  /** A page decoded whole: its definition levels and dictionary indexes (it is read to its end before the next page is decoded). */
  wholeLevels = new Uint8Array(0);
  wholeIndexes = new Int32Array(0);
  /**
   * A large number dictionary's memory, for a cursor whose dictionaries are not kept (a spill
   * decodes one column after another: each takes the memory of the one before, which no one reads
   * any more, rather than leaving it to the garbage collector).
   */
  dictionary: ArrayBuffer | null = null;
}

export class FlatColumnCursor {
  private window: SourceWindow;
  private dictionary: DecodedArray | null = null;
  /** The dictionary while it is decoded only in part (its values are `dictionary`). */
  private growing: GrowingDictionary | null = null;
  private whole: WholePage | null = null;
  private streamed: StreamedPage | null = null;
  private rowsDone = 0;
  private finished = false;

  private constructor(
    private readonly source: ByteSource,
    private readonly decoder: Decoder & { codec: CompressionCodec; compressors: Compressors },
    private readonly element: SchemaElement,
    readonly presentLevel: number,
    private readonly codec: CompressionCodec,
    private readonly compressors: Compressors,
    start: number,
    private readonly chunkEnd: number,
    readonly rows: number,
    private readonly tuning: CursorTuning,
    private readonly dictionaries: Map<number, KeptDictionary> | undefined,
    private readonly buffers: ColumnBuffers,
  ) {
    this.window = new SourceWindow(source, start, chunkEnd, tuning.readBytes, buffers.window);
    buffers.window = null;
  }

  /** A window over the chunk from `from` on, in the memory of the one before (whose bytes are no longer needed). */
  private moveWindow(from: number): void {
    this.window = new SourceWindow(this.source, from, this.chunkEnd, this.tuning.readBytes, this.window.buffer);
  }

  /** The chunk's rows are all read: its buffers go to the next cursor over the same column. */
  private release(): void {
    if (this.rowsDone < this.rows || this.finished) return;
    this.buffers.window = this.window.buffer;
  }

  /**
   * The caller reads no more rows (a provisional answer's limit, an inspection's sample, the end of
   * a share): the read window and a streamed page's decompression buffer go to the next cursor over
   * the column, as when the chunk ends. Without this, every pass of a first look over a large row
   * group took fresh memory for both, for every column (on this kind of machine, fresh pages cost
   * ~11 µs each to touch). Nothing may be read from the cursor after it.
   */
  finish(): void {
    if (this.finished) return;
    this.finished = true;
    this.buffers.window = this.window.buffer;
    if (this.streamed) this.keepSnappy(this.streamed.bytes);
    this.streamed = null;
    this.whole = null;
  }

  /** A streamed page's decompression buffer, kept for the next page. */
  private keepSnappy(bytes: PageBytes): void {
    if (bytes instanceof SnappyPageBytes) this.buffers.snappy = bytes.bytes;
  }

  /**
   * A cursor over column `column` of `group`, or null when the column is not flat (nested, repeated) or lives in another file.
   * `dictionaries`: decoded dictionary pages by file offset, kept by the caller to serve its next pass over the group.
   */
  static open(
    source: ByteSource,
    metadata: FileMetaData,
    group: RowGroup,
    column: string,
    compressors: Compressors,
    tuning: CursorTuning,
    dictionaries?: Map<number, KeptDictionary>,
    buffers: ColumnBuffers = new ColumnBuffers(),
  ): FlatColumnCursor | null {
    const chunk = group.columns.find((candidate) => candidate.meta_data?.path_in_schema.length === 1 && candidate.meta_data.path_in_schema[0] === column);
    const meta = chunk?.meta_data;
    if (chunk === undefined || meta === undefined || chunk.file_path !== undefined) return null;
    const schemaPath = getSchemaPath(metadata.schema, [column]);
    if (!isFlatColumn(schemaPath)) return null;
    const element = schemaPath[schemaPath.length - 1].element;
    const decoder = { pathInSchema: [column], type: meta.type, element, schemaPath, codec: meta.codec, parsers: DEFAULT_PARSERS, compressors, utf8: true };
    const start = Number(meta.dictionary_page_offset || meta.data_page_offset);
    const end = Math.min(source.size, start + Number(meta.total_compressed_size));
    return new FlatColumnCursor(source, decoder, element, getMaxDefinitionLevel(schemaPath), meta.codec, compressors, start, end, Number(group.num_rows), tuning, dictionaries, buffers);
  }

  /** The next rows, at most maxRows and at least one while rows remain (throws when the data ends early). */
  async next(maxRows: number): Promise<ColumnPiece> {
    while (this.whole === null && this.streamed === null) await this.readPage();
    const piece = this.whole ? this.nextWhole(this.whole, maxRows) : await this.nextStreamed(this.streamed!, maxRows);
    this.rowsDone += piece.rows;
    this.release();
    return piece;
  }

  private nextWhole(page: WholePage, maxRows: number): ColumnPiece {
    const rows = Math.min(maxRows, page.rows - page.rowAt);
    const piece: ColumnPiece = {
      rows,
      levels: page.levels,
      levelStart: page.rowAt,
      presentLevel: this.presentLevel,
      values: page.values,
      indexes: page.indexes,
      dictionary: page.indexes ? this.dictionary : null,
      valueStart: page.valueAt,
    };
    const present = page.levels ? countLevel(page.levels, page.rowAt, page.rowAt + rows, this.presentLevel) : rows;
    page.rowAt += rows;
    page.valueAt += present;
    if (page.rowAt >= page.rows) this.whole = null;
    return piece;
  }

  private async nextStreamed(page: StreamedPage, maxRows: number): Promise<ColumnPiece> {
    const rows = Math.min(maxRows, page.rows - page.rowAt);
    try {
      let present = rows;
      let levels: Uint8Array | null = null;
      if (page.levels) {
        if (this.buffers.levels.length < rows) this.buffers.levels = new Uint8Array(rows);
        levels = this.buffers.levels;
        await page.levels.read(rows, levels, 0);
        present = countPresent(levels, rows);
        if (present === rows) levels = null;
      }
      let values: ColumnPiece['values'] = null;
      let indexes: Int32Array | null = null;
      if (page.indexes) {
        if (this.buffers.indexes.length < present) this.buffers.indexes = new Int32Array(Math.max(present, 1024));
        indexes = this.buffers.indexes;
        await page.indexes.read(present, indexes, 0);
        const size = this.dictionary?.length ?? 0;
        const bound = indexBound(indexes, present);
        if (bound >= size) {
          const beyond = firstIndexBeyond(indexes, present, size);
          if (beyond >= 0) throw new StreamDamaged(`a dictionary index ${indexes[beyond]} beyond the ${size} entries`);
        }
        if (this.growing && bound >= this.growing.filled) {
          await this.growing.fillTo(Math.min(size, bound + 1));
          if (this.growing.complete) this.growing = null;
        }
      } else {
        const Type = NUMBER_ARRAYS[this.decoder.type as StreamedType];
        if (!(this.buffers.values instanceof Type) || this.buffers.values.length < present) this.buffers.values = new Type(Math.max(present, 1024));
        const width = Type.BYTES_PER_ELEMENT;
        await page.bytes.ensure(present * width);
        new Uint8Array(this.buffers.values.buffer, 0, present * width).set(page.bytes.bytes.subarray(page.bytes.position, page.bytes.position + present * width));
        page.bytes.position += present * width;
        values = this.buffers.values;
      }
      page.rowAt += rows;
      if (page.rowAt >= page.rows) this.finishStreamed(page);
      return { rows, levels, levelStart: 0, presentLevel: this.presentLevel, values, indexes, dictionary: indexes ? this.dictionary : null, valueStart: 0 };
    } catch (error) {
      if (!(error instanceof StreamFallback)) throw error;
      return this.nextWhole(await this.fallBack(page), maxRows);
    }
  }

  /** Decodes a streamed page whole from the file, positioned at the row the stream had reached. */
  private async fallBack(page: StreamedPage): Promise<WholePage> {
    const compressed = await readExactly(this.source, page.dataOffset, page.header.compressed_page_size);
    await this.completeDictionaryFor(page.header);
    const whole = this.decodeWhole(compressed, page.header);
    this.streamed = null;
    this.keepSnappy(page.bytes);
    this.moveWindow(page.dataOffset + page.header.compressed_page_size);
    this.whole = whole;
    if (page.rowAt > 0) this.nextWhole(whole, page.rowAt);
    return whole;
  }

  /**
   * Passes over the next `rows` rows, for a share of the row group that starts inside it: nothing is
   * converted or gathered, and bit-packed dictionary indexes are stepped over by their bytes (the
   * page is still decompressed up to the share's first row).
   */
  async skip(rows: number): Promise<void> {
    let left = rows;
    while (left > 0) {
      while (this.whole === null && this.streamed === null) await this.readPage();
      const done = this.whole ? this.nextWhole(this.whole, left).rows : await this.skipStreamed(this.streamed!, Math.min(left, SKIP_ROWS));
      this.rowsDone += done;
      left -= done;
    }
    this.release();
  }

  /** Skips up to maxRows rows of a streamed page; 0 when the page had to be decoded whole instead (then skipped as whole). */
  private async skipStreamed(page: StreamedPage, maxRows: number): Promise<number> {
    const rows = Math.min(maxRows, page.rows - page.rowAt);
    try {
      let present = rows;
      if (page.levels) {
        if (this.buffers.levels.length < rows) this.buffers.levels = new Uint8Array(rows);
        const levels = this.buffers.levels;
        await page.levels.read(rows, levels, 0);
        present = countPresent(levels, rows);
      }
      if (page.indexes) await page.indexes.skip(present);
      else {
        const width = NUMBER_ARRAYS[this.decoder.type as StreamedType].BYTES_PER_ELEMENT;
        await page.bytes.ensure(present * width);
        page.bytes.position += present * width;
      }
      page.rowAt += rows;
      if (page.rowAt >= page.rows) this.finishStreamed(page);
      return rows;
    } catch (error) {
      if (!(error instanceof StreamFallback)) throw error;
      await this.fallBack(page);
      return 0;
    }
  }

  private finishStreamed(page: StreamedPage): void {
    this.streamed = null;
    const pageEnd = page.dataOffset + page.header.compressed_page_size;
    this.keepSnappy(page.bytes);
    if (this.window.position !== pageEnd) this.moveWindow(pageEnd);
  }

  private async readHeader(): Promise<PageHeader> {
    const window = this.window;
    for (let want = 4096; ; want *= 4) {
      await window.ensure(want);
      const reader = { view: new DataView(window.buffer.buffer, window.buffer.byteOffset + window.start, window.available), offset: 0 };
      try {
        const header = parquetHeader(reader);
        window.skip(reader.offset);
        return header;
      } catch (error) {
        // A header cut off by the end of what is buffered: read more, unless there is no more.
        if (window.available >= window.remaining) throw error;
      }
    }
  }

  private async readPage(): Promise<void> {
    if (this.rowsDone >= this.rows) throw new StreamDamaged('read past the rows of the row group');
    if (this.window.remaining <= 0) throw new StreamDamaged(`the column chunk ends after ${this.rowsDone} of its ${this.rows} rows`);
    const header = await this.readHeader();
    const dataOffset = this.window.position;
    const size = header.compressed_page_size;
    if (header.type === 'DICTIONARY_PAGE') {
      // Decoded already by an earlier pass over this row group (or as far as it needed, still
      // growing): the same values, each entry written once.
      const known = this.dictionaries?.get(dataOffset) ?? this.growingDictionary(header, dataOffset);
      if (known) {
        this.window.discard(size);
        this.dictionaries?.set(dataOffset, known);
        if (known instanceof GrowingDictionary) {
          this.dictionary = known.values;
          this.growing = known.complete ? null : known;
        } else {
          this.dictionary = known;
        }
        return;
      }
      this.dictionary = decodeDictionary(await this.window.take(size), header, this.decoder);
      this.dictionaries?.set(dataOffset, this.dictionary);
      return;
    }
    if (header.type !== 'DATA_PAGE' && header.type !== 'DATA_PAGE_V2') {
      // Index pages carry no values.
      await this.window.take(size);
      return;
    }
    if (this.streamable(header, size)) {
      await this.openStreamed(header, dataOffset);
      return;
    }
    await this.completeDictionaryFor(header);
    this.whole = this.decodeWhole(await this.window.take(size), header);
  }

  /**
   * A large dictionary of plain numbers, decompressed into its array only as far as the indexes read
   * reach (GrowingDictionary). Null when it is read whole instead.
   */
  private growingDictionary(header: PageHeader, dataOffset: number): GrowingDictionary | null {
    const size = header.compressed_page_size;
    const count = header.dictionary_page_header?.num_values ?? 0;
    if (size <= this.tuning.streamPageBytes || (this.codec !== 'UNCOMPRESSED' && this.codec !== 'SNAPPY')) return null;
    if (!(this.decoder.type in NUMBER_ARRAYS) || !plainNumbers(this.element)) return null;
    const Type = NUMBER_ARRAYS[this.decoder.type as StreamedType];
    const length = count * Type.BYTES_PER_ELEMENT;
    if (header.uncompressed_page_size < length) throw new StreamDamaged(`a dictionary page of ${header.uncompressed_page_size} bytes for ${count} values`);
    let memory: ArrayBuffer | SharedArrayBuffer;
    if (this.dictionaries === undefined) {
      if (this.buffers.dictionary === null || this.buffers.dictionary.byteLength < length) this.buffers.dictionary = new ArrayBuffer(length);
      memory = this.buffers.dictionary;
    } else {
      // Kept for the next pass, and shared with the other threads where there is shared memory (shareParquetDictionaries).
      memory = typeof SharedArrayBuffer === 'undefined' ? new ArrayBuffer(length) : new SharedArrayBuffer(length);
    }
    return new GrowingDictionary(this.source, Type, count, memory, dataOffset, header, this.decoder, this.tuning);
  }

  /**
   * Decodes the rest of a growing dictionary before a data page of dictionary indexes is read whole
   * (any entry may be taken at once). A PLAIN page (a writer's fallback once the dictionary is full)
   * needs none of it.
   */
  private async completeDictionaryFor(header: PageHeader): Promise<void> {
    const growing = this.growing;
    const encoding = header.data_page_header?.encoding ?? header.data_page_header_v2?.encoding;
    if (!growing || (encoding !== 'PLAIN_DICTIONARY' && encoding !== 'RLE_DICTIONARY')) return;
    await growing.fillTo(growing.values.length);
    this.growing = null;
  }

  private takeSnappy(): Uint8Array | undefined {
    const kept = this.buffers.snappy ?? undefined;
    this.buffers.snappy = null;
    return kept;
  }

  private streamable(header: PageHeader, size: number): boolean {
    const data = header.data_page_header;
    if (size <= this.tuning.streamPageBytes || header.type !== 'DATA_PAGE' || !data) return false;
    if (this.codec !== 'UNCOMPRESSED' && this.codec !== 'SNAPPY') return false;
    if (this.presentLevel > 1 || (this.presentLevel === 1 && data.definition_level_encoding !== 'RLE')) return false;
    if (data.encoding === 'PLAIN_DICTIONARY' || data.encoding === 'RLE_DICTIONARY') return this.dictionary !== null;
    return data.encoding === 'PLAIN' && this.decoder.type in NUMBER_ARRAYS && plainNumbers(this.element);
  }

  private async openStreamed(header: PageHeader, dataOffset: number): Promise<void> {
    const data = header.data_page_header!;
    const size = header.compressed_page_size;
    try {
      const bytes: PageBytes = this.codec === 'SNAPPY' ? await SnappyPageBytes.open(this.window, size, header.uncompressed_page_size, this.tuning.snappyHistoryBytes, this.takeSnappy()) : new PlainPageBytes(this.window, size);
      let levels: HybridStream | null = null;
      if (this.presentLevel === 1) {
        await bytes.ensure(4);
        const at = bytes.position;
        const length = (bytes.bytes[at] | (bytes.bytes[at + 1] << 8) | (bytes.bytes[at + 2] << 16)) + bytes.bytes[at + 3] * 2 ** 24;
        bytes.position += 4;
        await bytes.ensure(length);
        const section = bytes.bytes.slice(bytes.position, bytes.position + length);
        bytes.position += length;
        levels = new HybridStream(new MemoryBytes(section), 1, length);
      }
      let indexes: HybridStream | null = null;
      if (data.encoding !== 'PLAIN') {
        await bytes.ensure(1);
        const width = bytes.bytes[bytes.position++];
        indexes = new HybridStream(bytes, width, bytes.left);
      }
      this.streamed = { rows: data.num_values, rowAt: 0, dataOffset, header, bytes, levels, indexes };
    } catch (error) {
      if (!(error instanceof StreamFallback)) throw error;
      this.moveWindow(dataOffset + size);
      await this.completeDictionaryFor(header);
      this.whole = this.decodeWhole(await readExactly(this.source, dataOffset, size), header);
    }
  }

  /** A data page decoded whole: the common flat v1 cases here, the rest by hyparquet. */
  private decodeWhole(compressed: Uint8Array, header: PageHeader): WholePage {
    const decoder = this.decoder;
    if (header.type === 'DATA_PAGE_V2' && header.data_page_header_v2) {
      const { definitionLevels, dataPage } = readDataPageV2(compressed, header, decoder);
      const values = this.withDictionary(dataPage, header.data_page_header_v2.encoding);
      return this.wholePage(header.data_page_header_v2.num_rows, definitionLevels, values, null);
    }
    const data = header.data_page_header;
    if (!data) throw new StreamDamaged('a data page without its header');
    const page = decompressPage(compressed, Number(header.uncompressed_page_size), this.codec, this.compressors);
    const dictionaryIndexes = data.encoding === 'PLAIN_DICTIONARY' || data.encoding === 'RLE_DICTIONARY';
    const handled = this.presentLevel <= 1 && (this.presentLevel === 0 || data.definition_level_encoding === 'RLE') && decoder.type !== 'BOOLEAN' && (data.encoding === 'PLAIN' || (dictionaryIndexes && this.dictionary !== null));
    if (!handled) {
      const { definitionLevels, dataPage } = readDataPage(page, data, decoder);
      return this.wholePage(data.num_values, definitionLevels, this.withDictionary(dataPage, data.encoding), null);
    }
    const view = new DataView(page.buffer, page.byteOffset, page.byteLength);
    const reader = { view, offset: 0 };
    let levels: Uint8Array | null = null;
    let present = data.num_values;
    if (this.presentLevel === 1) {
      if (this.buffers.wholeLevels.length < data.num_values) this.buffers.wholeLevels = new Uint8Array(data.num_values);
      levels = this.buffers.wholeLevels.subarray(0, data.num_values);
      readRleBitPackedHybrid(reader, 1, levels);
      present = countPresent(levels, levels.length);
      if (present === levels.length) levels = null;
    }
    if (data.encoding === 'PLAIN') return { rows: data.num_values, rowAt: 0, valueAt: 0, levels, values: convert(readPlain(reader, decoder.type, present, this.element.type_length), decoder), indexes: null };
    const width = view.getUint8(reader.offset++);
    if (this.buffers.wholeIndexes.length < present) this.buffers.wholeIndexes = new Int32Array(present);
    const indexes = this.buffers.wholeIndexes.subarray(0, present);
    if (width) readRleBitPackedHybrid(reader, width, indexes, view.byteLength - reader.offset);
    else indexes.fill(0);
    const size = this.dictionary?.length ?? 0;
    const beyond = firstIndexBeyond(indexes, present, size);
    if (beyond >= 0) throw new StreamDamaged(`a dictionary index ${indexes[beyond]} beyond the ${size} entries`);
    return { rows: data.num_values, rowAt: 0, valueAt: 0, levels, values: null, indexes };
  }

  /** A page's values through hyparquet, its dictionary indexes checked first (hyparquet maps an index past the end to undefined). */
  private withDictionary(dataPage: DecodedArray, encoding: Encoding): DecodedArray {
    const dictionary = this.dictionary ?? undefined;
    if (dictionary && encoding.endsWith('_DICTIONARY')) {
      const beyond = firstIndexBeyond(dataPage as ArrayLike<number>, dataPage.length, dictionary.length);
      if (beyond >= 0) throw new StreamDamaged(`a dictionary index ${String(dataPage[beyond])} beyond the ${dictionary.length} entries`);
    }
    return convertWithDictionary(dataPage, dictionary, encoding, this.decoder);
  }

  private wholePage(rows: number, definitionLevels: ArrayLike<number> | undefined, values: DecodedArray, indexes: Int32Array | null): WholePage {
    const levels = definitionLevels && definitionLevels.length > 0 ? definitionLevels : null;
    return { rows, rowAt: 0, valueAt: 0, levels, values, indexes };
  }
}

// The loops over a page's levels and indexes are functions of their own: inline, V8 optimised
// decodeWhole inside its first long loop, before the lines after the loop had run, and the
// optimised code then deoptimized at the end of every page (23 times a fit); nextStreamed was
// compiled 9 times a fit.

/** Levels equal to `level` in [from, to). */
function countLevel(levels: ArrayLike<number>, from: number, to: number, level: number): number {
  let count = 0;
  for (let i = from; i < to; i++) if (levels[i] === level) count++;
  return count;
}

/** Values present (definition level 1) among the first `count` levels. */
function countPresent(levels: Uint8Array, count: number): number {
  let present = 0;
  for (let i = 0; i < count; i++) present += levels[i]!;
  return present;
}

/** The first `count` indexes or'ed: at least the largest (at most twice it), without a branch per index. */
function indexBound(indexes: Int32Array, count: number): number {
  let bound = 0;
  for (let i = 0; i < count; i++) bound |= indexes[i]!;
  return bound;
}

/** The first of the first `count` dictionary indexes not below `size`, or -1. */
function firstIndexBeyond(indexes: ArrayLike<number>, count: number, size: number): number {
  for (let i = 0; i < count; i++) if (indexes[i]! >= size) return i;
  return -1;
}

/** A decoded dictionary page as a scan keeps it for its next pass over the row group. */
export type KeptDictionary = DecodedArray | GrowingDictionary;

type NumberArrayType = (typeof NUMBER_ARRAYS)[StreamedType];

/** A dictionary page decoded whole from its compressed bytes. */
function decodeDictionary(compressed: Uint8Array, header: PageHeader, decoder: Decoder & { codec: CompressionCodec; compressors: Compressors }): DecodedArray {
  const page = decompressPage(compressed, Number(header.uncompressed_page_size), decoder.codec, decoder.compressors);
  const reader = { view: new DataView(page.buffer, page.byteOffset, page.byteLength), offset: 0 };
  return convert(readPlain(reader, decoder.type, header.dictionary_page_header?.num_values ?? 0, decoder.element.type_length), decoder);
}

/**
 * A large dictionary of plain numbers, decompressed straight into its array (no compressed or
 * decompressed page copy beside it; when kept, in shared memory where there is one, so that the
 * threads that read the same row group hold it once: shareParquetDictionaries) and only as far as the indexes
 * read so far reach. Writers number the entries in order of first appearance (DuckDB, Arrow,
 * parquet-mr), so the first rows of a row group take only its first entries: a first look at a file
 * of one large row group used to decode every dictionary first (the 1 GB benchmark table's: ~130 MB,
 * most of its first look's 1.3 s). A pass over the whole group fills it as it goes, once; the array
 * has its full length from the start (memory not yet written costs nothing).
 */
export class GrowingDictionary {
  readonly values: DecodedArray;
  /** Entries decoded, from the first. */
  filled = 0;
  private readonly target: Uint8Array;
  /** Bytes per entry. */
  private readonly width: number;
  private bytes: PageBytes | null = null;
  private growing: Promise<void> = Promise.resolve();

  constructor(
    private readonly source: ByteSource,
    Type: NumberArrayType,
    count: number,
    memory: ArrayBuffer | SharedArrayBuffer,
    private readonly dataOffset: number,
    private readonly header: PageHeader,
    private readonly decoder: Decoder & { codec: CompressionCodec; compressors: Compressors },
    private readonly tuning: CursorTuning,
  ) {
    this.width = Type.BYTES_PER_ELEMENT;
    this.values = new Type(memory as ArrayBuffer, 0, count) as DecodedArray;
    this.target = new Uint8Array(memory, 0, count * this.width);
  }

  get complete(): boolean {
    return this.filled >= this.values.length;
  }

  /** Decodes the entries before `entries` (and a piece more, as later indexes tend to follow). One fill at a time. */
  fillTo(entries: number): Promise<void> {
    if (entries <= this.filled) return this.growing;
    this.growing = this.growing.then(() => this.grow(entries));
    return this.growing;
  }

  private async grow(entries: number): Promise<void> {
    const total = this.values.length;
    if (entries <= this.filled) return;
    const width = this.width;
    const piece = Math.max(1, Math.floor(DICTIONARY_PIECE / width));
    const want = Math.min(total, Math.max(entries, this.filled + piece));
    try {
      if (!this.bytes) {
        const size = this.header.compressed_page_size;
        const window = new SourceWindow(this.source, this.dataOffset, this.dataOffset + size, this.tuning.readBytes);
        this.bytes = this.decoder.codec === 'SNAPPY' ? await SnappyPageBytes.open(window, size, this.header.uncompressed_page_size, this.tuning.snappyHistoryBytes) : new PlainPageBytes(window, size);
      }
      const bytes = this.bytes;
      while (this.filled < want) {
        const n = Math.min(piece, want - this.filled);
        await bytes.ensure(n * width);
        this.target.set(bytes.bytes.subarray(bytes.position, bytes.position + n * width), this.filled * width);
        bytes.position += n * width;
        this.filled += n;
      }
    } catch (error) {
      if (!(error instanceof StreamFallback)) throw error;
      // Decoded whole (a snappy copy reaching back beyond the history kept): plain numbers, the same array type.
      const whole = decodeDictionary(await readExactly(this.source, this.dataOffset, this.header.compressed_page_size), this.header, this.decoder);
      (this.values as Float64Array).set(whole as Float64Array);
      this.filled = total;
    }
    // Decoded to the end: the page stream's window and buffers go.
    if (this.filled >= total) this.bytes = null;
  }
}

async function readExactly(source: ByteSource, offset: number, length: number): Promise<Uint8Array> {
  const copy = new Uint8Array(length);
  let filled = 0;
  while (filled < length) {
    const chunk = await source.read(offset + filled, length - filled);
    if (chunk.length === 0) throw new StreamDamaged(`the file ends at byte ${offset + filled}, inside a page`);
    const take = Math.min(chunk.length, length - filled);
    copy.set(chunk.subarray(0, take), filled);
    filled += take;
  }
  return copy;
}
