/**
 * JSON text read with the position of every value, so a problem in a config file can be reported
 * at its line and column ("scatterwise.config.json, line 7, column 16: datasets[0].solver …").
 * Strict JSON (RFC 8259): no comments, no trailing commas; a syntax error is a DataError naming
 * the file, line and column. The values equal what `JSON.parse` returns for the same text.
 */
import { DataError } from '../errors';

/** A key path into a JSON value: property names and array indices. */
export type JsonPath = readonly (string | number)[];

export interface TextPosition {
  /** 1-based. */
  line: number;
  /** 1-based, in UTF-16 code units. */
  column: number;
}

export interface PositionedJson {
  value: unknown;
  /** Position of each value by `pathKey(path)`: for an object property, where its key starts. */
  positions: Map<string, TextPosition>;
}

/** The map key of a path (`datasets\u00000\u0000solver`); not for display. */
export function pathKey(path: JsonPath): string {
  return path.map(String).join('\u0000');
}

/** A path for people: `datasets[0].solver`, `gates["min accuracy"]`, `(the whole file)` for the root. */
export function describePath(path: JsonPath): string {
  if (path.length === 0) return '(the whole file)';
  let text = '';
  for (const part of path) {
    if (typeof part === 'number') text += `[${part}]`;
    else if (/^[A-Za-z_$][\w$]*$/.test(part)) text += text === '' ? part : `.${part}`;
    else text += `[${JSON.stringify(part)}]`;
  }
  return text;
}

const ESCAPES: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };

class Reader {
  private at = 0;
  readonly positions = new Map<string, TextPosition>();

  constructor(
    private readonly text: string,
    private readonly fileName: string,
  ) {
    for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) this.lineStarts.push(i + 1);
  }

  /** Offsets where each line starts, for turning an offset into a line and column. */
  private readonly lineStarts: number[] = [0];

  position(offset: number): TextPosition {
    let low = 0;
    let high = this.lineStarts.length - 1;
    while (low < high) {
      const middle = (low + high + 1) >> 1;
      if (this.lineStarts[middle]! <= offset) low = middle;
      else high = middle - 1;
    }
    return { line: low + 1, column: offset - this.lineStarts[low]! + 1 };
  }

  fail(message: string, offset = this.at): never {
    const { line, column } = this.position(offset);
    throw new DataError('config-syntax', `${this.fileName}, line ${line}, column ${column}: ${message}.`, { file: this.fileName, line }, 'Fix the JSON at that place (strict JSON: no comments, no trailing commas).');
  }

  private skipSpace(): void {
    while (this.at < this.text.length) {
      const c = this.text.charCodeAt(this.at);
      if (c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d) this.at++;
      else break;
    }
  }

  private describeHere(): string {
    if (this.at >= this.text.length) return 'the end of the file';
    return `'${this.text[this.at]}'`;
  }

  document(): unknown {
    // A byte order mark is not JSON, but editors write one; accept it at the very start.
    if (this.text.charCodeAt(0) === 0xfeff) this.at = 1;
    const value = this.value([], this.at);
    this.skipSpace();
    if (this.at < this.text.length) this.fail(`unexpected ${this.describeHere()} after the end of the JSON value`);
    return value;
  }

  private value(path: (string | number)[], recordAt: number): unknown {
    this.skipSpace();
    this.positions.set(pathKey(path), this.position(path.length > 0 && typeof path[path.length - 1] === 'string' ? recordAt : this.at));
    const c = this.text[this.at];
    if (c === '{') return this.object(path);
    if (c === '[') return this.array(path);
    if (c === '"') return this.string();
    if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) return this.number();
    for (const [word, literal] of [['true', true], ['false', false], ['null', null]] as const) {
      if (this.text.startsWith(word, this.at)) {
        this.at += word.length;
        return literal;
      }
    }
    return this.fail(`expected a value but found ${this.describeHere()}`);
  }

  private object(path: (string | number)[]): Record<string, unknown> {
    const result: Record<string, unknown> = {};
    const seen = new Set<string>();
    this.at++;
    this.skipSpace();
    if (this.text[this.at] === '}') {
      this.at++;
      return result;
    }
    for (;;) {
      this.skipSpace();
      if (this.text[this.at] !== '"') this.fail(`expected a key in double quotes but found ${this.describeHere()}`);
      const keyAt = this.at;
      const key = this.string();
      if (seen.has(key)) this.fail(`the key "${key}" appears twice in this object`, keyAt);
      seen.add(key);
      this.skipSpace();
      if (this.text[this.at] !== ':') this.fail(`expected ':' after the key "${key}" but found ${this.describeHere()}`);
      this.at++;
      // Like JSON.parse: an own property even for "__proto__".
      Object.defineProperty(result, key, { value: this.value([...path, key], keyAt), enumerable: true, writable: true, configurable: true });
      this.skipSpace();
      const next = this.text[this.at];
      this.at++;
      if (next === '}') return result;
      if (next !== ',') this.fail(`expected ',' or '}' but found ${next === undefined ? 'the end of the file' : `'${next}'`}`, this.at - 1);
    }
  }

  private array(path: (string | number)[]): unknown[] {
    const result: unknown[] = [];
    this.at++;
    this.skipSpace();
    if (this.text[this.at] === ']') {
      this.at++;
      return result;
    }
    for (;;) {
      result.push(this.value([...path, result.length], this.at));
      this.skipSpace();
      const next = this.text[this.at];
      this.at++;
      if (next === ']') return result;
      if (next !== ',') this.fail(`expected ',' or ']' but found ${next === undefined ? 'the end of the file' : `'${next}'`}`, this.at - 1);
    }
  }

  private string(): string {
    const start = this.at;
    this.at++;
    let out = '';
    for (;;) {
      if (this.at >= this.text.length) this.fail('a string is not closed', start);
      const c = this.text[this.at]!;
      const code = c.charCodeAt(0);
      if (c === '"') {
        this.at++;
        return out;
      }
      if (code < 0x20) this.fail('a control character (such as a line break) inside a string; write it as an escape like \\n');
      if (c !== '\\') {
        out += c;
        this.at++;
        continue;
      }
      const escape = this.text[this.at + 1];
      if (escape === 'u') {
        const hex = this.text.slice(this.at + 2, this.at + 6);
        if (!/^[0-9a-fA-F]{4}$/.test(hex)) this.fail('\\u must be followed by four hexadecimal digits');
        out += String.fromCharCode(parseInt(hex, 16));
        this.at += 6;
      } else if (escape !== undefined && escape in ESCAPES) {
        out += ESCAPES[escape];
        this.at += 2;
      } else this.fail(`unknown escape '\\${escape ?? ''}' in a string`);
    }
  }

  private number(): number {
    const match = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/.exec(this.text.slice(this.at, this.at + 400));
    if (!match) this.fail('a number is malformed');
    this.at += match[0].length;
    const next = this.text[this.at];
    if (next !== undefined && /[\w.+-]/.test(next)) this.fail('a number is malformed');
    return Number(match[0]);
  }
}

/** Parses JSON text, recording where each value is; syntax errors are DataErrors at their line and column. */
export function parseJsonWithPositions(text: string, fileName: string): PositionedJson {
  const reader = new Reader(text, fileName);
  const value = reader.document();
  return { value, positions: reader.positions };
}
