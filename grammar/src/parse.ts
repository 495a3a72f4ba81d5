/**
 * `parseTrial`: text in, `TrialFile` out, never an exception.
 */
import type { SyntaxProblem, TrialFile } from "./ast.js";
import type { TrialFileCstNode } from "./cst.generated.js";
import { buildTrialFile, lexingProblems, parsingProblems } from "./cst-to-ast.js";
import { trialParser } from "./parser.js";
import { type QuickPassContinuation, withQuickPassContinuation } from "./plain-runs-body.js";
import { trialLexer } from "./tokens.js";

/** What may speed a parse up without changing its result. */
export interface ParseHints {
  /** The quick pass's facts for the text's second half, from another thread (plain-runs-body.ts). */
  readonly continuation?: QuickPassContinuation;
}

/**
 * Parses a `.trial` text. Always returns a `TrialFile`; whatever could not be read is in `problems`
 * (code `syntax`, with a message that says how to fix it). Offsets refer to `text` as given: a leading
 * byte-order mark is kept in `source` and read as white space, CRLF and tabs are accepted everywhere.
 * One parser instance is reused across calls (the grammar is analysed once).
 */
export function parseTrial(text: string, hints: ParseHints = {}): TrialFile {
  const source = typeof text === "string" ? text : String(text ?? "");
  try {
    const lexed = withQuickPassContinuation(hints.continuation, () => trialLexer().tokenize(source));
    const parser = trialParser();
    parser.setSource(source);
    parser.input = lexed.tokens;
    const cst = parser.trialFile() as TrialFileCstNode;
    const problems: SyntaxProblem[] = [...lexingProblems(lexed), ...parsingProblems(source, lexed.tokens, parser.errors)];
    return buildTrialFile(source, cst, problems);
  } catch (error) {
    // A bug of ours must not reach the user as an exception: report it where it cannot be missed.
    const detail = error instanceof Error ? error.message : String(error);
    return emptyTrialFile(source, {
      code: "syntax",
      message: `internal error while reading the file (please report it): ${detail}`,
      span: { start: 0, end: 0 },
    });
  }
}

/**
 * Builds the lexer and the parser now rather than at the first `parseTrial` (Chevrotain analyses the
 * grammar then: some 30-40 ms). The CLI calls it while a file is being read, so the two overlap.
 */
export function prepareParsing(): void {
  trialLexer();
  trialParser();
}

function emptyTrialFile(source: string, problem: SyntaxProblem): TrialFile {
  return {
    source,
    header: {},
    declarations: [],
    responses: [],
    factors: [],
    covariates: [],
    problems: [problem],
  };
}
