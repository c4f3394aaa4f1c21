/**
 * The inner loops of the Cholesky factorisation and of triangular products and solves, in
 * WebAssembly with 128-bit SIMD where the engine has it (Node ≥ 16, current browsers), else the
 * plain JavaScript loops of linalg.ts and conditionNumber.ts run instead. Three functions:
 *
 *  - rowPair: the blocked Cholesky's trailing update for two rows p, p + 1 of the Schur
 *    complement against `tiles` groups of four columns, w[p][q] −= Σ_t panel[p][t]·panel[q][t],
 *    with the panel's rows contiguous (PANEL doubles apart). Eight two-lane accumulators run over
 *    t two at a time (lane 0 the even t, lane 1 the odd t), so six loads feed sixteen
 *    multiply-adds; the JavaScript loop sums t in order, so the two agree to rounding.
 *  - dot: Σ_k a_k b_k with the four partial sums of linalg.dotRange (lanes of two accumulators,
 *    the tail added to the first, combined as (s0 + s1) + (s2 + s3)): bit for bit dotRange.
 *  - axpy: y += α x elementwise: bit for bit the JavaScript loop (y − l·x is y + l·(−x) exactly).
 *
 * The kernel owns one WebAssembly memory; the caller copies its matrix and vectors into `values`
 * and passes positions in doubles. The module is assembled below, instruction by instruction,
 * from the WebAssembly binary format (core specification, "Binary Format"; SIMD opcodes from the
 * fixed-width SIMD proposal, merged in WebAssembly 2.0), as crossProductKernel.ts does; a module
 * that fails `WebAssembly.validate` (no SIMD) means the JavaScript path.
 */
import {
  add, block, br, brIf, end, F64, f64Add, f64Load, f64Mul, f64Store, f64x2Add, f64x2Mul,
  f64x2Splat, geS, get, I32, i32, lane, loop, moduleOf, mul, section, set, unsignedLeb, utf8, V128, v128Load,
  v128Store, v128Zero, vector, compileModule, webAssembly, type WasmModule
} from './wasmAssembly';

/** Columns of a Cholesky panel: panel rows are this many doubles apart (linalg.ts uses it). */
export const PANEL = 32;

/** Below this order the JavaScript loops are used (instantiating costs more than it saves). */
export const SIMD_MIN_ORDER = 64;

export interface CholeskyKernel {
  /** The kernel's memory as doubles (at least as many as asked for); positions below are indices into it. */
  values: Float64Array;
  /** Σ_k values[a + k]·values[b + k] for k < length, summed as linalg.dotRange sums it. */
  dot(a: number, b: number, length: number): number;
  /** values[y + k] += alpha·values[x + k] for k < length (the ranges must not overlap). */
  axpy(y: number, x: number, alpha: number, length: number): void;
  /**
   * For rows p (its entry q at w) and p + 1 (n further on) and `tiles`·4 columns from q: subtract
   * Σ_t panel[p][t]·panel[q'][t] with panel row p at `a`, panel row q at `b` (rows PANEL apart),
   * t < width (even).
   */
  rowPair(w: number, n: number, a: number, b: number, tiles: number, width: number): void;
  /**
   * out = L Lᵀ x for the m × m lower-triangular L at `l` (row-major), with `scratch` (m) for Lᵀ x:
   * conditionNumber.applyGram's loops, bit for bit.
   */
  gram(l: number, x: number, scratch: number, out: number, m: number): void;
  /** x = L⁻ᵀ L⁻¹ x in place: linalg.solveLower then solveLowerTranspose, bit for bit. */
  inverse(l: number, x: number, m: number): void;
  /**
   * w −= (v·w) v for the `count` vectors v of length m stored one after another from `basis`, in
   * order, twice (the Lanczos re-orthogonalisation of conditionNumber.ts), v·w summed as dot.
   */
  orthogonalize(basis: number, count: number, w: number, m: number): void;
}

// ---- a small assembler --------------------------------------------------------------------------

const and = [0x71];
const eqz = [0x45];
const f64Sub = [0xa1];
const f64Div = [0xa3];
const f64Neg = [0x9a];
const sub = [0x6b];
const ltS = [0x48];
const call = (index: number): number[] => [0x10, index];
const f64Zero = [0x44, 0, 0, 0, 0, 0, 0, 0, 0];

/** `while (counter < limit) { body; counter += step }` */
function whileBelow(counter: number, limit: number, step: number, body: number[]): number[] {
  return [...block, ...loop, ...get(counter), ...get(limit), ...geS, ...brIf(1), ...body, ...get(counter), ...i32(step), ...add, ...set(counter), ...br(0), ...end, ...end];
}

// dot(a, b, length) → f64; locals: k, end4, endAll, acc0, acc1, s0
function dotBody(): number[] {
  const [A, B, LENGTH, K, END4, END_ALL, ACC0, ACC1, S0] = [0, 1, 2, 3, 4, 5, 6, 7, 8];
  const at = (base: number): number[] => [...get(base), ...get(K), ...add];
  return [
    ...get(LENGTH), ...i32(-4), ...and, ...i32(8), ...mul, ...set(END4),
    ...get(LENGTH), ...i32(8), ...mul, ...set(END_ALL),
    ...v128Zero, ...set(ACC0), ...v128Zero, ...set(ACC1),
    ...whileBelow(K, END4, 32, [
      ...get(ACC0), ...at(A), ...v128Load(0), ...at(B), ...v128Load(0), ...f64x2Mul, ...f64x2Add, ...set(ACC0),
      ...get(ACC1), ...at(A), ...v128Load(16), ...at(B), ...v128Load(16), ...f64x2Mul, ...f64x2Add, ...set(ACC1),
    ]),
    ...get(ACC0), ...lane(0), ...set(S0),
    ...whileBelow(K, END_ALL, 8, [...get(S0), ...at(A), ...f64Load(0), ...at(B), ...f64Load(0), ...f64Mul, ...f64Add, ...set(S0)]),
    ...get(S0), ...get(ACC0), ...lane(1), ...f64Add,
    ...get(ACC1), ...lane(0), ...get(ACC1), ...lane(1), ...f64Add,
    ...f64Add,
  ];
}

// axpy(y, x, alpha, length); locals: k, end2, endAll, splat
function axpyBody(): number[] {
  const [Y, X, ALPHA, LENGTH, K, END2, END_ALL, AV] = [0, 1, 2, 3, 4, 5, 6, 7];
  const at = (base: number): number[] => [...get(base), ...get(K), ...add];
  return [
    ...get(LENGTH), ...i32(-2), ...and, ...i32(8), ...mul, ...set(END2),
    ...get(LENGTH), ...i32(8), ...mul, ...set(END_ALL),
    ...get(ALPHA), ...f64x2Splat, ...set(AV),
    ...whileBelow(K, END2, 16, [...at(Y), ...at(Y), ...v128Load(0), ...at(X), ...v128Load(0), ...get(AV), ...f64x2Mul, ...f64x2Add, ...v128Store(0)]),
    ...whileBelow(K, END_ALL, 8, [...at(Y), ...at(Y), ...f64Load(0), ...at(X), ...f64Load(0), ...get(ALPHA), ...f64Mul, ...f64Add, ...f64Store(0)]),
  ];
}

// rowPair(w, nBytes, a, b, tiles, widthBytes); locals: w1, t, x0, x1, y, acc[2][4]
function rowPairBody(): number[] {
  const [W, N_BYTES, A, B, TILES, WIDTH, W1, T, X0, X1, Y] = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
  const ACC = 11; // acc[r][c] at ACC + 4r + c
  const rowBytes = PANEL * 8;
  const code: number[] = [];
  code.push(...block, ...loop, ...get(TILES), ...eqz, ...brIf(1));
  for (let a = 0; a < 8; a++) code.push(...v128Zero, ...set(ACC + a));
  code.push(...i32(0), ...set(T));
  const step: number[] = [];
  step.push(...get(A), ...get(T), ...add, ...v128Load(0), ...set(X0));
  step.push(...get(A), ...get(T), ...add, ...v128Load(rowBytes), ...set(X1));
  for (let c = 0; c < 4; c++) {
    step.push(...get(B), ...get(T), ...add, ...v128Load(c * rowBytes), ...set(Y));
    for (let r = 0; r < 2; r++) step.push(...get(ACC + 4 * r + c), ...get(r === 0 ? X0 : X1), ...get(Y), ...f64x2Mul, ...f64x2Add, ...set(ACC + 4 * r + c));
  }
  code.push(...whileBelow(T, WIDTH, 16, step));
  code.push(...get(W), ...get(N_BYTES), ...add, ...set(W1));
  for (let r = 0; r < 2; r++) {
    const row = r === 0 ? W : W1;
    for (let c = 0; c < 4; c++) {
      const acc = ACC + 4 * r + c;
      code.push(...get(row), ...get(row), ...f64Load(8 * c), ...get(acc), ...lane(0), ...get(acc), ...lane(1), ...f64Add, ...f64Sub, ...f64Store(8 * c));
    }
  }
  code.push(...get(W), ...i32(32), ...add, ...set(W));
  code.push(...get(B), ...i32(4 * rowBytes), ...add, ...set(B));
  code.push(...get(TILES), ...i32(-1), ...add, ...set(TILES));
  code.push(...br(0), ...end, ...end);
  return code;
}

// gram(l, x, scratch, out, m): scratch = Lᵀ x by rows (axpy), then out_i = dot(L[i, 0..i], scratch);
// locals: i, row, rowBytes
function gramBody(): number[] {
  const [L, X, SCRATCH, OUT, M, I, ROW, ROW_BYTES] = [0, 1, 2, 3, 4, 5, 6, 7];
  const k = I; // the zeroing loop's counter (bytes), reset before the rows
  const eachRow = (work: number[]): number[] => [
    ...i32(0), ...set(I), ...get(L), ...set(ROW),
    ...whileBelow(I, M, 1, [...work, ...get(ROW), ...get(ROW_BYTES), ...add, ...set(ROW)]),
  ];
  return [
    ...get(M), ...i32(8), ...mul, ...set(ROW_BYTES),
    ...whileBelow(k, ROW_BYTES, 8, [...get(SCRATCH), ...get(k), ...add, ...f64Zero, ...f64Store(0)]),
    ...eachRow([...get(SCRATCH), ...get(ROW), ...get(X), ...get(I), ...i32(8), ...mul, ...add, ...f64Load(0), ...get(I), ...i32(1), ...add, ...call(1)]),
    ...eachRow([...get(OUT), ...get(I), ...i32(8), ...mul, ...add, ...get(ROW), ...get(SCRATCH), ...get(I), ...i32(1), ...add, ...call(0), ...f64Store(0)]),
  ];
}

// inverse(l, x, m): x = L⁻ᵀ L⁻¹ x, solveLower then solveLowerTranspose; locals: i, row, rowBytes, at, v
function inverseBody(): number[] {
  const [L, X, M, I, ROW, ROW_BYTES, AT, V] = [0, 1, 2, 3, 4, 5, 6, 7];
  const diagonal = [...get(ROW), ...get(I), ...i32(8), ...mul, ...add, ...f64Load(0)];
  return [
    ...get(M), ...i32(8), ...mul, ...set(ROW_BYTES),
    ...get(L), ...set(ROW),
    ...whileBelow(I, M, 1, [
      ...get(X), ...get(I), ...i32(8), ...mul, ...add, ...set(AT),
      ...get(AT), ...get(AT), ...f64Load(0), ...get(ROW), ...get(X), ...get(I), ...call(0), ...f64Sub, ...diagonal, ...f64Div, ...f64Store(0),
      ...get(ROW), ...get(ROW_BYTES), ...add, ...set(ROW),
    ]),
    // i = m − 1 down to 0
    ...get(M), ...i32(1), ...sub, ...set(I),
    ...get(ROW), ...get(ROW_BYTES), ...sub, ...set(ROW),
    ...block, ...loop, ...get(I), ...i32(0), ...ltS, ...brIf(1),
    ...get(X), ...get(I), ...i32(8), ...mul, ...add, ...set(AT),
    ...get(AT), ...f64Load(0), ...diagonal, ...f64Div, ...set(V),
    ...get(AT), ...get(V), ...f64Store(0),
    ...get(X), ...get(ROW), ...get(V), ...f64Neg, ...get(I), ...call(1),
    ...get(ROW), ...get(ROW_BYTES), ...sub, ...set(ROW),
    ...get(I), ...i32(1), ...sub, ...set(I),
    ...br(0), ...end, ...end,
  ];
}

// orthogonalize(basis, count, w, m): twice over the count vectors v of the basis (m apart), w −= dot(v, w)·v;
// locals: pass, j, v, vectorBytes
function orthogonalizeBody(): number[] {
  const [BASIS, COUNT, W, M, PASS, J, V, VECTOR_BYTES] = [0, 1, 2, 3, 4, 5, 6, 7];
  return [
    ...get(M), ...i32(8), ...mul, ...set(VECTOR_BYTES),
    ...block, ...loop, ...get(PASS), ...i32(2), ...geS, ...brIf(1),
    ...i32(0), ...set(J), ...get(BASIS), ...set(V),
    ...whileBelow(J, COUNT, 1, [
      ...get(W), ...get(V), ...get(V), ...get(W), ...get(M), ...call(0), ...f64Neg, ...get(M), ...call(1),
      ...get(V), ...get(VECTOR_BYTES), ...add, ...set(V),
    ]),
    ...get(PASS), ...i32(1), ...add, ...set(PASS), ...br(0), ...end, ...end,
  ];
}

function moduleBytes(): Uint8Array {
  const type = section(
    1,
    vector([
      [0x60, ...vector([[I32], [I32], [I32]]), ...vector([[F64]])],
      [0x60, ...vector([[I32], [I32], [F64], [I32]]), 0],
      [0x60, ...vector([[I32], [I32], [I32], [I32], [I32], [I32]]), 0],
      [0x60, ...vector([[I32], [I32], [I32], [I32], [I32]]), 0],
      [0x60, ...vector([[I32], [I32], [I32]]), 0],
      [0x60, ...vector([[I32], [I32], [I32], [I32]]), 0],
    ]),
  );
  const imports = section(2, vector([[...utf8('env'), ...utf8('memory'), 0x02, 0x00, 0x01]]));
  const functions = section(3, vector([[0], [1], [2], [3], [4], [5]]));
  const exports = section(
    7,
    vector([[...utf8('dot'), 0x00, 0], [...utf8('axpy'), 0x00, 1], [...utf8('rowPair'), 0x00, 2], [...utf8('gram'), 0x00, 3], [...utf8('inverse'), 0x00, 4], [...utf8('orthogonalize'), 0x00, 5]]),
  );
  const dot = [...vector([[...unsignedLeb(3), I32], [...unsignedLeb(2), V128], [...unsignedLeb(1), F64]]), ...dotBody(), ...end];
  const axpy = [...vector([[...unsignedLeb(3), I32], [...unsignedLeb(1), V128]]), ...axpyBody(), ...end];
  const rowPair = [...vector([[...unsignedLeb(2), I32], [...unsignedLeb(11), V128]]), ...rowPairBody(), ...end];
  const gram = [...vector([[...unsignedLeb(3), I32]]), ...gramBody(), ...end];
  const inverse = [...vector([[...unsignedLeb(4), I32], [...unsignedLeb(1), F64]]), ...inverseBody(), ...end];
  const orthogonalize = [...vector([[...unsignedLeb(4), I32]]), ...orthogonalizeBody(), ...end];
  const code = section(10, vector([dot, axpy, rowPair, gram, inverse, orthogonalize].map((fn) => [...unsignedLeb(fn.length), ...fn])));
  return moduleOf(type, imports, functions, exports, code);
}

// ---- instances ------------------------------------------------------------------------------------

let compiled: WasmModule | null | undefined;
let enabled = true;

function simdModule(): WasmModule | null {
  if (compiled === undefined) compiled = compileModule(moduleBytes);
  return compiled;
}

const PAGE = 65536;

/** The one kernel instance, kept between calls (see choleskyKernel). */
let shared: { memory: { buffer: ArrayBuffer; grow(pages: number): number }; kernel: CholeskyKernel } | null = null;

/**
 * A kernel whose memory holds at least `doubles` values, for a matrix of order `order`; null
 * where WebAssembly SIMD is missing, when the order is below SIMD_MIN_ORDER, or when switched off
 * (useCholeskySimd). One instance serves every call (none runs while another is in use: the
 * core is synchronous) and its memory only grows, to the largest need so far (n² + 32n values
 * for a Cholesky of order n, 8 MB at n = 1000): a fresh memory per call cost more than the
 * factorisation saved, since every page of it faults on first touch (~30 ms per 8 MB here).
 */
export function choleskyKernel(doubles: number, order: number): CholeskyKernel | null {
  if (!enabled || order < SIMD_MIN_ORDER) return null;
  const module = simdModule();
  if (!module) return null;
  const bytes = doubles * 8;
  if (shared === null) {
    const wasm = webAssembly()!;
    const memory = new wasm.Memory({ initial: Math.max(1, Math.ceil(bytes / PAGE)) });
    const { exports } = new wasm.Instance(module, { env: { memory } });
    const dot = exports.dot as (a: number, b: number, length: number) => number;
    const axpy = exports.axpy as (y: number, x: number, alpha: number, length: number) => void;
    const rowPair = exports.rowPair as (w: number, nBytes: number, a: number, b: number, tiles: number, widthBytes: number) => void;
    const gram = exports.gram as (l: number, x: number, scratch: number, out: number, m: number) => void;
    const inverse = exports.inverse as (l: number, x: number, m: number) => void;
    const orthogonalize = exports.orthogonalize as (basis: number, count: number, w: number, m: number) => void;
    const kernel = {
      values: new Float64Array(memory.buffer),
      dot: (a: number, b: number, length: number) => dot(a * 8, b * 8, length),
      axpy: (y: number, x: number, alpha: number, length: number) => axpy(y * 8, x * 8, alpha, length),
      rowPair: (w: number, n: number, a: number, b: number, tiles: number, width: number) => rowPair(w * 8, n * 8, a * 8, b * 8, tiles, width * 8),
      gram: (l: number, x: number, scratch: number, out: number, m: number) => gram(l * 8, x * 8, scratch * 8, out * 8, m),
      inverse: (l: number, x: number, m: number) => inverse(l * 8, x * 8, m),
      orthogonalize: (basis: number, count: number, w: number, m: number) => orthogonalize(basis * 8, count, w * 8, m),
    };
    shared = { memory, kernel };
  } else if (shared.memory.buffer.byteLength < bytes) {
    shared.memory.grow(Math.ceil((bytes - shared.memory.buffer.byteLength) / PAGE));
    shared.kernel.values = new Float64Array(shared.memory.buffer);
  }
  return shared.kernel;
}

/** Whether the WebAssembly SIMD Cholesky kernel can run here. */
export function choleskySimdAvailable(): boolean {
  return simdModule() !== null;
}

/**
 * Switches the WebAssembly path on or off (tests compare the two paths; the JavaScript path is
 * what runs where SIMD is missing) and returns the previous setting.
 */
export function useCholeskySimd(on: boolean): boolean {
  const previous = enabled;
  enabled = on;
  return previous;
}
