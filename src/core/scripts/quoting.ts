/**
 * Literals and identifiers for the generated scripts. Column names and labels come from data
 * files, so they may hold quotes, backslashes, newlines, non-Latin letters or text written to
 * look like code; every one of them reaches a script only through these functions, which escape
 * by the target language's own grammar:
 *
 * - Python 3 string literals (The Python Language Reference, §2.4.1 "String and Bytes literals").
 * - R string literals (R Language Definition, §10.3.1 "Constants"); control and non-ASCII
 *   characters are written as `\u{…}` / `\U{…}` escapes (R refuses to mix them with `\x` escapes
 *   in one literal) so the script means the same in any locale.
 * - SQL identifiers and string literals per dialect: doubled quote characters in PostgreSQL,
 *   DuckDB, SQLite and ANSI SQL (ISO/IEC 9075-2, §5.3 "<literal>", §5.4 "<delimited identifier>");
 *   Spark SQL uses backtick identifiers and backslash escapes inside string literals. Control
 *   characters inside literals are escaped too (line-based shells such as sqlite3 drop a carriage
 *   return before a line feed): `E'\r'` in PostgreSQL, `char(13)` / `chr(13)` concatenated in SQLite
 *   and DuckDB, `U&'\000D'` in ANSI SQL. Identifiers have no escape syntax in SQLite, DuckDB and
 *   Spark, so a control character in a column name stays raw there.
 *
 * Characters that are invisible or reorder text (control characters, bidirectional overrides,
 * line/paragraph separators, byte-order marks) are always escaped, so a script reads as it runs.
 */
import { DataError } from '../errors';

export const SQL_DIALECTS = ['postgres', 'duckdb', 'sqlite', 'spark', 'ansi'] as const;
export type SqlDialect = (typeof SQL_DIALECTS)[number];

/** Code points that must never appear raw in generated source text. */
function isInvisibleOrControl(code: number): boolean {
  return (
    code < 0x20 ||
    (code >= 0x7f && code <= 0x9f) ||
    code === 0x00ad ||
    (code >= 0x200b && code <= 0x200f) ||
    (code >= 0x2028 && code <= 0x202e) ||
    (code >= 0x2060 && code <= 0x206f) ||
    code === 0xfeff ||
    (code >= 0xfff9 && code <= 0xfffb) ||
    (code >= 0xd800 && code <= 0xdfff)
  );
}

const hex = (code: number, width: number): string => code.toString(16).padStart(width, '0');

/** A Python 3 `str` literal in single quotes, equal to `text` code point for code point. */
export function pythonString(text: string): string {
  let out = "'";
  for (let i = 0; i < text.length; i++) {
    const code = text.charCodeAt(i);
    // Keep a valid surrogate pair together as one astral character, written literally.
    if (code >= 0xd800 && code <= 0xdbff && i + 1 < text.length) {
      const next = text.charCodeAt(i + 1);
      if (next >= 0xdc00 && next <= 0xdfff) {
        out += text[i]! + text[i + 1]!;
        i++;
        continue;
      }
    }
    const ch = text[i]!;
    if (ch === '\\') out += '\\\\';
    else if (ch === "'") out += "\\'";
    else if (ch === '\n') out += '\\n';
    else if (ch === '\r') out += '\\r';
    else if (ch === '\t') out += '\\t';
    else if (isInvisibleOrControl(code)) out += code <= 0xff ? `\\x${hex(code, 2)}` : `\\u${hex(code, 4)}`;
    else out += ch;
  }
  return out + "'";
}

/**
 * An R string literal in double quotes. R strings cannot hold NUL or unpaired surrogates (neither
 * can come out of a UTF-8 file); such a name is a DataError naming it.
 */
export function rString(text: string): string {
  let out = '"';
  for (const ch of text) {
    const code = ch.codePointAt(0)!;
    if (ch === '\\') out += '\\\\';
    else if (ch === '"') out += '\\"';
    else if (ch === '\n') out += '\\n';
    else if (ch === '\r') out += '\\r';
    else if (ch === '\t') out += '\\t';
    else if (code === 0 || (code >= 0xd800 && code <= 0xdfff)) {
      throw new DataError('unrepresentable-name', `The name ${JSON.stringify(text)} holds a character R strings cannot hold (U+${hex(code, 4).toUpperCase()}).`, {}, 'Rename the column or label.');
    } else if (code < 0x20 || code >= 0x7f) out += code > 0xffff ? `\\U{${hex(code, 1)}}` : `\\u{${hex(code, 1)}}`;
    else out += ch;
  }
  return out + '"';
}

function rejectNul(text: string, what: string): void {
  if (text.includes('\u0000')) {
    throw new DataError('unrepresentable-name', `The ${what} ${JSON.stringify(text)} holds a NUL character, which SQL text cannot carry.`, {}, 'Rename the column.');
  }
}

/** A delimited (quoted) SQL identifier: the name exactly, case and all. */
export function sqlIdentifier(name: string, dialect: SqlDialect): string {
  rejectNul(name, 'column name');
  if (dialect === 'spark') return '`' + name.replaceAll('`', '``') + '`';
  return '"' + name.replaceAll('"', '""') + '"';
}

/**
 * A SQL character-string expression (a literal, or for control characters in SQLite and DuckDB a
 * parenthesised concatenation). PostgreSQL gets the escape form `E'…'` whenever the text holds a
 * backslash or a control character, so the meaning does not depend on `standard_conforming_strings`;
 * Spark SQL always reads backslash escapes inside literals, so it gets them.
 */
export function sqlString(text: string, dialect: SqlDialect): string {
  rejectNul(text, 'text');
  const isControl = (code: number) => code < 0x20 || code === 0x7f;
  const hasControl = /[\u0001-\u001f\u007f]/.test(text);
  if (dialect === 'spark' || (dialect === 'postgres' && (hasControl || text.includes('\\')))) {
    let body = '';
    for (const ch of text) {
      const code = ch.codePointAt(0)!;
      if (ch === '\\') body += '\\\\';
      else if (ch === "'") body += "\\'";
      else if (ch === '\n') body += '\\n';
      else if (ch === '\r') body += '\\r';
      else if (ch === '\t') body += '\\t';
      else if (isControl(code)) body += dialect === 'spark' ? `\\u${hex(code, 4)}` : `\\x${hex(code, 2)}`;
      else body += ch;
    }
    return dialect === 'spark' ? `'${body}'` : `E'${body}'`;
  }
  const plain = (part: string) => "'" + part.replaceAll("'", "''") + "'";
  if (!hasControl) return plain(text);
  if (dialect === 'ansi') {
    let body = '';
    for (const ch of text) {
      const code = ch.codePointAt(0)!;
      body += ch === '\\' ? '\\\\' : ch === "'" ? "''" : isControl(code) ? `\\${hex(code, 4).toUpperCase()}` : ch;
    }
    return `U&'${body}'`;
  }
  // SQLite and DuckDB: plain pieces and char(N) / chr(N) for each control character, concatenated.
  const pieces: string[] = [];
  let run = '';
  for (const ch of text) {
    const code = ch.codePointAt(0)!;
    if (!isControl(code)) {
      run += ch;
      continue;
    }
    if (run !== '') pieces.push(plain(run));
    run = '';
    pieces.push(`${dialect === 'sqlite' ? 'char' : 'chr'}(${code})`);
  }
  if (run !== '') pieces.push(plain(run));
  return `(${pieces.join(' || ')})`;
}

/**
 * Text safe inside a line comment of any of our languages: one line, no invisible characters
 * (anything else is shown as a JSON-style escape). Comments only describe; code never reads them.
 */
export function commentText(text: string): string {
  let out = '';
  for (const ch of text) {
    const code = ch.codePointAt(0)!;
    out += isInvisibleOrControl(code) ? `\\u${hex(code, 4)}` : ch;
  }
  return out;
}
