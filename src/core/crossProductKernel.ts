/**
 * The blocked rank-k update at the heart of the moments, S += Yᵀ Y over a block of rows, in
 * WebAssembly with 128-bit SIMD where the engine has it (Node ≥ 16, current browsers), else in
 * plain JavaScript (linalg.crossProductUpdate). Same shapes and layout either way:
 *
 *   S  d × d, row-major; only the upper triangle (j ≥ i) is updated and meaningful
 *   Y  the block transposed, d × stride: entry (i, t) at i·stride + t, the first `rows` columns used
 *
 * Each kernel owns its memory and hands out Float64Array views of it (`scatter`, `block`), which
 * the caller fills and reads in place: nothing is copied per update. The WebAssembly function
 * computes two rows × four columns of S at a time, with eight two-lane accumulators running over
 * the block two rows at a time (S[i][j] = Σ_t Y[i][t]·Y[j][t]: Y's rows are contiguous in t), so
 * every pair of loads feeds eight multiply-adds. The module (a few hundred bytes) is assembled
 * below, instruction by instruction, from the WebAssembly binary format (core specification,
 * "Binary Format"; SIMD opcodes from the fixed-width SIMD proposal, merged in WebAssembly 2.0).
 */
import { crossProductUpdate } from './linalg';

export interface CrossProductKernel {
  /** d × d; S += Yᵀ Y accumulates in the upper triangle. */
  readonly scatter: Float64Array;
  /** d × stride, the block transposed. */
  readonly block: Float64Array;
  readonly stride: number;
  /** S += Yᵀ Y over the first `rows` columns of the block (rows ≤ stride − 1). */
  update(rows: number): void;
}

// ---- a small assembler for the one function --------------------------------------------------

function unsignedLeb(value: number): number[] {
  const out: number[] = [];
  do {
    let byte = value & 0x7f;
    value >>>= 7;
    if (value !== 0) byte |= 0x80;
    out.push(byte);
  } while (value !== 0);
  return out;
}

function signedLeb(value: number): number[] {
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

const section = (id: number, body: number[]): number[] => [id, ...unsignedLeb(body.length), ...body];
const vector = (items: number[][]): number[] => [...unsignedLeb(items.length), ...items.flat()];
const utf8 = (text: string): number[] => [...unsignedLeb(text.length), ...Array.from(text, (c) => c.charCodeAt(0))];

const I32 = 0x7f;
const V128 = 0x7b;
const get = (local: number): number[] => [0x20, local];
const set = (local: number): number[] => [0x21, local];
const i32 = (value: number): number[] => [0x41, ...signedLeb(value)];
const add = [0x6a];
const mul = [0x6c];
const geS = [0x4e];
const gtS = [0x4a];
const ne = [0x47];
const block = [0x02, 0x40];
const loop = [0x03, 0x40];
const when = [0x04, 0x40];
const end = [0x0b];
const br = (depth: number): number[] => [0x0c, depth];
const brIf = (depth: number): number[] => [0x0d, depth];
const f64Load = (offset: number): number[] => [0x2b, 3, ...unsignedLeb(offset)];
const f64Store = (offset: number): number[] => [0x39, 3, ...unsignedLeb(offset)];
const f64Add = [0xa0];
const v128Load = (offset: number): number[] => [0xfd, 0x00, 3, ...unsignedLeb(offset)];
const v128Zero = [0xfd, 0x0c, ...new Array<number>(16).fill(0)];
const f64x2Add = [0xfd, 0xf0, 0x01];
const f64x2Mul = [0xfd, 0xf2, 0x01];
const lane = (index: number): number[] => [0xfd, 0x21, index];

// Parameters: S byte offset, d, Y byte offset, stride in bytes, rows (even).
const [S, D, Y, STRIDE, ROWS] = [0, 1, 2, 3, 4];
// Locals: i32 i, j, t, tEnd, pi0, pj, ti, tj, s0, s1; v128 accumulators a[r][c], x0, x1, b.
const [I, J, T, T_END, PI0, PJ, TI, TJ, S0, S1] = [5, 6, 7, 8, 9, 10, 11, 12, 13, 14];
const ACC = 15; // 8 v128: a[r][c] at ACC + 4r + c
const [X0, X1, B] = [23, 24, 25];

/**
 * The 2 × `columns` tile at (i, j): accumulate over the block, then add into S. The module is
 * made for one stride, so the other rows of the tile are constant offsets from two pointers and
 * each step of two block rows costs two address additions.
 */
function tile(columns: number, strideBytes: number): number[] {
  const code: number[] = [];
  code.push(...get(J), ...get(STRIDE), ...mul, ...get(Y), ...add, ...set(PJ));
  for (let a = 0; a < 2 * columns; a++) code.push(...v128Zero, ...set(ACC + 4 * Math.floor(a / columns) + (a % columns)));
  code.push(...i32(0), ...set(T));
  code.push(...block, ...loop, ...get(T), ...get(T_END), ...geS, ...brIf(1));
  code.push(...get(PI0), ...get(T), ...add, ...set(TI), ...get(PJ), ...get(T), ...add, ...set(TJ));
  // (Unrolling this loop twice measured slower: more live vectors than registers.)
  code.push(...get(TI), ...v128Load(0), ...set(X0));
  code.push(...get(TI), ...v128Load(strideBytes), ...set(X1));
  for (let c = 0; c < columns; c++) {
    code.push(...get(TJ), ...v128Load(c * strideBytes), ...set(B));
    for (let r = 0; r < 2; r++) code.push(...get(ACC + 4 * r + c), ...get(r === 0 ? X0 : X1), ...get(B), ...f64x2Mul, ...f64x2Add, ...set(ACC + 4 * r + c));
  }
  code.push(...get(T), ...i32(16), ...add, ...set(T), ...br(0), ...end, ...end);
  // S rows: s0 = S + (i·d + j)·8, s1 = s0 + d·8; add both lanes of each accumulator.
  code.push(...get(I), ...get(D), ...mul, ...get(J), ...add, ...i32(8), ...mul, ...get(S), ...add, ...set(S0));
  code.push(...get(S0), ...get(D), ...i32(8), ...mul, ...add, ...set(S1));
  for (let r = 0; r < 2; r++) {
    for (let c = 0; c < columns; c++) {
      const acc = ACC + 4 * r + c;
      const store = [...get(r === 0 ? S0 : S1), ...get(r === 0 ? S0 : S1), ...f64Load(8 * c), ...get(acc), ...lane(0), ...get(acc), ...lane(1), ...f64Add, ...f64Add, ...f64Store(8 * c)];
      // (i + 1, j) with j = i lies below the diagonal: leave the lower triangle alone.
      if (r === 1 && c === 0) code.push(...get(J), ...get(I), ...ne, ...when, ...store, ...end);
      else code.push(...store);
    }
  }
  return code;
}

/** The function body: pairs of rows i, tiles of four columns j ≥ i, then single columns. */
function body(strideBytes: number): number[] {
  const code: number[] = [];
  code.push(...get(ROWS), ...i32(8), ...mul, ...set(T_END));
  code.push(...i32(0), ...set(I));
  code.push(...block, ...loop); // over pairs of rows; a last odd row is the caller's (one entry)
  code.push(...get(I), ...i32(1), ...add, ...get(D), ...geS, ...brIf(1));
  code.push(...get(I), ...get(STRIDE), ...mul, ...get(Y), ...add, ...set(PI0));
  code.push(...get(I), ...set(J));
  code.push(...block, ...loop, ...get(J), ...i32(4), ...add, ...get(D), ...gtS, ...brIf(1), ...tile(4, strideBytes), ...get(J), ...i32(4), ...add, ...set(J), ...br(0), ...end, ...end);
  code.push(...block, ...loop, ...get(J), ...get(D), ...geS, ...brIf(1), ...tile(1, strideBytes), ...get(J), ...i32(1), ...add, ...set(J), ...br(0), ...end, ...end);
  code.push(...get(I), ...i32(2), ...add, ...set(I), ...br(0), ...end, ...end);
  return code;
}

function moduleBytes(strideBytes: number): Uint8Array {
  const type = section(1, vector([[0x60, ...vector([[I32], [I32], [I32], [I32], [I32]]), 0]]));
  const imports = section(2, vector([[...utf8('env'), ...utf8('memory'), 0x02, 0x00, 0x01]]));
  const functions = section(3, vector([[0]]));
  const exports = section(7, vector([[...utf8('syrk'), 0x00, 0]]));
  const locals = vector([
    [...unsignedLeb(10), I32],
    [...unsignedLeb(11), V128],
  ]);
  const fn = [...locals, ...body(strideBytes), ...end];
  const code = section(10, vector([[...unsignedLeb(fn.length), ...fn]]));
  return Uint8Array.from([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00, ...type, ...imports, ...functions, ...exports, ...code]);
}

/** The part of the WebAssembly JavaScript API used here (declared by hand: the core's type-check has no DOM library). */
interface WasmModule {
  readonly compiled: unique symbol;
}
interface WasmApi {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => WasmModule;
  Instance: new (module: WasmModule, imports: object) => { exports: Record<string, unknown> };
  Memory: new (descriptor: { initial: number }) => { buffer: ArrayBuffer };
}

const compiled = new Map<number, WasmModule | null>();

/** The module compiled for this stride, or null where WebAssembly or its SIMD is missing. */
function simdModule(stride: number): WasmModule | null {
  const known = compiled.get(stride);
  if (known !== undefined) return known;
  const wasm = (globalThis as { WebAssembly?: WasmApi }).WebAssembly;
  let module: WasmModule | null = null;
  try {
    const bytes = moduleBytes(stride * 8);
    if (wasm && wasm.validate(bytes)) module = new wasm.Module(bytes);
  } catch {
    module = null;
  }
  compiled.set(stride, module);
  return module;
}

const PAGE = 65536;

class SimdKernel implements CrossProductKernel {
  readonly scatter: Float64Array;
  readonly block: Float64Array;
  private readonly syrk: (s: number, d: number, y: number, stride: number, rows: number) => void;
  private readonly blockOffset: number;

  constructor(
    module: WasmModule,
    private readonly d: number,
    readonly stride: number,
  ) {
    const wasm = (globalThis as { WebAssembly?: WasmApi }).WebAssembly!;
    this.blockOffset = d * d * 8;
    const bytes = this.blockOffset + d * stride * 8;
    const memory = new wasm.Memory({ initial: Math.max(1, Math.ceil(bytes / PAGE)) });
    const instance = new wasm.Instance(module, { env: { memory } });
    this.syrk = instance.exports.syrk as (s: number, d: number, y: number, stride: number, rows: number) => void;
    this.scatter = new Float64Array(memory.buffer, 0, d * d);
    this.block = new Float64Array(memory.buffer, this.blockOffset, d * stride);
  }

  update(rows: number): void {
    const { d, stride, block } = this;
    if (rows <= 0) return;
    // Rows go two at a time: an odd count gets a zero row (the stride is even, so there is room).
    const padded = rows + (rows % 2);
    if (padded > rows) for (let i = 0; i < d; i++) block[i * stride + rows] = 0;
    this.syrk(0, d, this.blockOffset, stride * 8, padded);
    if (d % 2 === 1) {
      // The last row of S (one entry, on the diagonal) when d is odd.
      const last = (d - 1) * stride;
      let sum = 0;
      for (let t = 0; t < rows; t++) sum += block[last + t] * block[last + t];
      this.scatter[(d - 1) * d + d - 1] += sum;
    }
  }
}

class PlainKernel implements CrossProductKernel {
  readonly scatter: Float64Array;
  readonly block: Float64Array;

  constructor(
    private readonly d: number,
    readonly stride: number,
  ) {
    this.scatter = new Float64Array(d * d);
    this.block = new Float64Array(d * stride);
  }

  update(rows: number): void {
    crossProductUpdate(this.scatter, this.d, this.block, this.stride, rows);
  }
}

/**
 * A kernel for d features and blocks of up to `stride` − 1 rows (stride even: an odd block is
 * padded with a zero row); `plain` forces the JavaScript version (tests compare the two). The
 * column after an odd block's last row is overwritten with zeros.
 */
export function createCrossProductKernel(d: number, stride: number, plain = false): CrossProductKernel {
  if (stride % 2 !== 0) throw new RangeError(`the block stride must be even, not ${stride}`);
  const module = plain ? null : simdModule(stride);
  return module ? new SimdKernel(module, d, stride) : new PlainKernel(d, stride);
}

/** Whether the WebAssembly SIMD kernel is in use here. */
export function simdAvailable(): boolean {
  return simdModule(4) !== null;
}
