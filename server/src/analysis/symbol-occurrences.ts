/**
 * Every place a declared name occurs in a `.trial` file: declarations, `within` and `control`, model,
 * pairwise, fraction and detect settings, the runs header and (for levels) every cell of the factor's
 * column. Rename, references and go to definition are built on it.
 */
import type { Name, Span, TrialFile } from "../../../grammar/src/ast.js";
import { cellText, isPendingCell } from "../../../grammar/src/runs-table.js";
import { classifyName, columnOfCell, type SymbolKey } from "./symbol-at.js";

/** One occurrence of a name. `declaration` marks where it is declared; `cell` marks a runs-table cell. */
export interface Occurrence {
  readonly span: Span;
  readonly declaration: boolean;
  readonly cell: boolean;
}

/** The occurrences of `key` in file order; the first declaration (if any) is the definition. */
export function symbolOccurrences(file: TrialFile, key: SymbolKey): Occurrence[] {
  const out: Occurrence[] = [];
  const add = (span: Span, declaration = false, cell = false) => out.push({ span, declaration, cell });
  if (key.kind === "level") {
    collectLevel(file, key.factor, key.name, add);
  } else {
    collectName(file, key.kind, key.name, add);
  }
  return out.sort((a, b) => a.span.start - b.span.start);
}

/** The span where `key` is declared (its first declaration), or undefined when it is not declared. */
export function symbolDefinition(file: TrialFile, key: SymbolKey): Span | undefined {
  if (key.kind === "level") {
    for (const f of file.factors) {
      if (f.name?.text !== key.factor) continue;
      const level = f.levels.find((l) => l.name.text === key.name);
      if (level) return level.name.span;
    }
    return undefined;
  }
  const decls = key.kind === "factor" ? file.factors : key.kind === "covariate" ? file.covariates : file.responses;
  return decls.find((d) => d.name?.text === key.name)?.name?.span;
}

type Add = (span: Span, declaration?: boolean, cell?: boolean) => void;

function collectName(file: TrialFile, kind: "factor" | "covariate" | "response", name: string, add: Add): void {
  const decls = kind === "factor" ? file.factors : kind === "covariate" ? file.covariates : file.responses;
  for (const d of decls) if (d.name?.text === name) add(d.name.span, true);
  const isUse = (n: Name | undefined): n is Name => n !== undefined && n.text === name && classifyName(file, n.text) === kind;
  if (kind === "factor") for (const f of file.factors) if (isUse(f.within)) add(f.within.span);
  for (const s of file.plan?.settings ?? []) {
    const names: (Name | undefined)[] = [];
    if (s.kind === "model") for (const t of s.terms) names.push(...t.names);
    if (s.kind === "pairwise") names.push(...(s.term?.names ?? []));
    if (s.kind === "fraction") names.push(s.generated, ...(s.generator?.names ?? []));
    if (s.kind === "detect" || s.kind === "sigma") names.push(s.response);
    for (const n of names) if (isUse(n)) add(n.span);
  }
  for (const c of file.runs?.columns ?? []) if (isUse(c)) add(c.span);
}

function collectLevel(file: TrialFile, factor: string, level: string, add: Add): void {
  for (const f of file.factors) {
    if (f.name?.text !== factor) continue;
    for (const l of f.levels) if (l.name.text === level) add(l.name.span, true);
    if (f.control?.text === level) add(f.control.span);
  }
  const table = file.runs;
  if (!table) return;
  const column = table.columns.findIndex((c, i) => i < table.responseStart && c.text === factor);
  if (column < 0) return;
  const rows = table.rows;
  for (let r = 0; r < rows.count; r++) {
    const first = rows.cellOffset[r]!;
    const n = rows.cellOffset[r + 1]! - first;
    // The factor's cell is usually at index `column`; rows with a misplaced '|' are mapped like the builder.
    let k = column < n && columnOfCell(table, r, column) === column ? column : -1;
    if (k < 0) for (let j = 0; j < n; j++) if (columnOfCell(table, r, j) === column) k = j;
    if (k < 0) continue;
    const cell = first + k;
    if (isPendingCell(file.source, rows, cell)) continue;
    if (cellText(file.source, rows, cell) === level) add({ start: rows.cellStart[cell]!, end: rows.cellEnd[cell]! }, false, true);
  }
}
