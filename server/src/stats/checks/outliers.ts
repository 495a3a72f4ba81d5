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
  const screen = bonferroniScreen(n, residualDf, alpha);
  if (screen === null) return [];
  const out: OutlierFlag[] = [];
  for (let index = 0; index < n; index++) {
    const t = studentized[index];
    if (t === null || t === undefined || !Number.isFinite(t) || Math.abs(t) < screen) continue;
    const p = Math.min(1, n * tTwoSidedP(t, residualDf - 1));
    if (p < alpha) out.push({ index, studentized: t, p });
  }
  return out;
}

/**
 * The |t| below which no studentized residual of `n` can be flagged: 99% of the Bonferroni critical value
 * t(1 - α/(2n), ν - 1), 0 when that value is not usable (every residual is then tested), null when nothing
 * can be flagged (ν - 1 < 1 or no runs).
 */
export function bonferroniScreen(n: number, residualDf: number, alpha: number): number | null {
  const df = residualDf - 1;
  if (df < 1 || n === 0) return null;
  const critical = -tQuantile(alpha / (2 * n), df);
  // Without a usable bound (NaN), every residual gets its exact p-value.
  return Number.isFinite(critical) && critical > 0 ? 0.99 * critical : 0;
}

/**
 * `bonferroniOutliers` of `n` residuals given only some of them: `studentized[j]` is the residual of
 * observation `index[j]`, and every residual not given lies below `bonferroniScreen` (the caller's screen
 * must ensure it). Equal to `bonferroniOutliers` of all n.
 */
export function bonferroniOutliersAmong(index: ArrayLike<number>, studentized: ArrayLike<number>, n: number, residualDf: number, alpha: number): OutlierFlag[] {
  const screen = bonferroniScreen(n, residualDf, alpha);
  if (screen === null) return [];
  const out: OutlierFlag[] = [];
  for (let j = 0; j < index.length; j++) {
    const t = studentized[j]!;
    if (!Number.isFinite(t) || Math.abs(t) < screen) continue;
    const p = Math.min(1, n * tTwoSidedP(t, residualDf - 1));
    if (p < alpha) out.push({ index: index[j]!, studentized: t, p });
  }
  return out;
}
