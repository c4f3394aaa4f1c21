/**
 * A checker for the part of JSON Schema draft-07 that `schemas/scatterwise.schema.json` uses, so
 * the CLI, the extension and the tests validate the project config against the very schema VS Code
 * shows the user (completion and squiggles come from the same file).
 *
 * Supported keywords: `type` (one name or a list), `enum`, `const`, `pattern`, `minLength`,
 * `minimum`, `maximum`, `exclusiveMinimum`, `items` (one schema), `minItems`, `uniqueItems`,
 * `properties`, `required`, `additionalProperties` (boolean or schema), `$ref` to
 * `#/definitions/NAME`; annotations (`title`, `description`, `markdownDescription`, `default`,
 * `examples`, `enumDescriptions`, `patternErrorMessage`, `$schema`, `$id`, `$comment`,
 * `definitions`) are read or ignored. A schema with any other keyword is refused with an Error, so
 * the schema cannot silently use something this checker does not enforce.
 */
import type { JsonPath } from './jsonText';
import { describePath } from './jsonText';

export interface JsonSchema {
  [keyword: string]: unknown;
}

export interface SchemaProblem {
  path: JsonPath;
  message: string;
}

const CHECKED = new Set([
  'type', 'enum', 'const', 'pattern', 'minLength', 'minimum', 'maximum', 'exclusiveMinimum', 'items', 'minItems',
  'uniqueItems', 'properties', 'required', 'additionalProperties', '$ref',
]);
const ANNOTATIONS = new Set([
  'title', 'description', 'markdownDescription', 'default', 'examples', 'enumDescriptions', 'patternErrorMessage',
  '$schema', '$id', '$comment', 'definitions',
]);

/** Throws when the schema (or a schema inside it) uses a keyword this checker does not know. */
export function assertSupportedSchema(schema: JsonSchema, where = '#'): void {
  for (const [keyword, value] of Object.entries(schema)) {
    if (!CHECKED.has(keyword) && !ANNOTATIONS.has(keyword)) throw new Error(`schema keyword '${keyword}' at ${where} is not supported by schemaCheck.ts`);
    if (keyword === 'properties' || keyword === 'definitions') {
      for (const [name, inner] of Object.entries(value as Record<string, JsonSchema>)) assertSupportedSchema(inner, `${where}/${keyword}/${name}`);
    } else if ((keyword === 'items' || keyword === 'additionalProperties') && typeof value === 'object' && value !== null) {
      assertSupportedSchema(value as JsonSchema, `${where}/${keyword}`);
    }
  }
}

function typeOf(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'array';
  if (typeof value === 'number') return Number.isInteger(value) ? 'integer' : 'number';
  return typeof value;
}

function matchesType(value: unknown, type: string): boolean {
  const actual = typeOf(value);
  return actual === type || (type === 'number' && actual === 'integer');
}

const ARTICLE: Record<string, string> = {
  string: 'a string', number: 'a number', integer: 'a whole number', boolean: 'true or false', object: 'an object', array: 'an array', null: 'null',
};

/** A value as a user would recognise it in their file, shortened. */
function shown(value: unknown): string {
  const text = JSON.stringify(value) ?? String(value);
  return text.length > 60 ? `${text.slice(0, 57)}…` : text;
}

/** Edit distance, for "did you mean …" on a misspelt key. */
function distance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diagonal = row[0]!;
    row[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const above = row[j]!;
      row[j] = Math.min(row[j]! + 1, row[j - 1]! + 1, diagonal + (a[i - 1]!.toLowerCase() === b[j - 1]!.toLowerCase() ? 0 : 1));
      diagonal = above;
    }
  }
  return row[b.length]!;
}

function closest(key: string, known: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Math.max(2, Math.floor(key.length / 3)) + 1;
  for (const candidate of known) {
    const d = distance(key, candidate);
    if (d < bestDistance) {
      best = candidate;
      bestDistance = d;
    }
  }
  return best;
}

function resolve(schema: JsonSchema, root: JsonSchema): JsonSchema {
  const ref = schema.$ref;
  if (typeof ref !== 'string') return schema;
  const match = /^#\/definitions\/([^/]+)$/.exec(ref);
  const definitions = root.definitions as Record<string, JsonSchema> | undefined;
  const target = match ? definitions?.[match[1]!] : undefined;
  if (!target) throw new Error(`schema reference '${ref}' does not resolve`);
  return resolve(target, root);
}

function check(value: unknown, schema: JsonSchema, root: JsonSchema, path: (string | number)[], problems: SchemaProblem[]): void {
  schema = resolve(schema, root);
  const report = (message: string, at: (string | number)[] = path): void => void problems.push({ path: at, message });

  if (schema.type !== undefined) {
    const types = Array.isArray(schema.type) ? (schema.type as string[]) : [schema.type as string];
    if (!types.some((t) => matchesType(value, t))) {
      report(`must be ${types.map((t) => ARTICLE[t] ?? t).join(' or ')} (got ${shown(value)})`);
      return;
    }
  }
  if (schema.const !== undefined && JSON.stringify(value) !== JSON.stringify(schema.const)) report(`must be ${shown(schema.const)} (got ${shown(value)})`);
  if (Array.isArray(schema.enum) && !schema.enum.some((allowed) => JSON.stringify(allowed) === JSON.stringify(value))) {
    report(`must be one of ${schema.enum.map(shown).join(', ')} (got ${shown(value)})`);
  }

  if (typeof value === 'string') {
    if (typeof schema.minLength === 'number' && [...value].length < schema.minLength) report(schema.minLength === 1 ? 'must not be empty' : `must have at least ${schema.minLength} characters`);
    if (typeof schema.pattern === 'string' && !new RegExp(schema.pattern, 'u').test(value)) {
      report(typeof schema.patternErrorMessage === 'string' ? `${schema.patternErrorMessage} (got ${shown(value)})` : `must match ${schema.pattern} (got ${shown(value)})`);
    }
  }
  if (typeof value === 'number') {
    if (typeof schema.minimum === 'number' && value < schema.minimum) report(`must be at least ${schema.minimum} (got ${value})`);
    if (typeof schema.exclusiveMinimum === 'number' && value <= schema.exclusiveMinimum) report(`must be greater than ${schema.exclusiveMinimum} (got ${value})`);
    if (typeof schema.maximum === 'number' && value > schema.maximum) report(`must be at most ${schema.maximum} (got ${value})`);
  }
  if (Array.isArray(value)) {
    if (typeof schema.minItems === 'number' && value.length < schema.minItems) report(schema.minItems === 1 ? 'must list at least one entry' : `must list at least ${schema.minItems} entries`);
    if (schema.uniqueItems === true) {
      const seen = new Map<string, number>();
      value.forEach((item, i) => {
        const key = JSON.stringify(item);
        const first = seen.get(key);
        if (first !== undefined) report(`repeats entry [${first}] (${shown(item)})`, [...path, i]);
        else seen.set(key, i);
      });
    }
    if (typeof schema.items === 'object' && schema.items !== null) value.forEach((item, i) => check(item, schema.items as JsonSchema, root, [...path, i], problems));
  }
  if (typeOf(value) === 'object') {
    const object = value as Record<string, unknown>;
    const properties = (schema.properties ?? {}) as Record<string, JsonSchema>;
    for (const key of (schema.required ?? []) as string[]) {
      if (!Object.prototype.hasOwnProperty.call(object, key)) report(`needs the key "${key}"`);
    }
    for (const [key, inner] of Object.entries(object)) {
      if (Object.prototype.hasOwnProperty.call(properties, key)) check(inner, properties[key]!, root, [...path, key], problems);
      else if (schema.additionalProperties === false) {
        const known = Object.keys(properties);
        const guess = closest(key, known);
        report(`is not a known key${guess ? ` (did you mean "${guess}"?)` : ''}; known keys here: ${known.join(', ')}`, [...path, key]);
      } else if (typeof schema.additionalProperties === 'object' && schema.additionalProperties !== null) {
        check(inner, schema.additionalProperties as JsonSchema, root, [...path, key], problems);
      }
    }
  }
}

/** Every way `value` breaks `schema`, in document order; empty when it conforms. */
export function checkAgainstSchema(value: unknown, schema: JsonSchema): SchemaProblem[] {
  const problems: SchemaProblem[] = [];
  check(value, schema, schema, [], problems);
  return problems;
}

/** `datasets[0].solver must be one of …`. */
export function describeProblem(problem: SchemaProblem): string {
  return problem.path.length === 0 ? `the file ${problem.message}` : `${describePath(problem.path)} ${problem.message}`;
}
