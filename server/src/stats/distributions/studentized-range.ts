/**
 * The studentized range distribution of the range of k independent standard normal means divided by an
 * independent estimate of their standard deviation with ν degrees of freedom (Tukey's q).
 *
 * Method: jstat 1.9.6's `tukey.cdf` and `tukey.inv`, a line-by-line port of R's `ptukey` and `qtukey`
 * (Copenhaver & Holland 1988, "Computation of the distribution of the maximum studentized range
 * statistic with application to multiple significance testing of simple effects", J. Statist. Comput.
 * Simul. 30, 1-15: Gauss-Legendre quadrature of the range of normals, integrated over the chi density).
 * jstat uses its own normal CDF, so it agrees with R 4.2.2's ptukey to about 3e-11 absolute and qtukey to
 * 1e-9 relative (test/stats/fixtures/r/comparisons). The upper tail is 1 - CDF, so p-values below 1e-10 are
 * not resolved: they are floored there (see `studentizedRangeUpperTail`).
 *
 * jstat throws when its iteration does not converge; these wrappers return NaN instead, and callers turn
 * NaN into a diagnostic.
 */

import jStat from "jstat";

/**
 * The fewest error degrees of freedom the algorithm accepts: R's ptukey and qtukey (and so jstat) return
 * NaN below 2. Between 2 and 3 they are computed but not to the accuracy stated above: against the exact
 * identity for two means, P(Q <= q; 2, ν) = 2·P(T_ν <= q/√2) - 1, R 4.2.2's ptukey is off by 1.3e-5 at
 * q = 1 and 1.1e-4 at q = 8 for ν = 2, and by about 1e-13 from ν = 3 on (checked in R; pinned in
 * test/stats/comparisons/comparisons-r.test.ts). Comparisons below the minimum are skipped with a
 * diagnostic rather than shown without numbers.
 */
export const STUDENTIZED_RANGE_MIN_DF = 2;

/** The smallest upper-tail probability the studentized-range algorithm resolves (absolute accuracy). */
export const STUDENTIZED_RANGE_P_FLOOR = 1e-10;

/** Returns P(Q <= q) for the studentized range of `k` means with `df` error degrees of freedom. NaN when undefined. */
export function studentizedRangeCdf(q: number, k: number, df: number): number {
  if (!(k >= 2) || !(df >= 1) || Number.isNaN(q)) return NaN;
  if (q <= 0) return 0;
  try {
    const p = jStat.tukey.cdf(q, k, df);
    return Number.isFinite(p) ? Math.min(1, Math.max(0, p)) : NaN;
  } catch {
    return NaN;
  }
}

/**
 * Returns P(Q > q), floored at `STUDENTIZED_RANGE_P_FLOOR` because it is computed as 1 - CDF and the CDF is
 * accurate to about 3e-11 absolute; such a p-value means "< 1e-10". NaN when undefined.
 */
export function studentizedRangeUpperTail(q: number, k: number, df: number): number {
  const cdf = studentizedRangeCdf(q, k, df);
  if (Number.isNaN(cdf)) return NaN;
  return Math.max(STUDENTIZED_RANGE_P_FLOOR, 1 - cdf);
}

// The quantile iterates on the CDF (some 5-10 ms each); analyses ask for the same few values on every edit.
const QUANTILE_CACHE = new Map<string, number>();
const QUANTILE_CACHE_LIMIT = 2000;

/** Returns the q with P(Q <= q) = p, for 0 < p < 1. NaN when undefined or when the iteration fails. Memoised. */
export function studentizedRangeQuantile(p: number, k: number, df: number): number {
  if (!(k >= 2) || !(df >= 1) || !(p > 0 && p < 1)) return NaN;
  const key = `${p}|${k}|${df}`;
  const cached = QUANTILE_CACHE.get(key);
  if (cached !== undefined) return cached;
  let q: number;
  try {
    q = jStat.tukey.inv(p, k, df);
    if (!(Number.isFinite(q) && q > 0)) q = NaN;
  } catch {
    q = NaN;
  }
  if (QUANTILE_CACHE.size >= QUANTILE_CACHE_LIMIT) QUANTILE_CACHE.clear();
  QUANTILE_CACHE.set(key, q);
  return q;
}
