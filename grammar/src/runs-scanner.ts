/**
 * The runs-table row scanner: reads the body of a runs table into the column-wise `RunRows`.
 *
 * It finds where the table ends itself (the first line, after a line feed, whose first word is a
 * top-level keyword), so the lexer's `RunsBody` matcher runs it once and hands the result to the AST
 * builder as the token's payload: the body is read once, not once to find its end and again to split it.
 * A plain body is not read here while parsing (`plain-runs-body.ts`): its rows are scanned here when
 * first asked for (`RunsTable.rows`).
 *
 * A tight loop over character codes, with no object and no regular expression per cell: a million-run
 * table is about 24 MB of text and must be read in about a tenth of a second. One table load per
 * character classifies it (`CLASS`); the typed-array columns are written directly by a small row reader
 * called once per row (no method call per cell) and sized once from a sampled line count
 * (`line-density.ts`), so a uniform table never regrows. Ordinary rows are read from the text encoded as
 * bytes a chunk at a time (`readPlainRowBytes`), which is several times cheaper per character than
 * `charCodeAt`. Only problems (rare) allocate. What remains of the cost is mostly the character loop
 * itself and the first touch of the ~48 MB of fresh column memory (page faults), which any reader that
 * produces these columns pays.
 */
import { CellFlag, type ExcludedMark, type RunRows, type SyntaxProblem } from "./ast.js";
import { encodeAsciiChunk } from "./ascii-chunk.js";
import { estimateLineFeeds } from "./line-density.js";
import { isTopLevelKeywordAt } from "./top-level-keywords.js";
import { Char } from "./char-codes.js";

/**
 * What one pass over a runs-table body found, before the header is known. The checks that compare a
 * row's `|` with the header's are made later by `runsBodyProblems`, which needs only the rows.
 */
export interface RunsBodyScan {
  /**
   * Offset just past the body: the start of the first line (after a line feed) whose first word is a
   * top-level keyword, or the end of the scanned range.
   */
  readonly end: number;
  readonly rows: RunRows;
  /** Problems inside rows, in text order (the header-dependent `|` checks are not among them). */
  readonly rowProblems: readonly SyntaxProblem[];
  /** For each entry of `rowProblems`, the index of the row it was found in. */
  readonly rowProblemRows: readonly number[];
  /** How many rows have no `|`, and how many have one: lets `runsBodyProblems` skip the row loop. */
  readonly rowsWithoutPipe: number;
  readonly rowsWithPipe: number;
}


/**
 * Character classes, one byte per UTF-16 code unit, so the cell loop makes one table load per character
 * instead of a chain of comparisons. 0 is an ordinary cell character.
 */
const K_BLANK = 1; // space, tab, byte-order mark
const K_BREAK = 2; // \n, \r
const K_PIPE = 3;
const K_HASH = 4;
const K_QUOTE = 5; // ends nothing inside a bare cell (a stray quote), starts a quoted cell
const CLASS: Uint8Array = (() => {
  const table = new Uint8Array(65536);
  table[Char.Space] = K_BLANK;
  table[Char.Tab] = K_BLANK;
  table[Char.BOM] = K_BLANK;
  table[Char.LF] = K_BREAK;
  table[Char.CR] = K_BREAK;
  table[Char.Pipe] = K_PIPE;
  table[Char.Hash] = K_HASH;
  table[Char.Quote] = K_QUOTE;
  return table;
})();

function isBlank(c: number): boolean {
  return c === Char.Space || c === Char.Tab || c === Char.BOM;
}

/** True for characters that end an unquoted cell. */
function endsBareCell(c: number): boolean {
  return (
    c === Char.Space || c === Char.Tab || c === Char.Pipe || c === Char.Hash || c === Char.LF || c === Char.CR || c === Char.BOM
  );
}

/** True when `source[start, end)` is exactly the word `excluded`. */
function isExcludedWord(source: string, start: number, end: number): boolean {
  return end - start === 8 && source.startsWith("excluded", start);
}

/** Unquotes a quoted string token text `"..."` (or an unterminated `"...`), resolving `\"` and `\\`. */
export function unquote(raw: string, terminated: boolean): string {
  const inner = raw.slice(1, terminated ? raw.length - 1 : raw.length);
  if (inner.indexOf("\\") < 0) return inner;
  return inner.replace(/\\(["\\])/g, "$1");
}

function problem(message: string, start: number, end: number): SyntaxProblem {
  return { code: "syntax", message, span: { start, end } };
}

/**
 * The capacity to grow a column to once `used` entries filled it after `done` of at most `total` units
 * (rows) were read: the density so far extrapolated to the whole plus a sixteenth, so a uniform table
 * grows once; never less than 1.5 times the current capacity, so a skewed one still grows geometrically.
 */
function grownCapacity(capacity: number, used: number, done: number, total: number): number {
  const projected = done > 0 ? Math.ceil((used / done) * total * 1.0625) + 64 : 0;
  return Math.max(projected, capacity + (capacity >> 1) + 16);
}

function grow32(data: Int32Array, capacity: number): Int32Array {
  const grown = new Int32Array(capacity);
  grown.set(data);
  return grown;
}

function grow8(data: Uint8Array, capacity: number): Uint8Array {
  const grown = new Uint8Array(capacity);
  grown.set(data);
  return grown;
}

/**
 * The first `used` entries of a column: a view when little would be wasted, else a copy, so that an
 * over-estimate does not keep a large buffer alive for as long as the AST lives.
 */
function trimmed32(data: Int32Array, used: number): Int32Array {
  return data.length - used > (used >> 3) + 1024 ? data.slice(0, used) : data.subarray(0, used);
}

function trimmed8(data: Uint8Array, used: number): Uint8Array {
  return data.length - used > (used >> 3) + 1024 ? data.slice(0, used) : data.subarray(0, used);
}

/**
 * The columns being filled and the scanner's running state: one object of one shape for the whole scan,
 * so the row readers below are ordinary small functions that take it as an argument (no closure per row).
 */
class RowsBuilder {
  rowCap: number;
  cellCap: number;
  rowStart: Int32Array;
  rowEnd: Int32Array;
  cellOffset: Int32Array;
  pipeCell: Int32Array;
  cellStart: Int32Array;
  cellEnd: Int32Array;
  cellFlags: Uint8Array;
  rowCount = 0;
  cellCount = 0;
  rowsWithPipe = 0;
  /** End of the last run of glued characters reported after a closing quote (see `readRow`). */
  glueEnd = -1;
  readonly excluded = new Map<number, ExcludedMark>();
  readonly problems: SyntaxProblem[] = [];
  readonly problemRows: number[] = [];

  constructor(rowCap: number) {
    // Rows: sized once from the line density. Cells: four a row to start with (a typical small design),
    // then extrapolated from the cells per row read so far.
    this.rowCap = rowCap;
    this.cellCap = rowCap * 4;
    this.rowStart = new Int32Array(rowCap);
    this.rowEnd = new Int32Array(rowCap);
    this.cellOffset = new Int32Array(rowCap + 1); // cellOffset[0] = 0: typed arrays start zeroed
    this.pipeCell = new Int32Array(rowCap);
    this.cellStart = new Int32Array(this.cellCap);
    this.cellEnd = new Int32Array(this.cellCap);
    this.cellFlags = new Uint8Array(this.cellCap);
  }
}

/** Makes room for more rows (past an estimate that was too low). */
function growRows(b: RowsBuilder): void {
  b.rowCap = b.rowCap + (b.rowCap >> 1) + 16;
  b.rowStart = grow32(b.rowStart, b.rowCap);
  b.rowEnd = grow32(b.rowEnd, b.rowCap);
  b.cellOffset = grow32(b.cellOffset, b.rowCap + 1);
  b.pipeCell = grow32(b.pipeCell, b.rowCap);
}

/** Makes room for more cells, extrapolating the cells per row read so far. */
function growCells(b: RowsBuilder): void {
  b.cellCap = grownCapacity(b.cellCap, b.cellCount, b.rowCount, Math.max(b.rowCap, b.rowCount + 1));
  b.cellStart = grow32(b.cellStart, b.cellCap);
  b.cellEnd = grow32(b.cellEnd, b.cellCap);
  b.cellFlags = grow8(b.cellFlags, b.cellCap);
}

/**
 * Scans a runs-table body starting at `start`, the line break that ends the header line (the header
 * itself is not read), up to the first line (after a line feed) whose first word is a top-level keyword,
 * or up to `limit` (default: the end of `source`), whichever comes first. Returns the rows, the problems
 * found inside rows, and where the body ends. The `|` checks that need the header are left to
 * `runsBodyProblems`.
 *
 * The work is split so that the engine optimises it early and keeps it optimised: this loop only finds
 * row starts; an ordinary row (bare cells, blanks, at most one `|`, a comment) is read by the small
 * `readPlainRow`, called once per row and so compiled as an ordinary function after a few hundred rows,
 * not by on-stack replacement of one large loop, which deoptimised several times on a cold first scan
 * whenever it reached a branch it had not run before. Every other row (quotes, `excluded`, problems, a
 * full cell column) is read from its start again by `readRow`, which handles everything.
 */
export function scanRunsTable(source: string, start: number, limit: number = source.length): RunsBodyScan {
  const end = Math.max(start, Math.min(limit, source.length));
  const b = new RowsBuilder(estimateLineFeeds(source, start, end) + 1);
  const table = CLASS;
  let bodyEnd = end;
  let p = start;
  // The text of `[chunkStart, chunkEnd)` is in `bytes` when `chunkAscii` (see `readPlainRowBytes`).
  let chunkStart = start;
  let chunkEnd = start;
  let chunkAscii = false;
  while (p < end) {
    // At a line start (or the header's line break): skip the line break first. After a line feed, the
    // table ends if the line's first word (after spaces, tabs and byte-order marks, the blanks of a row)
    // is a top-level keyword: that line starts the next declaration.
    let c = source.charCodeAt(p);
    if (c === Char.LF || c === Char.CR) {
      p++;
      if (c === Char.CR) {
        if (p >= end || source.charCodeAt(p) !== Char.LF) continue;
        p++;
      }
      let q = p;
      while (q < end && ((c = source.charCodeAt(q)) === Char.Space || c === Char.Tab || c === Char.BOM)) q++;
      if (q < end && isTopLevelKeywordAt(source, q)) {
        bodyEnd = p;
        break;
      }
      // The blanks just read are blanks for the row too.
      p = q;
      continue;
    }
    if (table[c] === K_BLANK) {
      do p++;
      while (p < end && table[(c = source.charCodeAt(p))] === K_BLANK);
      if (p >= end) break;
      if (c === Char.LF || c === Char.CR) continue;
    }
    if (c === Char.Hash) {
      p = skipToLineEnd(source, p, end);
      continue;
    }
    // A row: its first character is an ordinary one, `|` or a quote.
    if (b.rowCount === b.rowCap) growRows(b);
    if (p >= chunkEnd) {
      // The next chunk of text as bytes, from this row on. `encodeInto` writes one byte per character
      // exactly when every character is ASCII; otherwise the rows of this chunk are read from the string.
      chunkStart = p;
      chunkEnd = Math.min(end, p + CHUNK);
      chunkAscii = encodeAsciiChunk(source, p, chunkEnd, bytes);
    }
    let q = chunkAscii ? readPlainRowBytes(b, source, bytes, chunkStart, p, chunkEnd, end) : -1;
    if (q < 0) q = readPlainRow(b, source, p, end);
    p = q >= 0 ? q : readRow(b, source, p, end);
  }
  return finishScan(b, bodyEnd);
}

/**
 * How many characters of the table are turned into bytes at a time: enough that the call per chunk
 * costs nothing, small enough that the one buffer stays in the processor's cache and that a table in a
 * small file is not copied whole.
 */
const CHUNK = 32768;

/** The buffer the chunks are encoded into, shared by every scan (scans never overlap: one thread). */
const bytes = new Uint8Array(CHUNK);

/**
 * The scan's result: columns trimmed to what was read. Kept out of `scanRunsTable`, whose loop is
 * optimised while it runs: code after the loop has not run yet then, and would deoptimise it on the way
 * out.
 */
function finishScan(b: RowsBuilder, bodyEnd: number): RunsBodyScan {
  const rowCount = b.rowCount;
  const cellCount = b.cellCount;
  const rows: RunRows = {
    count: rowCount,
    rowStart: trimmed32(b.rowStart, rowCount),
    rowEnd: trimmed32(b.rowEnd, rowCount),
    cellOffset: trimmed32(b.cellOffset, rowCount + 1),
    pipeCell: trimmed32(b.pipeCell, rowCount),
    cellStart: trimmed32(b.cellStart, cellCount),
    cellEnd: trimmed32(b.cellEnd, cellCount),
    cellFlags: trimmed8(b.cellFlags, cellCount),
    excluded: b.excluded,
  };
  return {
    end: bodyEnd,
    rows,
    rowProblems: b.problems,
    rowProblemRows: b.problemRows,
    rowsWithoutPipe: rowCount - b.rowsWithPipe,
    rowsWithPipe: b.rowsWithPipe,
  };
}

/**
 * Reads an ordinary row starting at `p` (`p < end`, not a blank, line break or `#`): bare cells, blanks,
 * at most one `|`, an optional comment. Records it and returns where it ends (a line break or `end`).
 * Returns -1 and records nothing when the row holds anything else — a quote, a second `|`, a cell that
 * may be `excluded` (eight characters starting with `e`) — or when the cell column is full: `readRow`
 * then reads the row from its start. The flags of its cells stay `CellFlag.None`, the zero every new
 * column starts with: not writing them spares a store per cell, and the memory pages of a column of
 * unquoted cells are never touched.
 */
function readPlainRow(b: RowsBuilder, source: string, p: number, end: number): number {
  const table = CLASS;
  const cellStart = b.cellStart;
  const cellEnd = b.cellEnd;
  const cellCap = b.cellCap;
  const row = b.rowCount;
  const first = b.cellCount;
  const rowFirst = p;
  let cell = first;
  let pipe = -1;
  let lastContentEnd = p;
  let kind = table[source.charCodeAt(p)]!;
  for (;;) {
    if (kind === 0) {
      // A bare cell: up to a blank, a line break, `|`, `#` or a quote. The test for a possible `excluded`
      // (eight characters, the first an `e`) reads the first character and compares on every cell, with
      // no short-circuit: a call or comparison the engine has not seen run before it optimises this
      // function would deoptimise it when first reached (the OR of two int32 values is 0 only when both
      // are).
      const s = p;
      const head = source.charCodeAt(s);
      kind = K_BREAK;
      while (++p < end) {
        const k = table[source.charCodeAt(p)]!;
        if (k !== 0) {
          kind = k;
          break;
        }
      }
      if (kind === K_QUOTE || cell === cellCap || ((p - s - 8) | (head - 101)) === 0) return -1;
      cellStart[cell] = s;
      cellEnd[cell] = p;
      cell++;
      lastContentEnd = p;
    } else if (kind === K_BLANK) {
      p++;
      kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
    } else if (kind === K_PIPE) {
      if (pipe >= 0) return -1;
      pipe = cell - first;
      lastContentEnd = p + 1;
      p++;
      kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
    } else if (kind === K_BREAK) {
      break;
    } else if (kind === K_HASH) {
      p = skipToLineEnd(source, p, end);
      break;
    } else {
      return -1;
    }
  }
  commitRow(b, row, rowFirst, lastContentEnd, pipe, cell);
  return p;
}

/**
 * `readPlainRow` over bytes: the same row, read from `bytes`, which holds the ASCII text of
 * `[base, limit)` one byte per character (so a byte's index plus `base` is the character's offset). An
 * element of a byte array is read several times faster than a character of a string (`charCodeAt` checks
 * the string's representation on every call), and the character loop is most of the scan. Returns -1,
 * recording nothing, for every row `readPlainRow` would give up and for a row that runs past `limit`
 * before `end` (the next chunk): the string readers then read it.
 */
function readPlainRowBytes(
  b: RowsBuilder,
  source: string,
  bytes: Uint8Array,
  base: number,
  p: number,
  limit: number,
  end: number,
): number {
  const table = CLASS;
  const cellStart = b.cellStart;
  const cellEnd = b.cellEnd;
  const cellCap = b.cellCap;
  const row = b.rowCount;
  const first = b.cellCount;
  // A row reaching `limit` ends there only when `limit` is the end of the table.
  const cut = limit < end;
  const rowFirst = p;
  let cell = first;
  let pipe = -1;
  let lastContentEnd = p;
  let kind = table[bytes[p - base]!]!;
  for (;;) {
    if (kind === 0) {
      // A bare cell, as in `readPlainRow`.
      const s = p;
      const head = bytes[s - base]!;
      kind = K_BREAK;
      while (++p < limit) {
        const k = table[bytes[p - base]!]!;
        if (k !== 0) {
          kind = k;
          break;
        }
      }
      if (kind === K_QUOTE || cell === cellCap || ((p - s - 8) | (head - 101)) === 0 || (p === limit && cut)) return -1;
      cellStart[cell] = s;
      cellEnd[cell] = p;
      cell++;
      lastContentEnd = p;
    } else if (kind === K_BLANK) {
      p++;
      if (p < limit) kind = table[bytes[p - base]!]!;
      else if (cut) return -1;
      else kind = K_BREAK;
    } else if (kind === K_PIPE) {
      if (pipe >= 0) return -1;
      pipe = cell - first;
      lastContentEnd = p + 1;
      p++;
      if (p < limit) kind = table[bytes[p - base]!]!;
      else if (cut) return -1;
      else kind = K_BREAK;
    } else if (kind === K_BREAK) {
      break;
    } else if (kind === K_HASH) {
      p = skipToLineEnd(source, p, end);
      break;
    } else {
      return -1;
    }
  }
  commitRow(b, row, rowFirst, lastContentEnd, pipe, cell);
  return p;
}

/**
 * Reads any row starting at `p` (`p < end`, not a blank, line break or `#`), with every problem in it,
 * records it and returns where it ends (a line break or `end`). The general reader behind
 * `readPlainRow`.
 */
function readRow(b: RowsBuilder, source: string, p: number, end: number): number {
  const table = CLASS;
  const problems = b.problems;
  const problemRows = b.problemRows;
  const row = b.rowCount;
  const firstCell = b.cellCount;
  let cellCount = firstCell;
  let pipe = -1;
  let lastContentEnd = p;
  let mark: ExcludedMark | undefined;
  let kind = table[source.charCodeAt(p)]!;
  b.rowStart[row] = p;
  for (;;) {
    if (kind === K_BLANK) {
      p++;
      kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
      continue;
    }
    if (kind === K_BREAK) break;
    if (kind === K_HASH) {
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
      problemRows.push(row);
      lastContentEnd = trimEnd(source, p, stop);
      p = stop;
      kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
      continue;
    }
    if (kind === K_PIPE) {
      if (pipe < 0) {
        pipe = cellCount - firstCell;
      } else {
        problems.push(problem("a second '|' in this row: a row has one '|' between factor and response columns", p, p + 1));
        problemRows.push(row);
      }
      lastContentEnd = p + 1;
      p++;
      kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
      continue;
    }
    if (cellCount === b.cellCap) {
      b.cellCount = cellCount;
      growCells(b);
    }
    if (kind === K_QUOTE) {
      const qEnd = scanQuoted(source, p, end);
      const terminated = lastQuotedTerminated;
      b.cellStart[cellCount] = p;
      b.cellEnd[cellCount] = qEnd;
      b.cellFlags[cellCount] = terminated ? CellFlag.Quoted : CellFlag.Quoted | CellFlag.Unterminated;
      cellCount++;
      if (!terminated) {
        problems.push(problem("unterminated quoted cell: add the closing '\"'", p, qEnd));
        problemRows.push(row);
      } else if (qEnd < end && !endsBareCell(source.charCodeAt(qEnd))) {
        // `"a"b`: report the glued characters and go on reading them as another cell. A run of glued
        // quoted cells (`""""…`) shares one end: start from the one already found, or a long run would
        // be rescanned once per cell (quadratic).
        let e = qEnd < b.glueEnd ? b.glueEnd : qEnd;
        while (e < end && !endsBareCell(source.charCodeAt(e))) e++;
        b.glueEnd = e;
        problems.push(problem("put a space after the closing quote: cells are separated by spaces or tabs", qEnd, e));
        problemRows.push(row);
      }
      lastContentEnd = qEnd;
      p = qEnd;
      kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
      continue;
    }
    // An unquoted cell: up to a blank, a line break, `|` or `#` (a quote inside it is stray). Its first
    // character is an ordinary one (every other class is handled above).
    const s = p;
    let strayQuote = -1;
    kind = K_BREAK;
    while (++p < end) {
      const k = table[source.charCodeAt(p)]!;
      if (k !== 0) {
        if (k !== K_QUOTE) {
          kind = k;
          break;
        }
        if (strayQuote < 0) strayQuote = p;
      }
    }
    if (strayQuote >= 0) {
      problems.push(
        problem(
          `stray '"' in cell '${source.slice(s, p)}': quote the whole cell ("...") and write \\" for a quote inside it`,
          strayQuote,
          strayQuote + 1,
        ),
      );
      problemRows.push(row);
    }
    if (p - s === 8 && isExcludedWord(source, s, p)) {
      // `excluded "reason"`: the reason must follow, quoted.
      let r = p;
      while (r < end && isBlank(source.charCodeAt(r))) r++;
      if (r < end && source.charCodeAt(r) === Char.Quote) {
        const qEnd = scanQuoted(source, r, end);
        const terminated = lastQuotedTerminated;
        if (!terminated) {
          problems.push(problem("unterminated excluded reason: add the closing '\"'", r, qEnd));
          problemRows.push(row);
        }
        const reason = { text: unquote(source.slice(r, qEnd), terminated), span: { start: r, end: qEnd } };
        mark = { span: { start: s, end: qEnd }, reason };
        p = qEnd;
        kind = p < end ? table[source.charCodeAt(p)]! : K_BREAK;
      } else {
        mark = { span: { start: s, end: p } };
        problems.push(problem('excluded needs a reason in quotes: excluded "why the run does not count"', s, p));
        problemRows.push(row);
      }
      b.excluded.set(row, mark);
      lastContentEnd = mark.span.end;
      continue;
    }
    b.cellStart[cellCount] = s;
    b.cellEnd[cellCount] = p;
    cellCount++;
    lastContentEnd = p;
  }
  b.rowEnd[row] = lastContentEnd;
  b.pipeCell[row] = pipe;
  if (pipe >= 0) b.rowsWithPipe++;
  b.cellCount = cellCount;
  b.rowCount = row + 1;
  b.cellOffset[row + 1] = cellCount;
  return p;
}

/** True when some cell of row `r` is a quoted cell without its closing quote. */
function rowHasUnterminatedCell(rows: RunRows, r: number): boolean {
  for (let i = rows.cellOffset[r]!; i < rows.cellOffset[r + 1]!; i++) {
    if ((rows.cellFlags[i]! & CellFlag.Unterminated) !== 0) return true;
  }
  return false;
}

/**
 * All problems of a scanned body in text order: the problems found inside each row, each followed by
 * that row's disagreement with the header about `|` (a row without `|` under a header with one, or the
 * other way round). A row whose quoted cell is unterminated swallowed its `|`: no second problem for it.
 */
export function runsBodyProblems(scan: RunsBodyScan, headerHasPipe: boolean): SyntaxProblem[] {
  const rows = scan.rows;
  const inRows = scan.rowProblems;
  const rowOf = scan.rowProblemRows;
  const mismatched = headerHasPipe ? scan.rowsWithoutPipe : scan.rowsWithPipe;
  if (mismatched === 0) return inRows.slice();
  const out: SyntaxProblem[] = [];
  let j = 0;
  for (let r = 0; r < rows.count; r++) {
    while (j < inRows.length && rowOf[j] === r) out.push(inRows[j++]!);
    const pipe = rows.pipeCell[r]!;
    if (pipe < 0) {
      if (headerHasPipe && rows.cellOffset[r + 1]! > rows.cellOffset[r]! && !rowHasUnterminatedCell(rows, r)) {
        out.push(
          problem(
            "missing '|' between factor and response columns: put '|' where the runs header has it",
            rows.rowStart[r]!,
            rows.rowEnd[r]!,
          ),
        );
      }
    } else if (!headerHasPipe) {
      out.push(
        problem(
          "this row has '|' but the runs header has none: add '|' before the response names in the header",
          rows.rowStart[r]!,
          rows.rowEnd[r]!,
        ),
      );
    }
  }
  while (j < inRows.length) out.push(inRows[j++]!);
  return out;
}

function skipToLineEnd(source: string, p: number, end: number): number {
  while (p < end) {
    const c = source.charCodeAt(p);
    if (c === Char.LF || c === Char.CR) break;
    p++;
  }
  return p;
}

function skipToCommentOrLineEnd(source: string, p: number, end: number): number {
  while (p < end) {
    const c = source.charCodeAt(p);
    if (c === Char.LF || c === Char.CR || c === Char.Hash) break;
    if (c === Char.Quote) {
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
    if (c === Char.Quote) {
      lastQuotedTerminated = true;
      return p + 1;
    }
    if (c === Char.LF || c === Char.CR) break;
    if (c === Char.Backslash && p + 1 < end) {
      const d = source.charCodeAt(p + 1);
      if (d !== Char.LF && d !== Char.CR) {
        p += 2;
        continue;
      }
    }
    p++;
  }
  lastQuotedTerminated = false;
  return p;
}

/** Records a row read by `readPlainRow` or `readPlainRowBytes`: its extent, its '|' and its last cell. */
function commitRow(b: RowsBuilder, row: number, rowFirst: number, lastContentEnd: number, pipe: number, cell: number): void {
  b.rowStart[row] = rowFirst;
  b.rowEnd[row] = lastContentEnd;
  b.pipeCell[row] = pipe;
  if (pipe >= 0) b.rowsWithPipe++;
  b.cellCount = cell;
  b.rowCount = row + 1;
  b.cellOffset[row + 1] = cell;
}
