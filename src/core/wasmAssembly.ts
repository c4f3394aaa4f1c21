/**
 * The byte encodings shared by the WebAssembly modules we assemble in place (crossProductKernel.ts,
 * choleskyKernel.ts): LEB128 integers, sections, vectors and names, as the WebAssembly binary
 * format (an open W3C standard) defines them.
 */
export function unsignedLeb(value: number): number[] {
  const out: number[] = [];
  do {
    let byte = value & 0x7f;
    value >>>= 7;
    if (value !== 0) byte |= 0x80;
    out.push(byte);
  } while (value !== 0);
  return out;
}

export function signedLeb(value: number): number[] {
  const out: number[] = [];
  for (;;) {
    const byte = value & 0x7f;
    value >>= 7;
    if ((value === 0 && (byte & 0x40) === 0) || (value === -1 && (byte & 0x40) !== 0)) {
      out.push(byte);
      return out;
    }
    out.push(byte | 0x80);
  }
}

export const section = (id: number, body: number[]): number[] => [id, ...unsignedLeb(body.length), ...body];
export const vector = (items: number[][]): number[] => [...unsignedLeb(items.length), ...items.flat()];
export const utf8 = (text: string): number[] => [...unsignedLeb(text.length), ...Array.from(text, (c) => c.charCodeAt(0))];
