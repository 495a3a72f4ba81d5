/**
 * The externally studentized residuals of a fit as a typed array (NaN where undefined), for the outlier
 * check. The fit's own `studentized` is a generic array of numbers and nulls built on first read: with a
 * million runs that is a million boxed numbers the text report and `check` never show. The values here
 * come from the same function with the same inputs (linear-model/case-statistics.ts), so they are the
 * fit's values bit for bit (test/analysis/extensions/studentized-values.test.ts checks it).
 */

import { caseStatisticValues } from "../../stats/linear-model/case-statistics.js";
import type { LinearModelResult } from "../../stats/linear-model/types.js";

/** Externally studentized residuals of `fit` (Belsley, Kuh & Welsch 1980), NaN where the fit has null. */
export function studentizedValues(fit: LinearModelResult): Float64Array {
  // The fit computes case statistics only when its residual mean square can be tested against: a residual
  // df and a residual that is not zero (the `zero-residual-variance` note).
  const testable = fit.residual.ms !== null && !fit.notes.some((note) => note.code === "zero-residual-variance");
  return caseStatisticValues(fit.residuals, fit.leverage, fit.residual.ss, fit.residual.df, testable).studentized;
}
