/**
 * The order classes are reported in: when every label reads as a decimal number (`3`, `-1.5`,
 * `2e3`, surrounding spaces allowed), by numeric value; otherwise by Unicode code point, which is
 * what Python's `sorted` and R's `sort(method = "radix")` give, so generated scripts agree.
 * Labels with equal numeric value (`1` and `1.0`) fall back to code point order.
 */
const DECIMAL = /^\s*[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?\s*$/;

/** Compares two strings by Unicode code point (not UTF-16 code unit). */
export function compareCodePoints(a: string, b: string): number {
  const x = Array.from(a);
  const y = Array.from(b);
  const n = Math.min(x.length, y.length);
  for (let i = 0; i < n; i++) {
    const d = x[i].codePointAt(0)! - y[i].codePointAt(0)!;
    if (d !== 0) return d;
  }
  return x.length - y.length;
}

/** A sorted copy of the labels (see the module comment). */
export function sortLabels(labels: string[]): string[] {
  const numeric = labels.length > 0 && labels.every((l) => DECIMAL.test(l));
  const copy = [...labels];
  if (numeric) return copy.sort((a, b) => Number(a) - Number(b) || compareCodePoints(a, b));
  return copy.sort(compareCodePoints);
}
