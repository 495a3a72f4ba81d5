/**
 * Tests of equal variances across groups.
 *
 * - Levene (1960): one-way ANOVA F on |y - group mean|.
 * - Brown & Forsythe (1974): the same on |y - group median|, robust to non-normal data; this is the one
 *   Trialbook's `unequal-variance` diagnostic uses.
 * Both equal car::leveneTest with center = mean and center = median.
 */

import { type FTest, oneWayF } from "./one-way-f.js";

/** Levene's (center "mean") or Brown-Forsythe's (center "median") test; null when undefined. */
export function leveneTest(y: ArrayLike<number>, codes: ArrayLike<number>, count: number, center: "mean" | "median"): FTest | null {
  const members: number[][] = Array.from({ length: count }, () => []);
  for (let i = 0; i < y.length; i++) members[codes[i]!]!.push(y[i]!);
  const centers = members.map((values) => {
    if (values.length === 0) return 0;
    if (center === "mean") return values.reduce((s, v) => s + v, 0) / values.length;
    const sorted = [...values].sort((a, b) => a - b);
    const h = sorted.length >> 1;
    return sorted.length % 2 ? sorted[h]! : (sorted[h - 1]! + sorted[h]!) / 2;
  });
  const deviations = Float64Array.from({ length: y.length }, (_, i) => Math.abs(y[i]! - centers[codes[i]!]!));
  return oneWayF(deviations, codes, count);
}
