/**
 * `JSON.stringify(value, null, 2)` in pieces, byte for byte the same text, so that a report with a
 * large plot sample is written out without first building one string of tens of megabytes (the
 * command line's peak memory on a 1 GB file stays under its bound). Arrays longer than
 * `PIECE_ITEMS` are walked item by item; everything smaller goes to JSON.stringify whole and is
 * re-indented for its depth (a newline can occur only between tokens: inside strings it is escaped).
 */
const PIECE_ITEMS = 256;
const INDENT = '  ';

export function* jsonPieces(value: unknown, depth = 0): Generator<string> {
  const json = (value as { toJSON?: unknown } | null)?.toJSON;
  if (typeof json === 'function') value = (json as (key: string) => unknown).call(value, '');
  if (Array.isArray(value) && value.length > 0 && (value.length > PIECE_ITEMS || hasLargeArray(value, 0))) {
    const inner = INDENT.repeat(depth + 1);
    yield '[';
    for (let i = 0; i < value.length; i++) {
      yield `${i === 0 ? '' : ','}\n${inner}`;
      const item: unknown = value[i];
      // As JSON.stringify: an item it cannot represent (undefined, a function, a symbol) is null.
      if (item === undefined || typeof item === 'function' || typeof item === 'symbol') yield 'null';
      else yield* jsonPieces(item, depth + 1);
    }
    yield `\n${INDENT.repeat(depth)}]`;
    return;
  }
  if (value !== null && typeof value === 'object' && !Array.isArray(value) && hasLargeArray(value, 0)) {
    const inner = INDENT.repeat(depth + 1);
    let first = true;
    yield '{';
    for (const key of Object.keys(value)) {
      const item = (value as Record<string, unknown>)[key];
      if (item === undefined || typeof item === 'function' || typeof item === 'symbol') continue;
      yield `${first ? '' : ','}\n${inner}${JSON.stringify(key)}: `;
      first = false;
      yield* jsonPieces(item, depth + 1);
    }
    yield first ? '}' : `\n${INDENT.repeat(depth)}}`;
    return;
  }
  const text = JSON.stringify(value, null, 2);
  yield depth === 0 ? text : text.replace(/\n/g, `\n${INDENT.repeat(depth)}`);
}

/** Whether a large array sits anywhere below `value` (plain objects and arrays, a few levels deep). */
function hasLargeArray(value: object, level: number): boolean {
  if (level > 4) return false;
  for (const item of Object.values(value)) {
    if (Array.isArray(item)) {
      if (item.length > PIECE_ITEMS) return true;
      if (item.some((element) => element !== null && typeof element === 'object' && !ArrayBuffer.isView(element) && hasLargeArray(element as object, level + 1))) return true;
    } else if (item !== null && typeof item === 'object' && !ArrayBuffer.isView(item) && hasLargeArray(item, level + 1)) return true;
  }
  return false;
}
