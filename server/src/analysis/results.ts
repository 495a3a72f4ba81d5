import type { TrialFile } from "../../../grammar/src/ast.js";
import type { Design, SumsOfSquaresType } from "./design.js";
import type { Diagnostic } from "./diagnostics.js";

/**
 * Analysis results as plain values. Their shape is the `analyze --format json` contract of the design
 * brief §5 (documented in docs/json-output.md): extend it, never break it. A value that cannot be computed
 * is `null` and a diagnostic says why; no field is ever NaN or Infinity.
 */

/** One line of an ANOVA table: a model term, `Residual` or `Total`. */
export interface AnovaRow {
  readonly source: string;
  readonly df: number;
  readonly ss: number;
  /** Absent on `Total`; null where undefined (no degrees of freedom). */
  readonly ms?: number | null;
  /** Present on model terms only; null without residual degrees of freedom or variance. */
  readonly f?: number | null;
  readonly p?: number | null;
}

/** Mean of one level of a factor, or one cell of an interaction (`level` is "a x b"). */
export interface LevelMean {
  readonly term: string;
  readonly level: string;
  readonly n: number;
  readonly mean: number;
  readonly sd: number | null;
  /** Confidence interval of the mean from the pooled residual mean square; null without residual df. */
  readonly lower: number | null;
  readonly upper: number | null;
}

export interface EffectSize {
  readonly term: string;
  readonly etaSquared: number | null;
  readonly partialEtaSquared: number | null;
  readonly omegaSquared: number | null;
}

export interface RunResidual {
  readonly run: string;
  /** Row index in the runs table (0-based), for editors that need to find the run again. */
  readonly row: number;
  readonly fitted: number;
  readonly residual: number;
  readonly leverage: number;
  readonly standardized: number | null;
  readonly studentized: number | null;
}

/** ANCOVA: the common slope of a covariate. */
export interface CovariateSlopeResult {
  readonly covariate: string;
  readonly slope: number;
  readonly standardError: number | null;
}

/** ANCOVA: a level's mean adjusted to the covariate means. */
export interface AdjustedLevelMean {
  readonly term: string;
  readonly level: string;
  readonly mean: number | null;
  readonly standardError: number | null;
}

/** ANCOVA: test that the covariate's slope is the same at every level of a factor. */
export interface SlopeHomogeneity {
  readonly term: string;
  readonly covariate: string;
  readonly df1: number;
  readonly df2: number;
  readonly f: number | null;
  readonly p: number | null;
}

/** Everything computed for one response. */
export interface ResponseAnalysis {
  readonly name: string;
  /** Measured, non-excluded runs used in the fit. */
  readonly n: number;
  readonly ssType: SumsOfSquaresType;
  /** Term rows in model order, then `Residual` and `Total`; empty when no fit was possible. */
  readonly anova: readonly AnovaRow[];
  readonly rSquared: number | null;
  readonly residualSd: number | null;
  readonly means: readonly LevelMean[];
  readonly effectSizes: readonly EffectSize[];
  readonly residuals: readonly RunResidual[];
  readonly slopes: readonly CovariateSlopeResult[];
  readonly adjustedMeans: readonly AdjustedLevelMean[];
  readonly slopeHomogeneity: readonly SlopeHomogeneity[];
  /** The significance level the verdicts use (file, then editor setting, then 0.05). */
  readonly alpha: number;
  readonly confidence: number;
}

/** The whole result for one document: what every face (editor, CLI, report) shows. */
export interface DocumentAnalysis {
  readonly file: TrialFile;
  readonly design: Design;
  /** Structural and analysis diagnostics, in no particular order. */
  readonly diagnostics: readonly Diagnostic[];
  readonly responses: readonly ResponseAnalysis[];
}
