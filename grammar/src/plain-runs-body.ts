/**
 * The quick pass over a runs-table body: where it ends, and whether every row in it is plain.
 *
 * A large run sheet (a machine log of a million runs) is nearly always plain: unquoted cells separated by
 * blanks, at most one `|` per row, comments, no `excluded` mark. Such a body can hold no
 * problem of its own, and the model builder can read its values in one pass straight from the text
 * (`server/src/analysis/read-plain-runs.ts`) instead of through the cell columns of `RunRows`. So the lexer
 * runs this pass first: it stores nothing per row or cell (the full scanner writes about 48 bytes a row of
 * cell columns and looks at every character in script) and the AST builder then builds the `RunRows` of a
 * plain body only when something asks for them (`cst-to-ast.ts`). Any other body gives `undefined` here
 * and is read by `scanRunsTable` as before, with every problem in it.
 *
 * "Plain" is decided conservatively, so that `scanRunsTable` of the same body is certain to report no
 * problem inside a row: a quote or the word `excluded` in a row (before its comment; anywhere in a cell,
 * as part of a longer word too), a second `|` in a row, or a lone carriage return makes the body not
 * plain. Whether each row's `|` agrees with the header's is left to the caller, which knows the header:
 * `rowsWithPipe` says how many rows have one.
 */
import { isTopLevelKeywordAt } from "./top-level-keywords.js";
import { Char } from "./char-codes.js";

/** What the quick pass found in a plain body. */
export interface PlainRunsBody {
  /** Offset just past the body, as `RunsBodyScan.end`. */
  readonly end: number;
  /** Rows (lines with a cell or a `|`, as the scanner counts them). */
  readonly rowCount: number;
  /** Rows with a `|`; the others have none. */
  readonly rowsWithPipe: number;
  /** Where the last row's content ends (its `RunRows.rowEnd`), or -1 without rows. */
  readonly lastRowEnd: number;
  /**
   * The first row that starts at or after the middle of the text from the body's start to `limit`: its
   * index and the start of its line, where a reader may split the body in two parts of about the same
   * size (the CLI reads a large table on two threads). -1 and -1 when no row starts there.
   */
  readonly middleRow: number;
  readonly middleOffset: number;
}


/**
 * What another thread found from a line feed of the text on: `facts()` is what
 * `scanPlainRunsBody(text.slice(at), 0, undefined, 0)` gives there (offsets from `at`; its middle row is
 * the first row after `at`), waiting for it if need be, or `null` when it is not available (then the
 * quick pass reads on by itself). The CLI's reading thread computes it while this thread lexes the first
 * half of a large file (server/src/cli/helper-thread.ts).
 */
export interface QuickPassContinuation {
  /** The offset of a line feed in the text. */
  readonly at: number;
  /** The length of the text it was computed for (a check that it is this text). */
  readonly length: number;
  facts(): PlainRunsBody | undefined | null;
}

/**
 * The continuation of the text being parsed (set by `parseTrial` for one call). Module state because the
 * lexer calls the body matcher with the text and an offset only (a Chevrotain custom token pattern).
 */
let continuation: QuickPassContinuation | undefined;

/** Runs `parse` with `next` as the continuation of the quick passes it makes, and clears it after. */
export function withQuickPassContinuation<T>(next: QuickPassContinuation | undefined, parse: () => T): T {
  continuation = next;
  try {
    return parse();
  } finally {
    continuation = undefined;
  }
}

/** An `indexOf` result as a position: "not found" is past every position. */
function found(at: number): number {
  return at < 0 ? Number.MAX_SAFE_INTEGER : at;
}

/**
 * Reads a runs-table body from `start` (the line break ending the header line) as `scanRunsTable` does
 * and, when every row is plain, returns where it ends and what the AST needs without the rows; otherwise
 * `undefined`. The table ends at the first line, after a line feed, whose first word (after spaces, tabs
 * and byte-order marks) is a top-level keyword, or at `limit`.
 *
 * It hops from line feed to line feed with `indexOf` (the engine's search, far cheaper per character than
 * a loop in script) and looks only at each line's first word and at its `|`, `#`, quotes and `excluded`,
 * each found the same way as the next one after the previous (a body with none costs one search). A line with a lone carriage
 * return (one not just before a line feed) makes the body not plain: the scanner splits rows there.
 */
export function scanPlainRunsBody(source: string, start: number, limit: number = source.length, middleAt?: number): PlainRunsBody | undefined {
  const end = Math.max(start, Math.min(limit, source.length));
  if (start >= end) return undefined;
  let lf = start;
  if (source.charCodeAt(start) === Char.CR) {
    if (start + 1 >= end || source.charCodeAt(start + 1) !== Char.LF) return undefined;
    lf = start + 1;
  } else if (source.charCodeAt(start) !== Char.LF) return undefined;
  let nextPipe = found(source.indexOf("|", start));
  let nextHash = found(source.indexOf("#", start));
  let nextCr = found(source.indexOf("\r", lf));
  let nextQuote = found(source.indexOf('"', start));
  let nextExcluded = found(source.indexOf("excluded", start));
  let rowCount = 0;
  let rowsWithPipe = 0;
  let lastRowEnd = -1;
  let bodyEnd = end;
  const middle = middleAt ?? start + Math.floor((end - start) / 2);
  let middleRow = -1;
  let middleOffset = -1;
  // Its facts run to the text's end or its table's end: usable only for a pass that reads that far.
  const next = continuation !== undefined && continuation.length === source.length && end === source.length && continuation.at > start && continuation.at < end ? continuation : undefined;
  let joinAt = next ? next.at : -1;
  while (lf < end) {
    if (lf === joinAt) {
      // The rest was read by another thread: its facts continue these (or none: read on here).
      const rest = next!.facts();
      if (rest === undefined) return undefined;
      if (rest !== null) {
        const at = joinAt;
        const restMiddle = middleRow < 0 && rest.middleRow >= 0;
        return {
          end: at + rest.end,
          rowCount: rowCount + rest.rowCount,
          rowsWithPipe: rowsWithPipe + rest.rowsWithPipe,
          lastRowEnd: rest.lastRowEnd >= 0 ? at + rest.lastRowEnd : lastRowEnd,
          middleRow: restMiddle ? rowCount + rest.middleRow : middleRow,
          middleOffset: restMiddle ? at + rest.middleOffset : middleOffset,
        };
      }
      joinAt = -1;
    }
    const lineStart = lf + 1;
    const lineEnd = Math.min(found(source.indexOf("\n", lineStart)), end);
    let q = lineStart;
    let c = 0;
    while (q < lineEnd && ((c = source.charCodeAt(q)) === Char.Space || c === Char.Tab || c === Char.BOM)) q++;
    if (q < lineEnd && isTopLevelKeywordAt(source, q)) {
      bodyEnd = lineStart;
      break;
    }
    let contentEnd = lineEnd;
    if (nextCr < lineEnd) {
      if (nextCr !== lineEnd - 1 || lineEnd === end) return undefined;
      contentEnd = nextCr;
      nextCr = found(source.indexOf("\r", lineEnd));
    }
    if (nextHash < contentEnd) {
      contentEnd = nextHash;
      nextHash = found(source.indexOf("#", lineEnd));
    }
    // A quote or `excluded` before the comment: the scanner's general reader handles those rows.
    if (nextQuote < contentEnd || nextExcluded < contentEnd) return undefined;
    if (q < contentEnd) {
      // A row: its first character is neither a blank nor `#`.
      let pipes = 0;
      while (nextPipe < contentEnd) {
        if (++pipes > 1) return undefined;
        nextPipe = found(source.indexOf("|", nextPipe + 1));
      }
      if (middleRow < 0 && lineStart >= middle) {
        middleRow = rowCount;
        middleOffset = lineStart;
      }
      rowCount++;
      if (pipes > 0) rowsWithPipe++;
      let e = contentEnd;
      while (e > q && ((c = source.charCodeAt(e - 1)) === Char.Space || c === Char.Tab || c === Char.BOM)) e--;
      lastRowEnd = e;
    }
    // A `|`, a quote or `excluded` in a comment belongs to no row.
    while (nextPipe < lineEnd) nextPipe = found(source.indexOf("|", nextPipe + 1));
    while (nextQuote < lineEnd) nextQuote = found(source.indexOf('"', nextQuote + 1));
    while (nextExcluded < lineEnd) nextExcluded = found(source.indexOf("excluded", nextExcluded + 1));
    lf = lineEnd;
  }
  return { end: bodyEnd, rowCount, rowsWithPipe, lastRowEnd, middleRow, middleOffset };
}
