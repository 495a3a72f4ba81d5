/**
 * Raw (unadjusted) means of groups of observations with pooled confidence intervals.
 *
 * For a group of n runs with mean m, the interval is m -/+ t(1 - (1 - confidence)/2, df) sqrt(MSE / n),
 * where MSE and df are the residual mean square and degrees of freedom of the fitted model (the pooled
 * error estimate; Montgomery 2017, Design and Analysis of Experiments, 9th ed., eq. 3.12). The SD is the
 * sample standard deviation (divisor n - 1), null for a group of one. Means and SDs use two passes
 * over the data so that the rounding error does not grow with the group size.
 */

import { type SummarizedGroups, summariesFromAccumulators } from "../comparisons/group-summary.js";
import { tQuantile } from "../distributions/t-distribution.js";

/** Statistics of one group; mean and interval are null for an empty group, SD null for n < 2. */
export interface GroupMean {
  readonly group: number;
  readonly n: number;
  readonly mean: number | null;
  readonly sd: number | null;
  readonly lower: number | null;
  readonly upper: number | null;
}

/** The pooled error estimate used for every interval: residual mean square and its df. */
export interface PooledError {
  readonly ms: number | null;
  readonly df: number;
}

/**
 * Computes n, mean, SD and the pooled confidence interval of each group `0..groupCount-1`, where
 * `codes[i]` is observation i's group. Intervals are null when the pooled error is unavailable
 * (no residual df) or the confidence is not strictly between 0 and 1.
 */
export function groupMeans(
  y: Float64Array,
  codes: Int32Array,
  groupCount: number,
  pooled: PooledError,
  confidence = 0.95,
): GroupMean[] {
  return groupMeansOfGroupings(y, [{ codes, groupCount }], pooled, confidence)[0]!;
}

/**
 * One way of grouping the observations: `codes[i]` is observation i's group in `0..groupCount-1`. With
 * `within`, the group is a cell of two factors, `codes[i] * within.levelCount + within.codes[i]` (the first
 * factor's levels varying slowest, as in `cellCodes`), formed as the observations are read instead of
 * stored as a third array of codes.
 */
export interface Grouping {
  readonly codes: Int32Array;
  readonly groupCount: number;
  readonly within?: { readonly codes: Int32Array; readonly levelCount: number };
}

/**
 * {@link groupMeans} for several groupings of the same observations, with the same results bit for bit
 * (each group's sums accumulated in observation order); the interval's t quantile is computed once.
 */
export function groupMeansOfGroupings(y: Float64Array, groupings: readonly Grouping[], pooled: PooledError, confidence = 0.95): GroupMean[][] {
  return groupStatisticsOfGroupings(y, groupings, pooled, confidence).means;
}

/**
 * Per group of every grouping (group g of grouping q at `offsets[q] + g`): the count, the plain sum and
 * first-pass mean, and the corrections and squared deviations about that mean.
 */
export interface GroupAccumulators {
  readonly offsets: Int32Array;
  readonly counts: Float64Array;
  readonly sums: Float64Array;
  readonly means: Float64Array;
  readonly corrections: Float64Array;
  readonly squares: Float64Array;
}

/**
 * The two passes of `groupStatisticsOfGroupings` over the observations. Typed arrays in and out, so that
 * another thread can make them (the CLI's helper thread, for a large file) with the same results bit for bit.
 */
export function accumulateGroupings(y: Float64Array, groupings: readonly Grouping[]): GroupAccumulators {
  const k = groupings.length;
  // All groupings' accumulators in one array each, grouping q's groups from offsets[q].
  const offsets = new Int32Array(k + 1);
  for (let q = 0; q < k; q++) offsets[q + 1] = offsets[q]! + Math.max(0, groupings[q]!.groupCount);
  const total = offsets[k]!;
  const counts = new Float64Array(total);
  const sums = new Float64Array(total);
  const means = new Float64Array(total);
  const corrections = new Float64Array(total);
  const squares = new Float64Array(total);
  const n = y.length;
  if (k <= 3 && groupings.every((g) => g.codes.length >= n && (g.within === undefined || g.within.codes.length >= n))) {
    accumulateTogether(y, groupings, offsets, counts, sums, means, corrections, squares);
  } else {
    for (let q = 0; q < k; q++) {
      const { codes, groupCount, within } = groupings[q]!;
      const from = offsets[q]!;
      const to = offsets[q + 1]!;
      const cells = [counts.subarray(from, to), sums.subarray(from, to), means.subarray(from, to), corrections.subarray(from, to), squares.subarray(from, to)] as const;
      if (within) accumulateCells(y, codes, within.codes, within.levelCount, groupCount, ...cells);
      else accumulateGroups(y, codes, groupCount, ...cells);
    }
  }
  return { offsets, counts, sums, means, corrections, squares };
}

/**
 * {@link groupMeansOfGroupings}, and per grouping the summaries the comparisons and variance checks start
 * from (`summarizeGroupsWithSums` of the same observations and groups): both come from the same two
 * passes, so a caller that needs both reads the observations once. A cell grouping's group is
 * `codes * within.levelCount + within.codes`, as in the crossed codes of the comparisons. `accumulated`:
 * the passes (`accumulateGroupings`), when made elsewhere.
 */
export function groupStatisticsOfGroupings(
  y: Float64Array,
  groupings: readonly Grouping[],
  pooled: PooledError,
  confidence = 0.95,
  accumulated: GroupAccumulators = accumulateGroupings(y, groupings),
): { means: GroupMean[][]; summarized: SummarizedGroups[] } {
  const { offsets, counts, sums, means, corrections, squares } = accumulated;
  const usable =
    pooled.ms !== null && Number.isFinite(pooled.ms) && pooled.ms >= 0 && pooled.df > 0 && confidence > 0 && confidence < 1;
  const t = usable ? tQuantile(1 - (1 - confidence) / 2, pooled.df) : Number.NaN;
  const meansOut = groupings.map((grouping, q) => {
    const out: GroupMean[] = [];
    for (let g = 0; g < grouping.groupCount; g++) {
      const at = offsets[q]! + g;
      const n = counts[at]!;
      if (n === 0) {
        out.push({ group: g, n: 0, mean: null, sd: null, lower: null, upper: null });
        continue;
      }
      const c = corrections[at]!;
      const mean = means[at]! + c / n;
      // Corrected two-pass variance (Chan, Golub & LeVeque 1983): (sum d^2 - (sum d)^2 / n) / (n - 1).
      const sd = n > 1 ? Math.sqrt(Math.max(0, squares[at]! - (c * c) / n) / (n - 1)) : null;
      const half = usable && Number.isFinite(t) ? t * Math.sqrt(pooled.ms! / n) : null;
      out.push({ group: g, n, mean, sd, lower: half !== null ? mean - half : null, upper: half !== null ? mean + half : null });
    }
    return out;
  });
  const summarized = groupings.map((_, q) => {
    const from = offsets[q]!;
    const to = offsets[q + 1]!;
    return {
      summaries: summariesFromAccumulators(counts.subarray(from, to), means.subarray(from, to), squares.subarray(from, to), corrections.subarray(from, to)),
      sums: sums.slice(from, to),
    };
  });
  return { means: meansOut, summarized };
}

/**
 * The two passes of up to three groupings at once (each grouping's codes at least as long as y): one pass
 * reads each value once for all of them, so a million observations cost two passes instead of two per
 * grouping. Each group still sums its values in observation order, so the results are bit for bit those
 * of `accumulateGroups` and `accumulateCells` one grouping at a time. The groupings are held in locals
 * (an absent one has no groups, so every observation skips it): a loop over an array of groupings per
 * observation costs more than the passes it saves.
 */
function accumulateTogether(
  y: Float64Array,
  groupings: readonly Grouping[],
  offsets: Int32Array,
  counts: Float64Array,
  sums: Float64Array,
  means: Float64Array,
  corrections: Float64Array,
  squares: Float64Array,
): void {
  const n = y.length;
  const none = new Int32Array(0);
  const part = (q: number) => {
    const g = groupings[q];
    return {
      first: g ? g.codes : none,
      second: g?.within ? g.within.codes : g ? g.codes : none,
      radix: g?.within ? g.within.levelCount : 0,
      size: g ? Math.max(0, g.groupCount) : 0,
      within: g?.within !== undefined,
      offset: g ? offsets[q]! : 0,
    };
  };
  const p0 = part(0);
  const p1 = part(1);
  const p2 = part(2);
  const f0 = p0.first, s0 = p0.second, r0 = p0.within ? p0.radix : 0, m0 = p0.within ? 1 : 0, z0 = p0.size, o0 = p0.offset;
  const f1 = p1.first, s1 = p1.second, r1 = p1.within ? p1.radix : 0, m1 = p1.within ? 1 : 0, z1 = p1.size, o1 = p1.offset;
  const f2 = p2.first, s2 = p2.second, r2 = p2.within ? p2.radix : 0, m2 = p2.within ? 1 : 0, z2 = p2.size, o2 = p2.offset;
  // Group of observation i in a grouping: first * radix + second for cells of two factors (m = 1), else
  // first (m = 0; first + 0 * second). Absent groupings have size 0 and are skipped before any read.
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    if (z0 > 0) {
      const g = m0 === 1 ? f0[i]! * r0 + s0[i]! : f0[i]!;
      if (g >= 0 && g < z0) {
        counts[o0 + g]!++;
        sums[o0 + g]! += v;
      }
    }
    if (z1 > 0) {
      const g = m1 === 1 ? f1[i]! * r1 + s1[i]! : f1[i]!;
      if (g >= 0 && g < z1) {
        counts[o1 + g]!++;
        sums[o1 + g]! += v;
      }
    }
    if (z2 > 0) {
      const g = m2 === 1 ? f2[i]! * r2 + s2[i]! : f2[i]!;
      if (g >= 0 && g < z2) {
        counts[o2 + g]!++;
        sums[o2 + g]! += v;
      }
    }
  }
  for (let at = 0; at < sums.length; at++) means[at] = counts[at]! > 0 ? sums[at]! / counts[at]! : 0;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    if (z0 > 0) {
      const g = m0 === 1 ? f0[i]! * r0 + s0[i]! : f0[i]!;
      if (g >= 0 && g < z0) {
        const d = v - means[o0 + g]!;
        corrections[o0 + g]! += d;
        squares[o0 + g]! += d * d;
      }
    }
    if (z1 > 0) {
      const g = m1 === 1 ? f1[i]! * r1 + s1[i]! : f1[i]!;
      if (g >= 0 && g < z1) {
        const d = v - means[o1 + g]!;
        corrections[o1 + g]! += d;
        squares[o1 + g]! += d * d;
      }
    }
    if (z2 > 0) {
      const g = m2 === 1 ? f2[i]! * r2 + s2[i]! : f2[i]!;
      if (g >= 0 && g < z2) {
        const d = v - means[o2 + g]!;
        corrections[o2 + g]! += d;
        squares[o2 + g]! += d * d;
      }
    }
  }
}

/**
 * The two passes of one grouping over typed arrays held in locals: counts, means (first pass), then the
 * corrections and squared deviations about those means (second pass), as described in the module comment.
 */
function accumulateGroups(
  y: Float64Array,
  codes: Int32Array,
  groupCount: number,
  counts: Float64Array,
  sums: Float64Array,
  means: Float64Array,
  corrections: Float64Array,
  squares: Float64Array,
): void {
  const m = Math.min(y.length, codes.length);
  for (let i = 0; i < m; i++) {
    const g = codes[i]!;
    if (g < 0 || g >= groupCount) continue;
    counts[g]!++;
    sums[g]! += y[i]!;
  }
  for (let g = 0; g < groupCount; g++) means[g] = counts[g]! > 0 ? sums[g]! / counts[g]! : 0;
  for (let i = 0; i < m; i++) {
    const g = codes[i]!;
    if (g < 0 || g >= groupCount) continue;
    const d = y[i]! - means[g]!;
    corrections[g]! += d;
    squares[g]! += d * d;
  }
}

/** As `accumulateGroups`, for the cells of two factors (group = first * levelCount + second). */
function accumulateCells(
  y: Float64Array,
  first: Int32Array,
  second: Int32Array,
  levelCount: number,
  groupCount: number,
  counts: Float64Array,
  sums: Float64Array,
  means: Float64Array,
  corrections: Float64Array,
  squares: Float64Array,
): void {
  const m = Math.min(y.length, first.length, second.length);
  for (let i = 0; i < m; i++) {
    const g = first[i]! * levelCount + second[i]!;
    if (g < 0 || g >= groupCount) continue;
    counts[g]!++;
    sums[g]! += y[i]!;
  }
  for (let g = 0; g < groupCount; g++) means[g] = counts[g]! > 0 ? sums[g]! / counts[g]! : 0;
  for (let i = 0; i < m; i++) {
    const g = first[i]! * levelCount + second[i]!;
    if (g < 0 || g >= groupCount) continue;
    const d = y[i]! - means[g]!;
    corrections[g]! += d;
    squares[g]! += d * d;
  }
}

/**
 * Combines several factors' level codes into one cell code per observation, the first factor's
 * levels varying slowest (cell = ((a * L_b) + b) * L_c + c ...).
 */
export function cellCodes(factors: readonly { readonly levelCount: number; readonly codes: Int32Array }[]): { codes: Int32Array; count: number } {
  const n = factors.length > 0 ? factors[0]!.codes.length : 0;
  const codes = new Int32Array(n);
  let count = 1;
  for (const f of factors) {
    for (let i = 0; i < n; i++) codes[i] = codes[i]! * f.levelCount + f.codes[i]!;
    count *= f.levelCount;
  }
  return { codes, count };
}
