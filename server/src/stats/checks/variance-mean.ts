/**
 * Does the spread grow with the mean? Regress ln s_i on ln ȳ_i over groups; when s ∝ μ^β, the power
 * transformation y^λ with λ = 1 - β stabilises the variance, λ = 0 meaning ln y (Box, Hunter & Hunter 2005,
 * Statistics for Experimenters, 2nd ed., §7.7, "variance stabilizing transformations"). Trialbook rounds λ
 * to the nearest half for the suggestion, since that is how it is used in practice.
 */

import type { GroupSummary } from "../comparisons/group-summary.js";

/** The fitted slope β of ln s on ln mean and the suggested λ = 1 - β (rounded to a half). */
export interface VarianceMeanTrend {
  readonly slope: number;
  readonly lambda: number;
  readonly roundedLambda: number;
}

/** Null when fewer than 3 groups have positive means and variances, or the means do not vary. */
export function varianceMeanTrend(groups: readonly GroupSummary[]): VarianceMeanTrend | null {
  const points = groups.filter((g) => g.n >= 2 && g.mean > 0 && g.variance !== null && g.variance > 0).map((g) => [Math.log(g.mean), 0.5 * Math.log(g.variance!)] as const);
  if (points.length < 3) return null;
  const mx = points.reduce((s, p) => s + p[0], 0) / points.length;
  const my = points.reduce((s, p) => s + p[1], 0) / points.length;
  const sxx = points.reduce((s, p) => s + (p[0] - mx) ** 2, 0);
  if (!(sxx > 1e-12)) return null;
  const slope = points.reduce((s, p) => s + (p[0] - mx) * (p[1] - my), 0) / sxx;
  const lambda = 1 - slope;
  return { slope, lambda, roundedLambda: Math.round(lambda * 2) / 2 };
}
