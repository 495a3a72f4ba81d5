/**
 * Size, mean and sample variance of groups of observations, the input of every pairwise comparison and of
 * the variance checks. Two passes per group, so the rounding error does not grow with the group size.
 */

/** One group's summary; `variance` (divisor n - 1) is null for n < 2. */
export interface GroupSummary {
  readonly n: number;
  readonly mean: number;
  readonly variance: number | null;
}

/** Summaries of groups 0..count-1 (codes[i] is observation i's group; -1 leaves it out). Empty groups have n = 0, mean 0. */
export function summarizeGroups(y: ArrayLike<number>, codes: ArrayLike<number>, count: number): GroupSummary[] {
  return summarizeGroupsWithSums(y, codes, count).summaries;
}

/**
 * `summarizeGroups`, and each group's plain sum of values in observation order (the first pass's), which
 * the Levene test's group means are formed from: a caller holding both saves a pass over the data.
 */
export function summarizeGroupsWithSums(y: ArrayLike<number>, codes: ArrayLike<number>, count: number): { summaries: GroupSummary[]; sums: Float64Array } {
  const n = new Float64Array(count);
  const sum = new Float64Array(count);
  for (let i = 0; i < y.length; i++) {
    const g = codes[i]!;
    if (g < 0 || g >= count) continue;
    n[g]!++;
    sum[g] += y[i]!;
  }
  const mean = Float64Array.from(sum, (s, g) => (n[g]! > 0 ? s / n[g]! : 0));
  const ss = new Float64Array(count);
  const correction = new Float64Array(count);
  for (let i = 0; i < y.length; i++) {
    const g = codes[i]!;
    if (g < 0 || g >= count) continue;
    const d = y[i]! - mean[g]!;
    ss[g] += d * d;
    correction[g] += d;
  }
  const summaries = Array.from({ length: count }, (_, g) => {
    const size = n[g]!;
    // Corrected two-pass formula (Chan, Golub & LeVeque 1983): subtract the squared sum of deviations.
    const variance = size > 1 ? Math.max(0, (ss[g]! - (correction[g]! * correction[g]!) / size) / (size - 1)) : null;
    return { n: size, mean: mean[g]! + (size > 0 ? correction[g]! / size : 0), variance };
  });
  return { summaries, sums: sum };
}
