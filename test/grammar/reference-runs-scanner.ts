/**
 * The runs-table reading as it was before the one-pass scanner (kept verbatim as a reference for tests):
 * the lexer's former `RunsBody` matcher, which walked every line to find where the table ends, and the
 * former two-pass row scanner that then read the body again. Tests compare the one-pass scanner of
 * `grammar/src/runs-scanner.ts` with this slow path on fixed and random tables.
 */
import { CellFlag, type ExcludedMark, type RunRows, type SyntaxProblem } from "../../grammar/src/ast.js";
import { unquote } from "../../grammar/src/runs-scanner.js";
import { lineStartsWithTopLevelKeywordReference } from "./reference-keyword-line.js";

/**
 * Where the former `RunsBody` matcher ended a table body starting at `offset` (a line break): just after
 * the line feed that precedes the first line whose first word is a top-level keyword, or the text end.
 */
export function referenceRunsBodyEnd(text: string, offset: number): number {
  const c = text.charCodeAt(offset);
  let nl = c === 13 ? text.indexOf("\n", offset) : offset;
  if (nl < 0) return text.length;
  while (nl >= 0) {
    if (lineStartsWithTopLevelKeywordReference(text, nl + 1)) return nl + 1;
    nl = text.indexOf("\n", nl + 1);
  }
  return text.length;
}

/** The rows of one table body and the syntax problems found in it. */
export interface ReferenceScanResult {
  readonly rows: RunRows;
  readonly problems: SyntaxProblem[];
}

const LF = 10;
const CR = 13;
const SPACE = 32;
const TAB = 9;
const QUOTE = 34;
const HASH = 35;
const PIPE = 124;
const BACKSLASH = 92;
const BOM = 0xfeff;

/** Growable Int32Array. */
class IntColumn {
  data: Int32Array;
  length = 0;
  constructor(capacity: number) {
    this.data = new Int32Array(capacity);
  }
  push(value: number): void {
    if (this.length === this.data.length) {
      const grown = new Int32Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.length++] = value;
  }
  trimmed(): Int32Array {
    return this.data.subarray(0, this.length);
  }
}

/** Growable Uint8Array. */
class ByteColumn {
  data: Uint8Array;
  length = 0;
  constructor(capacity: number) {
    this.data = new Uint8Array(capacity);
  }
  push(value: number): void {
    if (this.length === this.data.length) {
      const grown = new Uint8Array(this.data.length * 2);
      grown.set(this.data);
      this.data = grown;
    }
    this.data[this.length++] = value;
  }
  trimmed(): Uint8Array {
    return this.data.subarray(0, this.length);
  }
}

function isBlank(c: number): boolean {
  return c === SPACE || c === TAB || c === BOM;
}

/** True for characters that end an unquoted cell. */
function endsBareCell(c: number): boolean {
  return c === SPACE || c === TAB || c === PIPE || c === HASH || c === LF || c === CR || c === BOM;
}

/** True when `source[start, end)` is exactly the word `excluded`. */
function isExcludedWord(source: string, start: number, end: number): boolean {
  return end - start === 8 && source.startsWith("excluded", start);
}

function problem(message: string, start: number, end: number): SyntaxProblem {
  return { code: "syntax", message, span: { start, end } };
}

/**
 * Scans the table body `source[start, end)` into rows and cells. `start` is the line break that ends the
 * header line (the body token's first character); the header line itself is not read. `headerHasPipe`
 * says whether the header separates factor from response columns, so a row without `|` is reported.
 */
export function referenceScanRunsBody(source: string, start: number, end: number, headerHasPipe: boolean): ReferenceScanResult {
  // A typical row has 5 to 10 cells and 30 to 60 characters; start near that and double as needed.
  const estimateRows = Math.max(16, Math.ceil((end - start) / 32));
  const rowStart = new IntColumn(estimateRows);
  const rowEnd = new IntColumn(estimateRows);
  const cellOffset = new IntColumn(estimateRows + 1);
  const pipeCell = new IntColumn(estimateRows);
  const cellStart = new IntColumn(estimateRows * 4);
  const cellEnd = new IntColumn(estimateRows * 4);
  const cellFlags = new ByteColumn(estimateRows * 4);
  const excluded = new Map<number, ExcludedMark>();
  const problems: SyntaxProblem[] = [];

  // End of the last run of glued characters reported after a closing quote (see below).
  let glueEnd = -1;
  let p = start;
  cellOffset.push(0);
  while (p < end) {
    // At a line start (or the header's line break): skip the line break first.
    let c = source.charCodeAt(p);
    if (c === CR) {
      p++;
      if (p < end && source.charCodeAt(p) === LF) p++;
      continue;
    }
    if (c === LF) {
      p++;
      continue;
    }
    while (p < end && isBlank(source.charCodeAt(p))) p++;
    if (p >= end) break;
    c = source.charCodeAt(p);
    if (c === LF || c === CR) continue;
    if (c === HASH) {
      p = skipToLineEnd(source, p, end);
      continue;
    }

    // A row.
    const row = rowStart.length;
    const firstCell = cellStart.length;
    let pipe = -1;
    let lastContentEnd = p;
    let mark: ExcludedMark | undefined;
    let unterminatedCell = false;
    rowStart.push(p);
    while (p < end) {
      c = source.charCodeAt(p);
      if (isBlank(c)) {
        p++;
        continue;
      }
      if (c === LF || c === CR) break;
      if (c === HASH) {
        p = skipToLineEnd(source, p, end);
        break;
      }
      if (mark !== undefined) {
        // Anything but a comment after `excluded "reason"`.
        const stop = skipToCommentOrLineEnd(source, p, end);
        problems.push(
          problem(
            "unexpected text after the excluded reason: 'excluded \"reason\"' must end the row (put notes in a # comment)",
            p,
            trimEnd(source, p, stop),
          ),
        );
        lastContentEnd = trimEnd(source, p, stop);
        p = stop;
        continue;
      }
      if (c === PIPE) {
        if (pipe < 0) {
          pipe = cellStart.length - firstCell;
        } else {
          problems.push(problem("a second '|' in this row: a row has one '|' between factor and response columns", p, p + 1));
        }
        lastContentEnd = p + 1;
        p++;
        continue;
      }
      if (c === QUOTE) {
        const qEnd = scanQuoted(source, p, end);
        const terminated = lastQuotedTerminated;
        cellStart.push(p);
        cellEnd.push(qEnd);
        cellFlags.push(terminated ? CellFlag.Quoted : CellFlag.Quoted | CellFlag.Unterminated);
        if (!terminated) {
          unterminatedCell = true;
          problems.push(problem("unterminated quoted cell: add the closing '\"'", p, qEnd));
        } else if (qEnd < end && !endsBareCell(source.charCodeAt(qEnd))) {
          // `"a"b`: report the glued characters and go on reading them as another cell. A run of glued
          // quoted cells (`""""…`) shares one end: start from the one already found, or a long run would
          // be rescanned once per cell (quadratic).
          let e = qEnd < glueEnd ? glueEnd : qEnd;
          while (e < end && !endsBareCell(source.charCodeAt(e))) e++;
          glueEnd = e;
          problems.push(problem("put a space after the closing quote: cells are separated by spaces or tabs", qEnd, e));
        }
        lastContentEnd = qEnd;
        p = qEnd;
        continue;
      }
      // An unquoted cell.
      const s = p;
      let strayQuote = -1;
      while (p < end) {
        const d = source.charCodeAt(p);
        if (endsBareCell(d)) break;
        if (d === QUOTE && strayQuote < 0) strayQuote = p;
        p++;
      }
      if (strayQuote >= 0) {
        problems.push(
          problem(
            `stray '"' in cell '${source.slice(s, p)}': quote the whole cell ("...") and write \\" for a quote inside it`,
            strayQuote,
            strayQuote + 1,
          ),
        );
      }
      if (isExcludedWord(source, s, p)) {
        // `excluded "reason"`: the reason must follow, quoted.
        let r = p;
        while (r < end && isBlank(source.charCodeAt(r))) r++;
        if (r < end && source.charCodeAt(r) === QUOTE) {
          const qEnd = scanQuoted(source, r, end);
          const terminated = lastQuotedTerminated;
          if (!terminated) problems.push(problem("unterminated excluded reason: add the closing '\"'", r, qEnd));
          const reason = { text: unquote(source.slice(r, qEnd), terminated), span: { start: r, end: qEnd } };
          mark = { span: { start: s, end: qEnd }, reason };
          p = qEnd;
        } else {
          mark = { span: { start: s, end: p } };
          problems.push(problem('excluded needs a reason in quotes: excluded "why the run does not count"', s, p));
        }
        excluded.set(row, mark);
        lastContentEnd = mark.span.end;
        continue;
      }
      cellStart.push(s);
      cellEnd.push(p);
      cellFlags.push(CellFlag.None);
      lastContentEnd = p;
    }
    rowEnd.push(lastContentEnd);
    pipeCell.push(pipe);
    cellOffset.push(cellStart.length);
    // An unterminated quoted cell swallows the rest of the line, `|` included: one problem is enough.
    if (pipe < 0 && headerHasPipe && cellStart.length > firstCell && !unterminatedCell) {
      problems.push(
        problem("missing '|' between factor and response columns: put '|' where the runs header has it", rowStart.data[row]!, lastContentEnd),
      );
    } else if (pipe >= 0 && !headerHasPipe) {
      problems.push(
        problem("this row has '|' but the runs header has none: add '|' before the response names in the header", rowStart.data[row]!, lastContentEnd),
      );
    }
  }

  const rows: RunRows = {
    count: rowStart.length,
    rowStart: rowStart.trimmed(),
    rowEnd: rowEnd.trimmed(),
    cellOffset: cellOffset.trimmed(),
    pipeCell: pipeCell.trimmed(),
    cellStart: cellStart.trimmed(),
    cellEnd: cellEnd.trimmed(),
    cellFlags: cellFlags.trimmed(),
    excluded,
  };
  return { rows, problems };
}

function skipToLineEnd(source: string, p: number, end: number): number {
  while (p < end) {
    const c = source.charCodeAt(p);
    if (c === LF || c === CR) break;
    p++;
  }
  return p;
}

function skipToCommentOrLineEnd(source: string, p: number, end: number): number {
  while (p < end) {
    const c = source.charCodeAt(p);
    if (c === LF || c === CR || c === HASH) break;
    if (c === QUOTE) {
      p = scanQuoted(source, p, end);
      continue;
    }
    p++;
  }
  return p;
}

function trimEnd(source: string, start: number, end: number): number {
  while (end > start && isBlank(source.charCodeAt(end - 1))) end--;
  return end;
}

/** Whether the last `scanQuoted` call found the closing quote (a flag, so no object per cell). */
let lastQuotedTerminated = false;

/**
 * Reads a quoted cell starting at the `"` at `p` and returns its end; an unterminated one runs to the end
 * of the line. Sets `lastQuotedTerminated`.
 */
function scanQuoted(source: string, p: number, end: number): number {
  p++;
  while (p < end) {
    const c = source.charCodeAt(p);
    if (c === QUOTE) {
      lastQuotedTerminated = true;
      return p + 1;
    }
    if (c === LF || c === CR) break;
    if (c === BACKSLASH && p + 1 < end) {
      const d = source.charCodeAt(p + 1);
      if (d !== LF && d !== CR) {
        p += 2;
        continue;
      }
    }
    p++;
  }
  lastQuotedTerminated = false;
  return p;
}
