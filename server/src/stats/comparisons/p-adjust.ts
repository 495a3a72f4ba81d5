/**
 * Multiplicity adjustments of a family of p-values: Bonferroni and Holm's (1979) step-down method
 * ("A simple sequentially rejective multiple test procedure", Scand. J. Statist. 6, 65-70), with the
 * monotonicity step so that adjusted p-values follow the order of the raw ones (as R's p.adjust does).
 */

/** Bonferroni: min(1, m p). */
export function bonferroniAdjust(p: readonly number[]): number[] {
  return p.map((x) => Math.min(1, p.length * x));
}

/** Holm: sort ascending, multiply the i-th smallest (0-based) by m - i, take running maxima, cap at 1. */
export function holmAdjust(p: readonly number[]): number[] {
  const m = p.length;
  const order = p.map((_, i) => i).sort((a, b) => p[a]! - p[b]!);
  const out = new Array<number>(m);
  let running = 0;
  order.forEach((index, rank) => {
    running = Math.max(running, Math.min(1, (m - rank) * p[index]!));
    out[index] = running;
  });
  return out;
}
