/**
 * Univariate repeated-measures ANOVA with error strata (Winer, Brown & Michels 1991, Statistical
 * Principles in Experimental Design, ch. 7; the same partition as a linear model with an Error(subject)
 * stratum per within term). Every subject is measured once in each of the k conditions (combinations of
 * the within factors); subjects may belong to groups formed by between-subject factors.
 *
 * Method: the subjects' n × k matrix Y is transformed by each within term's orthonormal contrasts,
 * Z_T = Y·C_T (contrasts.ts). The between stratum is the regression of Y·1/√k on the between factors:
 * its terms are tested against the subjects-within-groups mean square. In the stratum of within term T,
 * T itself has SS = n·‖z̄_T‖² (the intercept of Z_T, fitted first as in a sequential fit), T x B has
 * the trace of B's hypothesis SSCP of Z_T, and the error T x subject has the trace of the residual SSCP
 * E_T on (n - g)·p_T degrees of freedom; E_T also feeds the sphericity statistics (sphericity.ts).
 * Between-subject terms use sequential (Type I) sums of squares; with equal group sizes every type agrees.
 */

import type { AnovaTermRow } from "../linear-model/types.js";
import { fUpperTail } from "../distributions/f-distribution.js";
import { fitLinearModel } from "../linear-model/fit-linear-model.js";
import type { ModelFactor, ModelTerm } from "../linear-model/types.js";
import { type Matrix, termContrasts } from "./contrasts.js";
import { type Sphericity, sphericity } from "./sphericity.js";

/** A factor of a repeated-measures design: its name and level count. */
export interface RmFactor {
  readonly name: string;
  readonly levelCount: number;
}

/** The data of a repeated-measures design with one value per subject and condition. */
export interface RepeatedMeasuresInput {
  /** Name of the subject factor, used to name the error strata. */
  readonly subjectName: string;
  readonly subjects: number;
  /** Within-subject factors; conditions are their level combinations, last factor varying fastest. */
  readonly within: readonly RmFactor[];
  /** Row-major subjects × conditions values: y[s·k + c]. */
  readonly y: Float64Array;
  /** Between-subject factors with the level (0-based) of every subject. */
  readonly between: readonly (RmFactor & { readonly codes: Int32Array })[];
}

/** One row of a stratified table; `error` names the row whose mean square is the F denominator. */
export interface StratumRow extends AnovaTermRow {
  /** Source of the error row this term is tested against; absent on error rows. */
  readonly error?: string;
  /** True for the error row of a stratum. */
  readonly isError: boolean;
  /** Index into `sphericity` of the within term whose stratum holds this row; absent in the between stratum. */
  readonly withinTerm?: number;
}

/** Sphericity of one within term, with the corrected p-values of every row in its stratum. */
export interface TermSphericity {
  readonly term: string;
  readonly statistics: Sphericity;
  /** Per tested row of the stratum: p with the GG and the HF correction (df multiplied by ε). */
  readonly corrected: readonly { readonly source: string; readonly greenhouseGeisserP: number | null; readonly huynhFeldtP: number | null }[];
}

export type RepeatedMeasuresResult =
  | { readonly ok: true; readonly rows: readonly StratumRow[]; readonly sphericity: readonly TermSphericity[]; readonly total: { readonly df: number; readonly ss: number } }
  | { readonly ok: false; readonly reason: string };

/** Non-empty subsets of 0..m-1 as boolean masks, by size then in order. */
function subsets(m: number): boolean[][] {
  const out: boolean[][] = [];
  for (let size = 1; size <= m; size++) {
    const rec = (start: number, chosen: number[]) => {
      if (chosen.length === size) {
        out.push(Array.from({ length: m }, (_, i) => chosen.includes(i)));
        return;
      }
      for (let i = start; i < m; i++) rec(i + 1, [...chosen, i]);
    };
    rec(0, []);
  }
  return out;
}

function pValue(f: number | null, df1: number, df2: number): number | null {
  if (f === null) return null;
  const p = fUpperTail(f, df1, df2);
  return Number.isFinite(p) ? p : null;
}

function ratio(ss: number, df: number): number | null {
  return df > 0 ? ss / df : null;
}

interface ColumnFits {
  /** Per between term (in between-model order): SS summed over columns. */
  readonly termSs: number[];
  readonly termDf: number[];
  readonly termNames: string[];
  /** Residual per column, per subject. */
  readonly residuals: Float64Array[];
  readonly residualDf: number;
}

/** Regresses every column of Z (n × q, row-major) on the between factors (fully crossed, Type I). */
function fitColumns(z: Float64Array, n: number, q: number, input: RepeatedMeasuresInput): ColumnFits | string {
  const b = input.between;
  const factors: ModelFactor[] = b.map((f) => ({ name: f.name, levelCount: f.levelCount, codes: f.codes }));
  const terms: ModelTerm[] = subsets(b.length).map((mask) => ({ factors: mask.flatMap((on, i) => (on ? [i] : [])), covariates: [] }));
  const termNames = terms.map((t) => t.factors.map((i) => b[i]!.name).join(" x "));
  const termSs = terms.map(() => 0);
  let termDf = terms.map(() => 0);
  const residuals: Float64Array[] = [];
  let residualDf = n - 1;
  for (let c = 0; c < q; c++) {
    const col = new Float64Array(n);
    for (let s = 0; s < n; s++) col[s] = z[s * q + c]!;
    if (terms.length === 0) {
      let mean = 0;
      for (let s = 0; s < n; s++) mean += col[s]!;
      mean /= n;
      residuals.push(col.map((v) => v - mean));
      continue;
    }
    const fit = fitLinearModel({ y: col, factors, covariates: [], terms, ssType: "I" });
    if (!fit.ok) {
      if (fit.code === "zero-variance") {
        residuals.push(new Float64Array(n));
        continue;
      }
      return fit.reason;
    }
    fit.anova.forEach((row, t) => {
      termSs[t]! += row.ss;
    });
    termDf = fit.anova.map((row) => row.df);
    residualDf = fit.residual.df;
    residuals.push(fit.residuals);
  }
  return { termSs, termDf, termNames, residuals, residualDf };
}

/** The stratified ANOVA and per-term sphericity of a complete repeated-measures layout. */
export function repeatedMeasuresAnova(input: RepeatedMeasuresInput): RepeatedMeasuresResult {
  const n = input.subjects;
  const k = input.within.reduce((a, f) => a * f.levelCount, 1);
  if (input.within.length === 0 || input.within.some((f) => f.levelCount < 2)) return { ok: false, reason: "a repeated-measures design needs a within-subject factor with at least two levels" };
  if (input.y.length !== n * k) return { ok: false, reason: "every subject needs exactly one value in every condition" };
  if (input.y.some((v) => !Number.isFinite(v))) return { ok: false, reason: "a value is not a finite number" };
  if (input.between.some((f) => f.codes.length !== n)) return { ok: false, reason: "every subject needs a level of every between-subject factor" };
  const rows: StratumRow[] = [];
  const sphericities: TermSphericity[] = [];
  const subjectName = input.subjectName;

  // Between-subject stratum.
  const between = applyContrasts(input.y, n, k, termContrasts(input.within.map((f) => f.levelCount), input.within.map(() => false)));
  const bFit = fitColumns(between, n, 1, input);
  if (typeof bFit === "string") return { ok: false, reason: bFit };
  if (bFit.residualDf < 1) return { ok: false, reason: "each group of subjects needs at least two subjects to estimate the between-subject error" };
  const bErrorSs = sumSquares(bFit.residuals);
  const bErrorMs = ratio(bErrorSs, bFit.residualDf);
  bFit.termNames.forEach((name, t) => {
    const df = bFit.termDf[t]!;
    const ms = ratio(bFit.termSs[t]!, df);
    const f = ms !== null && bErrorMs !== null && bErrorMs > 0 ? ms / bErrorMs : null;
    rows.push({ source: name, df, ss: bFit.termSs[t]!, ms, f, p: pValue(f, df, bFit.residualDf), error: subjectName, isError: false });
  });
  rows.push({ source: subjectName, df: bFit.residualDf, ss: bErrorSs, ms: bErrorMs, f: null, p: null, isError: true });

  // One stratum per within term.
  for (const mask of subsets(input.within.length)) {
    const c = termContrasts(input.within.map((f) => f.levelCount), mask);
    const q = c.cols;
    const z = applyContrasts(input.y, n, k, c);
    const fit = fitColumns(z, n, q, input);
    if (typeof fit === "string") return { ok: false, reason: fit };
    const termName = input.within.filter((_, i) => mask[i]).map((f) => f.name).join(" x ");
    const errorName = `${termName} x ${subjectName}`;
    const errorDf = fit.residualDf * q;
    const e = residualSscp(fit.residuals, n);
    const errorSs = trace(e);
    const errorMs = ratio(errorSs, errorDf);
    const termIndex = sphericities.length;
    const tested: { source: string; df: number; f: number | null }[] = [];
    let intercept = 0;
    for (let col = 0; col < q; col++) {
      let s = 0;
      for (let r = 0; r < n; r++) s += z[r * q + col]!;
      intercept += (s * s) / n;
    }
    const add = (source: string, df: number, ss: number) => {
      const ms = ratio(ss, df);
      const f = ms !== null && errorMs !== null && errorMs > 0 ? ms / errorMs : null;
      rows.push({ source, df, ss, ms, f, p: pValue(f, df, errorDf), error: errorName, isError: false, withinTerm: termIndex });
      tested.push({ source, df, f });
    };
    add(termName, q, intercept);
    fit.termNames.forEach((name, t) => add(`${name} x ${termName}`, fit.termDf[t]! * q, fit.termSs[t]!));
    rows.push({ source: errorName, df: errorDf, ss: errorSs, ms: errorMs, f: null, p: null, isError: true, withinTerm: termIndex });
    const stats = sphericity(e, fit.residualDf);
    if (!stats.ok) return { ok: false, reason: stats.reason };
    const hf = Math.min(1, stats.huynhFeldt);
    sphericities.push({
      term: termName,
      statistics: stats,
      corrected: tested.map((t) => ({
        source: t.source,
        greenhouseGeisserP: pValue(t.f, t.df * stats.greenhouseGeisser, errorDf * stats.greenhouseGeisser),
        huynhFeldtP: pValue(t.f, t.df * hf, errorDf * hf),
      })),
    });
  }

  let mean = 0;
  for (const v of input.y) mean += v;
  mean /= input.y.length;
  let totalSs = 0;
  for (const v of input.y) totalSs += (v - mean) ** 2;
  return { ok: true, rows, sphericity: sphericities, total: { df: n * k - 1, ss: totalSs } };
}

/** Z = Y·C for row-major Y (n × k) and C (k × q). */
function applyContrasts(y: Float64Array, n: number, k: number, c: Matrix): Float64Array {
  const q = c.cols;
  const z = new Float64Array(n * q);
  for (let s = 0; s < n; s++)
    for (let j = 0; j < q; j++) {
      let v = 0;
      for (let i = 0; i < k; i++) v += y[s * k + i]! * c.data[i * q + j]!;
      z[s * q + j] = v;
    }
  return z;
}

/** E = R'R for residual columns R (one array per column). */
function residualSscp(residuals: readonly Float64Array[], n: number): Matrix {
  const q = residuals.length;
  const data = new Float64Array(q * q);
  for (let i = 0; i < q; i++)
    for (let j = 0; j <= i; j++) {
      let v = 0;
      for (let s = 0; s < n; s++) v += residuals[i]![s]! * residuals[j]![s]!;
      data[i * q + j] = v;
      data[j * q + i] = v;
    }
  return { rows: q, cols: q, data };
}

function trace(m: Matrix): number {
  let t = 0;
  for (let i = 0; i < m.rows; i++) t += m.data[i * m.cols + i]!;
  return t;
}

function sumSquares(columns: readonly Float64Array[]): number {
  let s = 0;
  for (const c of columns) for (const v of c) s += v * v;
  return s;
}
