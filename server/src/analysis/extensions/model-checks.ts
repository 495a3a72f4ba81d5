/**
 * Model checks and alternative tests of one response.
 *
 * Checks (always reported when computable): Levene (mean-centred) and Brown-Forsythe (median-centred)
 * tests and Bartlett's test over the cells of the fixed factors in the model; Shapiro-Wilk on the residuals;
 * externally studentized residuals against a Bonferroni bound; the slope of log SD on log mean.
 * Diagnostics, at the file's alpha:
 * - `unequal-variance` when the Brown-Forsythe p < alpha (with a power transformation suggested when the
 *   spread grows with the mean);
 * - `non-normal-residuals` when the Shapiro-Wilk p < alpha and, for more than 50 residuals, also W < 0.95,
 *   and the residual df exceed half the runs (otherwise the residuals' dependence through the fit, e.g. the
 *   +d/-d pairs of two-run cells, distorts W; the result is still reported).
 *   This is Trialbook's own rule: with many runs the test detects departures too small to matter, while
 *   the F test's reliance on normality fades (central limit theorem; Box, Hunter & Hunter 2005, §3.1).
 * - `outlier` on the value cell of each run past the Bonferroni bound;
 * - `out-of-spec` (information) on each measured value outside the response's spec limits.
 * Alternatives: with a single fixed factor, Welch's ANOVA and Kruskal-Wallis (and Welch's t for two levels);
 * with one fixed factor and one block factor holding one run per cell, Friedman's test.
 */

import type { ResponseExtension } from "../analyze-document.js";
import { ValueStatus } from "../design.js";
import { responseSpan, responseText, runId } from "../design-runs.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";
import type { AlternativeTests, ModelChecks } from "../results.js";
import { bartlettTest } from "../../stats/checks/bartlett.js";
import { leveneTests } from "../../stats/checks/levene.js";
import { bonferroniOutliersAmong, bonferroniScreen } from "../../stats/checks/outliers.js";
import { shapiroWilk, shapiroWilkSizeProblem } from "../../stats/checks/shapiro-wilk.js";
import { varianceMeanTrend } from "../../stats/checks/variance-mean.js";
import { friedman, kruskalWallis } from "../../stats/alternatives/rank-tests.js";
import { welchAnova, welchT } from "../../stats/alternatives/welch.js";
import { formatNumber, formatP } from "../../text/format-number.js";
import { commonGroupings, fixedFactorsInModel, groupsOf, prepareGroups } from "./compared-groups.js";
import { takeVarianceTests } from "../early-analysis.js";
import { studentizedCandidates } from "./studentized-values.js";

const MAX_SPEC_DIAGNOSTICS = 100;

/** The model-checks extension (registered in analyze-document.ts): keys `checks` and `alternatives`. */
export const modelChecksExtension: ResponseExtension = (context) => {
  const diagnostics: Diagnostic[] = [];
  // `rows` (typed run indices), not `runs`: the plain array is built on first read, a million entries.
  const { design, fit, rows } = context;
  const response = design.responses[context.responseIndex]!;
  const anchor = context.anchors.response;
  const alpha = context.result.alpha;
  const checks: { -readonly [K in keyof ModelChecks]: ModelChecks[K] } = {};
  const skipped = (what: string, why: string) => diagnostics.push(diagnostic("check-skipped", anchor, `${what} of '${response.name}': not computed, because ${why}.`));

  // Variance checks over the cells of the fixed factors in the model.
  const fixed = fixedFactorsInModel(context);
  // Usually summarised already by the comparisons; otherwise the cells and main effects are, together, here.
  prepareGroups(context, commonGroupings(context));
  const cells = fixed.length > 0 ? groupsOf(context, fixed) : undefined;
  if (cells) {
    const present = cells.summaries.map((s, i) => [s, i] as const).filter(([s]) => s.n > 0);
    checks.groupsBy = cells.term;
    if (present.length < 2) skipped("The equal-variance tests", `only one cell of ${cells.term} has measured runs`);
    else if (present.some(([s]) => s.n < 2)) {
      const single = present.filter(([s]) => s.n < 2).map(([, i]) => cells.labels[i]!);
      skipped("The equal-variance tests (Levene, Brown-Forsythe, Bartlett)", `${single.length === 1 ? "cell" : "cells"} ${single.slice(0, 5).join(", ")}${single.length > 5 ? ", ..." : ""} of ${cells.term} ${single.length === 1 ? "has" : "have"} a single run, so ${single.length === 1 ? "its" : "their"} spread is unknown`);
    } else {
      // With two runs in every cell both absolute deviations of a cell are equal, so Levene-type tests have
      // no within-cell spread; they need a cell with at least three runs.
      const pairsOnly = present.every(([s]) => s.n <= 2);
      // Both tests share their passes over the runs (levene.ts); for a large file, made on another thread
      // while the fit, the means and the comparisons were made here (early-analysis.ts).
      const count = cells.summaries.length;
      const spread = pairsOnly ? null : (takeVarianceTests(context.y, cells.codes, count) ?? leveneTests(context.y, cells.codes, count, { sizes: cells.summaries.map((s) => s.n), sums: cells.sums }));
      const levene = spread?.levene ?? null;
      const bf = spread?.brownForsythe ?? null;
      const bartlett = bartlettTest(cells.summaries);
      if (levene) checks.levene = levene;
      if (bf) checks.brownForsythe = bf;
      if (bartlett) checks.bartlett = bartlett;
      if (!levene || !bf) skipped("Levene's and the Brown-Forsythe test", pairsOnly ? `every cell of ${cells.term} has two runs, whose absolute deviations from the cell centre are equal, so the tests are undefined (Bartlett's test is reported)` : "the absolute deviations have no spread within the cells");
      if (!bartlett) skipped("Bartlett's test", "a cell has no spread");
      const shifted = cells.summaries.map((s) => ({ ...s, mean: s.mean + context.offset }));
      const trend = varianceMeanTrend(shifted);
      if (trend) checks.varianceMean = { slope: trend.slope, lambda: trend.lambda };
      if (bf && bf.p < alpha) {
        const transform =
          trend && trend.slope > 0.5 && trend.roundedLambda !== 1 && trend.roundedLambda >= -1
            ? ` The spread grows with the mean (log SD rises ${formatNumber(trend.slope, 2)} per log mean): analyse ${transformName(trend.roundedLambda)} of '${response.name}' (power transformation λ ≈ ${formatNumber(trend.lambda, 2)}).`
            : "";
        diagnostics.push(
          diagnostic(
            "unequal-variance",
            anchor,
            `The spread of '${response.name}' differs between the cells of ${cells.term} (Brown-Forsythe F(${bf.df1}, ${formatNumber(bf.df2, 4)}) = ${formatNumber(bf.statistic, 3)}, p = ${formatP(bf.p)}). The pooled F tests and Tukey intervals assume equal spread and may mislead: read the Games-Howell comparisons and Welch's test instead, or find and remove the cause of the extra spread.${transform}`,
          ),
        );
      }
    }
  }

  // Normality of the residuals.
  if (fit.residual.df >= 1) {
    const unsized = shapiroWilkSizeProblem(fit.n);
    const sw = unsized === undefined ? shapiroWilk(fit.residuals) : { ok: false as const, reason: unsized };
    if (sw.ok) {
      checks.shapiroWilk = { w: sw.w, p: sw.p, n: sw.n };
      // Residuals are correlated through the fit (cov = σ²(I - H)); when the model uses half the runs or more
      // (e.g. two runs per cell, whose residuals are +d and -d), that dependence alone distorts W, so the
      // result is shown but raises no diagnostic.
      const dependent = fit.residual.df * 2 <= sw.n;
      // (No hint either: the values are in `checks`, and the limit is documented in docs/json-output-comparisons.md.)
      if (!dependent && sw.p < alpha && (sw.n <= 50 || sw.w < 0.95)) {
        diagnostics.push(
          diagnostic(
            "non-normal-residuals",
            anchor,
            `The residuals of '${response.name}' are not normally distributed (Shapiro-Wilk W = ${formatNumber(sw.w, 4)}, p = ${formatP(sw.p)}, n = ${sw.n}). p-values and intervals may be off, most with few runs: look for outliers or a skewed response, consider a log or other power transformation, or read the Kruskal-Wallis / Friedman test.`,
          ),
        );
      }
    } else skipped("The Shapiro-Wilk test", sw.reason);

    // Outliers: Bonferroni bound on externally studentized residuals.
    // Only runs that can pass the bound get a studentized residual (studentized-values.ts).
    const screen = bonferroniScreen(fit.n, fit.residual.df, alpha);
    const candidates = screen === null ? null : studentizedCandidates(fit, screen);
    const flags = candidates ? bonferroniOutliersAmong(candidates.index, candidates.studentized, fit.n, fit.residual.df, alpha) : [];
    if (flags.length > 0) {
      checks.outliers = flags.map((f) => ({ run: rows.length ? runId(design.runs, rows[f.index]!) : "", row: rows[f.index]!, studentized: f.studentized, p: f.p }));
      for (const f of flags) {
        const row = rows[f.index]!;
        diagnostics.push(
          diagnostic(
            "outlier",
            responseSpan(design.runs, context.responseIndex, row) ?? anchor,
            `Run ${runId(design.runs, row)}'s '${response.name}' lies far from its fitted value (studentized residual ${formatNumber(f.studentized, 3)}, Bonferroni p = ${formatP(f.p)}). One such run can shift means and inflate the error: check the record and the run; if it is a mistake correct it, if the run went wrong mark it excluded "reason"; otherwise keep it and report it.`,
          ),
        );
      }
    } else checks.outliers = [];
  }

  // Measured values outside the spec limits.
  if (response.specLower !== undefined || response.specUpper !== undefined) {
    let count = 0;
    const status = design.runs.responseStatus[context.responseIndex]!;
    for (let r = 0; r < design.runs.count && count < MAX_SPEC_DIAGNOSTICS; r++) {
      if (status[r] !== ValueStatus.Measured) continue;
      const value = Number(responseText(design.runs, context.responseIndex, r));
      const low = response.specLower !== undefined && value < response.specLower;
      const high = response.specUpper !== undefined && value > response.specUpper;
      if (!low && !high) continue;
      count++;
      diagnostics.push(
        diagnostic(
          "out-of-spec",
          responseSpan(design.runs, context.responseIndex, r) ?? anchor,
          `Run ${runId(design.runs, r)}: ${response.name} = ${responseText(design.runs, context.responseIndex, r)} is ${low ? `below the lower spec limit ${response.specLower}` : `above the upper spec limit ${response.specUpper}`}${design.runs.excluded[r] ? " (the run is excluded from the analysis)" : ""}.`,
        ),
      );
    }
  }

  return { add: { checks, ...alternatives(context, fixed) }, diagnostics };
};

function transformName(lambda: number): string {
  if (lambda === 0) return "the logarithm";
  if (lambda === 0.5) return "the square root";
  if (lambda === -1) return "the reciprocal";
  if (lambda === -0.5) return "the reciprocal square root";
  return `the power ${lambda}`;
}

/** Welch, Kruskal-Wallis, Welch's t and Friedman where the design is one of the layouts they apply to. */
function alternatives(context: Parameters<ResponseExtension>[0], fixed: readonly number[]): { alternatives?: AlternativeTests } {
  if (fixed.length !== 1) return {};
  const treatment = fixed[0]!;
  const blocks = context.design.factors.flatMap((f, i) => (f.role === "block" && context.levelsOf(i) ? [i] : []));
  const g = groupsOf(context, [treatment]);
  if (!g) return {};
  const out: { -readonly [K in keyof AlternativeTests]: AlternativeTests[K] } = { term: g.term };
  if (blocks.length === 0) {
    const welch = welchAnova(g.summaries);
    if (welch) out.welch = welch;
    const kw = kruskalWallis(context.y, g.codes, g.summaries.length);
    if (kw) out.kruskalWallis = kw;
    const present = g.summaries.flatMap((s, i) => (s.n > 0 ? [i] : []));
    if (present.length === 2) {
      const t = welchT(g.summaries[present[0]!]!, g.summaries[present[1]!]!);
      if (t) out.welchT = { a: g.labels[present[0]!]!, b: g.labels[present[1]!]!, diff: t.diff, statistic: t.statistic, df: t.df, p: t.p };
    }
  } else if (blocks.length === 1) {
    const b = context.levelsOf(blocks[0]!)!;
    const k = g.summaries.length;
    const table: number[][] = Array.from({ length: b.levels.length }, () => new Array<number>(k).fill(NaN));
    const counts = new Int32Array(b.levels.length * k);
    for (let i = 0; i < context.y.length; i++) {
      table[b.codes[i]!]![g.codes[i]!] = context.y[i]!;
      counts[b.codes[i]! * k + g.codes[i]!]!++;
    }
    if (counts.every((c) => c === 1)) {
      const test = friedman(table);
      if (test) out.friedman = { ...test, block: context.design.factors[blocks[0]!]!.name };
    }
  }
  return Object.keys(out).length > 1 ? { alternatives: out } : {};
}

