/**
 * The design matrix of a fixed-effects linear model: an intercept column, then for each term the
 * products of its factors' sum-to-zero (deviation) contrast columns and its covariates' centred values.
 *
 * Sum-to-zero coding (contrast column c of a factor with L levels is +1 at level c, -1 at level L-1,
 * 0 elsewhere) makes Type III sums of squares test the usual equal-weight hypotheses (Searle 1987,
 * Linear Models for Unbalanced Data, ch. 4). Covariates are centred at their mean before use: this
 * changes no sum of squares of a model that contains the intercept, but keeps interaction columns
 * nearly orthogonal to the main-effect columns, which helps the conditioning of the QR step.
 */

import type { LinearModelInput, ModelTerm } from "./types.js";

/** The column-major design matrix and which term each column belongs to. */
export interface DesignMatrix {
  readonly n: number;
  /** Number of columns, intercept included. */
  readonly p: number;
  /** Column-major values: column j occupies x[j*n .. j*n + n). */
  readonly x: Float64Array;
  /** Term index of each column; -1 for the intercept (column 0). */
  readonly termOfColumn: Int32Array;
  /** First column and column count of each term, in term order. */
  readonly termColumns: readonly { readonly start: number; readonly count: number }[];
  /** The mean subtracted from each covariate. */
  readonly covariateMeans: Float64Array;
}

/** Nominal degrees of freedom of a term: the product of (levels - 1) over its factors. */
export function nominalDf(input: LinearModelInput, term: ModelTerm): number {
  let df = 1;
  for (const f of term.factors) df *= Math.max(0, input.factors[f]!.levelCount - 1);
  return df;
}

/** Builds the full design matrix of `input` (intercept plus every term in model order). */
export function buildDesignMatrix(input: LinearModelInput): DesignMatrix {
  const n = input.y.length;
  const covariateMeans = new Float64Array(input.covariates.length);
  const centred = input.covariates.map((c, i) => {
    const m = mean(c.values);
    covariateMeans[i] = m;
    const v = new Float64Array(n);
    for (let r = 0; r < n; r++) v[r] = c.values[r]! - m;
    return v;
  });
  const termColumns: { start: number; count: number }[] = [];
  let p = 1;
  for (const term of input.terms) {
    const count = nominalDf(input, term);
    termColumns.push({ start: p, count });
    p += count;
  }
  const x = new Float64Array(n * p);
  const termOfColumn = new Int32Array(p);
  termOfColumn[0] = -1;
  x.fill(1, 0, n);
  input.terms.forEach((term, t) => {
    const { start, count } = termColumns[t]!;
    const levels = term.factors.map((f) => input.factors[f]!.levelCount - 1);
    // Enumerate the contrast combinations with the first factor varying fastest.
    const combo = new Array<number>(levels.length).fill(0);
    for (let c = 0; c < count; c++) {
      const col = (start + c) * n;
      termOfColumn[start + c] = t;
      for (let r = 0; r < n; r++) {
        let v = 1;
        for (let q = 0; q < term.factors.length; q++) {
          const f = input.factors[term.factors[q]!]!;
          const code = f.codes[r]!;
          const want = combo[q]!;
          v *= code === want ? 1 : code === f.levelCount - 1 ? -1 : 0;
          if (v === 0) break;
        }
        if (v !== 0) for (const cv of term.covariates) v *= centred[cv]![r]!;
        x[col + r] = v;
      }
      for (let q = 0; q < combo.length; q++) {
        combo[q]!++;
        if (combo[q]! < levels[q]!) break;
        combo[q] = 0;
      }
    }
  });
  return { n, p, x, termOfColumn, termColumns, covariateMeans };
}

/**
 * Copies the listed columns of `design` (in the listed order) into a new column-major matrix, the
 * design of a sub-model for a nested fit.
 */
export function selectColumns(design: DesignMatrix, columns: readonly number[]): Float64Array {
  const { n } = design;
  const out = new Float64Array(n * columns.length);
  columns.forEach((j, k) => out.set(design.x.subarray(j * n, j * n + n), k * n));
  return out;
}

/** Arithmetic mean: compensated sum, then one correction pass, so the rounding error does not grow with n. */
export function mean(v: Float64Array): number {
  const n = v.length;
  if (n === 0) return 0;
  const s = new NeumaierSum();
  for (let i = 0; i < n; i++) s.add(v[i]!);
  const m = s.value() / n;
  const c = new NeumaierSum();
  for (let i = 0; i < n; i++) c.add(v[i]! - m);
  return m + c.value() / n;
}

/**
 * Compensated summation (Neumaier 1974, improving Kahan 1965): the error bound does not grow with the
 * number of terms, which matters for sums over thousands of observations.
 */
export class NeumaierSum {
  private sum = 0;
  private compensation = 0;

  /** Adds one term. */
  add(v: number): void {
    const t = this.sum + v;
    this.compensation += Math.abs(this.sum) >= Math.abs(v) ? this.sum - t + v : v - t + this.sum;
    this.sum = t;
  }

  /** The compensated total so far. */
  value(): number {
    return this.sum + this.compensation;
  }
}
