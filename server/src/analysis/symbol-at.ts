/**
 * What the name or cell at an offset of a `.trial` file refers to: a factor, covariate, response or level
 * (at its declaration or at a use), a response value in a run row, a run id or a plan keyword. Editors use
 * it for hovers, go to definition, references and rename; it speaks offsets and names only.
 */
import type { Name, RunsTable, Span, TrialFile } from "../../../grammar/src/ast.js";
import { cellText, findRowAt } from "../../../grammar/src/runs-table.js";

/** A declared name: its kind and text (levels also carry their factor's name). */
export type SymbolKey =
  | { readonly kind: "factor" | "covariate" | "response"; readonly name: string }
  | { readonly kind: "level"; readonly factor: string; readonly name: string };

/** What sits at an offset. `declaration` is true where the name is declared rather than used. */
export type SymbolAt =
  | { readonly kind: "symbol"; readonly key: SymbolKey; readonly span: Span; readonly declaration: boolean }
  | { readonly kind: "value"; readonly response: string; readonly row: number; readonly span: Span }
  | { readonly kind: "run-id"; readonly row: number; readonly span: Span }
  | { readonly kind: "plan-keyword"; readonly keyword: string; readonly span: Span };

/** The role of a runs-table header column. */
export type ColumnKind = "id" | "factor" | "covariate" | "response" | "unknown";

const within = (span: Span | undefined, offset: number): span is Span => span !== undefined && span.start <= offset && offset <= span.end;

/** Whether `name` is a declared factor, covariate or response of the file (the first declaration wins). */
export function classifyName(file: TrialFile, name: string): "factor" | "covariate" | "response" | undefined {
  if (file.factors.some((f) => f.name?.text === name)) return "factor";
  if (file.covariates.some((c) => c.name?.text === name)) return "covariate";
  if (file.responses.some((r) => r.name?.text === name)) return "response";
  return undefined;
}

/** The role of header column `column` of the runs table (the same rules as the design builder). */
export function columnKind(file: TrialFile, table: RunsTable, column: number): ColumnKind {
  const name = table.columns[column];
  if (!name) return "unknown";
  if (column === 0 && name.text === "id" && !name.quoted) return "id";
  const kind = classifyName(file, name.text);
  if (column < table.responseStart) return kind === "factor" || kind === "covariate" ? kind : "unknown";
  return kind === "response" ? "response" : "unknown";
}

/**
 * The header column of the `k`-th cell of row `r`, or -1. With a `|` in both the header and the row, the
 * two sides are matched separately (as the design builder does), so a missing cell on the left does not
 * shift the responses.
 */
export function columnOfCell(table: RunsTable, r: number, k: number): number {
  const rows = table.rows;
  const n = rows.cellOffset[r + 1]! - rows.cellOffset[r]!;
  if (k < 0 || k >= n) return -1;
  const pipe = rows.pipeCell[r]!;
  if (pipe >= 0 && table.headerHasPipe) {
    if (k < pipe) return k < table.responseStart ? k : -1;
    const column = table.responseStart + (k - pipe);
    return column < table.columns.length ? column : -1;
  }
  return k < table.columns.length ? k : -1;
}

/** The index within row `r` of the cell containing `offset` (end inclusive), or -1. */
export function cellAt(table: RunsTable, r: number, offset: number): number {
  const rows = table.rows;
  const first = rows.cellOffset[r]!;
  const last = rows.cellOffset[r + 1]!;
  for (let c = first; c < last; c++) {
    if (rows.cellStart[c]! <= offset && offset <= rows.cellEnd[c]!) return c - first;
  }
  return -1;
}

/** What the name or cell at `offset` refers to, or undefined (white space, keywords, comments, text). */
export function symbolAt(file: TrialFile, offset: number): SymbolAt | undefined {
  const named = (kind: "factor" | "covariate" | "response", name: Name, declaration: boolean): SymbolAt => ({
    kind: "symbol",
    key: { kind, name: name.text },
    span: name.span,
    declaration,
  });
  const reference = (name: Name): SymbolAt | undefined => {
    const kind = classifyName(file, name.text);
    return kind ? named(kind, name, false) : undefined;
  };

  for (const f of file.factors) {
    if (!within(f.span, offset) || !f.name) continue;
    if (within(f.name.span, offset)) return named("factor", f.name, true);
    for (const level of f.levels) {
      if (within(level.name.span, offset)) return { kind: "symbol", key: { kind: "level", factor: f.name.text, name: level.name.text }, span: level.name.span, declaration: true };
    }
    if (f.control && within(f.control.span, offset)) return { kind: "symbol", key: { kind: "level", factor: f.name.text, name: f.control.text }, span: f.control.span, declaration: false };
    if (f.within && within(f.within.span, offset)) return reference(f.within);
  }
  for (const c of file.covariates) if (c.name && within(c.name.span, offset)) return named("covariate", c.name, true);
  for (const r of file.responses) if (r.name && within(r.name.span, offset)) return named("response", r.name, true);

  const plan = file.plan;
  if (plan && within(plan.span, offset)) {
    for (const s of plan.settings) {
      if (!within(s.span, offset)) continue;
      if (within(s.keywordSpan, offset)) return { kind: "plan-keyword", keyword: s.kind, span: s.keywordSpan };
      const names: Name[] = [];
      if (s.kind === "model") for (const t of s.terms) names.push(...t.names);
      if (s.kind === "pairwise" && s.term) names.push(...s.term.names);
      if (s.kind === "fraction") {
        if (s.generated) names.push(s.generated);
        if (s.generator) names.push(...s.generator.names);
      }
      if ((s.kind === "detect" || s.kind === "sigma") && s.response) names.push(s.response);
      for (const n of names) if (within(n.span, offset)) return reference(n);
    }
  }

  const table = file.runs;
  if (table && within(table.span, offset)) {
    for (let i = 0; i < table.columns.length; i++) {
      const column = table.columns[i]!;
      if (!within(column.span, offset)) continue;
      const kind = columnKind(file, table, i);
      return kind === "factor" || kind === "covariate" || kind === "response" ? named(kind, column, false) : undefined;
    }
    const r = findRowAt(table.rows, offset);
    if (r < 0) return undefined;
    const k = cellAt(table, r, offset);
    if (k < 0) return undefined;
    const cell = table.rows.cellOffset[r]! + k;
    const span = { start: table.rows.cellStart[cell]!, end: table.rows.cellEnd[cell]! };
    const column = columnOfCell(table, r, k);
    switch (columnKind(file, table, column)) {
      case "id":
        return { kind: "run-id", row: r, span };
      case "factor":
        return { kind: "symbol", key: { kind: "level", factor: table.columns[column]!.text, name: cellText(file.source, table.rows, cell) }, span, declaration: false };
      case "response":
        return { kind: "value", response: table.columns[column]!.text, row: r, span };
      default:
        return undefined;
    }
  }
  return undefined;
}
