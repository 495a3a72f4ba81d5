/**
 * Expected mean squares, F-test denominators, Satterthwaite degrees of freedom, ANOVA-method variance
 * components and the intraclass correlation of a balanced mixed model.
 *
 * Convention: the UNRESTRICTED mixed model (Searle, Casella & McCulloch 1992, §4.7; Hocking 1973,
 * Biometrics 29), in which random interaction effects are independent with no sum-to-zero constraint
 * over the levels of the fixed factors. Its rule: σ²_U (U a random term, i.e. one whose factors or parents
 * include a random factor) appears in E(MS_S) with coefficient N / Π_{scope(U)} levels whenever
 * scope(S) ⊆ scope(U); a fixed term contributes only its own quadratic form Q(S). In this convention a
 * random main effect crossed with a fixed factor is tested against their interaction, as is the fixed
 * factor (the restricted convention would test the random main effect against the residual instead).
 *
 * Denominators: for term S the target is E(MS_S) without S's own component. Components are removed from
 * the smallest scope upward, each by the mean square of the term it belongs to (E(MS_U) holds only
 * components of terms containing U, so a removed component never returns), and the residual mean square
 * absorbs what is left of σ². When one mean square results it is an exact F test; otherwise the
 * denominator Σ c_j MS_j is synthetic with Satterthwaite's (1946) degrees of freedom
 * (Σ c_j MS_j)² / Σ (c_j MS_j)²/df_j.
 *
 * Variance components (ANOVA method, Searle et al. 1992, §4.5): the EMS equations solved with the mean
 * squares in place of their expectations, from the largest scope downward; a negative estimate is reported
 * as zero with a note (the truncated estimator), while the untruncated value is kept for the other
 * equations so that every estimate stays unbiased before truncation.
 */

import { fUpperTail } from "../distributions/f-distribution.js";
import { type BalancedAnova, type BalancedFactor, type BalancedTerm, popcount } from "./balanced-terms.js";

/** One part of an expected mean square: the variance of a random term (or the residual) times a coefficient. */
export interface EmsPart {
  /** Index into the terms, or -1 for the residual. */
  readonly term: number;
  readonly coefficient: number;
}

/** The expected mean square of a term: σ² parts and, for a fixed term, its own quadratic form Q. */
export interface ExpectedMeanSquare {
  readonly parts: readonly EmsPart[];
  readonly fixedPart: boolean;
}

/** A denominator: Σ coefficient·MS over terms (-1 = residual). */
export interface Denominator {
  readonly parts: readonly EmsPart[];
  readonly ms: number;
  readonly df: number;
  /** True when it is one mean square (exact F), false when synthetic (Satterthwaite df). */
  readonly exact: boolean;
}

export interface MixedTermTest {
  readonly term: number;
  readonly ems: ExpectedMeanSquare;
  /** Null when no valid denominator exists (e.g. a synthetic combination that is not positive). */
  readonly denominator: Denominator | null;
  readonly f: number | null;
  readonly p: number | null;
  readonly note?: string;
}

export interface VarianceComponent {
  /** Index into the terms, or -1 for the residual. */
  readonly term: number;
  readonly estimate: number;
  /** The estimate reported: max(estimate, 0). */
  readonly variance: number;
  readonly truncated: boolean;
  /** variance / Σ variances (null when all are zero). */
  readonly share: number | null;
}

export interface MixedModelResult {
  readonly tests: readonly MixedTermTest[];
  readonly components: readonly VarianceComponent[];
  /** Share of the first random main-effect term: the intraclass correlation of its levels. */
  readonly icc: { readonly term: number; readonly value: number } | null;
}

function msOf(anova: BalancedAnova, term: number): { ms: number; df: number } {
  const row = term < 0 ? anova.residual : anova.terms[term]!;
  return { ms: row.df > 0 ? row.ss / row.df : 0, df: row.df };
}

function scopeSize(factors: readonly BalancedFactor[], scope: number): number {
  let s = 1;
  factors.forEach((f, i) => {
    if ((scope >> i) & 1) s *= f.levels;
  });
  return s;
}

const contains = (outer: BalancedTerm, inner: BalancedTerm) => (outer.scope & inner.scope) === inner.scope;

/** Expected mean square of every term (unrestricted model). */
export function expectedMeanSquares(factors: readonly BalancedFactor[], anova: BalancedAnova): ExpectedMeanSquare[] {
  return anova.terms.map((s) => {
    const parts: EmsPart[] = [{ term: -1, coefficient: 1 }];
    anova.terms.forEach((u, j) => {
      if (u.random && contains(u, s)) parts.push({ term: j, coefficient: anova.n / scopeSize(factors, u.scope) });
    });
    return { parts, fixedPart: !s.random };
  });
}

/** Builds the denominator of term `s` from the EMS table (see the module comment). */
function denominatorOf(s: number, anova: BalancedAnova, ems: readonly ExpectedMeanSquare[]): Denominator | { reason: string } {
  const target = new Map<number, number>();
  for (const p of ems[s]!.parts) if (p.term !== s) target.set(p.term, (target.get(p.term) ?? 0) + p.coefficient);
  const used = new Map<number, number>();
  const order = [...target.keys()].filter((t) => t >= 0).sort((a, b) => popcount(anova.terms[a]!.scope) - popcount(anova.terms[b]!.scope) || a - b);
  const pending = new Set(order);
  while (pending.size > 0) {
    // The pending component of smallest scope: no other pending component's scope lies inside it.
    const u = [...pending].sort((a, b) => popcount(anova.terms[a]!.scope) - popcount(anova.terms[b]!.scope) || a - b)[0]!;
    pending.delete(u);
    const need = target.get(u) ?? 0;
    if (Math.abs(need) < 1e-12) continue;
    const own = ems[u]!.parts.find((p) => p.term === u)!.coefficient;
    const c = need / own;
    used.set(u, (used.get(u) ?? 0) + c);
    for (const p of ems[u]!.parts) {
      const left = (target.get(p.term) ?? 0) - c * p.coefficient;
      target.set(p.term, left);
      if (p.term >= 0 && Math.abs(left) > 1e-12) pending.add(p.term);
    }
  }
  const residualLeft = target.get(-1) ?? 0;
  if (Math.abs(residualLeft) > 1e-12) used.set(-1, residualLeft);
  const parts = [...used.entries()].filter(([, c]) => Math.abs(c) > 1e-12).map(([term, coefficient]) => ({ term, coefficient: Math.abs(coefficient - Math.round(coefficient)) < 1e-12 ? Math.round(coefficient) : coefficient }));
  if (parts.length === 0) return { reason: "no mean square has the expectation this term's test needs" };
  if (parts.some((p) => p.term >= 0 ? anova.terms[p.term]!.df === 0 : anova.residual.df === 0)) return { reason: "the denominator needs a mean square with no degrees of freedom (no replication)" };
  let ms = 0;
  let dfDen = 0;
  for (const p of parts) {
    const m = msOf(anova, p.term);
    ms += p.coefficient * m.ms;
    dfDen += (p.coefficient * m.ms) ** 2 / m.df;
  }
  const exact = parts.length === 1 && parts[0]!.coefficient === 1;
  if (!(ms > 0)) return { reason: "the synthetic denominator is not positive, so no F test is possible" };
  const df = exact ? msOf(anova, parts[0]!.term).df : (ms * ms) / dfDen;
  return { parts, ms, df, exact };
}

/** F tests, variance components and ICC of a balanced mixed model in the unrestricted convention. */
export function mixedModelTests(factors: readonly BalancedFactor[], anova: BalancedAnova): MixedModelResult {
  const ems = expectedMeanSquares(factors, anova);
  const tests: MixedTermTest[] = anova.terms.map((t, s) => {
    const d = denominatorOf(s, anova, ems);
    if (!("ms" in d)) return { term: s, ems: ems[s]!, denominator: null, f: null, p: null, note: d.reason };
    const num = msOf(anova, s);
    if (num.df === 0) return { term: s, ems: ems[s]!, denominator: d, f: null, p: null, note: "the term has no degrees of freedom" };
    const f = num.ms / d.ms;
    const p = fUpperTail(f, num.df, d.df);
    return { term: s, ems: ems[s]!, denominator: d, f, p: Number.isFinite(p) ? p : null };
  });

  // Variance components, largest scope first.
  const estimate = new Map<number, number>();
  const residualMs = msOf(anova, -1).ms;
  const randomTerms = anova.terms.map((t, i) => ({ t, i })).filter((x) => x.t.random);
  randomTerms.sort((a, b) => popcount(b.t.scope) - popcount(a.t.scope) || b.i - a.i);
  for (const { i } of randomTerms) {
    let rest = msOf(anova, i).ms - residualMs;
    let own = 1;
    for (const p of ems[i]!.parts) {
      if (p.term === i) own = p.coefficient;
      else if (p.term >= 0) rest -= p.coefficient * (estimate.get(p.term) ?? 0);
    }
    estimate.set(i, rest / own);
  }
  const raw = [...randomTerms.map(({ i }) => ({ term: i, estimate: estimate.get(i)! })).sort((a, b) => a.term - b.term), { term: -1, estimate: residualMs }];
  const total = raw.reduce((a, c) => a + Math.max(0, c.estimate), 0);
  const components: VarianceComponent[] = raw.map((c) => ({
    term: c.term,
    estimate: c.estimate,
    variance: Math.max(0, c.estimate),
    truncated: c.estimate < 0,
    share: total > 0 ? Math.max(0, c.estimate) / total : null,
  }));
  const first = components.find((c) => c.term >= 0 && popcount(anova.terms[c.term]!.own) === 1);
  const icc = first && first.share !== null ? { term: first.term, value: first.share } : null;
  return { tests, components, icc };
}

/** The EMS written out, e.g. "σ²(Residual) + 2·σ²(A x B) + Q(A)". */
export function emsText(ems: ExpectedMeanSquare, self: number, terms: readonly BalancedTerm[]): string {
  const parts = ems.parts.map((p) => {
    const name = p.term < 0 ? "Residual" : terms[p.term]!.name;
    return p.coefficient === 1 ? `σ²(${name})` : `${formatCoefficient(p.coefficient)}·σ²(${name})`;
  });
  if (ems.fixedPart) parts.push(`Q(${terms[self]!.name})`);
  return parts.join(" + ");
}

function formatCoefficient(c: number): string {
  return Number.isInteger(c) ? String(c) : c.toPrecision(6).replace(/\.?0+$/, "");
}
