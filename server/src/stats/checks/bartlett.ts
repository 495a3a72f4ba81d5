/**
 * Bartlett's (1937) test of equal variances: with pooled variance s_p² on N - k df,
 * K² = [(N - k) ln s_p² - Σ (n_i - 1) ln s_i²] / [1 + (Σ 1/(n_i - 1) - 1/(N - k)) / (3(k - 1))],
 * referred to χ²(k - 1) (Snedecor & Cochran 1989, Statistical Methods, 8th ed., §13.8). Equals R's
 * bartlett.test. Sensitive to non-normality; reported beside the Brown-Forsythe test, not used for the
 * diagnostic.
 */

import { chiSquareUpperTail } from "../distributions/chi-square-distribution.js";
import type { GroupSummary } from "../comparisons/group-summary.js";

/** A chi-square test result. */
export interface ChiSquareTest {
  readonly statistic: number;
  readonly df: number;
  readonly p: number;
}

/** Bartlett's test on group summaries; null when a group has fewer than 2 runs or zero variance, or k < 2. */
export function bartlettTest(groups: readonly GroupSummary[]): ChiSquareTest | null {
  const used = groups.filter((g) => g.n > 0);
  const k = used.length;
  if (k < 2 || used.some((g) => g.n < 2 || !(g.variance! > 0))) return null;
  const dfs = used.map((g) => g.n - 1);
  const dfTotal = dfs.reduce((s, d) => s + d, 0);
  const pooled = used.reduce((s, g, i) => s + dfs[i]! * g.variance!, 0) / dfTotal;
  const numerator = dfTotal * Math.log(pooled) - used.reduce((s, g, i) => s + dfs[i]! * Math.log(g.variance!), 0);
  const correction = 1 + (dfs.reduce((s, d) => s + 1 / d, 0) - 1 / dfTotal) / (3 * (k - 1));
  const statistic = Math.max(0, numerator / correction);
  return { statistic, df: k - 1, p: chiSquareUpperTail(statistic, k - 1) };
}
