/**
 * Plain data (strings, finite numbers, booleans, null, arrays, records) written as a Python or R
 * expression, for the parameter block of a generated script. Strings go through quoting.ts; numbers
 * in the shortest form that reads back as the same double (ECMAScript Number::toString), which both
 * Python's float literal and R's parser accept.
 */
import { pythonString, rString } from './quoting';

export type PlainValue = string | number | boolean | null | PlainValue[] | { [key: string]: PlainValue };

function numberText(value: number): string {
  if (!Number.isFinite(value)) throw new RangeError(`Only finite numbers can be written into a script, got ${value}.`);
  return Object.is(value, -0) ? '0' : String(value);
}

/** A Python expression: str, int/float, True/False/None, list, dict (keys in the given order). */
export function pythonValue(value: PlainValue, indent = ''): string {
  if (value === null) return 'None';
  if (typeof value === 'boolean') return value ? 'True' : 'False';
  if (typeof value === 'number') return Number.isInteger(value) && Math.abs(value) < 2 ** 53 ? numberText(value) : floatText(value);
  if (typeof value === 'string') return pythonString(value);
  const inner = indent + '    ';
  if (Array.isArray(value)) {
    if (value.every((v) => typeof v !== 'object' || v === null)) return `[${value.map((v) => pythonValue(v)).join(', ')}]`;
    return `[\n${value.map((v) => inner + pythonValue(v, inner)).join(',\n')},\n${indent}]`;
  }
  const entries = Object.entries(value);
  if (entries.length === 0) return '{}';
  return `{\n${entries.map(([k, v]) => `${inner}${pythonString(k)}: ${pythonValue(v, inner)}`).join(',\n')},\n${indent}}`;
}

/** Python reads `1e-07` and `0.5` as floats but `3` as an int; figures that are doubles stay floats. */
function floatText(value: number): string {
  const text = numberText(value);
  return /[.eE]/.test(text) ? text : `${text}.0`;
}

/**
 * An R expression: character/numeric/logical vectors via c(), NULL, and list() for records and
 * for arrays of arrays (matrices are written as lists of rows and rebuilt by the script).
 */
export function rValue(value: PlainValue, indent = ''): string {
  if (value === null) return 'NULL';
  if (typeof value === 'boolean') return value ? 'TRUE' : 'FALSE';
  if (typeof value === 'number') return numberText(value);
  if (typeof value === 'string') return rString(value);
  const inner = indent + '  ';
  if (Array.isArray(value)) {
    if (value.length === 0) return 'list()';
    if (value.every((v) => typeof v === 'string')) return `c(${value.map((v) => rString(v as string)).join(', ')})`;
    if (value.every((v) => typeof v === 'number')) return `c(${value.map((v) => numberText(v as number)).join(', ')})`;
    return `list(\n${value.map((v) => inner + rValue(v, inner)).join(',\n')}\n${indent})`;
  }
  const entries = Object.entries(value);
  if (entries.length === 0) return 'list()';
  return `list(\n${entries.map(([k, v]) => `${inner}${rName(k)} = ${rValue(v, inner)}`).join(',\n')}\n${indent})`;
}

/** A list element name: bare when syntactic, else back-quoted (R Language Definition §10.3.2). */
function rName(name: string): string {
  if (/^[A-Za-z][A-Za-z0-9_.]*$/.test(name)) return name;
  return '`' + name.replaceAll('\\', '\\\\').replaceAll('`', '\\`') + '`';
}
