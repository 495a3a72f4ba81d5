/**
 * Tests of equal variances across groups.
 *
 * - Levene (1960): one-way ANOVA F on |y - group mean|.
 * - Brown & Forsythe (1974): the same on |y - group median|, robust to non-normal data; this is the one
 *   Trialbook's `unequal-variance` diagnostic uses.
 * Both equal car::leveneTest with center = mean and center = median.
 */

import { type FTest, oneWayF } from "./one-way-f.js";

/**
 * Levene's (center "mean") or Brown-Forsythe's (center "median") test; null when undefined.
 *
 * Linear passes over typed arrays: with a million runs an array of numbers per group and a closure per
 * value cost more than the test. Group values are gathered into one Float64Array in group order (a
 * counting sort of the codes) only for the median, and each group's slice is sorted in place. Sums run
 * in observation order, so the results equal the straightforward computation bit for bit.
 */
export function leveneTest(y: ArrayLike<number>, codes: ArrayLike<number>, count: number, center: "mean" | "median"): FTest | null {
  const n = y.length;
  const size = new Int32Array(count);
  for (let i = 0; i < n; i++) size[codes[i]!]!++;
  const centers = new Float64Array(count);
  if (center === "mean") {
    for (let i = 0; i < n; i++) centers[codes[i]!] += y[i]!;
    for (let g = 0; g < count; g++) centers[g] = size[g]! > 0 ? centers[g]! / size[g]! : 0;
  } else {
    const start = new Int32Array(count + 1);
    for (let g = 0; g < count; g++) start[g + 1] = start[g]! + size[g]!;
    const fill = start.slice(0, count);
    const grouped = new Float64Array(n);
    for (let i = 0; i < n; i++) grouped[fill[codes[i]!]!++] = y[i]!;
    for (let g = 0; g < count; g++) {
      const m = size[g]!;
      if (m === 0) continue;
      const sorted = grouped.subarray(start[g]!, start[g + 1]!).sort();
      const h = m >> 1;
      centers[g] = m % 2 ? sorted[h]! : (sorted[h - 1]! + sorted[h]!) / 2;
    }
  }
  const deviations = new Float64Array(n);
  for (let i = 0; i < n; i++) deviations[i] = Math.abs(y[i]! - centers[codes[i]!]!);
  return oneWayF(deviations, codes, count);
}
