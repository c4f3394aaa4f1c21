/**
 * Stratified k-fold assignment that works while streaming (each row's fold is known when the row
 * is read) and that a Python or R script can reproduce exactly. The rule:
 *
 *   For the class whose first appearance in file order is a-th (0-based), a Park–Miller
 *   minimal-standard generator (x ← 48271·x mod (2³¹−1); exact in double arithmetic) seeded
 *   with ((seed · 7919 + a · 104729 + 1) mod (2³¹−1)) or 1 if that is 0. The j-th row of that
 *   class (0-based, file order) lies in block b = floor(j / kFolds); for each new block draw a
 *   permutation of 0..kFolds−1 by Fisher–Yates (for i = kFolds−1 down to 1: r = next() mod (i+1);
 *   swap perm[i], perm[r]); the row's fold = perm[j mod kFolds].
 *
 * Details a re-implementation needs: "mod" is the mathematical (non-negative) remainder, taken on
 * exact integers (the seed may be any safe integer); each block's permutation starts from the
 * identity [0, 1, …, kFolds−1]; next() first advances x and then returns the new x.
 * Park & Miller, "Random number generators: good ones are hard to find", CACM 31 (1988), with the
 * multiplier 48271 of their 1993 follow-up.
 *
 * Every block of kFolds rows of a class puts one row in each fold, so each fold receives
 * floor(n_c/k) or ceil(n_c/k) rows of class c.
 */
import { DataError } from './errors';

const MODULUS = 2147483647; // 2³¹ − 1
const MULTIPLIER = 48271;

/** The generator's starting state for class a (0-based order of first appearance). */
export function foldSeed(seed: number, classFirstAppearanceIndex: number): number {
  const m = BigInt(MODULUS);
  let start = (BigInt(seed) * 7919n + BigInt(classFirstAppearanceIndex) * 104729n + 1n) % m;
  if (start < 0n) start += m;
  return start === 0n ? 1 : Number(start);
}

interface ClassStream {
  state: number;
  rows: number;
  permutation: Int32Array;
}

export class FoldAssigner {
  private readonly streams: ClassStream[] = [];

  constructor(
    readonly kFolds: number,
    readonly seed: number,
  ) {
    if (!Number.isInteger(kFolds) || kFolds < 2) {
      throw new DataError('bad-option', `k-fold cross-validation needs at least 2 folds, not ${kFolds}.`, {}, 'Use kfold:N with N ≥ 2.');
    }
    if (!Number.isSafeInteger(seed)) throw new DataError('bad-option', `The fold seed must be an integer, not ${seed}.`);
  }

  /** The fold (0..kFolds−1) of the next row of the class first seen a-th; call once per row, in file order. */
  foldOf(classFirstAppearanceIndex: number): number {
    const stream = this.stream(classFirstAppearanceIndex);
    const k = this.kFolds;
    const j = stream.rows;
    if (j % k === 0) this.drawPermutation(stream);
    stream.rows = j + 1;
    return stream.permutation[j % k];
  }

  /**
   * Moves the class's stream on by `rows` rows as if foldOf had been called that many times, in
   * O(log rows): a parallel scan of a later part of the file starts its assigner here, knowing
   * how many rows of each class came before. Each block draws kFolds − 1 numbers, and n draws
   * multiply the state by 48271ⁿ mod (2³¹ − 1).
   */
  skip(classFirstAppearanceIndex: number, rows: number): void {
    if (!Number.isSafeInteger(rows) || rows < 0) throw new RangeError(`cannot skip ${rows} rows`);
    const stream = this.stream(classFirstAppearanceIndex);
    const k = this.kFolds;
    const from = stream.rows;
    const to = from + rows;
    const drawn = Math.ceil(from / k); // permutations drawn so far
    const block = Math.floor(to / k);
    if (to % k === 0) {
      stream.state = advance(stream.state, (to / k - drawn) * (k - 1));
    } else if (!(from % k !== 0 && block === Math.floor(from / k))) {
      stream.state = advance(stream.state, (block - drawn) * (k - 1));
      this.drawPermutation(stream);
    }
    stream.rows = to;
  }

  private stream(classFirstAppearanceIndex: number): ClassStream {
    let stream = this.streams[classFirstAppearanceIndex];
    if (stream === undefined) {
      if (!Number.isInteger(classFirstAppearanceIndex) || classFirstAppearanceIndex < 0) {
        throw new RangeError(`class appearance index ${classFirstAppearanceIndex} is not a non-negative integer`);
      }
      stream = { state: foldSeed(this.seed, classFirstAppearanceIndex), rows: 0, permutation: new Int32Array(this.kFolds) };
      this.streams[classFirstAppearanceIndex] = stream;
    }
    return stream;
  }

  /** The permutation of a new block: Fisher–Yates from the identity, kFolds − 1 draws. */
  private drawPermutation(stream: ClassStream): void {
    const perm = stream.permutation;
    const k = this.kFolds;
    for (let i = 0; i < k; i++) perm[i] = i;
    for (let i = k - 1; i >= 1; i--) {
      stream.state = (MULTIPLIER * stream.state) % MODULUS;
      const r = stream.state % (i + 1);
      const t = perm[i];
      perm[i] = perm[r];
      perm[r] = t;
    }
  }
}

/** state · 48271^draws mod (2³¹ − 1): the generator's state after `draws` more draws. */
function advance(state: number, draws: number): number {
  const m = BigInt(MODULUS);
  let result = BigInt(state);
  let base = BigInt(MULTIPLIER);
  for (let e = draws; e > 0; e = Math.floor(e / 2)) {
    if (e % 2 === 1) result = (result * base) % m;
    base = (base * base) % m;
  }
  return Number(result);
}
