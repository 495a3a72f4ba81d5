/**
 * Outliers by externally studentized residuals with a Bonferroni bound (Cook & Weisberg 1982, Residuals
 * and Influence in Regression, §2.2.3; the test car::outlierTest performs): run i's residual t_i follows
 * t(ν - 1) under the model, ν the residual df, and its Bonferroni p-value is min(1, n · 2 P(T > |t_i|)).
 */

import { tQuantile, tTwoSidedP } from "../distributions/t-distribution.js";

/** A run whose Bonferroni-adjusted p-value is below alpha. `index` is the observation's position. */
export interface OutlierFlag {
  readonly index: number;
  readonly studentized: number;
  readonly p: number;
}

/**
 * Runs whose externally studentized residual exceeds the Bonferroni bound at `alpha`.
 *
 * The p-value falls as |t| grows, so only residuals beyond the critical value t(1 - α/(2n), ν - 1) can be
 * flagged: the exact p-value is computed only for residuals within 1% of that bound or past it, not for
 * each of a million runs (the margin keeps the decision to the exact p-value for every borderline run).
 * Undefined residuals are null or NaN (a typed array).
 */
export function bonferroniOutliers(studentized: ArrayLike<number | null>, residualDf: number, alpha: number): OutlierFlag[] {
  const n = studentized.length;
  const df = residualDf - 1;
  if (df < 1 || n === 0) return [];
  const critical = -tQuantile(alpha / (2 * n), df);
  // Without a usable bound (NaN), every residual gets its exact p-value.
  const screen = Number.isFinite(critical) && critical > 0 ? 0.99 * critical : 0;
  const out: OutlierFlag[] = [];
  for (let index = 0; index < n; index++) {
    const t = studentized[index];
    if (t === null || t === undefined || !Number.isFinite(t) || Math.abs(t) < screen) continue;
    const p = Math.min(1, n * tTwoSidedP(t, df));
    if (p < alpha) out.push({ index, studentized: t, p });
  }
  return out;
}
