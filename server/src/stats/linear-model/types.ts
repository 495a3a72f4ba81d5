import type { RunCells } from "./model-core.js";

/**
 * Public data shapes of the fixed-effects linear model.
 *
 * All values are plain numbers, typed arrays or `null`; a value that cannot be computed is `null`
 * and never NaN or Infinity. Quantities on the response scale (fitted values, coefficients of the
 * intercept, adjusted means) are on the scale of `LinearModelInput.y` as given: when the caller
 * centred the responses by a decimal offset it adds that offset back. Sums of squares, mean squares,
 * F, p, residuals, slopes and standard errors do not depend on the offset.
 */

/** One factor: its name, how many levels it declares and the level index (0-based) of every observation. */
export interface ModelFactor {
  readonly name: string;
  readonly levelCount: number;
  readonly codes: Int32Array;
}

/** One covariate: its name and its value for every observation. */
export interface ModelCovariate {
  readonly name: string;
  readonly values: Float64Array;
}

/**
 * One model term as indices into `factors` and `covariates`: the product of the factors' sum-to-zero
 * contrasts and the (centred) covariate values. `{ factors: [0, 1], covariates: [] }` is `A x B`.
 */
export interface ModelTerm {
  readonly factors: readonly number[];
  readonly covariates: readonly number[];
}

/** Which sums of squares the ANOVA table reports: sequential (I), marginality-respecting (II) or each term last (III). */
export type SsType = "I" | "II" | "III";

/** Everything the fit needs. The intercept is always in the model and is not listed in `terms`. */
export interface LinearModelInput {
  /** One value per observation, already centred by the caller (e.g. by an exact decimal offset). */
  readonly y: Float64Array;
  readonly factors: readonly ModelFactor[];
  readonly covariates: readonly ModelCovariate[];
  /** The model terms in model order (the order matters for Type I sums of squares). */
  readonly terms: readonly ModelTerm[];
  readonly ssType: SsType;
}

/** One term's line of the ANOVA table. `df` is the estimable df; `ms`, `f`, `p` are null where undefined. */
export interface AnovaTermRow {
  readonly source: string;
  readonly df: number;
  readonly ss: number;
  readonly ms: number | null;
  readonly f: number | null;
  readonly p: number | null;
}

/** The residual line; `ms` is null when there are no residual degrees of freedom. */
export interface AnovaResidualRow {
  readonly source: "Residual";
  readonly df: number;
  readonly ss: number;
  readonly ms: number | null;
}

/** The corrected total line: `ss` is the sum of squared deviations from the mean, `df` is n - 1. */
export interface AnovaTotalRow {
  readonly source: "Total";
  readonly df: number;
  readonly ss: number;
}

/** Effect sizes of one term (Olejnik & Algina 2003); null where the formula is undefined. */
export interface TermEffectSize {
  readonly source: string;
  readonly etaSquared: number | null;
  readonly partialEtaSquared: number | null;
  readonly omegaSquared: number | null;
}

/** A term whose columns are partly or wholly linearly dependent on earlier columns (e.g. an empty cell). */
export interface AliasedTerm {
  readonly source: string;
  readonly nominalDf: number;
  readonly estimableDf: number;
}

/** The common slope of a covariate main-effect term, with its standard error (null without residual df). */
export interface CovariateSlope {
  readonly covariate: string;
  readonly estimate: number;
  readonly standardError: number | null;
}

/** The adjusted (estimated marginal) mean of one level, at the covariate means, equal weights over other factors. */
export interface AdjustedMean {
  readonly level: number;
  /** Null when the mean is not estimable (e.g. an empty cell in an interaction involving this factor). */
  readonly mean: number | null;
  readonly standardError: number | null;
}

/** Adjusted means of every level of one factor whose main effect is in the model. */
export interface FactorAdjustedMeans {
  readonly factor: string;
  readonly means: readonly AdjustedMean[];
}

/** The F test of `factor x covariate` added to the model: do the slopes differ between levels? */
export interface SlopeHomogeneityTest {
  readonly factor: string;
  readonly covariate: string;
  readonly df1: number;
  readonly df2: number;
  readonly ss: number;
  readonly f: number | null;
  readonly p: number | null;
}

/** A remark on a degenerate situation the result still covers; `code` is a kebab-case word. */
export interface ModelNote {
  readonly code: string;
  readonly message: string;
}

/** A successful fit. Per-observation arrays are in input order. */
export interface LinearModelResult {
  readonly ok: true;
  readonly ssType: SsType;
  /**
   * "balanced" when the cell-sum fast path computed the result, "cells" when the QR ran on the weighted
   * cell-level design (factor-only models, see cell-path.ts), "qr" for the general least-squares path.
   */
  readonly method: "balanced" | "cells" | "qr";
  readonly n: number;
  /** Rank of the full design matrix (intercept included). */
  readonly rank: number;
  readonly anova: readonly AnovaTermRow[];
  readonly residual: AnovaResidualRow;
  readonly total: AnovaTotalRow;
  readonly rSquared: number | null;
  readonly residualSd: number | null;
  readonly fitted: Float64Array;
  readonly residuals: Float64Array;
  readonly leverage: Float64Array;
  /** The cell path's per-cell view of `fitted`, `residuals` and `leverage` (model-core.ts), when it ran. */
  readonly runCells?: RunCells;
  /**
   * Whether standardized and studentized residuals are defined at all: a residual mean square exists and
   * the residual is not zero to rounding. Consumers that compute case statistics for a subset of the runs
   * (the outlier screen) pass it on to `caseStatisticValues` instead of re-deriving it.
   */
  readonly caseStatisticsDefined: boolean;
  /** Internally studentized residuals e / (s sqrt(1 - h)); null where h = 1 or s = 0. */
  readonly standardized: readonly (number | null)[];
  /** Externally studentized residuals (Belsley, Kuh & Welsch 1980); null where undefined. */
  readonly studentized: readonly (number | null)[];
  readonly effectSizes: readonly TermEffectSize[];
  readonly slopes: readonly CovariateSlope[];
  readonly adjustedMeans: readonly FactorAdjustedMeans[];
  readonly slopeHomogeneity: readonly SlopeHomogeneityTest[];
  readonly aliased: readonly AliasedTerm[];
  readonly notes: readonly ModelNote[];
}

/** Why no table could be produced. */
export type ModelFailureCode = "invalid-input" | "no-data" | "single-observation" | "zero-variance";

/** A fit that could not be made; `reason` is a full sentence for the user. */
export interface ModelFailure {
  readonly ok: false;
  readonly code: ModelFailureCode;
  readonly reason: string;
}
