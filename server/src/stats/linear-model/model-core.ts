/**
 * The intermediate result shared by the two computation paths (general QR and balanced cell sums):
 * everything `fitLinearModel` needs to assemble the ANOVA table, before F, p, effect sizes and
 * residual scaling are applied. Standard errors are kept unscaled (multiples of the residual SD).
 */

import type { AliasedTerm, LinearModelInput, ModelNote, ModelTerm } from "./types.js";

/** Adjusted means of one factor with unscaled standard errors (multiply by the residual SD). */
export interface CoreAdjustedMeans {
  readonly factor: string;
  readonly means: readonly { readonly level: number; readonly mean: number | null; readonly seFactor: number | null }[];
}

/** A slope homogeneity comparison before its F test is formed. */
export interface CoreSlopeHomogeneity {
  readonly factor: string;
  readonly covariate: string;
  readonly ss: number;
  readonly df1: number;
  readonly residualSs: number;
  readonly df2: number;
  readonly zeroResidual: boolean;
}

/** Output of a computation path. Term arrays follow `input.terms`. */
/**
 * A fit whose runs share their cell's fitted value and leverage (a model of factors only, fitted on cell
 * statistics): run i's fitted value is `fitted[cellOfRun[i]]`, its residual `y[i] - fitted[cellOfRun[i]]`
 * (the same operation as the residuals array), its leverage `leverage[cellOfRun[i]]`. A consumer that
 * scans every run once (the outlier screen) reads these instead of making per-run arrays.
 */
export interface RunCells {
  readonly y: Float64Array;
  readonly cellOfRun: Int32Array;
  readonly fitted: Float64Array;
  readonly leverage: Float64Array;
}

export interface ModelCore {
  readonly method: "balanced" | "cells" | "qr";
  readonly rank: number;
  readonly termSs: readonly number[];
  readonly termDf: readonly number[];
  readonly residualSs: number;
  /** Sum of squares explained beyond the intercept (the sum of the non-intercept effects). */
  readonly modelSs: number;
  readonly fitted: Float64Array;
  readonly residuals: Float64Array;
  readonly leverage: Float64Array;
  /** Set by the cell path: the per-run values are their cell's (see `RunCells`). */
  readonly runCells?: RunCells;
  readonly slopes: readonly { readonly covariate: string; readonly estimate: number; readonly seFactor: number }[];
  readonly adjustedMeans: readonly CoreAdjustedMeans[];
  readonly slopeHomogeneity: readonly CoreSlopeHomogeneity[];
  readonly aliased: readonly AliasedTerm[];
  readonly notes: readonly ModelNote[];
}

/** The display name of a term: its factor names, then its covariate names, joined by " x ". */
export function termSource(input: LinearModelInput, term: ModelTerm): string {
  return [...term.factors.map((f) => input.factors[f]!.name), ...term.covariates.map((c) => input.covariates[c]!.name)].join(" x ");
}

/** True when `outer` contains every factor and covariate of `inner` (a term contains itself). */
export function termContains(outer: ModelTerm, inner: ModelTerm): boolean {
  return inner.factors.every((f) => outer.factors.includes(f)) && inner.covariates.every((c) => outer.covariates.includes(c));
}
