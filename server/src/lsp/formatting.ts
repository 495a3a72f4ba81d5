/**
 * Formatting: the runs table is aligned in columns (the `|` set off by one space, other columns by two),
 * plan settings are indented by two spaces and trailing white space is removed outside text blocks.
 * Only white space ever changes: every cell, name, value, `excluded` mark and comment keeps its exact
 * text, and rows keep their order. Range formatting applies the same whole-table layout to the lines in
 * the range only, so formatting a range and then the rest gives the same result as formatting everything.
 */
import type { Span, TrialFile } from "../../../grammar/src/ast.js";
import type { LineIndex } from "../../../grammar/src/line-index.js";
import type { FormattingOptions, Range, TextEdit } from "vscode-languageserver";
import { codePointLength } from "../text/align-columns.js";
import { rangeToSpan, spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** A replacement of `span` by `text`, in offsets. */
export interface OffsetEdit {
  readonly span: Span;
  readonly text: string;
}

/** Edits formatting the whole document. */
export function formatDocument(doc: AnalyzedDocument, _options?: FormattingOptions): TextEdit[] {
  return toTextEdits(doc, formattingEdits(doc.file, doc.lineIndex));
}

/** Edits formatting the lines that intersect `range`. */
export function formatRange(doc: AnalyzedDocument, range: Range, _options?: FormattingOptions): TextEdit[] {
  return toTextEdits(doc, formattingEdits(doc.file, doc.lineIndex, rangeToSpan(doc.lineIndex, range)));
}

function toTextEdits(doc: AnalyzedDocument, edits: readonly OffsetEdit[]): TextEdit[] {
  return edits.map((e) => ({ range: spanToRange(doc.lineIndex, e.span), newText: e.text }));
}

/**
 * The formatting edits of a parsed file as offset edits, one per changed line, in document order. With
 * `limit`, only lines intersecting it are edited. Lines whose content the parser could not fully account
 * for (stray text after a row, an unterminated quote) are left alone.
 */
export function formattingEdits(file: TrialFile, index: LineIndex, limit?: Span): OffsetEdit[] {
  const source = file.source;
  const lines = new Map<number, string>();
  layoutRunsTable(file, index, lines);
  indentPlan(file, index, lines);

  const protectedLines = textBlockLines(file, index);
  const edits: OffsetEdit[] = [];
  for (let line = 0; line < index.lineCount; line++) {
    const start = index.offsetAt({ line, character: 0 });
    const end = index.offsetAt({ line, character: Number.MAX_SAFE_INTEGER });
    if (limit && (end < limit.start || start > limit.end)) continue;
    const current = source.slice(start, end);
    let wanted = lines.get(line);
    if (wanted === undefined) {
      if (protectedLines.has(line)) continue;
      wanted = trimBlanksEnd(current);
    }
    if (wanted !== current) edits.push({ span: { start, end }, text: wanted });
  }
  return edits;
}

/**
 * The text without trailing spaces and tabs. A loop, not `/[ \t]+$/`: that regular expression retries
 * from every blank of a long inner run of blanks, which is quadratic (seconds for one 10,000-character
 * line).
 */
function trimBlanksEnd(text: string): string {
  let end = text.length;
  while (end > 0 && (text.charCodeAt(end - 1) === 32 || text.charCodeAt(end - 1) === 9)) end--;
  return end === text.length ? text : text.slice(0, end);
}

/** Lines that belong to a `"""` text block (their white space is the user's text). */
function textBlockLines(file: TrialFile, index: LineIndex): Set<number> {
  const out = new Set<number>();
  for (const d of file.declarations) {
    if ((d.kind === "conjecture" || d.kind === "conclusion") && d.body) {
      const a = index.positionAt(d.body.span.start).line;
      const b = index.positionAt(d.body.span.end).line;
      for (let l = a; l <= b; l++) out.add(l);
    }
  }
  // Quoted strings left open also make their line's end the user's text.
  for (const p of file.problems) if (/unterminated/.test(p.message)) out.add(index.positionAt(p.span.start).line);
  return out;
}

/** Plan settings that start their line get an indentation of exactly two spaces. */
function indentPlan(file: TrialFile, index: LineIndex, lines: Map<number, string>): void {
  for (const s of file.plan?.settings ?? []) {
    const pos = index.positionAt(s.span.start);
    const start = s.span.start - pos.character;
    if (file.source.slice(start, s.span.start).trim() !== "") continue;
    const end = index.offsetAt({ line: pos.line, character: Number.MAX_SAFE_INTEGER });
    if (!lines.has(pos.line)) lines.set(pos.line, "  " + trimBlanksEnd(file.source.slice(s.span.start, end)));
  }
}

interface TableLine {
  readonly line: number;
  /** Cells of the grid: lead, left cells, separator (or ""), right cells. */
  readonly grid: string[];
  /** `excluded "..."` and/or `# comment` after the cells, joined by two spaces; "" when none. */
  readonly tail: string;
}

/** Lays out the header and every row of the runs table into `lines` (line number → new content). */
function layoutRunsTable(file: TrialFile, index: LineIndex, lines: Map<number, string>): void {
  const table = file.runs;
  if (!table) return;
  const source = file.source;
  const rows = table.rows;
  const keywordLine = index.positionAt(table.keywordSpan.start).line;
  const lineEnd = (line: number) => index.offsetAt({ line, character: Number.MAX_SAFE_INTEGER });
  const lineStart = (line: number) => index.offsetAt({ line, character: 0 });

  // What follows the last known item of a line must be nothing or a comment; anything else (stray text)
  // means the line is not fully understood, and it is left alone.
  const tailOf = (line: number, after: number): string | undefined => {
    const rest = source.slice(after, lineEnd(line)).trim();
    return rest === "" || rest.startsWith("#") ? rest : undefined;
  };

  const hasPipe = table.headerHasPipe;
  let leftWidth = table.responseStart;
  let rightWidth = table.columns.length - table.responseStart;
  const pending: { line: number; left: string[]; right: string[]; lead: string; tail: string; pipe: boolean }[] = [];

  // Header: `runs` then the columns, with `|` between the two sides.
  if (source.slice(lineStart(keywordLine), table.keywordSpan.start).trim() === "") {
    const last = table.columns[table.columns.length - 1];
    let after = last ? last.span.end : table.keywordSpan.end;
    if (hasPipe) {
      const k = source.indexOf("|", table.responseStart > 0 ? table.columns[table.responseStart - 1]!.span.end : table.keywordSpan.end);
      if (k >= 0 && k < lineEnd(keywordLine)) after = Math.max(after, k + 1);
    }
    const tail = tailOf(keywordLine, after);
    const sameLine = table.columns.every((c) => index.positionAt(c.span.start).line === keywordLine);
    if (tail !== undefined && sameLine) {
      const raw = table.columns.map((c) => source.slice(c.span.start, c.span.end));
      pending.push({ line: keywordLine, lead: source.slice(table.keywordSpan.start, table.keywordSpan.end), left: raw.slice(0, table.responseStart), right: raw.slice(table.responseStart), tail, pipe: hasPipe });
    }
  }

  for (let r = 0; r < rows.count; r++) {
    const line = index.positionAt(rows.rowStart[r]!).line;
    const first = rows.cellOffset[r]!;
    const n = rows.cellOffset[r + 1]! - first;
    const raw: string[] = [];
    let unterminated = false;
    for (let k = 0; k < n; k++) {
      raw.push(source.slice(rows.cellStart[first + k]!, rows.cellEnd[first + k]!));
      if (rows.cellFlags[first + k]! & 2) unterminated = true;
    }
    if (unterminated) continue;
    const mark = rows.excluded.get(r);
    const comment = tailOf(line, rows.rowEnd[r]!);
    if (comment === undefined) continue;
    // The text between the cells must be white space and at most one `|`; otherwise leave the row alone.
    const pipe = rows.pipeCell[r]!;
    const cellsEnd = n > 0 ? rows.cellEnd[first + n - 1]! : rows.rowStart[r]!;
    let between = "";
    let prev = rows.rowStart[r]!;
    for (let k = 0; k < n; k++) {
      between += source.slice(prev, rows.cellStart[first + k]!);
      prev = rows.cellEnd[first + k]!;
    }
    between += source.slice(prev, mark ? mark.span.start : rows.rowEnd[r]!);
    if (between.replace(/[\s|]/g, "") !== "" || (between.match(/\|/g)?.length ?? 0) !== (pipe >= 0 ? 1 : 0)) continue;
    if (mark && source.slice(cellsEnd, mark.span.start).replace(/[\s|]/g, "") !== "") continue;
    // Stray text after the excluded reason (a `syntax` problem) is part of the row but not of the mark.
    if (mark && source.slice(mark.span.end, rows.rowEnd[r]!).trim() !== "") continue;
    const markText = mark ? source.slice(mark.span.start, mark.span.end) : "";
    const tail = [markText, comment].filter((t) => t !== "").join("  ");
    let left: string[];
    let right: string[];
    let rowPipe: boolean;
    if (pipe >= 0 && hasPipe) {
      left = raw.slice(0, pipe);
      right = raw.slice(pipe);
      rowPipe = true;
    } else if (hasPipe) {
      // No `|` in the row: the builder matches cells by position, so place them under those columns.
      left = raw.slice(0, table.responseStart);
      right = raw.slice(table.responseStart);
      rowPipe = false;
    } else if (pipe >= 0) {
      left = raw;
      right = [];
      rowPipe = false;
      // A `|` in a row of a header without one: keep it where it is written, as a cell of its own.
      left.splice(pipe, 0, "|");
    } else {
      left = raw;
      right = [];
      rowPipe = false;
    }
    leftWidth = Math.max(leftWidth, left.length);
    rightWidth = Math.max(rightWidth, right.length);
    pending.push({ line, lead: "", left, right, tail, pipe: rowPipe });
  }

  const grids: TableLine[] = pending.map((p) => {
    const left = [...p.left];
    while (left.length < leftWidth && (p.right.length > 0 || p.pipe)) left.push("");
    const grid = [p.lead, ...left];
    if (hasPipe) grid.push(p.pipe ? "|" : "", ...p.right);
    else grid.push(...p.right);
    return { line: p.line, grid, tail: p.tail };
  });
  const separator = hasPipe ? 1 + leftWidth : -1;
  const widths: number[] = [];
  for (const g of grids) g.grid.forEach((cell, c) => (widths[c] = Math.max(widths[c] ?? 0, codePointLength(cell))));
  const render = (grid: readonly string[]) => {
    let out = "";
    grid.forEach((cell, c) => {
      if (c > 0) out += c === separator || c - 1 === separator ? " " : "  ";
      out += cell + " ".repeat((widths[c] ?? 0) - codePointLength(cell));
    });
    // Only the padding spaces: `trimEnd` would also strip a cell's own trailing characters that JavaScript
    // counts as white space (a vertical tab or NBSP ending the last cell: found by the nothing-lost fuzzer).
    let end = out.length;
    while (end > 0 && out.charCodeAt(end - 1) === 32) end--;
    return out.slice(0, end);
  };
  const full = grids.length > 0 ? Math.max(...grids.map((g) => codePointLength(render(g.grid)))) : 0;
  for (const g of grids) {
    const body = render(g.grid);
    lines.set(g.line, g.tail === "" ? body : body + " ".repeat(full - codePointLength(body) + 2) + g.tail);
  }
}
