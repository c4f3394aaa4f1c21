/**
 * The blocked rank-k update at the heart of the moments, S += Xᵀ X over a block of rows held
 * row-major, in WebAssembly with 128-bit SIMD where the engine has it (Node ≥ 16, current
 * browsers), else in plain JavaScript: createScatterKernel, used for the per-class moments
 * (momentsAccumulator.ts) and for the k-fold parts (foldModels.ts). The block is packed into
 * panels of four columns, S's 4 × 4 tiles are held in registers while the block's rows stream
 * past, and S·v (S before the update, from its upper triangle) is taken on the way when asked; in
 * the same module the flush's per-element passes (shiftRows, centreRows). At d = 1000 the update
 * runs near the two-lane multiply-plus-add peak of this kind of machine; fused multiply-adds
 * (relaxed SIMD, behind a flag in Node 20) measured no faster there (1.10 against 1.13 s for the
 * 20 000 × 1 000 update).
 *
 * The kernel owns its memory and hands out Float64Array views of it (`scatter`, `block`, the
 * vectors), which the caller fills and reads in place: nothing is copied per update. The module
 * (a few hundred bytes) is assembled below, instruction by instruction, from the WebAssembly
 * binary format (core specification, "Binary Format"; SIMD opcodes from the fixed-width SIMD
 * proposal, merged in WebAssembly 2.0).
 */
import {
  add, block, br, brIf, end, F64, f64Add, f64Load, f64Store, f64x2Add, f64x2Mul,
  f64x2Splat, geS, get, I32, i32, lane, loop, moduleOf, mul, section, set, unsignedLeb, utf8, V128, v128Load,
  v128Store, v128Zero, vector, compileModule, webAssembly, type WasmModule
} from './wasmAssembly';
import { mirrorUpper } from './linalg';

const when = [0x04, 0x40];

// ---- the update: S tiles held in registers, block rows broadcast ---------------------------------

const geU = [0x4f];
const v128Splat64 = (offset: number): number[] => [0xfd, 0x0a, 3, ...unsignedLeb(offset)];

/** Side of the S tile held in registers by the row-major kernel (4 rows × 4 columns). */
export const TILE = 4;

// update(s, x, rows, multiply, v, out, panels): parameters S byte offset, block byte offset, rows;
// with multiply ≠ 0, out (zeroed by the caller) += S v from S's upper triangle as it is before the
// update; the byte offset of room for the block's rows in panels (as many doubles as the block).
const [RS, RX, RROWS, RMULTIPLY, RV, ROUT, RPANELS] = [0, 1, 2, 3, 4, 5, 6];
// Locals: i32 i0, j0, pi, pj, piEnd, ps, bytes of one panel; v128 acc[k][c] (8), b0, b1, a; for
// S v: v[j0..j0+3] (two), out[j0..j0+3] (two), a product.
const [RI, RJ, RPI, RPJ, RPI_END, RPS, RSPAN] = [7, 8, 9, 10, 11, 12, 13];
const RACC = 14; // acc[k][c] at RACC + 2k + c
const [RB0, RB1, RA] = [22, 23, 24];
const [RVJ0, RVJ1, ROJ0, ROJ1, RT] = [25, 26, 27, 28, 29];

const v128And = [0xfd, 0x4e];
const eq = [0x46];
const orElse = [0x05];

/** v128.const whose two 64-bit lanes are all ones where `keep` says so, else zero. */
function laneMask(keep: [boolean, boolean]): number[] {
  return [0xfd, 0x0c, ...keep.flatMap((k) => new Array<number>(8).fill(k ? 0xff : 0))];
}

/** The mask of a diagonal tile's two-column half `c` (columns 2c, 2c + 1) that keeps the columns ≥ `from`. */
const fromColumn = (from: number, c: number): number[] => laneMask([2 * c >= from, 2 * c + 1 >= from]);

/**
 * out += S v over the tile at (i0, j0) held in the accumulators (S as it was before this update).
 * An off-diagonal tile (j0 > i0) stands for itself and its mirror image: out[i0 + k] gets row k
 * times v[j0..j0+3] and out[j0..j0+3] the columns weighted by v[i0 + k]. In a diagonal tile only
 * the upper entries count (the lower ones are undefined) and are masked out: row k's own sum takes
 * the columns ≥ k, the columns' sums the rows above them (columns > k). The columns' sums are
 * stored first: in a diagonal tile out[j0..] is out[i0..].
 */
function tileProduct(diagonal: boolean): number[] {
  const code: number[] = [];
  const entry = (k: number, c: number, from: number): number[] => (diagonal ? [...get(RACC + 2 * k + c), ...fromColumn(from, c), ...v128And] : get(RACC + 2 * k + c));
  const vAt = (local: number): number[] => [...get(RV), ...get(local), ...i32(8), ...mul, ...add];
  const outAt = (local: number): number[] => [...get(ROUT), ...get(local), ...i32(8), ...mul, ...add];
  code.push(...vAt(RJ), ...v128Load(0), ...set(RVJ0), ...vAt(RJ), ...v128Load(16), ...set(RVJ1));
  code.push(...outAt(RJ), ...v128Load(0), ...set(ROJ0), ...outAt(RJ), ...v128Load(16), ...set(ROJ1));
  for (let k = 0; k < TILE; k++) {
    code.push(...vAt(RI), ...v128Splat64(8 * k), ...set(RA));
    for (let c = 0; c < 2; c++) code.push(...get(c === 0 ? ROJ0 : ROJ1), ...entry(k, c, k + 1), ...get(RA), ...f64x2Mul, ...f64x2Add, ...set(c === 0 ? ROJ0 : ROJ1));
  }
  code.push(...outAt(RJ), ...get(ROJ0), ...v128Store(0), ...outAt(RJ), ...get(ROJ1), ...v128Store(16));
  for (let k = 0; k < TILE; k++) {
    code.push(...entry(k, 0, k), ...get(RVJ0), ...f64x2Mul, ...entry(k, 1, k), ...get(RVJ1), ...f64x2Mul, ...f64x2Add, ...set(RT));
    code.push(...outAt(RI), ...outAt(RI), ...f64Load(8 * k), ...get(RT), ...lane(0), ...get(RT), ...lane(1), ...f64Add, ...f64Add, ...f64Store(8 * k));
  }
  return code;
}

/**
 * The block's rows copied into panels of four columns (GEMM's packing): panel p holds x[t][4p..4p+3]
 * for t = 0..rows−1, 32 bytes a row, panels one after another. A tile then reads its rows from two
 * runs of 32-byte steps instead of strides of a whole block row (8 KB at d = 1 000: a page a row).
 * Locals borrowed: RPI (row start), RPJ (byte in the row), RPS (where the row's first group goes).
 */
function packBody(size: number): number[] {
  const rowBytes = size * 8;
  const code: number[] = [];
  code.push(...get(RROWS), ...i32(32), ...mul, ...set(RSPAN));
  code.push(...get(RX), ...set(RPI), ...get(RX), ...get(RROWS), ...i32(rowBytes), ...mul, ...add, ...set(RPI_END), ...get(RPANELS), ...set(RI));
  code.push(...block, ...loop, ...get(RPI), ...get(RPI_END), ...geU, ...brIf(1));
  code.push(...get(RI), ...set(RPS), ...i32(0), ...set(RPJ));
  code.push(...block, ...loop, ...get(RPJ), ...i32(rowBytes), ...geU, ...brIf(1));
  for (const offset of [0, 16]) code.push(...get(RPS), ...get(RPI), ...get(RPJ), ...add, ...v128Load(offset), ...v128Store(offset));
  code.push(...get(RPS), ...get(RSPAN), ...add, ...set(RPS), ...get(RPJ), ...i32(32), ...add, ...set(RPJ), ...br(0), ...end, ...end);
  code.push(...get(RPI), ...i32(rowBytes), ...add, ...set(RPI), ...get(RI), ...i32(32), ...add, ...set(RI), ...br(0), ...end, ...end);
  return code;
}

/**
 * S += Xᵀ X for a row-major block X (`rows` rows of `size` doubles, size a multiple of 4), S
 * size × size: the block is packed into panels (packBody), then for each 4 × 4 tile on or right
 * of the diagonal, the tile is loaded into eight two-lane registers, every block row adds
 * x[i..i+3] (each broadcast) times x[j..j+3] (two vectors), and the tile is stored back: per
 * block row two vector loads and four broadcast loads feed eight multiply-adds, and S is read and
 * written once per tile and block. With `multiply`, each tile also adds its part of S v
 * (tileProduct) while it is loaded: merging a block needs S v with the S before the block, and
 * this spares that a pass of its own over S (at d = 1 000, 10% of the update's time).
 */
function rowUpdateBody(size: number): number[] {
  const rowBytes = size * 8;
  const code: number[] = [...packBody(size)];
  // RSPAN: the bytes of one panel (rows · 32); tile (i0, j0) reads panels i0/4 and j0/4.
  code.push(...i32(0), ...set(RI));
  code.push(...block, ...loop, ...get(RI), ...i32(size), ...geS, ...brIf(1));
  code.push(...get(RI), ...set(RJ));
  code.push(...block, ...loop, ...get(RJ), ...i32(size), ...geS, ...brIf(1));
  // ps = s + (i0·size + j0)·8; load the tile.
  code.push(...get(RI), ...i32(size), ...mul, ...get(RJ), ...add, ...i32(8), ...mul, ...get(RS), ...add, ...set(RPS));
  for (let k = 0; k < TILE; k++) for (let c = 0; c < 2; c++) code.push(...get(RPS), ...v128Load(k * rowBytes + 16 * c), ...set(RACC + 2 * k + c));
  code.push(...get(RMULTIPLY), ...when, ...get(RI), ...get(RJ), ...eq, ...when, ...tileProduct(true), ...orElse, ...tileProduct(false), ...end, ...end);
  code.push(...get(RI), ...get(RROWS), ...mul, ...i32(8), ...mul, ...get(RPANELS), ...add, ...set(RPI));
  code.push(...get(RJ), ...get(RROWS), ...mul, ...i32(8), ...mul, ...get(RPANELS), ...add, ...set(RPJ));
  code.push(...get(RPI), ...get(RSPAN), ...add, ...set(RPI_END));
  code.push(...block, ...loop, ...get(RPI), ...get(RPI_END), ...geU, ...brIf(1));
  code.push(...get(RPJ), ...v128Load(0), ...set(RB0), ...get(RPJ), ...v128Load(16), ...set(RB1));
  for (let k = 0; k < TILE; k++) {
    code.push(...get(RPI), ...v128Splat64(8 * k), ...set(RA));
    for (let c = 0; c < 2; c++) code.push(...get(RACC + 2 * k + c), ...get(RA), ...get(c === 0 ? RB0 : RB1), ...f64x2Mul, ...f64x2Add, ...set(RACC + 2 * k + c));
  }
  code.push(...get(RPI), ...i32(32), ...add, ...set(RPI), ...get(RPJ), ...i32(32), ...add, ...set(RPJ), ...br(0), ...end, ...end);
  for (let k = 0; k < TILE; k++) for (let c = 0; c < 2; c++) code.push(...get(RPS), ...get(RACC + 2 * k + c), ...v128Store(k * rowBytes + 16 * c));
  code.push(...get(RJ), ...i32(TILE), ...add, ...set(RJ), ...br(0), ...end, ...end);
  code.push(...get(RI), ...i32(TILE), ...add, ...set(RI), ...br(0), ...end, ...end);
  return code;
}

const f64x2Sub = [0xfd, 0xf1, 0x01];
const f64x2Pmin = [0xfd, 0xf6, 0x01];
const f64x2Pmax = [0xfd, 0xf7, 0x01];

/** Local `base` + local `offset`, the address of an element pair. */
const at = (base: number, offset: number): number[] => [...get(base), ...get(offset), ...add];

// shiftRows(x, rows, shift, min, max, sums): row by row, min/max updated, x − shift stored, added to sums.
const [SX, SROWS, SSHIFT, SMIN, SMAX, SSUMS] = [0, 1, 2, 3, 4, 5];
const [SP, SP_END, SI] = [6, 7, 8];
const SV = 9;

function shiftRowsBody(size: number): number[] {
  const rowBytes = size * 8;
  const code: number[] = [];
  code.push(...get(SX), ...set(SP), ...get(SROWS), ...i32(rowBytes), ...mul, ...get(SX), ...add, ...set(SP_END));
  code.push(...block, ...loop, ...get(SP), ...get(SP_END), ...geU, ...brIf(1));
  code.push(...i32(0), ...set(SI));
  code.push(...block, ...loop, ...get(SI), ...i32(rowBytes), ...geU, ...brIf(1));
  code.push(...at(SP, SI), ...v128Load(0), ...set(SV));
  // pmin(m, v) = v < m ? v : m and pmax(m, v) = m < v ? v : m: a NaN leaves the extreme alone, as `if (x < lo) lo = x` does.
  code.push(...at(SMIN, SI), ...at(SMIN, SI), ...v128Load(0), ...get(SV), ...f64x2Pmin, ...v128Store(0));
  code.push(...at(SMAX, SI), ...at(SMAX, SI), ...v128Load(0), ...get(SV), ...f64x2Pmax, ...v128Store(0));
  code.push(...get(SV), ...at(SSHIFT, SI), ...v128Load(0), ...f64x2Sub, ...set(SV));
  code.push(...at(SP, SI), ...get(SV), ...v128Store(0));
  code.push(...at(SSUMS, SI), ...at(SSUMS, SI), ...v128Load(0), ...get(SV), ...f64x2Add, ...v128Store(0));
  code.push(...get(SI), ...i32(16), ...add, ...set(SI), ...br(0), ...end, ...end);
  code.push(...get(SP), ...i32(rowBytes), ...add, ...set(SP), ...br(0), ...end, ...end);
  return code;
}

// centreRows(x, rows, mean, delta, rowNorms, projections, cubic, timesDelta).
const [CX, CROWS, CMEAN, CDELTA, CNORMS, CPROJ, CCUBIC, CTIMES] = [0, 1, 2, 3, 4, 5, 6, 7];
const [CP, CP_END, CI, CT] = [8, 9, 10, 11];
const [CZ, CN2, CPR2] = [12, 13, 14];
const [CNORM, CPROJECTION] = [15, 16];

/**
 * Row by row: z = x − mean stored, ‖z‖² and zᵀδ (two lanes, added at the row's end) into
 * rowNorms[t] and projections[t]; then the row again (still in cache): cubic += ‖z‖² z and
 * timesDelta += (zᵀδ) z.
 */
function centreRowsBody(size: number): number[] {
  const rowBytes = size * 8;
  const code: number[] = [];
  code.push(...get(CX), ...set(CP), ...get(CROWS), ...i32(rowBytes), ...mul, ...get(CX), ...add, ...set(CP_END));
  code.push(...i32(0), ...set(CT));
  code.push(...block, ...loop, ...get(CP), ...get(CP_END), ...geU, ...brIf(1));
  code.push(...v128Zero, ...set(CN2), ...v128Zero, ...set(CPR2), ...i32(0), ...set(CI));
  code.push(...block, ...loop, ...get(CI), ...i32(rowBytes), ...geU, ...brIf(1));
  code.push(...at(CP, CI), ...v128Load(0), ...at(CMEAN, CI), ...v128Load(0), ...f64x2Sub, ...set(CZ));
  code.push(...at(CP, CI), ...get(CZ), ...v128Store(0));
  code.push(...get(CN2), ...get(CZ), ...get(CZ), ...f64x2Mul, ...f64x2Add, ...set(CN2));
  code.push(...get(CPR2), ...get(CZ), ...at(CDELTA, CI), ...v128Load(0), ...f64x2Mul, ...f64x2Add, ...set(CPR2));
  code.push(...get(CI), ...i32(16), ...add, ...set(CI), ...br(0), ...end, ...end);
  code.push(...get(CN2), ...lane(0), ...get(CN2), ...lane(1), ...f64Add, ...set(CNORM));
  code.push(...get(CPR2), ...lane(0), ...get(CPR2), ...lane(1), ...f64Add, ...set(CPROJECTION));
  code.push(...at(CNORMS, CT), ...get(CNORM), ...f64Store(0), ...at(CPROJ, CT), ...get(CPROJECTION), ...f64Store(0));
  code.push(...get(CNORM), ...f64x2Splat, ...set(CN2), ...get(CPROJECTION), ...f64x2Splat, ...set(CPR2), ...i32(0), ...set(CI));
  code.push(...block, ...loop, ...get(CI), ...i32(rowBytes), ...geU, ...brIf(1));
  code.push(...at(CP, CI), ...v128Load(0), ...set(CZ));
  code.push(...at(CCUBIC, CI), ...at(CCUBIC, CI), ...v128Load(0), ...get(CN2), ...get(CZ), ...f64x2Mul, ...f64x2Add, ...v128Store(0));
  code.push(...at(CTIMES, CI), ...at(CTIMES, CI), ...v128Load(0), ...get(CPR2), ...get(CZ), ...f64x2Mul, ...f64x2Add, ...v128Store(0));
  code.push(...get(CI), ...i32(16), ...add, ...set(CI), ...br(0), ...end, ...end);
  code.push(...get(CP), ...i32(rowBytes), ...add, ...set(CP), ...get(CT), ...i32(8), ...add, ...set(CT), ...br(0), ...end, ...end);
  return code;
}

/** Pages of 64 KiB a 32-bit memory can have: the declared maximum of a shared memory import. */
const MAX_PAGES = 65536;

function rowModuleBytes(size: number, shared: boolean): Uint8Array {
  const params = (count: number): number[] => [0x60, ...vector(Array.from({ length: count }, () => [I32])), 0];
  const type = section(1, vector([params(7), params(6), params(8)]));
  // Memory type limits: 0x00 minimum only; 0x03 shared with a maximum (threads proposal, WebAssembly 2.0 engines).
  const limits = shared ? [0x03, ...unsignedLeb(1), ...unsignedLeb(MAX_PAGES)] : [0x00, 0x01];
  const imports = section(2, vector([[...utf8('env'), ...utf8('memory'), 0x02, ...limits]]));
  const functions = section(3, vector([[0], [1], [2]]));
  const exports = section(7, vector([
    [...utf8('update'), 0x00, 0],
    [...utf8('shiftRows'), 0x00, 1],
    [...utf8('centreRows'), 0x00, 2],
  ]));
  const update = [...vector([[...unsignedLeb(7), I32], [...unsignedLeb(16), V128]]), ...rowUpdateBody(size), ...end];
  const shift = [...vector([[...unsignedLeb(3), I32], [...unsignedLeb(1), V128]]), ...shiftRowsBody(size), ...end];
  const centre = [...vector([[...unsignedLeb(4), I32], [...unsignedLeb(3), V128], [...unsignedLeb(2), F64]]), ...centreRowsBody(size), ...end];
  const code = section(10, vector([update, shift, centre].map((fn) => [...unsignedLeb(fn.length), ...fn])));
  return moduleOf(type, imports, functions, exports, code);
}

// ---- the kernel ---------------------------------------------------------------------------------------

/**
 * S += Xᵀ X over a block of rows held row-major (momentsAccumulator.ts, foldModels.ts):
 *
 *   S      size × size, row-major (size = d rounded up to a multiple of TILE); the upper
 *          triangle (j ≥ i) is exact, entries below it are left undefined (the diagonal tiles
 *          update a few of them)
 *   block  capacity × size: block row t at t·size; columns d..size−1 must stay 0, so the padding
 *          rows and columns of S stay 0
 *   vector, product  size each: product = S·vector from S's upper triangle as it was before an
 *          update (update with `multiply`)
 *   the flush's vectors (size each, padding 0 unless said) and per-row values (capacity each),
 *          read and written by shiftRows and centreRows
 *
 * All of them are views of the kernel's own memory, filled and read in place.
 */
export interface ScatterKernel {
  readonly d: number;
  readonly size: number;
  readonly capacity: number;
  readonly scatter: Float64Array;
  /**
   * Whether `scatter`'s memory may become a Moments' scatter as it is: a SharedArrayBuffer (the
   * kernel's WebAssembly memory made shared: posted to another thread, it is shared, not copied)
   * or a plain ArrayBuffer of its own. An unshared WebAssembly memory can be neither transferred
   * nor detached, and a copy of it would carry the block along.
   */
  readonly scatterOwnable: boolean;
  readonly block: Float64Array;
  readonly vector: Float64Array;
  readonly product: Float64Array;
  readonly shift: Float64Array;
  /** Start at ±Infinity (the caller fills them); their padding entries are meaningless. */
  readonly min: Float64Array;
  readonly max: Float64Array;
  readonly sums: Float64Array;
  readonly mean: Float64Array;
  readonly delta: Float64Array;
  readonly cubic: Float64Array;
  readonly timesDelta: Float64Array;
  readonly rowNorms: Float64Array;
  readonly projections: Float64Array;
  /**
   * S += Xᵀ X over the first `rows` block rows (rows ≤ capacity); with `multiply`, product =
   * S·vector (overwritten) from the upper triangle of S as it was before, in the same pass over S.
   */
  update(rows: number, multiply?: boolean): void;
  /** Row by row over the first `rows` block rows: min, max updated; x − shift stored; sums = Σ (x − shift) (overwritten). */
  shiftRows(rows: number): void;
  /**
   * Row by row: z = x − mean stored; rowNorms[t] = ‖z_t‖², projections[t] = z_tᵀ delta; cubic =
   * Σ ‖z_t‖² z_t and timesDelta = Σ (z_tᵀ delta) z_t (both overwritten).
   */
  centreRows(rows: number): void;
}

/** The vectors of `size` and of `capacity` doubles after S, the block, vector and product, in this order. */
const SIZE_VECTORS = ['shift', 'min', 'max', 'sums', 'mean', 'delta', 'cubic', 'timesDelta'] as const;
const ROW_VECTORS = ['rowNorms', 'projections'] as const;

const PAGE = 65536;

const rowModules = new Map<string, WasmModule | null>();

function rowModule(size: number, shared: boolean): WasmModule | null {
  const key = `${size} ${shared}`;
  const known = rowModules.get(key);
  if (known !== undefined) return known;
  const module = compileModule(() => rowModuleBytes(size, shared));
  rowModules.set(key, module);
  return module;
}

/** Whether this engine makes shared WebAssembly memories (a browser page only when cross-origin isolated); asked once. */
let sharedMemories: boolean | undefined;

function canShareMemory(): boolean {
  if (sharedMemories === undefined) {
    const wasm = webAssembly();
    try {
      sharedMemories = !!wasm && typeof SharedArrayBuffer === 'function' && new wasm.Memory({ initial: 1, maximum: 1, shared: true }).buffer instanceof SharedArrayBuffer;
    } catch {
      sharedMemories = false;
    }
  }
  return sharedMemories;
}

type Views = Record<(typeof SIZE_VECTORS)[number] | (typeof ROW_VECTORS)[number], Float64Array>;

class SimdScatterKernel implements ScatterKernel {
  readonly scatter: Float64Array;
  readonly block: Float64Array;
  readonly vector: Float64Array;
  readonly product: Float64Array;
  readonly shift: Float64Array;
  readonly min: Float64Array;
  readonly max: Float64Array;
  readonly sums: Float64Array;
  readonly mean: Float64Array;
  readonly delta: Float64Array;
  readonly cubic: Float64Array;
  readonly timesDelta: Float64Array;
  readonly rowNorms: Float64Array;
  readonly projections: Float64Array;
  private readonly run: (s: number, x: number, rows: number, multiply: number, v: number, out: number, panels: number) => void;
  /** Where update() packs the block (rowUpdateBody), after all the views. */
  private readonly panelsAt: number;
  private readonly shiftRun: (x: number, rows: number, shift: number, min: number, max: number, sums: number) => void;
  private readonly centreRun: (x: number, rows: number, mean: number, delta: number, norms: number, projections: number, cubic: number, timesDelta: number) => void;

  constructor(
    module: WasmModule,
    readonly d: number,
    readonly size: number,
    readonly capacity: number,
    readonly scatterOwnable: boolean,
  ) {
    const wasm = webAssembly()!;
    const blockAt = size * size * 8;
    const vectorAt = blockAt + capacity * size * 8;
    const productAt = vectorAt + size * 8;
    const vectorsAt = productAt + size * 8;
    const rowsAt = vectorsAt + SIZE_VECTORS.length * size * 8;
    this.panelsAt = rowsAt + ROW_VECTORS.length * capacity * 8;
    const bytes = this.panelsAt + capacity * size * 8;
    const pages = Math.max(1, Math.ceil(bytes / PAGE));
    const memory = new wasm.Memory(scatterOwnable ? { initial: pages, maximum: pages, shared: true } : { initial: pages });
    const { exports } = new wasm.Instance(module, { env: { memory } });
    this.run = exports.update as SimdScatterKernel['run'];
    this.shiftRun = exports.shiftRows as SimdScatterKernel['shiftRun'];
    this.centreRun = exports.centreRows as SimdScatterKernel['centreRun'];
    this.scatter = new Float64Array(memory.buffer, 0, size * size);
    this.block = new Float64Array(memory.buffer, blockAt, capacity * size);
    this.vector = new Float64Array(memory.buffer, vectorAt, size);
    this.product = new Float64Array(memory.buffer, productAt, size);
    const views = {} as Views;
    SIZE_VECTORS.forEach((name, k) => (views[name] = new Float64Array(memory.buffer, vectorsAt + k * size * 8, size)));
    ROW_VECTORS.forEach((name, k) => (views[name] = new Float64Array(memory.buffer, rowsAt + k * capacity * 8, capacity)));
    ({ shift: this.shift, min: this.min, max: this.max, sums: this.sums, mean: this.mean, delta: this.delta } = views);
    ({ cubic: this.cubic, timesDelta: this.timesDelta, rowNorms: this.rowNorms, projections: this.projections } = views);
  }

  update(rows: number, multiply = false): void {
    if (multiply) this.product.fill(0);
    this.run(0, this.block.byteOffset, Math.max(0, rows), multiply ? 1 : 0, this.vector.byteOffset, this.product.byteOffset, this.panelsAt);
  }

  shiftRows(rows: number): void {
    this.sums.fill(0);
    this.shiftRun(this.block.byteOffset, rows, this.shift.byteOffset, this.min.byteOffset, this.max.byteOffset, this.sums.byteOffset);
  }

  centreRows(rows: number): void {
    this.cubic.fill(0);
    this.timesDelta.fill(0);
    this.centreRun(this.block.byteOffset, rows, this.mean.byteOffset, this.delta.byteOffset, this.rowNorms.byteOffset, this.projections.byteOffset, this.cubic.byteOffset, this.timesDelta.byteOffset);
  }
}

class PlainScatterKernel implements ScatterKernel {
  readonly scatterOwnable = true;
  readonly scatter: Float64Array;
  readonly block: Float64Array;
  readonly vector: Float64Array;
  readonly product: Float64Array;

  readonly shift: Float64Array;
  readonly min: Float64Array;
  readonly max: Float64Array;
  readonly sums: Float64Array;
  readonly mean: Float64Array;
  readonly delta: Float64Array;
  readonly cubic: Float64Array;
  readonly timesDelta: Float64Array;
  readonly rowNorms: Float64Array;
  readonly projections: Float64Array;

  constructor(
    readonly d: number,
    readonly size: number,
    readonly capacity: number,
  ) {
    this.scatter = new Float64Array(size * size);
    this.block = new Float64Array(capacity * size);
    this.vector = new Float64Array(size);
    this.product = new Float64Array(size);
    [this.shift, this.min, this.max, this.sums, this.mean, this.delta, this.cubic, this.timesDelta] = SIZE_VECTORS.map(() => new Float64Array(size));
    [this.rowNorms, this.projections] = ROW_VECTORS.map(() => new Float64Array(capacity));
  }

  shiftRows(rows: number): void {
    const { d, size, block: y, shift, min, max, sums } = this;
    sums.fill(0);
    for (let t = 0; t < rows; t++) {
      const row = t * size;
      for (let i = 0; i < d; i++) {
        const x = y[row + i];
        if (x < min[i]) min[i] = x;
        if (x > max[i]) max[i] = x;
        const v = x - shift[i];
        y[row + i] = v;
        sums[i] += v;
      }
    }
  }

  centreRows(rows: number): void {
    const { d, size, block: y, mean, delta, rowNorms, projections, cubic, timesDelta } = this;
    cubic.fill(0);
    timesDelta.fill(0);
    for (let t = 0; t < rows; t++) {
      const row = t * size;
      let norm = 0;
      let projection = 0;
      for (let i = 0; i < d; i++) {
        const z = y[row + i] - mean[i];
        y[row + i] = z;
        norm += z * z;
        projection += z * delta[i];
      }
      for (let i = 0; i < d; i++) {
        const z = y[row + i];
        cubic[i] += norm * z;
        timesDelta[i] += projection * z;
      }
      rowNorms[t] = norm;
      projections[t] = projection;
    }
  }

  update(rows: number, multiply = false): void {
    if (multiply) this.multiplyUpper();
    // Row i of S, j ≥ i: Σ_t x_ti x_tj, a block row at a time.
    const { d, size, scatter, block } = this;
    for (let i = 0; i < d; i++) {
      const row = i * size;
      for (let t = 0; t < rows; t++) {
        const base = t * size;
        const xi = block[base + i];
        for (let j = i; j < d; j++) scatter[row + j] += xi * block[base + j];
      }
    }
  }

  private multiplyUpper(): void {
    const { d, size, scatter, vector, product } = this;
    product.fill(0);
    for (let i = 0; i < d; i++) {
      const row = i * size;
      const vi = vector[i];
      let sum = scatter[row + i] * vi;
      for (let j = i + 1; j < d; j++) {
        const value = scatter[row + j];
        sum += value * vector[j];
        product[j] += value * vi;
      }
      product[i] += sum;
    }
  }
}

/**
 * A row-major kernel for d features and blocks of up to `capacity` rows (WebAssembly SIMD where
 * the engine has it; `plain` forces the JavaScript version, which tests compare with it).
 */
export function createScatterKernel(d: number, capacity: number, plain = false): ScatterKernel {
  const size = Math.max(TILE, Math.ceil(d / TILE) * TILE);
  if (plain) return new PlainScatterKernel(d, size, capacity);
  const shared = canShareMemory() ? rowModule(size, true) : null;
  if (shared) return new SimdScatterKernel(shared, d, size, capacity, true);
  const module = rowModule(size, false);
  return module ? new SimdScatterKernel(module, d, size, capacity, false) : new PlainScatterKernel(d, size, capacity);
}

/** The full d × d symmetric matrix, a new one, from the upper triangle of a kernel's size × size scatter. */
export function symmetricFromUpper(upper: Float64Array, size: number, d: number): Float64Array {
  const out = new Float64Array(d * d);
  for (let i = 0; i < d; i++) out.set(upper.subarray(i * size + i, i * size + d), i * d + i);
  mirrorUpper(out, d);
  return out;
}

/** Whether the WebAssembly SIMD kernel is in use here. */
export function simdAvailable(): boolean {
  return rowModule(TILE, false) !== null;
}
