/**
 * A flat column chunk decoded page by page with hyparquet's own page decoders (its published
 * `hyparquet/src/*.js` modules), handing each page's values and definition levels to the caller.
 *
 * Why not hyparquet's column reader: it passes every value of a nullable column through its
 * nested-list assembly (assembleLists), which took about half the time of a Parquet scan here
 * (profiled on DuckDB output, whose columns are nullable); a flat column needs only its
 * definition levels to place the nulls. For the same reason the definition levels of an optional
 * column's v1 data page (PLAIN or dictionary values) are decoded here into a Uint8Array rather
 * than a JavaScript array (that was the next largest cost). Nested columns are left to hyparquet.
 */
import type { AsyncBuffer, Compressors, DecodedArray, FileMetaData } from 'hyparquet';
import { parquetHeader } from 'hyparquet/src/column.js';
import { convert, convertWithDictionary, DEFAULT_PARSERS } from 'hyparquet/src/convert.js';
import { decompressPage, readDataPage, readDataPageV2 } from 'hyparquet/src/datapage.js';
import { readRleBitPackedHybrid } from 'hyparquet/src/encoding.js';
import { readPlain } from 'hyparquet/src/plain.js';
import { getMaxDefinitionLevel, getSchemaPath, isFlatColumn } from 'hyparquet/src/schema.js';

export interface FlatPage {
  /** Row of the row group where the page starts. */
  firstRow: number;
  rows: number;
  /** Definition level per row, or empty when every row has a value. */
  definitionLevels: ArrayLike<number>;
  /** The definition level of a present value (a row with a lower one is null). */
  presentLevel: number;
  /** The present values, in row order (converted: decimals, dates, strings, dictionary entries). */
  values: DecodedArray;
}

type RowGroup = FileMetaData['row_groups'][number];

/**
 * Decodes column `column` of `group` page by page, stopping after the page that reaches `rowLimit`
 * rows. Returns false, having read nothing, when the column is not flat (nested or repeated), so
 * the caller can use hyparquet's reader instead.
 */
export async function readFlatColumnPages(
  file: AsyncBuffer,
  metadata: FileMetaData,
  group: RowGroup,
  column: string,
  compressors: Compressors,
  onPage: (page: FlatPage) => void,
  rowLimit = Infinity,
): Promise<boolean> {
  const chunk = group.columns.find((candidate) => candidate.meta_data?.path_in_schema.length === 1 && candidate.meta_data.path_in_schema[0] === column);
  const meta = chunk?.meta_data;
  if (chunk === undefined || meta === undefined || chunk.file_path !== undefined) return false;
  const schemaPath = getSchemaPath(metadata.schema, [column]);
  if (!isFlatColumn(schemaPath)) return false;
  const element = schemaPath[schemaPath.length - 1].element;
  const decoder = { pathInSchema: [column], type: meta.type, element, schemaPath, codec: meta.codec, parsers: DEFAULT_PARSERS, compressors, utf8: true };
  const presentLevel = getMaxDefinitionLevel(schemaPath);
  const start = Number(meta.dictionary_page_offset || meta.data_page_offset);
  const buffer = await file.slice(start, start + Number(meta.total_compressed_size));
  const reader = { view: new DataView(buffer), offset: 0 };
  const groupRows = Math.min(Number(group.num_rows), rowLimit);
  let dictionary: DecodedArray | undefined;
  let row = 0;
  while (reader.offset < buffer.byteLength - 1 && row < groupRows) {
    const header = parquetHeader(reader);
    const compressed = new Uint8Array(buffer, reader.offset, header.compressed_page_size);
    reader.offset += header.compressed_page_size;
    if (header.type === 'DICTIONARY_PAGE') {
      const page = decompressPage(compressed, Number(header.uncompressed_page_size), meta.codec, compressors);
      const pageReader = { view: new DataView(page.buffer, page.byteOffset, page.byteLength), offset: 0 };
      dictionary = convert(readPlain(pageReader, meta.type, header.dictionary_page_header?.num_values ?? 0, element.type_length), decoder);
    } else if (header.type === 'DATA_PAGE' && header.data_page_header) {
      const page = decompressPage(compressed, Number(header.uncompressed_page_size), meta.codec, compressors);
      const { definitionLevels, dataPage } = readFlatDataPage(page, header.data_page_header, decoder, presentLevel);
      const values = convertWithDictionary(dataPage, dictionary, header.data_page_header.encoding, decoder);
      const rows = header.data_page_header.num_values;
      onPage({ firstRow: row, rows, definitionLevels: definitionLevels ?? [], presentLevel, values });
      row += rows;
    } else if (header.type === 'DATA_PAGE_V2' && header.data_page_header_v2) {
      const { definitionLevels, dataPage } = readDataPageV2(compressed, header, decoder);
      const values = convertWithDictionary(dataPage, dictionary, header.data_page_header_v2.encoding, decoder);
      const rows = header.data_page_header_v2.num_rows;
      onPage({ firstRow: row, rows, definitionLevels: definitionLevels ?? [], presentLevel, values });
      row += rows;
    }
    // Index pages carry no values.
  }
  return true;
}

type Decoder = Parameters<typeof readDataPage>[2];
type DataPageHeader = Parameters<typeof readDataPage>[1];

/**
 * A v1 data page of a flat column: the common case of an optional (definition level 0 or 1)
 * column with PLAIN or dictionary-index values is decoded here; any other page by hyparquet.
 */
function readFlatDataPage(page: Uint8Array, header: DataPageHeader, decoder: Decoder, presentLevel: number): { definitionLevels: ArrayLike<number>; dataPage: DecodedArray } {
  const dictionaryIndexes = header.encoding === 'PLAIN_DICTIONARY' || header.encoding === 'RLE_DICTIONARY';
  const handled = presentLevel === 1 && header.definition_level_encoding === 'RLE' && decoder.type !== 'BOOLEAN' && (header.encoding === 'PLAIN' || dictionaryIndexes);
  if (!handled) {
    const { definitionLevels, dataPage } = readDataPage(page, header, decoder);
    return { definitionLevels: definitionLevels ?? [], dataPage };
  }
  const view = new DataView(page.buffer, page.byteOffset, page.byteLength);
  const reader = { view, offset: 0 };
  const levels = new Uint8Array(header.num_values);
  readRleBitPackedHybrid(reader, 1, levels);
  let present = 0;
  for (let i = 0; i < levels.length; i++) present += levels[i];
  let dataPage: DecodedArray;
  if (header.encoding === 'PLAIN') dataPage = readPlain(reader, decoder.type, present, decoder.element.type_length);
  else {
    // Indexes go into an untyped array, as hyparquet does: its dictionary lookup writes the
    // dictionary's values (strings, doubles) into this same array.
    const bitWidth = view.getUint8(reader.offset++);
    dataPage = bitWidth ? new Array<number>(present) : new Uint8Array(present);
    if (bitWidth) readRleBitPackedHybrid(reader, bitWidth, dataPage, view.byteLength - reader.offset);
  }
  return { definitionLevels: present === levels.length ? [] : levels, dataPage };
}
