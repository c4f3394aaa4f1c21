/**
 * The byte encodings shared by the WebAssembly modules we assemble in place (crossProductKernel.ts,
 * choleskyKernel.ts): LEB128 integers, sections, vectors and names, as the WebAssembly binary
 * format (an open W3C standard) defines them; and the part of the WebAssembly JavaScript API both
 * use to compile and instantiate them.
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

// Value types and the instructions both modules use (opcodes from the same specification).
export const I32 = 0x7f;
export const V128 = 0x7b;
export const get = (local: number): number[] => [0x20, local];
export const set = (local: number): number[] => [0x21, local];
export const i32 = (value: number): number[] => [0x41, ...signedLeb(value)];
export const add = [0x6a];
export const mul = [0x6c];
export const geS = [0x4e];
export const block = [0x02, 0x40];
export const loop = [0x03, 0x40];
export const end = [0x0b];
export const br = (depth: number): number[] => [0x0c, depth];
export const brIf = (depth: number): number[] => [0x0d, depth];
export const f64Load = (offset: number): number[] => [0x2b, 3, ...unsignedLeb(offset)];
export const f64Store = (offset: number): number[] => [0x39, 3, ...unsignedLeb(offset)];
export const f64Add = [0xa0];
export const v128Load = (offset: number): number[] => [0xfd, 0x00, 3, ...unsignedLeb(offset)];
export const v128Zero = [0xfd, 0x0c, ...new Array<number>(16).fill(0)];
export const f64x2Add = [0xfd, 0xf0, 0x01];
export const f64x2Mul = [0xfd, 0xf2, 0x01];
export const lane = (index: number): number[] => [0xfd, 0x21, index];
export const F64 = 0x7c;
export const f64Mul = [0xa2];
export const v128Store = (offset: number): number[] => [0xfd, 0x0b, 3, ...unsignedLeb(offset)];
export const f64x2Splat = [0xfd, 0x14];

/** A module: the magic number and version 1, then its sections (core specification, "Modules"). */
export const moduleOf = (...sections: number[][]): Uint8Array => Uint8Array.from([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, ...sections.flat()]);

// ---- the part of the WebAssembly JavaScript API the kernels use -------------------------------------
// (declared here by hand: the core's type-check has no DOM library)

export interface WasmModule {
  readonly compiled: unique symbol;
}

export interface WasmApi {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => WasmModule;
  Instance: new (module: WasmModule, imports: object) => { exports: Record<string, unknown> };
  Memory: new (descriptor: { initial: number; maximum?: number; shared?: boolean }) => { buffer: ArrayBuffer; grow(pages: number): number };
}

/** The engine's WebAssembly, where it has one. */
export const webAssembly = (): WasmApi | undefined => (globalThis as { WebAssembly?: WasmApi }).WebAssembly;

/** The module of these bytes, or null where WebAssembly or a feature the bytes use (SIMD, shared memory) is missing. */
export function compileModule(bytes: () => Uint8Array): WasmModule | null {
  const wasm = webAssembly();
  try {
    const code = bytes();
    return wasm && wasm.validate(code) ? new wasm.Module(code) : null;
  } catch {
    return null;
  }
}
