/**
 * Multiple comparisons of the level means of every fixed main effect in the model, and of the cells of
 * every `plan pairwise A x B` term: Tukey HSD (Tukey-Kramer), Fisher's LSD, Bonferroni and Holm, Games-Howell,
 * and Dunnett against a declared `control`. Adds a compact letter display of the Tukey results, the best
 * level by the response's goal, and polynomial contrasts of numeric, equally spaced factors.
 *
 * Means are raw level (or cell) means; the error is the fitted model's residual mean square and df. In a
 * balanced design raw means equal the model's marginal means, so the Tukey results equal R's TukeyHSD on
 * the same model; in an unbalanced multi-factor design they are the raw means (documented, and the reason
 * the letters may differ from an analysis on adjusted means).
 */

import type { ResponseContext } from "../analyze-response.js";
import type { ResponseExtension } from "../analyze-document.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";
import type { BestLevel, ComparisonResult, LetterGroup, PolynomialContrastResult, ResponseAnalysis } from "../results.js";
import { letterDisplay } from "../../stats/comparisons/letter-display.js";
import { type ComparisonMethod, type ComparisonOutcome, comparisonProblem, dunnett, gamesHowell, pairwiseT, tukeyHsd } from "../../stats/comparisons/pairwise.js";
import { equallySpaced, polynomialContrasts } from "../../stats/comparisons/polynomial-contrasts.js";
import { type ComparedGroups, commonGroupings, fixedMainEffects, groupsOf, prepareGroups } from "./compared-groups.js";

const MAX_PAIRWISE_CELLS = 40;

/** The comparisons extension (registered in analyze-document.ts). */
export const comparisonsExtension: ResponseExtension = (context) => {
  const diagnostics: Diagnostic[] = [];
  const contrasts: PolynomialContrastResult[] = [];
  const { design, fit } = context;
  if (fit.residual.ms === null || fit.residual.df < 1) return { add: {}, diagnostics };
  const pooled = { ms: fit.residual.ms, df: fit.residual.df };
  const confidence = context.result.confidence;
  const alpha = context.result.alpha;
  const response = design.responses[context.responseIndex]!;

  // This extension's groups and the model checks' cells, summarised together (compared-groups.ts).
  prepareGroups(context, [...commonGroupings(context), ...(design.pairwise ?? []).map((p) => p.factors)]);
  const families: { groups: ComparedGroups; control?: number; span: ReturnType<typeof spanOf> }[] = [];
  for (const f of fixedMainEffects(context)) {
    const g = groupsOf(context, [f]);
    if (g) families.push({ groups: g, control: design.factors[f]!.control, span: spanOf(context, g.term) });
  }
  for (const p of design.pairwise ?? []) {
    const g = groupsOf(context, p.factors);
    if (!g) continue;
    const cells = g.summaries.filter((s) => s.n > 0).length;
    if (cells > MAX_PAIRWISE_CELLS) diagnostics.push(diagnostic("check-skipped", p.span, `'pairwise ${g.term}' is not computed for '${response.name}': ${cells} cells make ${(cells * (cells - 1)) / 2} pairs, more than a comparison table can usefully show (limit ${MAX_PAIRWISE_CELLS} cells).`));
    else families.push({ groups: g, span: p.span });
  }

  // Which families each method can compare is known without any distribution: the skipped ones are
  // reported now. The numbers (studentized range and Dunnett integrals, some milliseconds per pair) are
  // computed when the result's `comparisons`, `groups` or `best` is first read: the editor publishes
  // diagnostics after every edit, and only a hover, a report or the CLI output reads the tables.
  let anyComparison = false;
  let anyTukey = false;
  for (const { groups: g, control, span } of families) {
    const present = g.summaries.filter((s) => s.n > 0).length;
    if (present < 2) continue;
    for (const method of familyMethods(g, control)) {
      const problem = comparisonProblem(method, g.summaries, pooled, method === "dunnett" ? g.declared.indexOf(control!) : undefined);
      if (problem) diagnostics.push(diagnostic("check-skipped", span, `No ${methodName(method)} comparisons of '${g.term}' for '${response.name}': ${problem}.`));
      else {
        anyComparison = true;
        if (method === "tukey") anyTukey = true;
      }
    }
    // Trend contrasts (t distribution only, cheap) for a numeric factor with equally spaced levels, as
    // before when Tukey's comparisons can be made.
    if (comparisonProblem("tukey", g.summaries, pooled) === null && g.factors.length === 1) contrasts.push(...trendContrasts(context, g, pooled, confidence));
  }

  let tables: { comparisons: ComparisonResult[]; groups: LetterGroup[]; best: BestLevel[] } | undefined;
  const computeTables = () => (tables ??= comparisonTables(context, families, pooled, confidence, alpha));
  const add: Partial<ResponseAnalysis> = {};
  const lazy = (key: "comparisons" | "groups" | "best") =>
    Object.defineProperty(add, key, { enumerable: true, configurable: true, get: () => computeTables()[key] });
  if (anyComparison) lazy("comparisons");
  if (anyTukey) lazy("groups");
  if (anyTukey && response.goal) lazy("best");
  if (contrasts.length > 0) Object.defineProperty(add, "contrasts", { enumerable: true, configurable: true, writable: true, value: contrasts });
  return { add, diagnostics };
};

/** The methods run on a family, in output order. */
function familyMethods(g: ComparedGroups, control: number | undefined): ComparisonMethod[] {
  const methods: ComparisonMethod[] = ["tukey", "lsd", "bonferroni", "holm"];
  // Games-Howell needs a studentized-range quantile per pair (its df differ): main effects only, for speed.
  if (g.factors.length === 1) methods.push("games-howell");
  if (control !== undefined && g.factors.length === 1 && g.declared.indexOf(control) >= 0) methods.push("dunnett");
  return methods;
}

/** Every pairwise comparison, the Tukey letters and the best level of every family (see the extension). */
function comparisonTables(
  context: ResponseContext,
  families: readonly { groups: ComparedGroups; control?: number }[],
  pooled: { ms: number; df: number },
  confidence: number,
  alpha: number,
): { comparisons: ComparisonResult[]; groups: LetterGroup[]; best: BestLevel[] } {
  const response = context.design.responses[context.responseIndex]!;
  const comparisons: ComparisonResult[] = [];
  const groups: LetterGroup[] = [];
  const best: BestLevel[] = [];
  for (const { groups: g, control } of families) {
    const present = g.summaries.flatMap((s, i) => (s.n > 0 ? [i] : []));
    if (present.length < 2) continue;
    const emit = (method: ComparisonMethod, outcome: ComparisonOutcome) => {
      // A family a method cannot compare was reported when the analysis ran.
      if (!outcome.ok) return;
      for (const pair of outcome.pairs) comparisons.push({ term: g.term, method, a: g.labels[pair.a]!, b: g.labels[pair.b]!, diff: pair.diff, lower: pair.lower, upper: pair.upper, p: pair.p });
    };
    const tukey = tukeyHsd(g.summaries, pooled, confidence);
    emit("tukey", tukey);
    emit("lsd", pairwiseT(g.summaries, pooled, confidence, "lsd"));
    emit("bonferroni", pairwiseT(g.summaries, pooled, confidence, "bonferroni"));
    emit("holm", pairwiseT(g.summaries, pooled, confidence, "holm"));
    if (g.factors.length === 1) emit("games-howell", gamesHowell(g.summaries, confidence));
    if (control !== undefined && g.factors.length === 1) {
      const index = g.declared.indexOf(control);
      if (index >= 0) emit("dunnett", dunnett(g.summaries, index, pooled, confidence));
    }

    // Letters from the Tukey comparisons, best level first. A pair without a p-value (a distribution that
    // failed) would read as "do not differ": then no letters at all rather than misleading ones.
    if (!tukey.ok || tukey.pairs.some((p) => p.p === null)) continue;
    const differs = new Set(tukey.pairs.filter((p) => p.p !== null && p.p < alpha).map((p) => `${p.a},${p.b}`));
    const order = orderByGoal(present, (i) => g.summaries[i]!.mean + context.offset, response.goal, response.target);
    const letters = letterDisplay(g.summaries.length, order, (i, j) => differs.has(`${Math.min(i, j)},${Math.max(i, j)}`));
    for (const i of order) groups.push({ term: g.term, level: g.labels[i]!, mean: g.summaries[i]!.mean + context.offset, letters: letters[i]! });
    if (response.goal) {
      const top = order[0]!;
      const same = order.slice(1).filter((i) => !differs.has(`${Math.min(i, top)},${Math.max(i, top)}`));
      best.push({ term: g.term, goal: response.goal, level: g.labels[top]!, indistinguishable: same.map((i) => g.labels[i]!) });
    }
  }
  return { comparisons, groups, best };
}

/** Linear and quadratic contrasts of a single numeric factor with equally spaced levels (at least 3 present). */
function trendContrasts(context: ResponseContext, g: ComparedGroups, pooled: { ms: number; df: number }, confidence: number): PolynomialContrastResult[] {
  const out: PolynomialContrastResult[] = [];
  const present = g.summaries.flatMap((s, i) => (s.n > 0 ? [i] : []));
  const factor = context.design.factors[g.factors[0]!]!;
  const values = present.map((i) => factor.levels[g.declared[i]!]!.numeric);
  if (values.every((v) => v !== undefined) && equallySpaced(values as number[])) {
    // Order the groups by their numeric value so that "linear" increases with it.
    const byValue = [...present].sort((x, y) => factor.levels[g.declared[x]!]!.numeric! - factor.levels[g.declared[y]!]!.numeric!);
    const found = polynomialContrasts(byValue.map((i) => g.summaries[i]!), byValue.map((i) => factor.levels[g.declared[i]!]!.numeric!), pooled, confidence, 2);
    for (const c of found) {
      out.push({ term: g.term, contrast: c.degree === 1 ? "linear" : "quadratic", estimate: c.estimate, standardError: c.standardError, t: c.t, df: c.df, p: c.p });
    }
  }
  return out;
}

/** Groups in display order: best first by the goal (highest mean when there is none). Ties keep level order. */
export function orderByGoal(groups: readonly number[], mean: (i: number) => number, goal: "maximize" | "minimize" | "target" | undefined, target: number | undefined): number[] {
  const key = (i: number) => (goal === "minimize" ? mean(i) : goal === "target" && target !== undefined ? Math.abs(mean(i) - target) : -mean(i));
  return [...groups].sort((a, b) => key(a) - key(b) || a - b);
}

function spanOf(context: ResponseContext, term: string) {
  return context.anchors.terms.get(term) ?? context.anchors.response;
}

function methodName(method: ComparisonMethod): string {
  return { tukey: "Tukey HSD", lsd: "Fisher LSD", bonferroni: "Bonferroni", holm: "Holm", "games-howell": "Games-Howell", dunnett: "Dunnett" }[method];
}
