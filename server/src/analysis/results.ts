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
  /**
   * Designs with error strata or random factors (docs/designs.md): the source of the row (or the
   * combination of rows) whose mean square is this term's F denominator. Absent in the fixed-effects table.
   */
  readonly error?: string;
  /** Degrees of freedom of that denominator (Satterthwaite's where it is a combination). */
  readonly errorDf?: number | null;
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

/** Sphericity of one within-subject term (docs/designs.md): Mauchly's test and the corrected p-values. */
export interface SphericityResult {
  readonly term: string;
  readonly mauchlyW: number | null;
  readonly p: number | null;
  readonly greenhouseGeisser: { readonly epsilon: number; readonly p: number | null };
  readonly huynhFeldt: { readonly epsilon: number; readonly p: number | null };
  /** Which correction to read (Girden 1992: Huynh–Feldt when the GG epsilon exceeds 0.75). */
  readonly recommended: "greenhouseGeisser" | "huynhFeldt";
  /** Corrected p-values of every term tested in this term's stratum (the term and its interactions with between-subject factors). */
  readonly corrected: readonly { readonly source: string; readonly greenhouseGeisserP: number | null; readonly huynhFeldtP: number | null }[];
}

/** One variance component by the ANOVA method; a negative estimate is reported as 0 with `truncated`. */
export interface VarianceComponentResult {
  readonly source: string;
  readonly variance: number;
  readonly share: number | null;
  readonly estimate: number;
  readonly truncated: boolean;
}

/** The expected mean square of a term of a balanced mixed model and its F denominator. */
export interface ExpectedMeanSquareResult {
  readonly source: string;
  readonly ems: string;
  readonly denominator: string | null;
  readonly exact: boolean;
}

/** One estimated effect of a two-level design. */
export interface TwoLevelEffectResult {
  readonly term: string;
  readonly effect: number;
  readonly coefficient: number;
  /** Terms that are the same contrast in the fraction (empty for a full factorial). */
  readonly aliases: readonly string[];
  /** |effect| / scale (Lenth's PSE unreplicated, else the effect's standard error): the Pareto bar. */
  readonly standardized: number | null;
  /** Normal and half-normal plot scores of this effect. */
  readonly normalScore: number;
  readonly halfNormalScore: number;
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
  /** Which special-design analysis replaced the fixed-effects `anova` rows, if any (docs/designs.md). */
  readonly designAnalysis?: "repeated-measures" | "mixed-model" | "two-level";
  readonly sphericity?: readonly SphericityResult[];
  readonly varianceComponents?: readonly VarianceComponentResult[];
  /** Share of the first random main effect in the total variance. */
  readonly icc?: { readonly source: string; readonly value: number } | null;
  readonly expectedMeanSquares?: readonly ExpectedMeanSquareResult[];
  readonly effects?: readonly TwoLevelEffectResult[];
  readonly lenth?: { readonly pse: number; readonly me: number; readonly sme: number; readonly df: number } | null;
  readonly curvature?: { readonly ss: number; readonly f: number | null; readonly p: number | null } | null;
  readonly aliases?: readonly { readonly term: string; readonly aliasedWith: readonly string[] }[];
  readonly definingRelation?: readonly string[];
  readonly resolution?: number | null;
  /** Pairwise comparisons of level (and `pairwise A x B` cell) means (docs/json-output-comparisons.md). */
  readonly comparisons?: readonly ComparisonResult[];
  /** Compact letter display of the Tukey comparisons: levels sharing a letter do not differ. */
  readonly groups?: readonly LetterGroup[];
  /** The best level of each compared term by the response's goal, with the levels indistinguishable from it. */
  readonly best?: readonly BestLevel[];
  /** Orthogonal polynomial contrasts of numeric, equally spaced factors. */
  readonly contrasts?: readonly PolynomialContrastResult[];
  /** Model checks: equal variances and normal residuals; a check that cannot be computed is absent. */
  readonly checks?: ModelChecks;
  /** Tests that do not assume what a failed check questions (one-factor and blocked one-factor designs). */
  readonly alternatives?: AlternativeTests;
  /** Power of each fixed main effect's F test to detect `plan detect` at the observed residual SD or `plan sigma`. */
  readonly power?: readonly PowerResult[];
}

/** The whole result for one document: what every face (editor, CLI, report) shows. */
export interface DocumentAnalysis {
  readonly file: TrialFile;
  readonly design: Design;
  /** Structural and analysis diagnostics, in no particular order. */
  readonly diagnostics: readonly Diagnostic[];
  readonly responses: readonly ResponseAnalysis[];
}

// ---------------------------------------------------------------------------------------------------------
// Comparisons, model checks, alternatives and power (docs/json-output-comparisons.md)

/** One pairwise comparison: `diff` is mean a - mean b, with its interval and multiplicity-adjusted p. */
export interface ComparisonResult {
  readonly term: string;
  readonly method: "tukey" | "lsd" | "bonferroni" | "holm" | "games-howell" | "dunnett";
  readonly a: string;
  readonly b: string;
  readonly diff: number;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly p: number | null;
}

/** The letters of one level (or cell) in the compact letter display of the Tukey comparisons. */
export interface LetterGroup {
  readonly term: string;
  readonly level: string;
  readonly mean: number;
  readonly letters: string;
}

/** The best level by the response's goal and the levels whose Tukey comparison with it is not significant. */
export interface BestLevel {
  readonly term: string;
  readonly goal: "maximize" | "minimize" | "target";
  readonly level: string;
  readonly indistinguishable: readonly string[];
}

/** One orthogonal polynomial contrast (degree 1 linear, 2 quadratic) of a numeric factor's level means. */
export interface PolynomialContrastResult {
  readonly term: string;
  readonly contrast: "linear" | "quadratic";
  readonly estimate: number;
  readonly standardError: number | null;
  readonly t: number | null;
  readonly df: number;
  readonly p: number | null;
}

/** An F test of a check. */
export interface CheckFTest {
  readonly statistic: number;
  readonly df1: number;
  readonly df2: number;
  readonly p: number;
}

/** The model checks of one response; each key is absent when its check could not be computed. */
export interface ModelChecks {
  /** The groups the variance tests compare: the cells of the fixed factors in the model, e.g. "profile x line". */
  readonly groupsBy?: string;
  readonly levene?: CheckFTest;
  readonly brownForsythe?: CheckFTest;
  readonly bartlett?: { readonly statistic: number; readonly df: number; readonly p: number };
  readonly shapiroWilk?: { readonly w: number; readonly p: number; readonly n: number };
  /** Runs whose externally studentized residual exceeds the Bonferroni bound. */
  readonly outliers?: readonly { readonly run: string; readonly row: number; readonly studentized: number; readonly p: number }[];
  /** Slope of log SD on log mean over the groups and the power transformation λ = 1 - slope it suggests. */
  readonly varianceMean?: { readonly slope: number; readonly lambda: number };
}

/** Alternative tests; each key is absent where it does not apply or cannot be computed. */
export interface AlternativeTests {
  readonly term?: string;
  readonly welch?: CheckFTest;
  readonly kruskalWallis?: { readonly statistic: number; readonly df: number; readonly p: number };
  readonly friedman?: { readonly statistic: number; readonly df: number; readonly p: number; readonly block: string };
  readonly welchT?: { readonly a: string; readonly b: string; readonly diff: number; readonly statistic: number; readonly df: number; readonly p: number };
}

/** Power of one main effect's F test; `replicatesNeeded` is null when no count up to 1000 reaches the target. */
export interface PowerResult {
  readonly term: string;
  readonly difference: number;
  readonly sigma: number;
  readonly replicates: number;
  readonly power: number;
  readonly target: number;
  readonly replicatesNeeded: number | null;
  /** Where `sigma` came from: `plan sigma` ("planned") or the residual SD of the measured runs ("observed"). */
  readonly sigmaSource?: "planned" | "observed";
}
