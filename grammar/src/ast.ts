/**
 * The typed syntax tree of a `.trial` file.
 *
 * Every node is a plain, JSON-friendly value carrying its source range as offsets into the text
 * (`Span`); line/column conversion belongs to the faces (LSP, CLI), see `line-index.ts`.
 *
 * The runs table is stored column-wise in typed arrays rather than as one object per cell: a
 * machine-logged experiment can hold a million runs, and one object per cell would cost hundreds of
 * megabytes. Use the accessors in `runs-table.ts` to read it.
 */

/** A half-open range of UTF-16 offsets `[start, end)` into the document text. */
export interface Span {
  readonly start: number;
  readonly end: number;
}

/** A name as the user wrote it: an identifier or a quoted string. `text` is unquoted and unescaped. */
export interface Name {
  readonly text: string;
  readonly span: Span;
  readonly quoted: boolean;
}

/** A number kept as its decimal text exactly as written, plus its double value. */
export interface DecimalNumber {
  readonly text: string;
  readonly value: number;
  readonly span: Span;
}

/** The contents of a quoted string (unescaped) or of a `"""` text block (verbatim between the fences). */
export interface TextValue {
  readonly text: string;
  readonly span: Span;
}

export interface TrialHeader {
  /** `trial "title"`. */
  readonly title?: TextValue;
  readonly owner?: TextValue;
  /** `date 2026-11-20`: the ISO date text as written. */
  readonly date?: TextValue;
}

export type Goal =
  | { readonly kind: "maximize"; readonly span: Span }
  | { readonly kind: "minimize"; readonly span: Span }
  | { readonly kind: "target"; readonly span: Span; readonly target?: DecimalNumber };

/** `spec >= 18`, `spec <= 2.5` or `spec 17.5 to 18.5`. */
export interface SpecLimits {
  readonly span: Span;
  readonly lower?: DecimalNumber;
  readonly upper?: DecimalNumber;
}

export interface ResponseDecl {
  readonly kind: "response";
  readonly span: Span;
  readonly keywordSpan: Span;
  readonly name?: Name;
  readonly unit?: TextValue;
  readonly goal?: Goal;
  readonly spec?: SpecLimits;
}

export type FactorRole = "fixed" | "block" | "random" | "subject";

/** A declared level. `number` is set when the level was written as a number (`levels 150, 175`). */
export interface LevelDecl {
  readonly name: Name;
  readonly number?: DecimalNumber;
}

export interface FactorDecl {
  readonly kind: "factor";
  readonly span: Span;
  readonly keywordSpan: Span;
  readonly name?: Name;
  readonly levels: readonly LevelDecl[];
  readonly unit?: TextValue;
  /** `fixed` unless `as block|random|subject` was written. */
  readonly role: FactorRole;
  readonly roleSpan?: Span;
  /** `control LEVEL`: the level others are compared with. */
  readonly control?: Name;
  /** `within FACTOR`: this factor is nested in another. */
  readonly within?: Name;
}

export interface CovariateDecl {
  readonly kind: "covariate";
  readonly span: Span;
  readonly keywordSpan: Span;
  readonly name?: Name;
  readonly unit?: TextValue;
}

/** A model term: one name (main effect or covariate) or names joined by `x` (interaction). */
export interface ModelTerm {
  readonly span: Span;
  readonly names: readonly Name[];
}

export type NumericPlanKey = "replicates" | "alpha" | "seed" | "confidence" | "power" | "centre-points";

export type PlanSetting =
  | { readonly kind: NumericPlanKey; readonly span: Span; readonly keywordSpan: Span; readonly value?: DecimalNumber }
  | { readonly kind: "model"; readonly span: Span; readonly keywordSpan: Span; readonly terms: readonly ModelTerm[] }
  | {
      readonly kind: "detect";
      readonly span: Span;
      readonly keywordSpan: Span;
      readonly response?: Name;
      readonly difference?: DecimalNumber;
    }
  /** `sums-of-squares I|II|III`; `value` holds the text as written (validated by the model builder). */
  | { readonly kind: "sums-of-squares"; readonly span: Span; readonly keywordSpan: Span; readonly value?: Name }
  /** `fraction coolant = speed x feed x depth`. */
  | {
      readonly kind: "fraction";
      readonly span: Span;
      readonly keywordSpan: Span;
      readonly generated?: Name;
      readonly generator?: ModelTerm;
    }
  /** `pairwise A x B`: comparisons of a term's cells. */
  | { readonly kind: "pairwise"; readonly span: Span; readonly keywordSpan: Span; readonly term?: ModelTerm }
  /** `sigma strength 1.2`: the planned error standard deviation of a response (power before data exist). */
  | {
      readonly kind: "sigma";
      readonly span: Span;
      readonly keywordSpan: Span;
      readonly response?: Name;
      readonly value?: DecimalNumber;
    };

export interface PlanBlock {
  readonly kind: "plan";
  readonly span: Span;
  readonly keywordSpan: Span;
  readonly settings: readonly PlanSetting[];
}

export interface TextBlockDecl {
  readonly kind: "conjecture" | "conclusion";
  readonly span: Span;
  readonly keywordSpan: Span;
  readonly body?: TextValue;
}

/** Cell flags, one byte per cell in `RunRows.cellFlags`. */
export const enum CellFlag {
  None = 0,
  /** Written in double quotes; the cell's span includes the quotes. */
  Quoted = 1,
  /** A quoted cell whose closing quote is missing (a `syntax` problem is reported too). */
  Unterminated = 2,
}

/**
 * The rows of a runs table, column-wise. Row `r` owns cells `cellOffset[r] .. cellOffset[r + 1] - 1`
 * (ids, factor and covariate cells, then response cells). Cell text is `source.slice(cellStart, cellEnd)`
 * (unquote with `cellText` in `runs-table.ts`). Rows appear in file order, which is run order; blank
 * lines and whole-line comments are not rows.
 */
export interface RunRows {
  readonly count: number;
  /** Offset of the row's first character and of the end of its last cell (before any trailing comment). */
  readonly rowStart: Int32Array;
  readonly rowEnd: Int32Array;
  /** Length `count + 1`. */
  readonly cellOffset: Int32Array;
  /** Index within the row of the first cell after `|`; -1 when the row has no `|`. */
  readonly pipeCell: Int32Array;
  readonly cellStart: Int32Array;
  readonly cellEnd: Int32Array;
  readonly cellFlags: Uint8Array;
  /** Rows marked `excluded "reason"`, keyed by row index (sparse: most rows are not excluded). */
  readonly excluded: ReadonlyMap<number, ExcludedMark>;
}

/** `excluded "reason"` at the end of a row; `span` covers the keyword and the reason. */
export interface ExcludedMark {
  readonly span: Span;
  readonly reason?: TextValue;
}

export interface RunsTable {
  readonly kind: "runs";
  readonly span: Span;
  readonly keywordSpan: Span;
  /** Header names in order, without the `|`. `id` (unquoted) names the run-id column. */
  readonly columns: readonly Name[];
  /** Index in `columns` of the first response column; `columns.length` when the header has no `|`. */
  readonly responseStart: number;
  readonly headerHasPipe: boolean;
  /**
   * The rows, column-wise. For a plain body (`plainBody`) they are built on first access (a getter,
   * computed once): a consumer that needs no cell span or text, such as the model builder's plain reader,
   * never pays for them.
   */
  readonly rows: RunRows;
  /** How many rows the table has (`rows.count`, known without building `rows`). */
  readonly rowCount: number;
  /**
   * Set when the body `[start, end)` is plain (`plain-runs-body.ts`): ASCII, unquoted cells, no
   * `excluded`, every row's `|` agreeing with the header's. Such a body has no syntax problem.
   */
  readonly plainBody?: Span;
  /**
   * For a plain body with rows on both sides of its middle: the first row starting at or after the
   * middle (its index, and the offset of its line's start), where a reader may split the body in two
   * parts of about the same size (the CLI reads a large table on two threads).
   */
  readonly plainMiddle?: { readonly row: number; readonly offset: number };
}

/** A problem found while reading the text: always code `syntax`, with a message that says how to fix it. */
export interface SyntaxProblem {
  readonly code: "syntax";
  readonly message: string;
  readonly span: Span;
}

export type Declaration = ResponseDecl | FactorDecl | CovariateDecl | PlanBlock | RunsTable | TextBlockDecl;

/** A parsed `.trial` file. Always produced, however broken the text: what could not be read is in `problems`. */
export interface TrialFile {
  readonly source: string;
  readonly header: TrialHeader;
  /** Every declaration in file order (useful for outlines and folding). */
  readonly declarations: readonly Declaration[];
  readonly responses: readonly ResponseDecl[];
  readonly factors: readonly FactorDecl[];
  readonly covariates: readonly CovariateDecl[];
  /** The first `plan` block; a second one is a `syntax` problem and is still listed in `declarations`. */
  readonly plan?: PlanBlock;
  /** The first `runs` table; a second one is a `syntax` problem. */
  readonly runs?: RunsTable;
  readonly conjecture?: TextBlockDecl;
  readonly conclusion?: TextBlockDecl;
  readonly problems: readonly SyntaxProblem[];
}
