/**
 * Repeated-measures analysis (docs/designs.md): for a design with a factor declared `as subject`, the
 * fixed-effects `anova` rows are REPLACED by the univariate table with error strata (every tested row names
 * its error row in `error`), and `sphericity` gives Mauchly's test with Greenhouse–Geisser and Huynh–Feldt
 * corrected p-values per within-subject term. Within-subject factors are the fixed factors that vary
 * within a subject; between-subject factors are those constant within every subject. A subject without a
 * measured value in every condition is left out (listwise, as a multivariate fit would), with a diagnostic;
 * repeated runs of one subject in one condition are averaged.
 */

import { repeatedMeasuresAnova } from "../../stats/repeated-measures/strata.js";
import type { ResponseContext } from "../analyze-response.js";
import { subjectKeys } from "../build-design.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";
import type { AnovaRow, ResponseAnalysis, SphericityResult } from "../results.js";

/** Adds the stratified table and sphericity for subject designs; does nothing for other designs. */
export function repeatedMeasuresExtension(context: ResponseContext): { add: Partial<ResponseAnalysis>; diagnostics: Diagnostic[] } {
  const { design } = context;
  const subject = design.factors.findIndex((f) => f.role === "subject");
  if (subject < 0) return { add: {}, diagnostics: [] };
  const anchor = context.anchors.response;
  const responseName = design.responses[context.responseIndex]!.name;
  const fail = (reason: string) => ({
    add: {},
    diagnostics: [diagnostic("special-design", anchor, `The repeated-measures analysis of '${responseName}' is not possible: ${reason} The table shown treats '${design.factors[subject]!.name}' as an ordinary factor.`)],
  });
  if (design.factors.some((f) => f.role === "random" || f.role === "block")) return fail("random and block factors together with a subject factor are not supported yet.");
  if (design.covariates.length > 0) return fail("covariates are not supported in repeated-measures designs yet.");

  const runs = context.runs;
  const allKeys = subjectKeys(design.factors, subject, design.runs);
  const keys = runs.map((r) => allKeys[r]!);
  const fixed = design.factors.flatMap((f, i) => (f.role === "fixed" ? [i] : []));
  const levelOf = (f: number, r: number) => design.runs.levels[f]![r]!;
  const within: number[] = [];
  const between: number[] = [];
  for (const f of fixed) {
    const first = new Map<string, number>();
    let varies = false;
    runs.forEach((r, i) => {
      const prior = first.get(keys[i]!);
      if (prior === undefined) first.set(keys[i]!, levelOf(f, r));
      else if (prior !== levelOf(f, r)) varies = true;
    });
    (varies ? within : between).push(f);
  }
  if (within.length === 0) return fail("no fixed factor varies within a subject.");

  const levelCounts = within.map((f) => design.factors[f]!.levels.length);
  const k = levelCounts.reduce((a, b) => a * b, 1);
  const subjects = new Map<string, { sums: Float64Array; counts: Int32Array; between: number[] }>();
  runs.forEach((r, i) => {
    let c = 0;
    within.forEach((f, q) => (c = c * levelCounts[q]! + levelOf(f, r)));
    const entry = subjects.get(keys[i]!) ?? { sums: new Float64Array(k), counts: new Int32Array(k), between: between.map((f) => levelOf(f, r)) };
    entry.sums[c]! += context.y[i]!;
    entry.counts[c]!++;
    subjects.set(keys[i]!, entry);
  });
  const diagnostics: Diagnostic[] = [];
  const complete = [...subjects.entries()].filter(([, s]) => s.counts.every((n) => n > 0));
  const dropped = subjects.size - complete.length;
  if (dropped > 0) {
    diagnostics.push(diagnostic("incomplete-subject", anchor, `${dropped} subject${dropped === 1 ? "" : "s"} without a measured '${responseName}' in every condition ${dropped === 1 ? "is" : "are"} left out of the repeated-measures analysis.`));
  }
  if (complete.some(([, s]) => s.counts.some((n) => n > 1))) {
    diagnostics.push(diagnostic("special-design", anchor, `Some subjects have more than one run of '${responseName}' in a condition: their values are averaged for the repeated-measures analysis.`));
  }
  const n = complete.length;
  const y = new Float64Array(n * k);
  complete.forEach(([, s], i) => {
    for (let c = 0; c < k; c++) y[i * k + c] = s.sums[c]! / s.counts[c]!;
  });
  // Between-subject factors with their levels compacted to those present.
  const betweenInput = between.map((f, q) => {
    const present = [...new Set(complete.map(([, s]) => s.between[q]!))].sort((a, b) => a - b);
    return { name: design.factors[f]!.name, levelCount: present.length, codes: Int32Array.from(complete, ([, s]) => present.indexOf(s.between[q]!)) };
  });
  const result = repeatedMeasuresAnova({
    subjectName: design.factors[subject]!.name,
    subjects: n,
    within: within.map((f, q) => ({ name: design.factors[f]!.name, levelCount: levelCounts[q]! })),
    y,
    between: betweenInput.filter((b) => b.levelCount > 1),
  });
  if (!result.ok) return { add: {}, diagnostics: [...diagnostics, ...fail(result.reason).diagnostics] };

  const errorDf = new Map(result.rows.filter((r) => r.isError).map((r) => [r.source, r.df] as const));
  // The core's offset does not change sums of squares; the strata are on the centred scale like the core.
  const anova: AnovaRow[] = [
    ...result.rows.map((r) =>
      r.isError ? { source: r.source, df: r.df, ss: r.ss, ms: r.ms } : { source: r.source, df: r.df, ss: r.ss, ms: r.ms, f: r.f, p: r.p, error: r.error!, errorDf: errorDf.get(r.error!) ?? null },
    ),
    { source: "Total", df: result.total.df, ss: result.total.ss },
  ];
  const sphericity: SphericityResult[] = result.sphericity.map((s) => {
    const own = s.corrected.find((c) => c.source === s.term);
    return {
      term: s.term,
      mauchlyW: s.statistics.mauchlyW,
      p: s.statistics.mauchlyP,
      greenhouseGeisser: { epsilon: s.statistics.greenhouseGeisser, p: own?.greenhouseGeisserP ?? null },
      huynhFeldt: { epsilon: s.statistics.huynhFeldt, p: own?.huynhFeldtP ?? null },
      recommended: s.statistics.recommended,
      corrected: s.corrected,
    };
  });
  const effectSizes = result.rows
    .filter((r) => !r.isError)
    .map((r) => {
      const err = result.rows.find((e) => e.isError && e.source === r.error);
      const partial = err && r.ss + err.ss > 0 ? r.ss / (r.ss + err.ss) : null;
      return { term: r.source, etaSquared: result.total.ss > 0 ? r.ss / result.total.ss : null, partialEtaSquared: partial, omegaSquared: null };
    });
  return { add: { designAnalysis: "repeated-measures", anova, sphericity, effectSizes, n: n * k }, diagnostics };
}
