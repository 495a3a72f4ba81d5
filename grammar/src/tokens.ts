/**
 * The tokens of the `.trial` language and the multi-mode lexer that produces them.
 *
 * Two lexer modes: `main` for declarations, and `runsHeader`, entered after the `runs` keyword, which
 * lexes the header line's column names and `|` and then hands the whole table body to one `RunsBody`
 * token. The body is split into rows and cells by the hand-written scanner in `runs-scanner.ts`,
 * because one token object per cell would cost far too much on a million-run file; the token's matcher
 * finds where the table ends itself (the quick pass of `plain-runs-body.ts`, or that scanner) and passes
 * what it read on as the token's payload.
 *
 * Keywords are declared ahead of `Identifier` with `longer_alt`, so `levelsX` stays an identifier
 * (the keyword-versus-identifier pattern from the Chevrotain examples).
 */
import { createToken, Lexer, type CustomPatternMatcherReturn, type TokenType } from "chevrotain";
import { scanPlainRunsBody } from "./plain-runs-body.js";
import { scanRunsTable } from "./runs-scanner.js";
import { TOP_LEVEL_KEYWORDS, lineStartsWithTopLevelKeyword } from "./top-level-keywords.js";
import { Char } from "./char-codes.js";

export { TOP_LEVEL_KEYWORDS, isTopLevelKeyword, lineStartsWithTopLevelKeyword } from "./top-level-keywords.js";

/** Keywords that start a setting inside `plan`. */
export const PLAN_SETTING_KEYWORDS = [
  "replicates",
  "alpha",
  "confidence",
  "power",
  "seed",
  "sums-of-squares",
  "model",
  "detect",
  "pairwise",
  "fraction",
  "centre-points",
  "sigma",
] as const;

/** Contextual keywords: keywords only where the grammar expects them, names elsewhere. */
export const CONTEXTUAL_KEYWORDS = [
  "unit",
  "maximize",
  "minimize",
  "target",
  "spec",
  "levels",
  "as",
  "block",
  "random",
  "subject",
  "control",
  "within",
  "x",
  "to",
  "excluded",
  ...PLAN_SETTING_KEYWORDS,
] as const;

/** Every keyword of the language: the top-level ones followed by the contextual ones. */
export const ALL_KEYWORDS: readonly string[] = [...TOP_LEVEL_KEYWORDS, ...CONTEXTUAL_KEYWORDS];


/** Where a `"""` text block starting at `offset` ends, and whether its closing fence was found. */
export interface TextBlockExtent {
  readonly end: number;
  readonly terminated: boolean;
}

/**
 * Finds the extent of a `"""` text block. The block ends after its closing `"""`. Two guards keep a
 * missing fence from swallowing the rest of the file: when no closing fence exists, or when the first
 * fence found sits on a line that starts with a top-level keyword (so it is the opening fence of the
 * next block, as in `conclusion """`), the block is unterminated and ends before the first line, after
 * the opening one, whose first word is a top-level keyword (or at the end of the text).
 */
export function scanTextBlock(text: string, offset: number): TextBlockExtent {
  const close = text.indexOf('"""', offset + 3);
  if (close >= 0) {
    const lineStart = Math.max(text.lastIndexOf("\n", close - 1) + 1, 0);
    if (lineStart <= offset || !lineStartsWithTopLevelKeyword(text, lineStart)) {
      return { end: close + 3, terminated: true };
    }
  }
  let nl = text.indexOf("\n", offset);
  while (nl >= 0) {
    if (lineStartsWithTopLevelKeyword(text, nl + 1)) {
      // End before the line break, so the break itself is whitespace of the main mode.
      const end = nl > offset && text.charCodeAt(nl - 1) === Char.CR ? nl - 1 : nl;
      return { end: Math.max(end, offset + 3), terminated: false };
    }
    nl = text.indexOf("\n", nl + 1);
  }
  return { end: text.length, terminated: false };
}

function matchTextBlock(wantTerminated: boolean) {
  return (text: string, offset: number): CustomPatternMatcherReturn | null => {
    if (!text.startsWith('"""', offset)) return null;
    const extent = scanTextBlock(text, offset);
    if (extent.terminated !== wantTerminated) return null;
    return [text.slice(offset, extent.end)] as unknown as CustomPatternMatcherReturn;
  };
}

/**
 * Matches the body of a runs table: from the line break that ends the header line up to (not including)
 * the first line whose first word is a top-level keyword, or the end of the text. One token, however
 * many rows. Finding that end means looking at every line, so the matcher reads the body itself and
 * hands the result to the AST builder as the token's payload: for a plain body (most of them), the quick
 * pass of `plain-runs-body.ts`, which stores nothing per row; for any other, the rows read by the scanner
 * of `runs-scanner.ts`. The payload lives as long as the token, so nothing is kept between parses.
 */
function matchRunsBody(text: string, offset: number): CustomPatternMatcherReturn | null {
  const c = text.charCodeAt(offset);
  if (c !== Char.LF && c !== Char.CR) return null;
  const scan = scanPlainRunsBody(text, offset) ?? scanRunsTable(text, offset);
  const match = [text.slice(offset, scan.end)] as CustomPatternMatcherReturn;
  match.payload = scan;
  return match;
}

// ---------------------------------------------------------------------------------------------------
// Categories

/** Any token that can serve as a name: identifiers and contextual keywords. */
export const NameToken = createToken({ name: "NameToken", pattern: Lexer.NA });

// ---------------------------------------------------------------------------------------------------
// Trivia

/** Spaces, tabs, line breaks and a byte-order mark (kept in the text so offsets match the editor's). */
export const WhiteSpace = createToken({
  name: "WhiteSpace",
  pattern: /[ \t\r\n\uFEFF]+/,
  group: Lexer.SKIPPED,
  line_breaks: true,
});

/** Spaces and tabs on the runs header line (a line break there starts the table body). */
export const HeaderSpace = createToken({ name: "HeaderSpace", pattern: /[ \t\uFEFF]+/, group: Lexer.SKIPPED });

/** `# ...` to the end of the line. */
export const Comment = createToken({ name: "Comment", pattern: /#[^\r\n]*/, group: Lexer.SKIPPED });

// ---------------------------------------------------------------------------------------------------
// Literals

/** A `"""` text block with its closing fence. */
export const TextBlock = createToken({
  name: "TextBlock",
  pattern: { exec: matchTextBlock(true) },
  line_breaks: true,
  start_chars_hint: ['"'],
});

/** A `"""` text block whose closing fence is missing (reported as a problem, never a cascade). */
export const UnterminatedTextBlock = createToken({
  name: "UnterminatedTextBlock",
  pattern: { exec: matchTextBlock(false) },
  line_breaks: true,
  start_chars_hint: ['"'],
});

/** A one-line quoted string with `\"` and `\\` escapes. */
export const StringLiteral = createToken({ name: "StringLiteral", pattern: /"(?:[^"\\\r\n]|\\[^\r\n])*"/ });

/** A quoted string whose closing quote is missing: runs to the end of the line. */
export const UnterminatedString = createToken({
  name: "UnterminatedString",
  pattern: /"(?:[^"\\\r\n]|\\[^\r\n])*\\?/,
});

/** An ISO date `2026-11-20` (before `NumberLiteral`, which would read `2026` and `-11`). */
export const DateLiteral = createToken({ name: "DateLiteral", pattern: /\d{4}-\d{2}-\d{2}(?![A-Za-z0-9_-])/ });

/** `-?digits[.digits][e[+-]digits]`, kept as text by the AST. */
export const NumberLiteral = createToken({ name: "NumberLiteral", pattern: /-?\d+(?:\.\d+)?(?:[eE][+-]?\d+)?/ });

/** `>=` in `spec >= 18`. */
export const GreaterEqual = createToken({ name: "GreaterEqual", pattern: />=/ });
/** `<=` in `spec <= 2.5`. */
export const LessEqual = createToken({ name: "LessEqual", pattern: /<=/ });
/** `=` in `fraction coolant = speed x feed`. */
export const Equals = createToken({ name: "Equals", pattern: /=/ });
/** `,` between levels and model terms. */
export const Comma = createToken({ name: "Comma", pattern: /,/ });
/** `|` between factor and response columns of the runs header. */
export const Pipe = createToken({ name: "Pipe", pattern: /\|/ });

/** A name: letters, digits, `_` and `-`, starting with a letter or `_`. */
export const Identifier = createToken({
  name: "Identifier",
  pattern: /[A-Za-z_][A-Za-z0-9_-]*/,
  categories: [NameToken],
});

// ---------------------------------------------------------------------------------------------------
// Keywords

function keyword(word: string, tokenName: string, extra: { top?: boolean; push?: string } = {}): TokenType {
  const escaped = word.replace(/-/g, "\\-");
  return createToken({
    name: tokenName,
    pattern: new RegExp(escaped),
    longer_alt: Identifier,
    categories: extra.top ? [] : [NameToken],
    ...(extra.push ? { push_mode: extra.push } : {}),
  });
}

export const Trial = keyword("trial", "Trial", { top: true });
export const Owner = keyword("owner", "Owner", { top: true });
export const DateKw = keyword("date", "DateKw", { top: true });
export const Conjecture = keyword("conjecture", "Conjecture", { top: true });
export const Conclusion = keyword("conclusion", "Conclusion", { top: true });
export const Response = keyword("response", "Response", { top: true });
export const Factor = keyword("factor", "Factor", { top: true });
export const Covariate = keyword("covariate", "Covariate", { top: true });
export const Plan = keyword("plan", "Plan", { top: true });
export const Runs = keyword("runs", "Runs", { top: true, push: "runsHeader" });

export const Unit = keyword("unit", "Unit");
export const Maximize = keyword("maximize", "Maximize");
export const Minimize = keyword("minimize", "Minimize");
export const Target = keyword("target", "Target");
export const Spec = keyword("spec", "Spec");
export const Levels = keyword("levels", "Levels");
export const As = keyword("as", "As");
export const Block = keyword("block", "Block");
export const Random = keyword("random", "Random");
export const Subject = keyword("subject", "Subject");
export const Control = keyword("control", "Control");
export const Within = keyword("within", "Within");
export const Replicates = keyword("replicates", "Replicates");
export const Alpha = keyword("alpha", "Alpha");
export const Confidence = keyword("confidence", "Confidence");
export const Power = keyword("power", "Power");
export const Seed = keyword("seed", "Seed");
export const SumsOfSquares = keyword("sums-of-squares", "SumsOfSquares");
export const Model = keyword("model", "Model");
export const Detect = keyword("detect", "Detect");
export const Pairwise = keyword("pairwise", "Pairwise");
export const Fraction = keyword("fraction", "Fraction");
export const CentrePoints = keyword("centre-points", "CentrePoints");
export const Cross = keyword("x", "Cross");
export const To = keyword("to", "To");
export const Excluded = keyword("excluded", "Excluded");
export const Sigma = keyword("sigma", "Sigma");

/** Any single character nothing else accepts; the parser reports it instead of the lexer failing. */
export const Unknown = createToken({ name: "Unknown", pattern: /[^\s]/ });

// ---------------------------------------------------------------------------------------------------
// Runs header mode

/** A column name on the runs header line: any run of characters up to a space, `|`, `"` or `#`. */
export const HeaderWord = createToken({ name: "HeaderWord", pattern: /[^\s|"#]+/ });

/** The whole runs table body, from the header's line break to the next top-level keyword line or EOF. */
export const RunsBody = createToken({
  name: "RunsBody",
  pattern: { exec: matchRunsBody },
  line_breaks: true,
  pop_mode: true,
  start_chars_hint: ["\n", "\r"],
});

const TOP_LEVEL_TOKENS = [Trial, Owner, DateKw, Conjecture, Conclusion, Response, Factor, Covariate, Plan, Runs];
const CONTEXTUAL_TOKENS = [
  Unit,
  Maximize,
  Minimize,
  Target,
  Spec,
  Levels,
  As,
  Block,
  Random,
  Subject,
  Control,
  Within,
  Replicates,
  Alpha,
  Confidence,
  Power,
  Seed,
  SumsOfSquares,
  Model,
  Detect,
  Pairwise,
  Fraction,
  CentrePoints,
  Cross,
  To,
  Excluded,
  Sigma,
];

const MAIN_MODE: TokenType[] = [
  WhiteSpace,
  Comment,
  TextBlock,
  UnterminatedTextBlock,
  StringLiteral,
  UnterminatedString,
  DateLiteral,
  NumberLiteral,
  GreaterEqual,
  LessEqual,
  Equals,
  Comma,
  ...TOP_LEVEL_TOKENS,
  ...CONTEXTUAL_TOKENS,
  Identifier,
  Unknown,
];

const RUNS_HEADER_MODE: TokenType[] = [
  HeaderSpace,
  Comment,
  RunsBody,
  StringLiteral,
  UnterminatedString,
  Pipe,
  HeaderWord,
];

/** Every token type the parser knows, categories included (the parser's vocabulary). */
export const ALL_TOKENS: TokenType[] = [
  NameToken,
  ...MAIN_MODE,
  HeaderSpace,
  RunsBody,
  Pipe,
  HeaderWord,
];

/** The multi-mode lexer definition: `main` and `runsHeader`. */
export const LEXER_DEFINITION = {
  modes: { main: MAIN_MODE, runsHeader: RUNS_HEADER_MODE },
  defaultMode: "main",
};

/**
 * True in the shipped bundles (esbuild defines `__TRIALBOOK_BUNDLE__`, see esbuild.mjs), where Chevrotain's
 * grammar validations are skipped: they check the grammar itself, not the input, and cost about 40 ms at
 * every start. The compiled tests (out/) run them on every test run, so a grammar mistake still fails there.
 */
declare const __TRIALBOOK_BUNDLE__: boolean | undefined;
export const SKIP_GRAMMAR_VALIDATIONS = typeof __TRIALBOOK_BUNDLE__ !== "undefined" && __TRIALBOOK_BUNDLE__ === true;

let lexer: Lexer | undefined;

/**
 * The one lexer instance, built on first use (Chevrotain lexers are stateless between calls and costly to
 * build; a command that reads no file should not pay for it).
 */
export function trialLexer(): Lexer {
  lexer ??= new Lexer(LEXER_DEFINITION, {
    positionTracking: "onlyOffset",
    ensureOptimizations: false,
    skipValidations: SKIP_GRAMMAR_VALIDATIONS,
  });
  return lexer;
}
