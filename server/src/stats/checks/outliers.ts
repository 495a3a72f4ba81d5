/**
 * Outliers by externally studentized residuals with a Bonferroni bound (Cook & Weisberg 1982, Residuals
 * and Influence in Regression, §2.2.3; the test car::outlierTest performs): run i's residual t_i follows
 * t(ν - 1) under the model, ν the residual df, and its Bonferroni p-value is min(1, n · 2 P(T > |t_i|)).
 */

import { tTwoSidedP } from "../distributions/t-distribution.js";

/** A run whose Bonferroni-adjusted p-value is below alpha. `index` is the observation's position. */
export interface OutlierFlag {
  readonly index: number;
  readonly studentized: number;
  readonly p: number;
}

/** Runs whose externally studentized residual exceeds the Bonferroni bound at `alpha`. */
export function bonferroniOutliers(studentized: readonly (number | null)[], residualDf: number, alpha: number): OutlierFlag[] {
  const n = studentized.length;
  const df = residualDf - 1;
  if (df < 1 || n === 0) return [];
  const out: OutlierFlag[] = [];
  studentized.forEach((t, index) => {
    if (t === null || !Number.isFinite(t)) return;
    const p = Math.min(1, n * tTwoSidedP(t, df));
    if (p < alpha) out.push({ index, studentized: t, p });
  });
  return out;
}
