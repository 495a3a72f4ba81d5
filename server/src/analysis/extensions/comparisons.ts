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
import type { BestLevel, ComparisonResult, LetterGroup, PolynomialContrastResult } from "../results.js";
import { letterDisplay } from "../../stats/comparisons/letter-display.js";
import { type ComparisonMethod, type ComparisonOutcome, dunnett, gamesHowell, pairwiseT, tukeyHsd } from "../../stats/comparisons/pairwise.js";
import { equallySpaced, polynomialContrasts } from "../../stats/comparisons/polynomial-contrasts.js";
import { type ComparedGroups, fixedMainEffects, groupsOf } from "./compared-groups.js";

const MAX_PAIRWISE_CELLS = 40;

/** The comparisons extension (registered in analyze-document.ts). */
export const comparisonsExtension: ResponseExtension = (context) => {
  const diagnostics: Diagnostic[] = [];
  const comparisons: ComparisonResult[] = [];
  const groups: LetterGroup[] = [];
  const best: BestLevel[] = [];
  const contrasts: PolynomialContrastResult[] = [];
  const { design, fit } = context;
  if (fit.residual.ms === null || fit.residual.df < 1) return { add: {}, diagnostics };
  const pooled = { ms: fit.residual.ms, df: fit.residual.df };
  const confidence = context.result.confidence;
  const alpha = context.result.alpha;
  const response = design.responses[context.responseIndex]!;

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

  for (const { groups: g, control, span } of families) {
    const present = g.summaries.flatMap((s, i) => (s.n > 0 ? [i] : []));
    if (present.length < 2) continue;
    const emit = (method: ComparisonMethod, outcome: ComparisonOutcome) => {
      if (!outcome.ok) {
        diagnostics.push(diagnostic("check-skipped", span, `No ${methodName(method)} comparisons of '${g.term}' for '${response.name}': ${outcome.reason}.`));
        return;
      }
      for (const pair of outcome.pairs) comparisons.push({ term: g.term, method, a: g.labels[pair.a]!, b: g.labels[pair.b]!, diff: pair.diff, lower: pair.lower, upper: pair.upper, p: pair.p });
    };
    const tukey = tukeyHsd(g.summaries, pooled, confidence);
    emit("tukey", tukey);
    emit("lsd", pairwiseT(g.summaries, pooled, confidence, "lsd"));
    emit("bonferroni", pairwiseT(g.summaries, pooled, confidence, "bonferroni"));
    emit("holm", pairwiseT(g.summaries, pooled, confidence, "holm"));
    // Games-Howell needs a studentized-range quantile per pair (its df differ): main effects only, for speed.
    if (g.factors.length === 1) emit("games-howell", gamesHowell(g.summaries, confidence));
    if (control !== undefined && g.factors.length === 1) {
      const index = g.declared.indexOf(control);
      if (index >= 0) emit("dunnett", dunnett(g.summaries, index, pooled, confidence));
    }

    // Letters from the Tukey comparisons, best level first.
    if (!tukey.ok) continue;
    const differs = new Set(tukey.pairs.filter((p) => p.p !== null && p.p < alpha).map((p) => `${p.a},${p.b}`));
    const order = orderByGoal(present, (i) => g.summaries[i]!.mean + context.offset, response.goal, response.target);
    const letters = letterDisplay(g.summaries.length, order, (i, j) => differs.has(`${Math.min(i, j)},${Math.max(i, j)}`));
    for (const i of order) groups.push({ term: g.term, level: g.labels[i]!, mean: g.summaries[i]!.mean + context.offset, letters: letters[i]! });
    if (response.goal) {
      const top = order[0]!;
      const same = order.slice(1).filter((i) => !differs.has(`${Math.min(i, top)},${Math.max(i, top)}`));
      best.push({ term: g.term, goal: response.goal, level: g.labels[top]!, indistinguishable: same.map((i) => g.labels[i]!) });
    }

    // Trend contrasts for a numeric factor with equally spaced levels (at least 3 present).
    if (g.factors.length === 1) {
      const factor = design.factors[g.factors[0]!]!;
      const values = present.map((i) => factor.levels[g.declared[i]!]!.numeric);
      if (values.every((v) => v !== undefined) && equallySpaced(values as number[])) {
        // Order the groups by their numeric value so that "linear" increases with it.
        const byValue = [...present].sort((x, y) => factor.levels[g.declared[x]!]!.numeric! - factor.levels[g.declared[y]!]!.numeric!);
        const found = polynomialContrasts(byValue.map((i) => g.summaries[i]!), byValue.map((i) => factor.levels[g.declared[i]!]!.numeric!), pooled, confidence, 2);
        for (const c of found) {
          contrasts.push({ term: g.term, contrast: c.degree === 1 ? "linear" : "quadratic", estimate: c.estimate, standardError: c.standardError, t: c.t, df: c.df, p: c.p });
        }
      }
    }
  }
  return {
    add: {
      ...(comparisons.length > 0 ? { comparisons } : {}),
      ...(groups.length > 0 ? { groups } : {}),
      ...(best.length > 0 ? { best } : {}),
      ...(contrasts.length > 0 ? { contrasts } : {}),
    },
    diagnostics,
  };
};

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
