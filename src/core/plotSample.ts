/**
 * The plot sample: which rows the panel draws when there are more than its point budget.
 *
 * Deterministic and stratified, decided in one streaming pass from the class counts alone, so the
 * same file and budget give the same points on every run and every machine.
 *
 * Allocation (quota per class, Σ quota = min(budget, n)):
 *  - everything when n ≤ budget;
 *  - else each class first gets min(n_c, ⌊budget / (2K)⌋) rows, so small classes stay visible;
 *  - the rest of the budget is shared in proportion to the rows each class has left over, by the
 *    largest-remainder rule (ties: the class listed first), never more than a class has.
 * Selection within a class (systematic sampling): the j-th used row of class c (0-based, file order)
 * is drawn when ⌊(j + 1)·q_c / n_c⌋ > ⌊j·q_c / n_c⌋, which draws exactly q_c rows spread evenly
 * through the file.
 */

/** Rows per class to draw; `counts` and the result are in the same class order. */
export function allocatePlotQuota(counts: readonly number[], budget: number): number[] {
  const total = counts.reduce((a, b) => a + b, 0);
  if (total <= budget) return [...counts];
  const K = counts.length;
  const floor = Math.floor(budget / (2 * K));
  const quota = counts.map((n) => Math.min(n, floor));
  let remaining = budget - quota.reduce((a, b) => a + b, 0);
  // Share the rest by largest remainder; repeat while some class is capped at its row count.
  while (remaining > 0) {
    const left = counts.map((n, c) => n - quota[c]!);
    const leftTotal = left.reduce((a, b) => a + b, 0);
    if (leftTotal === 0) break;
    const exact = left.map((l) => (l * remaining) / leftTotal);
    const whole = exact.map((e, c) => Math.min(left[c]!, Math.floor(e)));
    let given = whole.reduce((a, b) => a + b, 0);
    const order = exact
      .map((e, c) => ({ c, fraction: e - Math.floor(e) }))
      .sort((a, b) => b.fraction - a.fraction || a.c - b.c);
    for (const { c } of order) {
      if (given >= remaining) break;
      if (whole[c]! < left[c]!) {
        whole[c]! += 1;
        given += 1;
      }
    }
    for (let c = 0; c < K; c++) quota[c]! += whole[c]!;
    remaining -= given;
    if (given === 0) break;
  }
  return quota;
}

/** Streams the decision "is this row in the sample?" for rows given in file order. */
export class PlotSampler {
  /**
   * Per class, (j · quota) mod count for the class's next used row j: row j is taken when
   * ⌊(j + 1)·q / n⌋ > ⌊j·q / n⌋, that is when this remainder plus q reaches n (q < n). Kept as the
   * remainder, the test needs no product, which overflows 32 bits (and deoptimized the row loop
   * V8 had compiled with small-integer arithmetic) once j·q passes 2³¹.
   */
  private readonly rest: Float64Array;

  /** `start`: used rows of each class before the first row given (a scan of a later part of the file). */
  constructor(
    private readonly counts: readonly number[],
    readonly quota: readonly number[],
    start?: readonly number[],
  ) {
    // Exact: start · quota stays far below 2⁵³.
    // A typed array: a plain array's map would depend on how its first values were represented.
    this.rest = Float64Array.from(counts, (n, c) => (n > 0 ? ((start?.[c] ?? 0) * quota[c]!) % n : 0));
  }

  /** Call once per used row of class `c`, in file order. */
  take(c: number): boolean {
    const n = this.counts[c]!;
    const q = this.quota[c]!;
    if (q >= n) return true;
    const reached = this.rest[c]! + q;
    const taken = reached >= n;
    this.rest[c] = reached - (taken ? n : 0); // the subtraction made on every row, not only in a branch
    return taken;
  }
}
