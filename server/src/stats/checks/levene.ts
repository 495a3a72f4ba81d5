/**
 * Tests of equal variances across groups.
 *
 * - Levene (1960): one-way ANOVA F on |y - group mean|.
 * - Brown & Forsythe (1974): the same on |y - group median|, robust to non-normal data; this is the one
 *   Trialbook's `unequal-variance` diagnostic uses.
 * Both equal car::leveneTest with center = mean and center = median.
 */

import { type FTest, fTestFromSums } from "./one-way-f.js";
import { medianInPlace, selectInPlace } from "./select.js";

/** Levene's and the Brown-Forsythe test of the same groups; each null when undefined. */
export interface LeveneTests {
  readonly levene: FTest | null;
  readonly brownForsythe: FTest | null;
}

/**
 * Levene's (center "mean") or Brown-Forsythe's (center "median") test; null when undefined.
 * `codes[i]` is observation i's group, 0..count-1.
 */
export function leveneTest(y: ArrayLike<number>, codes: ArrayLike<number>, count: number, center: "mean" | "median"): FTest | null {
  const { size, sum } = sizesAndSums(y, codes, count);
  const centers = center === "mean" ? groupMeans(size, sum) : gatheredMedians(y, codes, size);
  return deviationTests(y, codes, size, centers, null)[0];
}

/** Group sizes and observation-order sums the caller already has (e.g. from group summaries). */
export interface GroupTotals {
  readonly sizes: ArrayLike<number>;
  readonly sums: ArrayLike<number>;
}

/**
 * Both tests at once, sharing the passes over the data. `totals`, when the caller has them, save the
 * pass that counts and sums the groups. Few values: the values are gathered by group for the medians
 * (selected, not sorted), then one pass sums both absolute deviations and one forms both within-group sums
 * of squares. Many values (binnedTests): four passes, the medians from a histogram. Every sum runs in
 * observation order, as the one-way F of the deviations does, so the results equal `leveneTest` bit for
 * bit.
 */
export function leveneTests(y: ArrayLike<number>, codes: ArrayLike<number>, count: number, totals?: GroupTotals): LeveneTests {
  let size: Int32Array;
  let sum: Float64Array;
  if (totals) {
    size = Int32Array.from(totals.sizes);
    sum = Float64Array.from(totals.sums);
  } else ({ size, sum } = sizesAndSums(y, codes, count));
  const means = groupMeans(size, sum);
  if (y.length >= BINNED_FROM) {
    const binned = binnedTests(y, codes, size, sum, means);
    if (binned) return binned;
  }
  const [levene, brownForsythe] = deviationTests(y, codes, size, means, gatheredMedians(y, codes, size));
  return { levene, brownForsythe };
}

function sizesAndSums(y: ArrayLike<number>, codes: ArrayLike<number>, count: number): { size: Int32Array; sum: Float64Array } {
  const size = new Int32Array(count);
  const sum = new Float64Array(count);
  for (let i = 0; i < y.length; i++) {
    const g = codes[i]!;
    size[g]!++;
    sum[g] += y[i]!;
  }
  return { size, sum };
}

function groupMeans(size: Int32Array, sum: Float64Array): Float64Array {
  const means = new Float64Array(size.length);
  for (let g = 0; g < size.length; g++) means[g] = size[g]! > 0 ? sum[g]! / size[g]! : 0;
  return means;
}

/**
 * Exact group medians: the values are gathered into one array in group order (a counting sort of the
 * codes, Seward 1954) and each group's median is selected in place (select.ts). Data holding NaN, which
 * selection cannot order, fall back to sorting each group, as before.
 */
function gatheredMedians(y: ArrayLike<number>, codes: ArrayLike<number>, size: Int32Array): Float64Array {
  const count = size.length;
  const start = new Int32Array(count + 1);
  for (let g = 0; g < count; g++) start[g + 1] = start[g]! + size[g]!;
  const fill = start.slice(0, count);
  const grouped = new Float64Array(y.length);
  let nan = false;
  for (let i = 0; i < y.length; i++) {
    const v = y[i]!;
    if (v !== v) nan = true;
    grouped[fill[codes[i]!]!++] = v;
  }
  const medians = new Float64Array(count);
  for (let g = 0; g < count; g++) {
    const m = size[g]!;
    if (m === 0) continue;
    if (!nan) {
      medians[g] = medianInPlace(grouped, start[g]!, start[g + 1]!);
      continue;
    }
    const sorted = grouped.subarray(start[g]!, start[g + 1]!).sort();
    const h = m >> 1;
    medians[g] = m % 2 ? sorted[h]! : (sorted[h - 1]! + sorted[h]!) / 2;
  }
  return medians;
}

/** From this many values on, medians are found through a histogram (binnedTests) instead of gathering all. */
const BINNED_FROM = 32768;

/** Histogram cells in all (groups x bins), so that the counts stay in the processor's cache. */
const HISTOGRAM_CELLS = 1 << 16;

/** Values sampled (evenly spaced) to place the histogram's bins. */
const RANGE_SAMPLE = 4096;

/**
 * Both tests for many values in four passes, without copying every value:
 * 1. a histogram of every group's values over equal-width bins, and the sums of |y - mean|;
 * 2. the values in the bin(s) holding each group's middle rank(s) are gathered and the medians selected
 *    exactly among them (a bucket selection, as in the distributive partitioning of Dobosiewicz 1978);
 * 3. the sums of |y - median| and the within-group sum of squares of |y - mean|;
 * 4. the within-group sum of squares of |y - median|.
 * A value's bin is a monotone function of it (clamped to mean ± 4 SD of a sample of the values), so
 * ranks counted by bins are ranks within the group and the medians are exact whatever the data; unusual
 * data only make the gathered bins larger. Null for data holding NaN or without spread in the sample
 * (the caller then gathers every value).
 */
function binnedTests(y: ArrayLike<number>, codes: ArrayLike<number>, size: Int32Array, sum: Float64Array, means: Float64Array): LeveneTests | null {
  const n = y.length;
  const count = size.length;
  // NaN anywhere makes its group's sum NaN (as does +Infinity with -Infinity, which is as well gathered).
  for (let g = 0; g < count; g++) if (sum[g] !== sum[g]) return null;
  const stride = Math.max(1, Math.floor(n / RANGE_SAMPLE));
  let s1 = 0;
  let s2 = 0;
  let taken = 0;
  for (let i = 0; i < n; i += stride, taken++) {
    s1 += y[i]!;
    s2 += y[i]! * y[i]!;
  }
  const centre = s1 / taken;
  const sd = Math.sqrt(Math.max(0, s2 / taken - centre * centre));
  const bins = Math.max(16, Math.min(4096, Math.floor(HISTOGRAM_CELLS / Math.max(1, count))));
  const lo = centre - 4 * sd;
  const scale = bins / (8 * sd);
  if (!(sd > 0) || !Number.isFinite(lo) || !(scale > 0) || !Number.isFinite(scale)) return null;
  const top = bins - 1;

  // Pass 1.
  const histogram = new Int32Array(count * bins);
  const sumA = new Float64Array(count);
  let totalA = 0;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    const g = codes[i]!;
    const t = (v - lo) * scale;
    histogram[g * bins + (t <= 0 ? 0 : t >= top ? top : t | 0)]!++;
    const da = Math.abs(v - means[g]!);
    sumA[g] += da;
    totalA += da;
  }
  // Per group: the bins holding ranks h - 1 (even sizes) and h, and how many values lie below them.
  const firstBin = new Int32Array(count);
  const lastBin = new Int32Array(count).fill(-1);
  const below = new Int32Array(count);
  const start = new Int32Array(count + 1);
  for (let g = 0; g < count; g++) {
    const m = size[g]!;
    let held = 0;
    if (m > 0) {
      const h = m >> 1;
      const lowRank = m % 2 ? h : h - 1;
      const row = g * bins;
      let b = 0;
      let cumulative = 0;
      while (cumulative + histogram[row + b]! <= lowRank) cumulative += histogram[row + b++]!;
      let last = b;
      let through = cumulative + histogram[row + b]!;
      while (through <= h) through += histogram[row + ++last]!;
      firstBin[g] = b;
      lastBin[g] = last;
      below[g] = cumulative;
      held = through - cumulative;
    }
    start[g + 1] = start[g]! + held;
  }

  // Pass 2.
  const gathered = new Float64Array(start[count]!);
  const fill = start.slice(0, count);
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    const g = codes[i]!;
    const t = (v - lo) * scale;
    const b = t <= 0 ? 0 : t >= top ? top : t | 0;
    if (b >= firstBin[g]! && b <= lastBin[g]!) gathered[fill[g]!++] = v;
  }
  const medians = new Float64Array(count);
  for (let g = 0; g < count; g++) {
    const m = size[g]!;
    if (m === 0) continue;
    const from = start[g]!;
    const h = m >> 1;
    // Rank h of the group is rank h - below of its gathered values.
    const k = from + h - below[g]!;
    selectInPlace(gathered, k, from, start[g + 1]! - 1);
    const upper = gathered[k]!;
    if (m % 2) {
      medians[g] = upper;
      continue;
    }
    // Rank h - 1 is gathered too: the largest gathered value before position k.
    let lower = gathered[from]!;
    for (let i = from + 1; i < k; i++) if (gathered[i]! > lower) lower = gathered[i]!;
    medians[g] = (lower + upper) / 2;
  }

  // Pass 3.
  const meanA = new Float64Array(count);
  for (let g = 0; g < count; g++) meanA[g] = sumA[g]! / size[g]!;
  const sumB = new Float64Array(count);
  let totalB = 0;
  let withinA = 0;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    const g = codes[i]!;
    const db = Math.abs(v - medians[g]!);
    sumB[g] += db;
    totalB += db;
    withinA += (Math.abs(v - means[g]!) - meanA[g]!) ** 2;
  }

  // Pass 4.
  const meanB = new Float64Array(count);
  for (let g = 0; g < count; g++) meanB[g] = sumB[g]! / size[g]!;
  let withinB = 0;
  for (let i = 0; i < n; i++) {
    const g = codes[i]!;
    withinB += (Math.abs(y[i]! - medians[g]!) - meanB[g]!) ** 2;
  }
  return { levene: fTestFromSums(size, sumA, totalA, n, withinA), brownForsythe: fTestFromSums(size, sumB, totalB, n, withinB) };
}

/**
 * The one-way F of |y - a[group]| and, when `b` is given, of |y - b[group]|, in two passes: sums of the
 * deviations, then their within-group sums of squares. The deviations are recomputed in the second pass
 * rather than stored (the same operations give the same values).
 */
function deviationTests(y: ArrayLike<number>, codes: ArrayLike<number>, size: Int32Array, a: Float64Array, b: Float64Array | null): [FTest | null, FTest | null] {
  const count = size.length;
  const n = y.length;
  const sumA = new Float64Array(count);
  const sumB = new Float64Array(count);
  let totalA = 0;
  let totalB = 0;
  if (b) {
    for (let i = 0; i < n; i++) {
      const g = codes[i]!;
      const v = y[i]!;
      const da = Math.abs(v - a[g]!);
      const db = Math.abs(v - b[g]!);
      sumA[g] += da;
      sumB[g] += db;
      totalA += da;
      totalB += db;
    }
  } else {
    for (let i = 0; i < n; i++) {
      const g = codes[i]!;
      const da = Math.abs(y[i]! - a[g]!);
      sumA[g] += da;
      totalA += da;
    }
  }
  const meanA = new Float64Array(count);
  const meanB = new Float64Array(count);
  for (let g = 0; g < count; g++) {
    meanA[g] = sumA[g]! / size[g]!;
    meanB[g] = sumB[g]! / size[g]!;
  }
  let withinA = 0;
  let withinB = 0;
  if (b) {
    for (let i = 0; i < n; i++) {
      const g = codes[i]!;
      const v = y[i]!;
      withinA += (Math.abs(v - a[g]!) - meanA[g]!) ** 2;
      withinB += (Math.abs(v - b[g]!) - meanB[g]!) ** 2;
    }
  } else {
    for (let i = 0; i < n; i++) {
      const g = codes[i]!;
      withinA += (Math.abs(y[i]! - a[g]!) - meanA[g]!) ** 2;
    }
  }
  return [fTestFromSums(size, sumA, totalA, n, withinA), b ? fTestFromSums(size, sumB, totalB, n, withinB) : null];
}
