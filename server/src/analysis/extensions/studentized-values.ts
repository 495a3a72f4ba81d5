/**
 * The externally studentized residuals the outlier check needs, without the fit's `studentized` array
 * (a generic array of numbers and nulls built on first read: with a million runs, a million boxed numbers
 * that the text report and `check` never show). The values come from the same function with the same
 * inputs as the fit's (linear-model/case-statistics.ts, element by element), so they equal the fit's bit
 * for bit (test/analysis/extensions/studentized-values.test.ts checks it).
 */

import { caseStatisticValues } from "../../stats/linear-model/case-statistics.js";
import type { RunCells } from "../../stats/linear-model/model-core.js";
import type { LinearModelResult } from "../../stats/linear-model/types.js";

/** Externally studentized residuals of `fit` (Belsley, Kuh & Welsch 1980), NaN where the fit has null. */
export function studentizedValues(fit: LinearModelResult): Float64Array {
  return caseStatisticValues(fit.residuals, fit.leverage, fit.residual.ss, fit.residual.df, fit.caseStatisticsDefined).studentized;
}

/** Runs that may have |t| >= `minimum`, and their studentized residuals (NaN where undefined). */
export interface StudentizedCandidates {
  readonly index: Int32Array;
  readonly studentized: Float64Array;
}

/**
 * The studentized residuals of only those runs whose |t| may reach `minimum`. With ν residual df and
 * residual sum of squares SS, run i's t² = r²(ν - 1) / (SS - r²) where r² = e²/(1 - h) (Belsley, Kuh &
 * Welsch 1980, §2.1), increasing in r²; so |t| >= T needs r² >= T² SS / (ν - 1 + T²). One pass over the
 * residuals and leverages with that bound (loosened by 2% against rounding) picks the candidates, and
 * their t comes from the fit's own formula applied to them alone.
 */
export function studentizedCandidates(fit: LinearModelResult, minimum: number): StudentizedCandidates {
  const ss = fit.residual.ss;
  const df = fit.residual.df;
  const bound = (0.98 * minimum * minimum * ss) / (df - 1 + minimum * minimum);
  const screened = Number.isFinite(bound) && bound > 0 && minimum > 0;
  if (screened && fit.runCells) return cellCandidates(fit, fit.runCells, bound);
  const residuals = fit.residuals;
  const leverage = fit.leverage;
  const n = residuals.length;
  let chosen: Int32Array;
  if (!screened) {
    chosen = new Int32Array(n);
    for (let i = 0; i < n; i++) chosen[i] = i;
  } else {
    let count = 0;
    const picked = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      const e = residuals[i]!;
      // Not `>= bound` alone: a NaN or a leverage of 1 must be kept for the exact formula to judge.
      if (!((e * e) / (1 - leverage[i]!) < bound)) picked[count++] = i;
    }
    chosen = picked.slice(0, count);
  }
  const e = new Float64Array(chosen.length);
  const h = new Float64Array(chosen.length);
  for (let j = 0; j < chosen.length; j++) {
    e[j] = residuals[chosen[j]!]!;
    h[j] = leverage[chosen[j]!]!;
  }
  return { index: chosen, studentized: caseStatisticValues(e, h, ss, df, fit.caseStatisticsDefined).studentized };
}

/**
 * `studentizedCandidates` of a fit on cell statistics: each run's residual and leverage are formed from
 * its cell's (the same operations as the fit's per-run arrays), so no per-run array is made.
 */
function cellCandidates(fit: LinearModelResult, cells: RunCells, bound: number): StudentizedCandidates {
  const { y, cellOfRun, fitted, leverage } = cells;
  const n = y.length;
  let count = 0;
  const picked: number[] = [];
  for (let i = 0; i < n; i++) {
    const c = cellOfRun[i]!;
    const e = y[i]! - fitted[c]!;
    if (!((e * e) / (1 - leverage[c]!) < bound)) {
      picked.push(i);
      count++;
    }
  }
  const chosen = Int32Array.from(picked);
  const e = new Float64Array(count);
  const h = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    const c = cellOfRun[chosen[j]!]!;
    e[j] = y[chosen[j]!]! - fitted[c]!;
    h[j] = leverage[c]!;
  }
  return { index: chosen, studentized: caseStatisticValues(e, h, fit.residual.ss, fit.residual.df, fit.caseStatisticsDefined).studentized };
}
