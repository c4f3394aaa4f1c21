/** Deterministic pseudo-random numbers for property tests (mulberry32; common practice, no source). */
export function seededRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by Box–Muller from a uniform source. */
export function normalFrom(uniform: () => number): () => number {
  return () => {
    const u = 1 - uniform();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * uniform());
  };
}

/** |actual − expected| ≤ tolerance·|expected|, with a message naming the quantity. */
export function relativeClose(actual: number, expected: number, tolerance: number): boolean {
  if (actual === expected) return true;
  return Math.abs(actual - expected) <= tolerance * Math.abs(expected);
}
