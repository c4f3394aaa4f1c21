/**
 * The top-level columns of a Parquet file and what kind each is: numeric (BOOLEAN, INT32, INT64,
 * FLOAT, DOUBLE, DECIMAL, FLOAT16), text (strings, binary, dates and times), or nested (groups,
 * lists, maps — ignored with a note).
 */
import type { FileMetaData, SchemaElement } from 'hyparquet';
import { parquetSchema } from 'hyparquet';
import type { ColumnKind } from './types';

export interface ParquetColumn {
  name: string;
  index: number;
  kind: ColumnKind;
  /** INT64 / UINT_64 columns, whose values may not fit a double exactly. */
  int64: boolean;
  /** Digits of a DECIMAL column (0 for other columns); above 15 a double may not hold every value exactly. */
  decimalDigits: number;
}

const TIME_CONVERTED = new Set(['DATE', 'TIME_MILLIS', 'TIME_MICROS', 'TIMESTAMP_MILLIS', 'TIMESTAMP_MICROS', 'INTERVAL']);
const TIME_LOGICAL = new Set(['DATE', 'TIME', 'TIMESTAMP', 'INTERVAL']);

export function parquetColumns(metadata: FileMetaData): ParquetColumn[] {
  return parquetSchema(metadata).children.map((child, index) => {
    const element = child.element;
    const nested = child.children.length > 0 || element.repetition_type === 'REPEATED';
    return {
      name: element.name,
      index,
      kind: nested ? 'nested' : kindOf(element),
      int64: !nested && element.type === 'INT64' && !isDecimal(element),
      decimalDigits: !nested && isDecimal(element) ? (element.precision ?? (element.logical_type?.type === 'DECIMAL' ? element.logical_type.precision : 0)) : 0,
    };
  });
}

function isDecimal(element: SchemaElement): boolean {
  return element.converted_type === 'DECIMAL' || element.logical_type?.type === 'DECIMAL';
}

function kindOf(element: SchemaElement): ColumnKind {
  if (isDecimal(element) || element.logical_type?.type === 'FLOAT16') return 'numeric';
  if ((element.converted_type && TIME_CONVERTED.has(element.converted_type)) || (element.logical_type && TIME_LOGICAL.has(element.logical_type.type))) return 'text';
  switch (element.type) {
    case 'BOOLEAN':
    case 'INT32':
    case 'INT64':
    case 'FLOAT':
    case 'DOUBLE':
      return 'numeric';
    default:
      return 'text'; // BYTE_ARRAY, FIXED_LEN_BYTE_ARRAY, INT96 (timestamps)
  }
}
