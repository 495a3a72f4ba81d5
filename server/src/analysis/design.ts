import type { FactorRole, Goal, RunRows, Span } from "../../../grammar/src/ast.js";
import type { DecimalColumn, DecimalExtremes } from "../stats/decimal/center-decimals.js";

/** A factor level after name resolution. */
export interface DesignLevel {
  readonly name: string;
  readonly span: Span;
  /** Set when the level was written as a number. */
  readonly numeric?: number;
}

export interface DesignFactor {
  readonly name: string;
  readonly span: Span;
  readonly role: FactorRole;
  readonly levels: readonly DesignLevel[];
  readonly unit?: string;
  /** Index into `levels` of the declared `control` level. */
  readonly control?: number;
  /** Index into `Design.factors` of the factor this one is nested in. */
  readonly within?: number;
}

export interface DesignCovariate {
  readonly name: string;
  readonly span: Span;
  readonly unit?: string;
}

export interface DesignResponse {
  readonly name: string;
  readonly span: Span;
  readonly unit?: string;
  readonly goal?: Goal["kind"];
  readonly target?: number;
  readonly specLower?: number;
  readonly specUpper?: number;
  /** `plan detect NAME DIFF`: the smallest difference worth finding. */
  readonly detect?: number;
  /** `plan sigma NAME S`: the planned error standard deviation, used for power until the runs estimate it. */
  readonly sigma?: number;
}

/** One variable of a model term: a factor or a covariate, by index. */
export type TermVariable = { readonly kind: "factor"; readonly index: number } | { readonly kind: "covariate"; readonly index: number };

/** A model term: one variable (main effect, covariate) or several (interaction). */
export interface DesignTerm {
  /** Source name as in the ANOVA table: variable names joined by " x ". */
  readonly name: string;
  readonly variables: readonly TermVariable[];
}

export type SumsOfSquaresType = "I" | "II" | "III";

/** Plan settings after validation, with defaults applied. `fromFile` records which the file set explicitly. */
export interface DesignSettings {
  readonly replicates?: number;
  readonly alpha: number;
  readonly confidence: number;
  readonly power: number;
  readonly seed?: number;
  readonly ssType: SumsOfSquaresType;
  readonly fromFile: ReadonlySet<"alpha" | "confidence" | "power" | "sums-of-squares">;
}

/** Status of one response value of one run. */
export const enum ValueStatus {
  Measured = 0,
  Pending = 1,
  /** Missing column, not a number, or a row that could not be read: reported by a diagnostic. */
  Invalid = 2,
}

/**
 * The runs of a design, column-wise: index `i` is the i-th row of the runs table (run order).
 * Texts are kept exactly as written so the engine can centre them in decimal.
 *
 * Stored as typed arrays of cell indices into the parsed table (`rows`, `source`). The per-run string
 * and span arrays (`ids`, `rowSpans`, `covariateTexts`, `responseTexts`, `responseSpans`) are built on
 * first access; code that reads one run should use the accessors of design-runs.ts instead
 * (`runId`, `runRowSpan`, `responseText`, `responseSpan`, `covariateText`), which allocate nothing else.
 */
export interface DesignRuns {
  readonly count: number;
  /** The document text the cell indices below point into. */
  readonly source: string;
  /** The parsed rows of the runs table; undefined when the file has none (then `count` is 0). */
  readonly rows?: RunRows;
  /** Global cell index (into `rows`) of each run's id cell; -1 where the row has none. */
  readonly idCells: Int32Array;
  /** Per response: global cell index of the value cell per run; -1 where the row has no such cell. */
  readonly responseCells: readonly Int32Array[];
  /** Per covariate: global cell index of the value cell per run; -1 where the row has no such cell. */
  readonly covariateCells: readonly Int32Array[];
  readonly ids: readonly string[];
  /** Span of each run's row in the document. */
  readonly rowSpans: readonly Span[];
  /** Per factor: level index per run, -1 where unknown or missing. */
  readonly levels: readonly Int32Array[];
  /** Per covariate: value text per run ("" where missing or invalid). */
  readonly covariateTexts: readonly (readonly string[])[];
  readonly covariateStatus: readonly Uint8Array[];
  /** Per response: value text per run ("" unless measured). */
  readonly responseTexts: readonly (readonly string[])[];
  /** Per response: a `ValueStatus` per run. */
  readonly responseStatus: readonly Uint8Array[];
  /** Per response: span of the value cell per run (for hovers and diagnostics); undefined where absent. */
  readonly responseSpans: readonly (readonly (Span | undefined)[])[];
  /** 1 where the run is marked `excluded`. */
  readonly excluded: Uint8Array;
  /**
   * Per response: each value as checked when the design was built (its exact decimal decomposition, see
   * `DecimalColumn`), so that the analysis centres the values without reading their texts again. Entries
   * are meaningful only where `responseStatus` is `Measured`.
   */
  readonly responseValues: readonly DecimalColumn[];
  /** Per covariate: as `responseValues`, meaningful only where `covariateStatus` is `Measured`. */
  readonly covariateValues: readonly DecimalColumn[];
  /**
   * True when every run is known to be complete: every factor's level known, every response and
   * covariate measured, none excluded (the plain-table reader proves it as it reads). Lets the analysis
   * skip finding the runs it can use. Absent when not known, not when false.
   */
  readonly complete?: true;
  /**
   * Counts made as the runs were read (by the plain-table reader), so that the checks and the centring
   * need no pass of their own; equal to counting afterwards. Present only when no run is excluded and
   * every run's factor levels and covariates are known (a response may be pending).
   */
  readonly tallies?: RunTallies;
}

/** See `DesignRuns.tallies`. */
export interface RunTallies {
  /** Per factor: runs per level, the sum of their run numbers (index + 1), and each level's first run (-1 none). */
  readonly levels: readonly { readonly counts: Int32Array; readonly rankSums: Float64Array; readonly firstRuns: Int32Array }[];
  /**
   * Runs per combination of every factor's level (factor 0 most significant, each factor's digit in base
   * its number of levels) and each combination's first run (-1 none); undefined when not counted.
   */
  readonly cells?: { readonly counts: Int32Array; readonly firstRuns: Int32Array };
  /** Per response: the centring's first pass over its measured values (undefined: a response without a column). */
  readonly responseExtremes: readonly (DecimalExtremes | undefined)[];
}

/**
 * The semantic model of a `.trial` file: names resolved, the design assembled. Plain data, no methods.
 */
export interface Design {
  readonly title?: string;
  readonly factors: readonly DesignFactor[];
  readonly covariates: readonly DesignCovariate[];
  readonly responses: readonly DesignResponse[];
  readonly terms: readonly DesignTerm[];
  /** True when `plan model` chose the terms; false when they are the default. */
  readonly explicitModel: boolean;
  readonly settings: DesignSettings;
  readonly runs: DesignRuns;
  /** Indices of the factors whose level combinations form the design's cells (fixed and block factors). */
  readonly cellFactors: readonly number[];
  readonly hasFraction: boolean;
  /** `plan fraction` generators resolved to factor indices (docs/designs.md). */
  readonly fractions?: readonly { readonly generated: number; readonly product: readonly number[]; readonly span: Span }[];
  /** `plan centre-points N`. */
  readonly centrePoints?: number;
  /** `plan pairwise A x B`: the interaction terms whose cells are compared pairwise (factor indices). */
  readonly pairwise?: readonly { readonly name: string; readonly factors: readonly number[]; readonly span: Span }[];
  /** Spans of plan settings that analysis diagnostics point at (`replicates`, `detect <response>`). */
  readonly planSpans?: { readonly replicates?: Span; readonly detect?: ReadonlyMap<string, Span> };
}
