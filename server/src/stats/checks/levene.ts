/**
 * Tests of equal variances across groups.
 *
 * - Levene (1960): one-way ANOVA F on |y - group mean|.
 * - Brown & Forsythe (1974): the same on |y - group median|, robust to non-normal data; this is the one
 *   Trialbook's `unequal-variance` diagnostic uses.
 * Both equal car::leveneTest with center = mean and center = median.
 */

import { type FTest, fTestFromSums } from "./one-way-f.js";
import { medianInPlace } from "./select.js";

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
  const centers = center === "mean" ? groupMeans(size, sum) : groupMedians(y, codes, size);
  return deviationTests(y, codes, size, centers, null)[0];
}

/**
 * Both tests at once, sharing the passes over the data: one for the group sizes and sums, one to gather
 * the values by group for the medians (found by selection, not sorting), one for the sums of both
 * absolute deviations and one for both within-group sums of squares. Every sum runs in observation order,
 * as the one-way F of the deviations does, so the results equal `leveneTest` bit for bit.
 */
export function leveneTests(y: ArrayLike<number>, codes: ArrayLike<number>, count: number): LeveneTests {
  const { size, sum } = sizesAndSums(y, codes, count);
  const [levene, brownForsythe] = deviationTests(y, codes, size, groupMeans(size, sum), groupMedians(y, codes, size));
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
function groupMedians(y: ArrayLike<number>, codes: ArrayLike<number>, size: Int32Array): Float64Array {
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
