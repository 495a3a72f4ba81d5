/**
 * Per-observation diagnostics from residuals and leverages.
 *
 * Standardized (internally studentized) residual: r_i = e_i / (s sqrt(1 - h_i)).
 * Externally studentized residual: t_i = e_i / (s_(i) sqrt(1 - h_i)), where the residual variance with
 * observation i deleted is s_(i)^2 = (RSS - e_i^2 / (1 - h_i)) / (n - p - 1)
 * (Belsley, Kuh & Welsch 1980, Regression Diagnostics, eq. 2.26; Cook & Weisberg 1982, Residuals and
 * Influence in Regression, section 2.2.1). Both are null where h_i = 1 (within rounding), where the
 * residual variance is zero, or where no degrees of freedom remain.
 */

/** Leverages this close to 1 are treated as 1, as R's `influence` does (10 machine epsilons). */
const LEVERAGE_ONE = 1 - 10 * Number.EPSILON;

/** The two residual scales of every observation, null where undefined. */
export interface CaseStatistics {
  readonly standardized: (number | null)[];
  readonly studentized: (number | null)[];
}

/** The two residual scales as typed arrays, NaN where undefined (where `CaseStatistics` has null). */
export interface CaseStatisticValues {
  readonly standardized: Float64Array;
  readonly studentized: Float64Array;
}

/**
 * Computes standardized and externally studentized residuals. `residualMsUsable` is false when the
 * residual variance is zero or undefined (then every value is null).
 */
export function caseStatistics(
  residuals: Float64Array,
  leverage: Float64Array,
  residualSs: number,
  residualDf: number,
  residualMsUsable: boolean,
): CaseStatistics {
  const values = caseStatisticValues(residuals, leverage, residualSs, residualDf, residualMsUsable);
  return { standardized: nullWhereNaN(values.standardized), studentized: nullWhereNaN(values.studentized) };
}

/**
 * As {@link caseStatistics}, into typed arrays with NaN for an undefined value: a million observations
 * then cost two flat arrays instead of two million boxed numbers in generic arrays.
 */
export function caseStatisticValues(
  residuals: Float64Array,
  leverage: Float64Array,
  residualSs: number,
  residualDf: number,
  residualMsUsable: boolean,
): CaseStatisticValues {
  const n = residuals.length;
  const standardized = new Float64Array(n).fill(NaN);
  const studentized = new Float64Array(n).fill(NaN);
  if (!residualMsUsable || residualDf <= 0) return { standardized, studentized };
  const s = Math.sqrt(residualSs / residualDf);
  for (let i = 0; i < n; i++) {
    const h = leverage[i]!;
    if (h >= LEVERAGE_ONE) continue;
    const e = residuals[i]!;
    const root = Math.sqrt(1 - h);
    const r = e / (s * root);
    if (Number.isFinite(r)) standardized[i] = r;
    if (residualDf > 1) {
      const deleted = (residualSs - (e * e) / (1 - h)) / (residualDf - 1);
      if (deleted > 0) {
        const t = e / (Math.sqrt(deleted) * root);
        if (Number.isFinite(t)) studentized[i] = t;
      }
    }
  }
  return { standardized, studentized };
}

/** The values of a typed array as numbers, null where NaN (the contract's "undefined here"). */
export function nullWhereNaN(values: Float64Array): (number | null)[] {
  const out: (number | null)[] = new Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    out[i] = v === v ? v : null;
  }
  return out;
}
