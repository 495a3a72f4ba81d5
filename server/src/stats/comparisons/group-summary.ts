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
  return { summaries: finish(n, mean, ss, correction), sums: sum };
}

/**
 * `summarizeGroupsWithSums` of several groupings of the same observations (e.g. each factor's levels and
 * their cells), two or three at a time in the same two passes: each pass reads every value once and
 * updates one accumulator per grouping. Each grouping's sums still run in observation order, so every
 * result equals `summarizeGroupsWithSums` of that grouping alone, bit for bit.
 */
export function summarizeGroupings(y: ArrayLike<number>, codes: readonly ArrayLike<number>[], counts: readonly number[]): { summaries: GroupSummary[]; sums: Float64Array }[] {
  const out: { summaries: GroupSummary[]; sums: Float64Array }[] = [];
  for (let j = 0; j < codes.length; j += 3) {
    if (j + 1 === codes.length) out.push(summarizeGroupsWithSums(y, codes[j]!, counts[j]!));
    else out.push(...twoOrThree(y, codes[j]!, counts[j]!, codes[j + 1]!, counts[j + 1]!, codes[j + 2] ?? null, counts[j + 2] ?? 0));
  }
  return out;
}

/** Two or three groupings (`c` null for two) in two passes, written out so that the loops stay simple. */
function twoOrThree(
  y: ArrayLike<number>,
  a: ArrayLike<number>,
  countA: number,
  b: ArrayLike<number>,
  countB: number,
  c: ArrayLike<number> | null,
  countC: number,
): { summaries: GroupSummary[]; sums: Float64Array }[] {
  const nA = new Float64Array(countA);
  const sumA = new Float64Array(countA);
  const nB = new Float64Array(countB);
  const sumB = new Float64Array(countB);
  const nC = new Float64Array(countC);
  const sumC = new Float64Array(countC);
  const three = c !== null;
  for (let i = 0; i < y.length; i++) {
    const v = y[i]!;
    let g = a[i]!;
    if (g >= 0 && g < countA) {
      nA[g]!++;
      sumA[g] += v;
    }
    g = b[i]!;
    if (g >= 0 && g < countB) {
      nB[g]!++;
      sumB[g] += v;
    }
    if (three) {
      g = c[i]!;
      if (g >= 0 && g < countC) {
        nC[g]!++;
        sumC[g] += v;
      }
    }
  }
  const meanA = Float64Array.from(sumA, (s, g) => (nA[g]! > 0 ? s / nA[g]! : 0));
  const meanB = Float64Array.from(sumB, (s, g) => (nB[g]! > 0 ? s / nB[g]! : 0));
  const meanC = Float64Array.from(sumC, (s, g) => (nC[g]! > 0 ? s / nC[g]! : 0));
  const ssA = new Float64Array(countA);
  const corrA = new Float64Array(countA);
  const ssB = new Float64Array(countB);
  const corrB = new Float64Array(countB);
  const ssC = new Float64Array(countC);
  const corrC = new Float64Array(countC);
  for (let i = 0; i < y.length; i++) {
    const v = y[i]!;
    let g = a[i]!;
    if (g >= 0 && g < countA) {
      const d = v - meanA[g]!;
      ssA[g] += d * d;
      corrA[g] += d;
    }
    g = b[i]!;
    if (g >= 0 && g < countB) {
      const d = v - meanB[g]!;
      ssB[g] += d * d;
      corrB[g] += d;
    }
    if (three) {
      g = c[i]!;
      if (g >= 0 && g < countC) {
        const d = v - meanC[g]!;
        ssC[g] += d * d;
        corrC[g] += d;
      }
    }
  }
  const out = [
    { summaries: finish(nA, meanA, ssA, corrA), sums: sumA },
    { summaries: finish(nB, meanB, ssB, corrB), sums: sumB },
  ];
  if (three) out.push({ summaries: finish(nC, meanC, ssC, corrC), sums: sumC });
  return out;
}

/** A grouping's summaries and its groups' plain sums (what `summarizeGroupsWithSums` returns). */
export interface SummarizedGroups {
  readonly summaries: GroupSummary[];
  readonly sums: Float64Array;
}

/**
 * Summaries from the two passes' accumulators: per group the count, the first pass's mean (sum / n, 0 for
 * an empty group), and the second pass's sum of squared deviations from it and sum of deviations. Other
 * modules that run the same two passes (the level means) make the same summaries with it.
 */
export function summariesFromAccumulators(n: Float64Array, mean: Float64Array, ss: Float64Array, correction: Float64Array): GroupSummary[] {
  return finish(n, mean, ss, correction);
}

/** Summaries from the two passes' accumulators. */
function finish(n: Float64Array, mean: Float64Array, ss: Float64Array, correction: Float64Array): GroupSummary[] {
  return Array.from({ length: n.length }, (_, g) => {
    const size = n[g]!;
    // Corrected two-pass formula (Chan, Golub & LeVeque 1983): subtract the squared sum of deviations.
    const variance = size > 1 ? Math.max(0, (ss[g]! - (correction[g]! * correction[g]!) / size) / (size - 1)) : null;
    return { n: size, mean: mean[g]! + (size > 0 ? correction[g]! / size : 0), variance };
  });
}
