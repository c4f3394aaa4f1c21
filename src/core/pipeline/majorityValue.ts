/**
 * The most frequent value of each feature when one value fills most of the rows, in two streaming
 * passes with constant memory: pass 1 runs the Boyer–Moore majority vote (Boyer & Moore 1991, "MJRTY
 * — a fast majority vote algorithm"), which ends on the value that fills more than half of the rows
 * whenever there is one; pass 2 counts that candidate exactly. Enough for the near-constant rule
 * (one value in ≥ 99% of the rows), which only a majority value can meet.
 */
export class MajorityVote {
  readonly candidates: Float64Array;
  readonly votes: Float64Array;

  constructor(d: number) {
    this.candidates = new Float64Array(d);
    this.votes = new Float64Array(d);
  }

  /** Pass 1: one row, `values[offset .. offset + d)`. */
  vote(values: Float64Array, offset: number): void {
    // Each row reads and writes the same arrays whatever the branch: a store made only in a branch
    // first taken after V8 optimised the row loop would deoptimize it (no feedback for the store yet).
    const { candidates, votes } = this;
    const d = candidates.length;
    for (let j = 0; j < d; j++) {
      const v = values[offset + j]!;
      const held = votes[j]!;
      const candidate = candidates[j]!;
      candidates[j] = held === 0 ? v : candidate;
      votes[j] = held === 0 ? 1 : held + (candidate === v ? 1 : -1);
    }
  }
}

/**
 * Combines the votes of two parts of the rows (a parallel scan): equal candidates add their votes,
 * different ones cancel, the larger keeping the difference. A value filling more than half of all
 * the rows still wins, so the near-constant rule sees the same value whatever the split.
 */
export function mergeMajorityVotes(into: MajorityVote, candidates: Float64Array, votes: Float64Array): void {
  for (let j = 0; j < into.candidates.length; j++) {
    const v = votes[j]!;
    if (v === 0) continue;
    const mine = into.votes[j]!;
    if (mine === 0 || into.candidates[j] === candidates[j]) {
      into.candidates[j] = candidates[j]!;
      into.votes[j] = mine + v;
    } else if (v > mine) {
      into.candidates[j] = candidates[j]!;
      into.votes[j] = v - mine;
    } else into.votes[j] = mine - v;
  }
}

/** Pass 2: exact counts of each feature's candidate value. */
export class CandidateCount {
  readonly counts: Float64Array;

  constructor(readonly candidates: Float64Array) {
    this.counts = new Float64Array(candidates.length);
  }

  count(values: Float64Array, offset: number): void {
    const { candidates, counts } = this;
    const d = candidates.length;
    // No store in a branch (see MajorityVote.vote).
    for (let j = 0; j < d; j++) counts[j]! += values[offset + j] === candidates[j] ? 1 : 0;
  }
}
