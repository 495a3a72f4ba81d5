/**
 * Pairwise comparisons of group means: each pair's difference (mean a - mean b), a simultaneous (or, for
 * Fisher's LSD, per-comparison) confidence interval and a multiplicity-adjusted p-value.
 *
 * Methods, all on group summaries (n, mean, variance):
 * - Tukey HSD, Tukey-Kramer for unequal n (Tukey 1953; Kramer 1956): q = |d| / √(MSE/2 (1/n_a + 1/n_b)),
 *   p = P(Q_{k,ν} > q), interval d ∓ q_{conf;k,ν} √(MSE/2 (1/n_a + 1/n_b)), with MSE and ν from the model.
 * - Fisher's LSD (Fisher 1935): t = d / √(MSE (1/n_a + 1/n_b)), unadjusted two-sided p and t interval.
 * - Bonferroni and Holm (1979) adjusted t tests on the same t statistics. Holm has no simultaneous interval
 *   of its own; the Bonferroni interval (valid for Holm's family, slightly wider than needed) is reported.
 * - Games-Howell (1976) for unequal variances: per-pair Welch standard error and Welch-Satterthwaite df,
 *   q = |d| / √((s_a²/n_a + s_b²/n_b)/2) referred to the studentized range with k means.
 * - Dunnett (1955), two-sided, every level against a control, with the product-correlation multivariate t
 *   (see distributions/dunnett.ts).
 * Pairs are (i, j) with i < j in group order; Dunnett pairs are (level, control).
 */

import { dunnettTwoSidedCdf, dunnettTwoSidedQuantile } from "../distributions/dunnett.js";
import { STUDENTIZED_RANGE_MAX_MEANS, studentizedRangeQuantile, studentizedRangeUpperTail } from "../distributions/studentized-range.js";
import { DUNNETT_P_FLOOR } from "../distributions/p-floors.js";
import { tQuantile, tTwoSidedP } from "../distributions/t-distribution.js";
import type { GroupSummary } from "./group-summary.js";
import { bonferroniAdjust, holmAdjust } from "./p-adjust.js";

/** The comparison methods, as named in the JSON contract. */
export type ComparisonMethod = "tukey" | "lsd" | "bonferroni" | "holm" | "games-howell" | "dunnett";

/** One comparison of group `a` with group `b` (indices into the summaries). Null where undefined. */
export interface PairComparison {
  readonly a: number;
  readonly b: number;
  readonly diff: number;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly p: number | null;
}

/** The pooled error of the model: residual mean square and its degrees of freedom. */
export interface PooledVariance {
  readonly ms: number;
  readonly df: number;
}

/** A comparison family or the reason it cannot be computed. */
export type ComparisonOutcome = { readonly ok: true; readonly pairs: readonly PairComparison[] } | { readonly ok: false; readonly reason: string };

/** Pairs (i, j), i < j, of the groups that have at least one observation. */
function allPairs(groups: readonly GroupSummary[]): [number, number][] {
  const present = groups.flatMap((g, i) => (g.n > 0 ? [i] : []));
  const out: [number, number][] = [];
  for (let x = 0; x < present.length; x++) for (let y = x + 1; y < present.length; y++) out.push([present[x]!, present[y]!]);
  return out;
}

function pooledProblem(pooled: PooledVariance): string | null {
  if (!(pooled.df >= 1)) return "the model leaves no residual degrees of freedom to estimate the error";
  if (!(pooled.ms > 0) || !Number.isFinite(pooled.ms)) return "the residual mean square is zero, so no difference has a standard error";
  return null;
}

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/**
 * Why `method` cannot compare these groups, or null when it can: the same checks the method itself makes
 * first, without computing any distribution. Callers that defer the comparisons (the analysis computes
 * them when a result is read) use it to report a skipped family at once. `control` is for Dunnett.
 */
export function comparisonProblem(method: ComparisonMethod, groups: readonly GroupSummary[], pooled: PooledVariance, control?: number): string | null {
  const k = groups.filter((g) => g.n > 0).length;
  switch (method) {
    case "games-howell":
      if (k < 2) return "fewer than two levels have measured runs";
      if (k > STUDENTIZED_RANGE_MAX_MEANS) return tooManyMeans(k);
      if (groups.some((g) => g.n > 0 && (g.n < 2 || !(g.variance! > 0)))) return "a level has a single run or no spread, so its own variance is unknown";
      return null;
    case "dunnett": {
      const problem = pooledProblem(pooled);
      if (problem) return problem;
      const g0 = control === undefined ? undefined : groups[control];
      if (!g0 || g0.n === 0) return "the control level has no measured runs";
      if (!groups.some((g, i) => i !== control && g.n > 0)) return "no other level has measured runs";
      return null;
    }
    case "tukey":
      return pooledProblem(pooled) ?? (k < 2 ? "fewer than two levels have measured runs" : k > STUDENTIZED_RANGE_MAX_MEANS ? tooManyMeans(k) : null);
    default:
      return pooledProblem(pooled) ?? (k < 2 ? "fewer than two levels have measured runs" : null);
  }
}

function tooManyMeans(k: number): string {
  return `${k} levels are more than the ${STUDENTIZED_RANGE_MAX_MEANS} the studentized range is computed for`;
}

/** Tukey HSD (Tukey-Kramer for unequal n) at the given confidence. */
export function tukeyHsd(groups: readonly GroupSummary[], pooled: PooledVariance, confidence: number): ComparisonOutcome {
  const problem = comparisonProblem("tukey", groups, pooled);
  if (problem) return { ok: false, reason: problem };
  const pairs = allPairs(groups);
  const k = groups.filter((g) => g.n > 0).length;
  const critical = studentizedRangeQuantile(confidence, k, pooled.df);
  return {
    ok: true,
    pairs: pairs.map(([a, b]) => {
      const diff = groups[a]!.mean - groups[b]!.mean;
      const se = Math.sqrt((pooled.ms / 2) * (1 / groups[a]!.n + 1 / groups[b]!.n));
      const p = studentizedRangeUpperTail(Math.abs(diff) / se, k, pooled.df);
      return { a, b, diff, lower: finiteOrNull(diff - critical * se), upper: finiteOrNull(diff + critical * se), p: finiteOrNull(p) };
    }),
  };
}

/** t statistics and raw two-sided p-values of every pair with the pooled variance. */
function pooledT(groups: readonly GroupSummary[], pooled: PooledVariance) {
  return allPairs(groups).map(([a, b]) => {
    const diff = groups[a]!.mean - groups[b]!.mean;
    const se = Math.sqrt(pooled.ms * (1 / groups[a]!.n + 1 / groups[b]!.n));
    return { a, b, diff, se, p: tTwoSidedP(diff / se, pooled.df) };
  });
}

/**
 * Pairwise t tests with the model's pooled variance: unadjusted (Fisher's LSD), Bonferroni- or
 * Holm-adjusted. Intervals: per-comparison t for LSD, Bonferroni t quantile 1 - α/(2m) for both others.
 */
export function pairwiseT(groups: readonly GroupSummary[], pooled: PooledVariance, confidence: number, adjust: "lsd" | "bonferroni" | "holm"): ComparisonOutcome {
  const problem = comparisonProblem(adjust, groups, pooled);
  if (problem) return { ok: false, reason: problem };
  const raw = pooledT(groups, pooled);
  const m = raw.length;
  const alpha = 1 - confidence;
  const critical = tQuantile(1 - (adjust === "lsd" ? alpha / 2 : alpha / (2 * m)), pooled.df);
  const p = adjust === "lsd" ? raw.map((r) => r.p) : adjust === "bonferroni" ? bonferroniAdjust(raw.map((r) => r.p)) : holmAdjust(raw.map((r) => r.p));
  return {
    ok: true,
    pairs: raw.map((r, i) => ({ a: r.a, b: r.b, diff: r.diff, lower: finiteOrNull(r.diff - critical * r.se), upper: finiteOrNull(r.diff + critical * r.se), p: finiteOrNull(p[i]!) })),
  };
}

/** Games-Howell: needs every compared group to have at least two runs and a positive variance. */
export function gamesHowell(groups: readonly GroupSummary[], confidence: number): ComparisonOutcome {
  const problem = comparisonProblem("games-howell", groups, { ms: 1, df: 1 });
  if (problem) return { ok: false, reason: problem };
  const pairs = allPairs(groups);
  const k = groups.filter((g) => g.n > 0).length;
  return {
    ok: true,
    pairs: pairs.map(([a, b]) => {
      const ga = groups[a]!;
      const gb = groups[b]!;
      const va = ga.variance! / ga.n;
      const vb = gb.variance! / gb.n;
      const diff = ga.mean - gb.mean;
      const df = ((va + vb) * (va + vb)) / ((va * va) / (ga.n - 1) + (vb * vb) / (gb.n - 1));
      const se = Math.sqrt((va + vb) / 2);
      const critical = studentizedRangeQuantile(confidence, k, df);
      const p = studentizedRangeUpperTail(Math.abs(diff) / se, k, df);
      return { a, b, diff, lower: finiteOrNull(diff - critical * se), upper: finiteOrNull(diff + critical * se), p: finiteOrNull(p) };
    }),
  };
}

/** Dunnett's two-sided comparisons of every other level with `control`. */
export function dunnett(groups: readonly GroupSummary[], control: number, pooled: PooledVariance, confidence: number): ComparisonOutcome {
  const problem = comparisonProblem("dunnett", groups, pooled, control);
  if (problem) return { ok: false, reason: problem };
  const g0 = groups[control]!;
  const others = groups.flatMap((g, i) => (i !== control && g.n > 0 ? [i] : []));
  const lambdas = others.map((i) => Math.sqrt(groups[i]!.n / (groups[i]!.n + g0.n)));
  const critical = dunnettTwoSidedQuantile(confidence, lambdas, pooled.df);
  return {
    ok: true,
    pairs: others.map((i) => {
      const diff = groups[i]!.mean - g0.mean;
      const se = Math.sqrt(pooled.ms * (1 / groups[i]!.n + 1 / g0.n));
      const cdf = dunnettTwoSidedCdf(Math.abs(diff) / se, lambdas, pooled.df);
      // 1 - P is accurate to the quadrature's ~1e-9 absolute; smaller p-values are floored there.
      const p = Number.isFinite(cdf) ? Math.max(DUNNETT_P_FLOOR, 1 - cdf) : NaN;
      return { a: i, b: control, diff, lower: finiteOrNull(diff - critical * se), upper: finiteOrNull(diff + critical * se), p: finiteOrNull(p) };
    }),
  };
}
