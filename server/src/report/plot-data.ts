import type { Design } from "../analysis/design.js";
import type { ResponseAnalysis } from "../analysis/results.js";
import { normalQuantile } from "../stats/distributions/normal-distribution.js";

/** One observation in a fit, on the response's scale, with the level index of every factor. */
export interface Observation {
  readonly run: string;
  /** 1-based position in the runs table: the run order. */
  readonly order: number;
  readonly y: number;
  readonly fitted: number;
  readonly residual: number;
  readonly standardized: number | null;
  /** Per design factor: declared level index, -1 where unknown. */
  readonly levels: readonly number[];
}

/**
 * The observations a response's fit used, rebuilt from its residuals (each carries its run's row) and the
 * design. The observed value is fitted + residual, which is the value as written up to rounding in the
 * last binary digit: good enough for a plot, and it needs no second parse of the table.
 */
export function observationsOf(design: Design, response: ResponseAnalysis): Observation[] {
  const out: Observation[] = [];
  for (const r of response.residuals) {
    const y = r.fitted + r.residual;
    if (!Number.isFinite(y) || !Number.isFinite(r.fitted) || !Number.isFinite(r.residual)) continue;
    const standardized = r.standardized !== null && Number.isFinite(r.standardized) ? r.standardized : null;
    out.push({ run: r.run, order: r.row + 1, y, fitted: r.fitted, residual: r.residual, standardized, levels: design.runs.levels.map((column) => column[r.row] ?? -1) });
  }
  return out;
}

/** A point of a probability plot: a sorted value against the quantile it is plotted at. */
export interface ProbabilityPoint {
  readonly quantile: number;
  readonly value: number;
  readonly label: string;
}

/**
 * Normal probability plot positions: the i-th smallest of n values against Φ⁻¹((i − 3/8) / (n + 1/4)),
 * Blom's (1958) plotting positions, which make the expected normal order statistics nearly unbiased.
 */
export function normalProbabilityPoints(values: readonly { readonly value: number; readonly label: string }[]): ProbabilityPoint[] {
  const sorted = values.filter((v) => Number.isFinite(v.value)).sort((a, b) => a.value - b.value);
  const n = sorted.length;
  return sorted.map((v, k) => ({ quantile: normalQuantile((k + 1 - 0.375) / (n + 0.25)), value: v.value, label: v.label }));
}

/**
 * Half-normal plot positions for m absolute effects (Daniel 1959): the i-th smallest |effect| against
 * Φ⁻¹(0.5 + 0.5 · (i − 0.5) / m), the quantiles of |Z|.
 */
export function halfNormalPoints(values: readonly { readonly value: number; readonly label: string }[]): ProbabilityPoint[] {
  const sorted = values.filter((v) => Number.isFinite(v.value)).map((v) => ({ value: Math.abs(v.value), label: v.label })).sort((a, b) => a.value - b.value);
  const m = sorted.length;
  return sorted.map((v, k) => ({ quantile: normalQuantile(0.5 + (0.5 * (k + 1 - 0.5)) / m), value: v.value, label: v.label }));
}

/** An estimated effect of a two-level design: the change in the mean from the low to the high level. */
export interface TwoLevelEffect {
  readonly term: string;
  readonly effect: number;
}

/**
 * Effects of a two-level factorial: when every model term has one degree of freedom and the design is
 * orthogonal (every cell of the fixed factors holds the same number of runs), the effect of a term is
 * ±2·√(SS/N), N the number of runs (Box, Hunter and Hunter 2005, ch. 5: SS = N·effect²/4). The sign is
 * recovered from the contrast of the observations. Returns a reason instead when the design is not of that
 * kind, or has fewer than three terms (a half-normal plot of fewer says nothing).
 */
export function twoLevelEffects(design: Design, response: ResponseAnalysis, observations: readonly Observation[]): { ok: true; effects: TwoLevelEffect[] } | { ok: false; reason: string } {
  const terms = response.anova.filter((row) => row.source !== "Residual" && row.source !== "Total");
  const factorTerms = design.terms.filter((t) => terms.some((row) => row.source === t.name));
  if (terms.length < 3) return { ok: false, reason: "A half-normal plot of effects needs a two-level design with at least three model terms." };
  if (factorTerms.length !== terms.length || factorTerms.some((t) => t.variables.some((v) => v.kind !== "factor" || design.factors[v.index]!.levels.length !== 2))) {
    return { ok: false, reason: "The half-normal plot of effects is drawn for two-level designs only (every model term made of factors with two levels)." };
  }
  if (terms.some((row) => row.df !== 1)) return { ok: false, reason: "A model term has other than one degree of freedom, so effects are not single contrasts." };
  const counts = new Map<string, number>();
  const used = [...new Set(factorTerms.flatMap((t) => t.variables.map((v) => v.index)))];
  for (const o of observations) {
    const key = used.map((f) => o.levels[f]).join(",");
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  const sizes = [...counts.values()];
  if (counts.size !== 2 ** used.length || sizes.some((c) => c !== sizes[0])) {
    return { ok: false, reason: "The runs are not balanced over all level combinations, so effects cannot be read from the sums of squares." };
  }
  const n = observations.length;
  const effects: TwoLevelEffect[] = [];
  for (const term of factorTerms) {
    const row = terms.find((t) => t.source === term.name)!;
    // The contrast's sign: +1 where an even number of the term's factors are at their first level.
    let contrast = 0;
    for (const o of observations) {
      const sign = term.variables.reduce((s, v) => s * (o.levels[v.index] === 1 ? 1 : -1), 1);
      contrast += sign * o.y;
    }
    const size = 2 * Math.sqrt(Math.max(row.ss, 0) / n);
    if (!Number.isFinite(size)) continue;
    effects.push({ term: term.name, effect: contrast < 0 ? -size : size });
  }
  return { ok: true, effects };
}
