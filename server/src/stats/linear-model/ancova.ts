/**
 * Analysis-of-covariance quantities from a QR fit: covariate slopes, adjusted means and the slope
 * homogeneity test.
 *
 * Adjusted means are estimated marginal means (Searle, Speed & Milliken 1980, "Population marginal
 * means in the linear model", The American Statistician 34, 216-221): the model's prediction for a
 * level, averaged with equal weights over the levels of the other factors, with every covariate at its
 * mean. Under sum-to-zero coding with centred covariates that average is simply the intercept plus the
 * factor's own contrast row, because every other column averages to zero over the reference grid.
 * Its standard error is s ||R^{-T} l||, from Var(l^T b) = sigma^2 l^T (R^T R)^{-1} l.
 *
 * The slope homogeneity test compares the model with and without `factor x covariate` (Huitema 2011,
 * The Analysis of Covariance and Alternatives, 2nd ed., ch. 8): F = (extra SS / df1) / (RSS / df2).
 */

import { buildDesignMatrix, type DesignMatrix } from "./design-matrix.js";
import type { CoreAdjustedMeans, CoreSlopeHomogeneity } from "./model-core.js";
import { blockSumOfSquares, isZeroResidual } from "./nested-fits.js";
import { aliasRelation, solveUpperTransposed, type QrDecomposition } from "./qr.js";
import type { LinearModelInput } from "./types.js";

/** Common slopes of the covariate main-effect terms (terms with one covariate and no factor). */
export function covariateSlopes(
  input: LinearModelInput,
  design: DesignMatrix,
  qr: QrDecomposition,
  coefficients: Float64Array,
): { covariate: string; estimate: number; seFactor: number }[] {
  const out: { covariate: string; estimate: number; seFactor: number }[] = [];
  input.terms.forEach((term, t) => {
    if (term.factors.length !== 0 || term.covariates.length !== 1) return;
    const j = design.termColumns[t]!.start;
    const k = qr.rankOfColumn[j]!;
    if (k < 0) return;
    const unit = new Float64Array(qr.rank);
    unit[k] = 1;
    out.push({ covariate: input.covariates[term.covariates[0]!]!.name, estimate: coefficients[j]!, seFactor: norm(solveUpperTransposed(qr, unit)) });
  });
  return out;
}

/** Adjusted means of every factor whose main effect is a model term; null where not estimable. */
export function adjustedMeans(
  input: LinearModelInput,
  design: DesignMatrix,
  qr: QrDecomposition,
  coefficients: Float64Array,
): CoreAdjustedMeans[] {
  const relations: { column: number; relation: Float64Array }[] = [];
  for (let j = 0; j < design.p; j++) {
    const relation = aliasRelation(qr, j);
    if (relation) relations.push({ column: j, relation });
  }
  const out: CoreAdjustedMeans[] = [];
  input.terms.forEach((term, t) => {
    if (term.factors.length !== 1 || term.covariates.length !== 0) return;
    const factor = input.factors[term.factors[0]!]!;
    const { start, count } = design.termColumns[t]!;
    const means: { level: number; mean: number | null; seFactor: number | null }[] = [];
    for (let level = 0; level < factor.levelCount; level++) {
      const l = new Float64Array(design.p);
      l[0] = 1;
      for (let c = 0; c < count; c++) l[start + c] = level === c ? 1 : level === factor.levelCount - 1 ? -1 : 0;
      if (!isEstimable(l, qr, relations)) {
        means.push({ level, mean: null, seFactor: null });
        continue;
      }
      let estimate = 0;
      const byRank = new Float64Array(qr.rank);
      for (let k = 0; k < qr.rank; k++) {
        const j = qr.columnOfRank[k]!;
        byRank[k] = l[j]!;
        estimate += l[j]! * coefficients[j]!;
      }
      means.push({ level, mean: estimate, seFactor: norm(solveUpperTransposed(qr, byRank)) });
    }
    out.push({ factor: factor.name, means });
  });
  return out;
}

/**
 * For each factor main effect and covariate main effect in the model whose interaction is not a
 * term, the extra sum of squares of `factor x covariate` added last, and the larger model's residual.
 */
export function slopeHomogeneityTests(input: LinearModelInput): CoreSlopeHomogeneity[] {
  const out: CoreSlopeHomogeneity[] = [];
  const has = (fs: number[], cs: number[]) =>
    input.terms.some(
      (t) => t.factors.length === fs.length && t.covariates.length === cs.length && fs.every((f) => t.factors.includes(f)) && cs.every((c) => t.covariates.includes(c)),
    );
  for (let f = 0; f < input.factors.length; f++) {
    if (!has([f], [])) continue;
    for (let c = 0; c < input.covariates.length; c++) {
      if (!has([], [c]) || has([f], [c])) continue;
      const augmented: LinearModelInput = { ...input, terms: [...input.terms, { factors: [f], covariates: [c] }] };
      const design = buildDesignMatrix(augmented);
      const last = design.termColumns[design.termColumns.length - 1]!;
      const before = range(0, last.start);
      const block = range(last.start, last.start + last.count);
      const r = blockSumOfSquares(design, input.y, before, block);
      out.push({
        factor: input.factors[f]!.name,
        covariate: input.covariates[c]!.name,
        ss: r.ss,
        df1: r.df,
        residualSs: r.residualSs,
        df2: r.residualDf,
        zeroResidual: isZeroResidual(r.residualSs, input.y),
      });
    }
  }
  return out;
}

/** l^T b is estimable when l agrees with every alias relation x_j = X c (Searle 1971, section 5.4). */
function isEstimable(l: Float64Array, qr: QrDecomposition, relations: readonly { column: number; relation: Float64Array }[]): boolean {
  for (const { column, relation } of relations) {
    let s = -l[column]!;
    let scale = Math.abs(l[column]!);
    for (let k = 0; k < qr.rank; k++) {
      const term = l[qr.columnOfRank[k]!]! * relation[k]!;
      s += term;
      scale += Math.abs(term);
    }
    if (Math.abs(s) > 1e-7 * Math.max(1, scale)) return false;
  }
  return true;
}

function norm(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]! * v[i]!;
  return Math.sqrt(s);
}

function range(from: number, to: number): number[] {
  const out: number[] = [];
  for (let i = from; i < to; i++) out.push(i);
  return out;
}
