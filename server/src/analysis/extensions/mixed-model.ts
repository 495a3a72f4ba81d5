/**
 * Mixed-model analysis of balanced designs with random and/or nested factors (docs/designs.md): the
 * fixed-effects `anova` rows are REPLACED by the table of the balanced model (nested terms written
 * `sample(batch)`), each term tested against the denominator its expected mean square calls for in the
 * unrestricted convention (`error` names it; `errorDf` is Satterthwaite's for a synthetic one), with
 * `expectedMeanSquares`, ANOVA-method `varianceComponents` and the `icc`. Block factors are fixed here.
 * An unbalanced design keeps the fixed-effects table with a diagnostic saying so.
 */

import { type BalancedFactor, balancedAnova } from "../../stats/mixed/balanced-terms.js";
import { emsText, mixedModelTests } from "../../stats/mixed/expected-mean-squares.js";
import type { ResponseContext } from "../analyze-response.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";
import type { AnovaRow, ResponseAnalysis } from "../results.js";

/** Adds the EMS-based table for designs with random or nested factors; does nothing for other designs. */
export function mixedModelExtension(context: ResponseContext): { add: Partial<ResponseAnalysis>; diagnostics: Diagnostic[] } {
  const { design } = context;
  const special = design.factors.some((f) => f.role === "random" || f.within !== undefined);
  if (!special || design.factors.some((f) => f.role === "subject")) return { add: {}, diagnostics: [] };
  const anchor = context.anchors.response;
  const responseName = design.responses[context.responseIndex]!.name;
  const fail = (reason: string) => ({
    add: {},
    diagnostics: [diagnostic("special-design", anchor, `The mixed-model tests of '${responseName}' are not available: ${reason} The table shown treats every factor as fixed, so its F tests of terms involving random factors are not the right ones.`)],
  });
  if (design.covariates.length > 0) return fail("covariates are not supported with random or nested factors yet.");
  if (design.explicitModel) return fail("'plan model' chooses the terms; the mixed-model analysis uses the full balanced model, so remove 'plan model' to get it.");
  const factors: BalancedFactor[] = design.factors.map((f) => ({
    name: f.name,
    levels: f.levels.length,
    ...(f.within !== undefined ? { parent: f.within } : {}),
    random: f.role === "random",
  }));
  const codes = design.factors.map((_, i) => Int32Array.from(context.runs, (r) => design.runs.levels[i]![r]!));
  const anova = balancedAnova({ factors, codes, y: context.y });
  if (!anova.ok) return fail(`${anova.reason}.`);
  const mixed = mixedModelTests(factors, anova);
  const nameOf = (term: number) => (term < 0 ? "Residual" : anova.terms[term]!.name);
  const denominatorName = (parts: readonly { term: number; coefficient: number }[]) =>
    parts
      .map((p, i) => {
        const sign = p.coefficient < 0 ? " - " : i === 0 ? "" : " + ";
        const c = Math.abs(p.coefficient);
        return `${sign}${c === 1 ? "" : `${Number(c.toPrecision(6))}·`}${nameOf(p.term)}`;
      })
      .join("");
  const rows: AnovaRow[] = anova.terms.map((t, i) => {
    const test = mixed.tests[i]!;
    const ms = t.df > 0 ? t.ss / t.df : null;
    return {
      source: t.name,
      df: t.df,
      ss: t.ss,
      ms,
      f: test.f,
      p: test.p,
      error: test.denominator ? denominatorName(test.denominator.parts) : "none",
      errorDf: test.denominator ? test.denominator.df : null,
    };
  });
  rows.push({ source: "Residual", df: anova.residual.df, ss: anova.residual.ss, ms: anova.residual.df > 0 ? anova.residual.ss / anova.residual.df : null });
  rows.push({ source: "Total", df: anova.total.df, ss: anova.total.ss });
  const diagnostics: Diagnostic[] = [];
  mixed.tests.forEach((t) => {
    if (t.note && anova.terms[t.term]!.df > 0) diagnostics.push(diagnostic("special-design", anchor, `'${nameOf(t.term)}' of '${responseName}' has no F test: ${t.note}.`));
  });
  for (const c of mixed.components) {
    if (c.truncated) {
      diagnostics.push(diagnostic("negative-variance-component", anchor, `The variance of '${nameOf(c.term)}' for '${responseName}' is estimated below zero (${Number(c.estimate.toPrecision(4))}) and reported as 0: its variation is too small to see against the noise.`));
    }
  }
  return {
    add: {
      designAnalysis: "mixed-model",
      anova: rows,
      expectedMeanSquares: mixed.tests.map((t) => ({
        source: nameOf(t.term),
        ems: emsText(t.ems, t.term, anova.terms),
        denominator: t.denominator ? denominatorName(t.denominator.parts) : null,
        exact: t.denominator?.exact ?? false,
      })),
      varianceComponents: mixed.components.map((c) => ({ source: nameOf(c.term), variance: c.variance, share: c.share, estimate: c.estimate, truncated: c.truncated })),
      icc: mixed.icc ? { source: nameOf(mixed.icc.term), value: mixed.icc.value } : null,
    },
    diagnostics,
  };
}
