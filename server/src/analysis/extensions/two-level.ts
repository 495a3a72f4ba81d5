/**
 * Two-level factorial and fractional designs (docs/designs.md). Applies when every factor is fixed and
 * either has two levels, or has three numeric levels whose middle is the midpoint of the other two and
 * `plan centre-points` is declared. Runs with every factor at its low or high level are factorial runs;
 * runs with every factor at its middle level are centre points. Adds `effects` (effect, coefficient,
 * aliases, normal and half-normal scores, standardized value for a Pareto chart), `lenth` (when there is no
 * pure error), `curvature` (with centre points), and for a `plan fraction` the `definingRelation`,
 * `resolution` and `aliases`, with an `aliased-term` diagnostic when `plan model` lists two aliased terms.
 * When there are centre points the fixed-effects `anova` rows are REPLACED by the effects table: one row per
 * effect, Curvature, Residual (pure error from centre points and repeated factorial settings), Total.
 */

import { fUpperTail } from "../../stats/distributions/f-distribution.js";
import { aliasesOf, definingRelation } from "../../stats/two-level/aliases.js";
import { curvatureTest, pureError } from "../../stats/two-level/curvature.js";
import { twoLevelEffects } from "../../stats/two-level/effects.js";
import { lenth } from "../../stats/two-level/lenth.js";
import { halfNormalPlotPoints, normalPlotPoints } from "../../stats/two-level/plot-data.js";
import { multiplyWords, wordName, wordOf } from "../../stats/two-level/words.js";
import type { ResponseContext } from "../analyze-response.js";
import { type Diagnostic, type DiagnosticCode, diagnostic } from "../diagnostics.js";
import type { AnovaRow, ResponseAnalysis, TwoLevelEffectResult } from "../results.js";

/** Per declared level of a factor: -1 low, +1 high, 0 centre; null when the factor is not two-level. */
function coding(levels: readonly { numeric?: number }[], centre: boolean): Int8Array | null {
  if (levels.length === 2) {
    const [a, b] = levels;
    if (a!.numeric !== undefined && b!.numeric !== undefined && a!.numeric > b!.numeric) return Int8Array.of(1, -1);
    return Int8Array.of(-1, 1);
  }
  if (levels.length === 3 && centre && levels.every((l) => l.numeric !== undefined)) {
    const values = levels.map((l) => l.numeric!);
    const lo = Math.min(...values);
    const hi = Math.max(...values);
    const mid = values.find((v) => v !== lo && v !== hi);
    if (mid === undefined || Math.abs(mid - (lo + hi) / 2) > 1e-9 * Math.max(1, Math.abs(hi))) return null;
    return Int8Array.from(values, (v) => (v === lo ? -1 : v === hi ? 1 : 0));
  }
  return null;
}

/** Adds the two-level analysis; does nothing for other designs. */
export function twoLevelExtension(context: ResponseContext): { add: Partial<ResponseAnalysis>; diagnostics: Diagnostic[]; supersedes?: readonly DiagnosticCode[] } {
  const { design } = context;
  const none = { add: {}, diagnostics: [] };
  const factors = design.factors;
  if (factors.length < 2 || factors.length > 30 || factors.some((f) => f.role !== "fixed" || f.within !== undefined) || design.covariates.length > 0) return none;
  const centreDeclared = design.centrePoints !== undefined;
  const codings = factors.map((f) => coding(f.levels, centreDeclared));
  if (codings.some((c) => c === null)) return none;
  const names = factors.map((f) => f.name);
  const anchor = context.anchors.response;
  const responseName = design.responses[context.responseIndex]!.name;
  const diagnostics: Diagnostic[] = [];

  // Split the runs into factorial and centre runs.
  const factorialRows: number[] = [];
  const centreValues: number[] = [];
  const factorialValues: number[] = [];
  let other = 0;
  context.runs.forEach((r, i) => {
    const codes = factors.map((_, f) => codings[f]![design.runs.levels[f]![r]!]!);
    if (codes.every((c) => c !== 0)) {
      factorialRows.push(i);
      factorialValues.push(context.y[i]!);
    } else if (codes.every((c) => c === 0)) centreValues.push(context.y[i]!);
    else other++;
  });
  if (other > 0) diagnostics.push(diagnostic("special-design", anchor, `${other} run${other === 1 ? " is" : "s are"} neither a factorial run nor a centre point and ${other === 1 ? "is" : "are"} left out of the two-level analysis of '${responseName}'.`));

  const relation = design.fractions && design.fractions.length > 0 ? definingRelation(design.fractions, factors.length) : null;
  if (relation && !relation.ok) return { add: {}, diagnostics: [...diagnostics, diagnostic("special-design", anchor, `The fraction cannot be analysed: ${relation.reason}.`)] };
  const termWords = context.modelTerms.filter((t) => t.variables.every((v) => v.kind === "factor")).map((t) => ({ name: t.name, word: wordOf(t.variables.map((v) => v.index)) }));

  // Aliases among model terms, and a diagnostic when the model asks for two of one alias set.
  const aliasesOut: { term: string; aliasedWith: string[] }[] = [];
  if (relation?.ok) {
    for (const t of termWords) aliasesOut.push({ term: t.name, aliasedWith: aliasesOf(t.word, relation).map((w) => wordName(w, names)) });
    if (design.explicitModel) {
      for (let i = 0; i < termWords.length; i++)
        for (let j = 0; j < i; j++) {
          const product = multiplyWords(termWords[i]!.word, termWords[j]!.word);
          if (relation.words.includes(product)) {
            diagnostics.push(
              diagnostic("aliased-term", context.anchors.terms.get(termWords[i]!.name) ?? anchor, `'${termWords[i]!.name}' is aliased with '${termWords[j]!.name}' in this fraction (${wordName(product, names)} is in the defining relation): the two cannot be estimated apart; remove one from the model.`),
            );
          }
        }
    }
  }
  const estimable = termWords.filter((t, i) => !relation?.ok || !termWords.slice(0, i).some((u) => relation.words.includes(multiplyWords(t.word, u.word))));
  const coded = factors.map((_, f) => Int8Array.from(factorialRows, (i) => codings[f]![design.runs.levels[f]![context.runs[i]!]!]!));
  const est = twoLevelEffects({ coded, y: Float64Array.from(factorialValues) }, estimable.map((t) => t.word));
  if (!est.ok) return { add: aliasesOut.length > 0 ? { aliases: aliasesOut } : {}, diagnostics: [...diagnostics, diagnostic("special-design", anchor, `No two-level effects for '${responseName}': ${est.reason}.`)] };

  // Pure error: runs at identical settings (centre points and repeated factorial settings).
  const groups = new Int32Array(factorialValues.length + centreValues.length);
  const keyIndex = new Map<string, number>();
  factorialRows.forEach((i, q) => {
    const key = factors.map((_, f) => design.runs.levels[f]![context.runs[i]!]!).join(",");
    if (!keyIndex.has(key)) keyIndex.set(key, keyIndex.size);
    groups[q] = keyIndex.get(key)!;
  });
  const centreGroup = keyIndex.size;
  for (let q = 0; q < centreValues.length; q++) groups[factorialValues.length + q] = centreGroup;
  const pe = pureError(Float64Array.from([...factorialValues, ...centreValues]), groups);
  // The residual of the effects model fitted to the factorial runs (lack of fit plus factorial pure error) is
  // pooled with the centre-point error only through pure error; terms not estimated remain in lack of fit.
  const effectValues = est.effects.map((e) => e.effect);
  const lenthResult = pe.df === 0 ? lenth(effectValues) : null;
  const pureMs = pe.df > 0 ? pe.ss / pe.df : null;
  const seEffect = pureMs !== null && pureMs > 0 ? 2 * Math.sqrt(pureMs / est.n) : null;
  const scale = lenthResult?.ok ? lenthResult.pse : seEffect;
  const normal = normalPlotPoints(effectValues);
  const half = halfNormalPlotPoints(effectValues);
  const normalScore = new Map(normal.map((p) => [p.index, p.score] as const));
  const halfScore = new Map(half.map((p) => [p.index, p.score] as const));
  const effects: TwoLevelEffectResult[] = est.effects.map((e, i) => ({
    term: estimable[i]!.name,
    effect: e.effect,
    coefficient: e.coefficient,
    aliases: relation?.ok ? aliasesOf(e.word, relation).map((w) => wordName(w, names)) : [],
    standardized: scale !== null && scale > 0 ? Math.abs(e.effect) / scale : null,
    normalScore: normalScore.get(i)!,
    halfNormalScore: halfScore.get(i)!,
  }));
  if (lenthResult && !lenthResult.ok) diagnostics.push(diagnostic("special-design", anchor, `Lenth's margins of error for '${responseName}' are not available: ${lenthResult.reason}.`));

  const add: { -readonly [K in keyof ResponseAnalysis]?: ResponseAnalysis[K] } = {
    designAnalysis: "two-level",
    effects,
    lenth: lenthResult?.ok ? { pse: lenthResult.pse, me: lenthResult.me, sme: lenthResult.sme, df: lenthResult.df } : null,
    ...(relation?.ok
      ? { definingRelation: relation.words.slice(1).map((w) => `I = ${wordName(w, names)}`), resolution: relation.resolution, aliases: aliasesOut }
      : {}),
  };
  if (centreValues.length > 0) {
    const c = curvatureTest(factorialValues, centreValues, pe);
    add.curvature = c.ok ? { ss: c.ss, f: c.f, p: c.p } : null;
    // The effects table replaces the fixed-effects one, whose coding cannot hold centre points.
    let total = 0;
    const all = [...factorialValues, ...centreValues];
    const mean = all.reduce((a, b) => a + b, 0) / all.length;
    for (const v of all) total += (v - mean) ** 2;
    const test = (ss: number): { f: number | null; p: number | null } => {
      if (pureMs === null || !(pureMs > 0)) return { f: null, p: null };
      const f = ss / pureMs;
      const p = fUpperTail(f, 1, pe.df);
      return { f, p: Number.isFinite(p) ? p : null };
    };
    const rows: AnovaRow[] = est.effects.map((e, i) => ({ source: estimable[i]!.name, df: 1, ss: e.ss, ms: e.ss, ...test(e.ss), error: "Residual", errorDf: pe.df }));
    const modelSs = est.effects.reduce((a, e) => a + e.ss, 0);
    const curvSs = c.ok ? c.ss : 0;
    rows.push({ source: "Curvature", df: 1, ss: curvSs, ms: curvSs, ...test(curvSs), error: "Residual", errorDf: pe.df });
    const lackSs = Math.max(0, total - modelSs - curvSs - pe.ss);
    const lackDf = all.length - 1 - est.effects.length - 1 - pe.df;
    if (lackDf > 0) rows.push({ source: "Lack of fit", df: lackDf, ss: lackSs, ms: lackSs / lackDf, ...(() => {
      if (pureMs === null || !(pureMs > 0)) return { f: null, p: null };
      const f = lackSs / lackDf / pureMs;
      const p = fUpperTail(f, lackDf, pe.df);
      return { f, p: Number.isFinite(p) ? p : null };
    })(), error: "Residual", errorDf: pe.df });
    rows.push({ source: "Residual", df: pe.df, ss: pe.ss, ms: pureMs });
    rows.push({ source: "Total", df: all.length - 1, ss: total });
    add.anova = rows;
    return { add, diagnostics, supersedes: ["aliased-term"] };
  }
  return { add, diagnostics };
}
