/**
 * Code actions: declare an unknown level, add pending `?` rows for every missing replicate (seeded random
 * positions, existing rows never reordered), set `replicates` to the smallest value reaching the power
 * target (`low-power`), write the randomized run sheet (on `runs`, or on `plan` when there is no runs
 * table), and mark a run excluded (with a snippet for the reason) or restore it.
 */
import type { Span, TrialFile } from "../../../grammar/src/ast.js";
import { findRowAt } from "../../../grammar/src/runs-table.js";
import type { Diagnostic } from "../analysis/diagnostics.js";
import { planMissingReplicateRuns } from "../analysis/missing-replicate-runs.js";
import { symbolAt } from "../analysis/symbol-at.js";
import { type CodeAction, CodeActionKind, type CodeActionParams, type Diagnostic as LspDiagnostic, type TextEdit, type WorkspaceEdit } from "vscode-languageserver";
import { codePointLength } from "../text/align-columns.js";
import { rangeToSpan, spanToRange, toLspDiagnostic } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";
import { nameToSource } from "./name-text.js";
import { runSheetOf } from "./run-sheet-request.js";

/** What the client can apply. */
export interface CodeActionCapabilities {
  /** The client accepts snippet text edits in workspace edits (LSP 3.18 `snippetEditSupport`). */
  readonly snippetEdits: boolean;
}

/** The code actions for a range. */
export function codeActions(doc: AnalyzedDocument, params: CodeActionParams, caps: CodeActionCapabilities): CodeAction[] {
  const span = rangeToSpan(doc.lineIndex, params.range);
  const touching = doc.analysis.diagnostics.filter((d) => d.span.start <= span.end && span.start <= d.span.end);
  const actions: CodeAction[] = [];
  const only = params.context.only;
  const wants = (kind: string) => !only || only.some((k) => kind === k || kind.startsWith(`${k}.`));

  if (wants(CodeActionKind.QuickFix)) {
    const seen = new Set<string>();
    for (const d of touching.filter((x) => x.code === "unknown-level")) {
      const action = declareLevel(doc, d);
      if (action && !seen.has(action.title)) {
        seen.add(action.title);
        actions.push(action);
      }
    }
    // Offered on a missing-replicate or empty-cell diagnostic, and anywhere in the runs table while one exists.
    const isGap = (d: Diagnostic) => d.code === "missing-replicate" || d.code === "empty-cell";
    const runs = doc.analysis.file.runs;
    const inTable = runs !== undefined && runs.span.start <= span.start && span.start <= runs.span.end;
    const gap = touching.find(isGap) ?? (inTable ? doc.analysis.diagnostics.find(isGap) : undefined);
    if (gap) {
      const action = addMissingRuns(doc, gap);
      if (action) actions.push(action);
    }
    const lowPower = touching.find((d) => d.code === "low-power");
    if (lowPower) {
      const action = setReplicatesForPower(doc, lowPower);
      if (action) actions.push(action);
    }
  }
  if (wants(CodeActionKind.RefactorRewrite)) {
    const sheet = writeRunSheet(doc, span);
    if (sheet) actions.push(sheet);
    const action = toggleExcluded(doc, span.start, caps);
    if (action) actions.push(action);
  }
  return actions;
}

function lspDiagnostic(doc: AnalyzedDocument, d: Diagnostic): LspDiagnostic {
  return toLspDiagnostic(d, doc.lineIndex, doc.uri);
}

function edit(doc: AnalyzedDocument, edits: TextEdit[]): WorkspaceEdit {
  return { changes: { [doc.uri]: edits } };
}

/** `unknown-level` on a run cell: append the level to its factor's `levels` list. */
function declareLevel(doc: AnalyzedDocument, d: Diagnostic): CodeAction | undefined {
  const { file } = doc.analysis;
  const found = symbolAt(file, d.span.start);
  if (!found || found.kind !== "symbol" || found.key.kind !== "level") return undefined;
  const { factor, name } = found.key;
  if (name === "?" || name.trim() === "") return undefined;
  const decl = file.factors.find((f) => f.name?.text === factor);
  if (!decl || !decl.name) return undefined;
  const last = decl.levels[decl.levels.length - 1];
  const text = nameToSource(name, true);
  const change: TextEdit = last
    ? { range: spanToRange(doc.lineIndex, { start: last.name.span.end, end: last.name.span.end }), newText: `, ${text}` }
    : { range: spanToRange(doc.lineIndex, { start: decl.name.span.end, end: decl.name.span.end }), newText: ` levels ${text}` };
  return {
    title: `Declare '${name}' as a level of factor '${factor}'`,
    kind: CodeActionKind.QuickFix,
    diagnostics: [lspDiagnostic(doc, d)],
    isPreferred: true,
    edit: edit(doc, [change]),
  };
}

/** `missing-replicate` or `empty-cell`: insert `?` rows for every missing replicate of every cell. */
function addMissingRuns(doc: AnalyzedDocument, d: Diagnostic): CodeAction | undefined {
  const { file, design } = doc.analysis;
  const table = file.runs;
  if (!table) return undefined;
  const plan = planMissingReplicateRuns(design);
  if (!plan.ok) return undefined;

  const layout = rowLayout(doc, file);
  const idColumn = table.columns[0]?.text === "id" && !table.columns[0].quoted;
  const ids = newRunIds(design.runs.ids, plan.runs.length);
  const cellFactorOfColumn = new Map<string, number>();
  design.cellFactors.forEach((f, i) => cellFactorOfColumn.set(design.factors[f]!.name, i));

  const edits: TextEdit[] = [];
  const rows = table.rows;
  // Group by insertion point so each point gets one edit, in the planned order.
  let i = 0;
  while (i < plan.runs.length) {
    const before = plan.runs[i]!.beforeRow;
    const lines: string[] = [];
    while (i < plan.runs.length && plan.runs[i]!.beforeRow === before) {
      const run = plan.runs[i]!;
      const cells = table.columns.map((column, c) => {
        if (c === 0 && idColumn) return ids[i]!;
        if (c >= table.responseStart) return "?";
        const slot = cellFactorOfColumn.get(column.text);
        if (slot === undefined) return "?";
        const factor = design.factors[design.cellFactors[slot]!]!;
        return nameToSource(factor.levels[run.levels[slot]!]!.name, true);
      });
      lines.push(layout(cells));
      i++;
    }
    const eol = doc.text.includes("\r\n") ? "\r\n" : "\n";
    if (before < rows.count) {
      const at = lineStartOf(doc, rows.rowStart[before]!);
      edits.push({ range: spanToRange(doc.lineIndex, { start: at, end: at }), newText: lines.map((l) => l + eol).join("") });
    } else {
      const anchor = rows.count > 0 ? rows.rowStart[rows.count - 1]! : table.keywordSpan.start;
      const end = lineEndOf(doc, anchor);
      edits.push({ range: spanToRange(doc.lineIndex, { start: end, end }), newText: lines.map((l) => eol + l).join("") });
    }
  }
  const n = plan.runs.length;
  return {
    title: `Add ${n} pending run${n === 1 ? "" : "s"} for the missing replicates (random order, seed ${plan.seed}${plan.seedFromFile ? "" : ": the plan has no seed"})`,
    kind: CodeActionKind.QuickFix,
    diagnostics: [lspDiagnostic(doc, d)],
    edit: edit(doc, edits),
  };
}

/**
 * `low-power`: set `plan replicates` to the smallest count at which every main effect of every response with
 * `detect` reaches the power target, i.e. the largest `replicatesNeeded` of the analysis' power results.
 * Replaces the number of `replicates N` (its span is `design.planSpans.replicates`), or adds the setting as
 * the plan's first line when the plan has none.
 */
function setReplicatesForPower(doc: AnalyzedDocument, d: Diagnostic): CodeAction | undefined {
  const { file, design, responses } = doc.analysis;
  const plan = file.plan;
  if (!plan) return undefined;
  let needed = 0;
  for (const r of responses) for (const p of r.power ?? []) if (p.replicatesNeeded !== null) needed = Math.max(needed, p.replicatesNeeded);
  if (needed < 1 || needed === design.settings.replicates) return undefined;
  let change: TextEdit;
  const at = design.planSpans?.replicates;
  const setting = [...plan.settings].reverse().find((x) => x.kind === "replicates");
  if (at && setting) {
    const hasNumber = setting.kind === "replicates" && setting.value !== undefined && setting.value.span.start === at.start && setting.value.span.end === at.end;
    change = { range: spanToRange(doc.lineIndex, at), newText: hasNumber ? String(needed) : `replicates ${needed}` };
  } else {
    const eol = doc.text.includes("\r\n") ? "\r\n" : "\n";
    const first = plan.settings[0];
    if (first) {
      const lineStart = lineStartOf(doc, first.span.start);
      const indent = doc.text.slice(lineStart, first.span.start);
      const clean = /^[ \t]*$/.test(indent) ? indent : "  ";
      change = { range: spanToRange(doc.lineIndex, { start: lineStart, end: lineStart }), newText: `${clean}replicates ${needed}${eol}` };
    } else {
      const end = plan.keywordSpan.end;
      change = { range: spanToRange(doc.lineIndex, { start: end, end }), newText: `${eol}  replicates ${needed}` };
    }
  }
  return {
    title: `Set replicates to ${needed} (the smallest count reaching power ${design.settings.power} for every term)`,
    kind: CodeActionKind.QuickFix,
    diagnostics: [lspDiagnostic(doc, d)],
    isPreferred: true,
    edit: edit(doc, [change]),
  };
}

/**
 * "Write Run Sheet" on the `runs` keyword, or on the `plan` keyword of a file with no runs table: the
 * planner's edits (planning/run-sheet.ts, converted to LSP edits by run-sheet-request.ts). Not offered when
 * the file cannot be planned or the run sheet is already complete.
 */
function writeRunSheet(doc: AnalyzedDocument, span: Span): CodeAction | undefined {
  const { file } = doc.analysis;
  const touches = (s: Span) => s.start <= span.end && span.start <= s.end;
  const anchor = file.runs ? file.runs.keywordSpan : file.plan?.keywordSpan;
  if (!anchor || !touches(anchor)) return undefined;
  const sheet = runSheetOf(doc, false);
  if (!sheet.ok || sheet.edits.length === 0) return undefined;
  return { title: "Write Run Sheet", kind: CodeActionKind.RefactorRewrite, edit: edit(doc, [...sheet.edits]) };
}

/** Mark the run at `offset` excluded (snippet for the reason), or restore it when it already is. */
function toggleExcluded(doc: AnalyzedDocument, offset: number, caps: CodeActionCapabilities): CodeAction | undefined {
  const table = doc.analysis.file.runs;
  if (!table) return undefined;
  const rows = table.rows;
  let r = findRowAt(rows, offset);
  if (r < 0) {
    // A cursor before the first cell of a row (in its indentation) still means that row.
    const lineEnd = lineEndOf(doc, offset);
    const next = findRowAt(rows, lineEnd);
    if (next >= 0 && rows.rowStart[next]! >= offset) r = next;
  }
  if (r < 0) return undefined;
  const id = doc.analysis.design.runs.ids[r] ?? String(r + 1);
  const mark = rows.excluded.get(r);
  if (mark) {
    const lastCell = rows.cellOffset[r + 1]! - 1;
    const from = lastCell >= rows.cellOffset[r]! ? Math.max(rows.cellEnd[lastCell]!, lastPipeBefore(doc.text, rows.rowStart[r]!, mark.span.start)) : mark.span.start;
    return {
      title: `Restore run ${id} (remove 'excluded')`,
      kind: CodeActionKind.RefactorRewrite,
      edit: edit(doc, [{ range: spanToRange(doc.lineIndex, { start: from, end: mark.span.end }), newText: "" }]),
    };
  }
  const at = rows.rowEnd[r]!;
  const range = spanToRange(doc.lineIndex, { start: at, end: at });
  const workspaceEdit: WorkspaceEdit = caps.snippetEdits
    ? {
        documentChanges: [
          { textDocument: { uri: doc.uri, version: doc.version }, edits: [{ range, snippet: { kind: "snippet", value: '  excluded "${1:reason}"' } }] },
        ],
      }
    : edit(doc, [{ range, newText: '  excluded "reason"' }]);
  return { title: `Mark run ${id} excluded (with a reason)`, kind: CodeActionKind.RefactorRewrite, edit: workspaceEdit };
}

/** The offset just after a `|` between `from` and `to` (a row whose last item is the pipe), or -1. */
function lastPipeBefore(text: string, from: number, to: number): number {
  const k = text.lastIndexOf("|", to);
  return k >= from ? k + 1 : -1;
}

function lineStartOf(doc: AnalyzedDocument, offset: number): number {
  const p = doc.lineIndex.positionAt(offset);
  return doc.lineIndex.offsetAt({ line: p.line, character: 0 });
}

function lineEndOf(doc: AnalyzedDocument, offset: number): number {
  const p = doc.lineIndex.positionAt(offset);
  return doc.lineIndex.offsetAt({ line: p.line, character: Number.MAX_SAFE_INTEGER });
}

/**
 * A function laying out a new row like the table's last row (or its header): each cell starts at the same
 * column as the template's, with at least two spaces between cells and the `|` at the template's place.
 */
function rowLayout(doc: AnalyzedDocument, file: TrialFile): (cells: readonly string[]) => string {
  const table = file.runs!;
  const rows = table.rows;
  const starts: number[] = [];
  let pipeColumn = -1;
  const column = (offset: number) => doc.lineIndex.positionAt(offset).character;
  if (rows.count > 0) {
    const r = rows.count - 1;
    for (let c = rows.cellOffset[r]!; c < rows.cellOffset[r + 1]!; c++) starts.push(column(rows.cellStart[c]!));
    const pipe = rows.pipeCell[r]!;
    if (pipe >= 0) {
      const before = pipe > 0 ? rows.cellEnd[rows.cellOffset[r]! + pipe - 1]! : rows.rowStart[r]!;
      const k = doc.text.indexOf("|", before);
      if (k >= 0) pipeColumn = column(k);
      starts.splice(pipe, 0, -1);
    }
  }
  if (starts.length !== table.columns.length + (table.headerHasPipe ? 1 : 0)) {
    starts.length = 0;
    const header = table.columns.map((c) => column(c.span.start));
    const first = header[0] ?? 6;
    // Rows sit under the header's columns; the header's first column is after the `runs` keyword.
    for (let c = 0; c < header.length; c++) {
      if (table.headerHasPipe && c === table.responseStart) starts.push(-1);
      starts.push(header[c] ?? first);
    }
    if (table.headerHasPipe && table.responseStart === header.length) starts.push(-1);
    pipeColumn = -1;
  }
  return (cells) => {
    const parts: string[] = [];
    let width = 0;
    const put = (text: string, at: number, gap: number) => {
      const pad = at >= 0 ? Math.max(width === 0 ? 0 : gap, at - width) : width === 0 ? 0 : gap;
      parts.push(" ".repeat(pad), text);
      width += pad + codePointLength(text);
    };
    let cell = 0;
    for (let s = 0; s < starts.length && cell < cells.length; s++) {
      if (starts[s] === -1) put("|", pipeColumn, 1);
      else put(cells[cell++]!, starts[s]!, starts[s - 1] === -1 ? 1 : 2);
    }
    while (cell < cells.length) put(cells[cell++]!, -1, 2);
    return parts.join("");
  };
}

/**
 * `count` new run ids continuing the file's pattern (`r20` → `r21`, keeping zero padding), skipping ids
 * already used.
 */
export function newRunIds(existing: readonly string[], count: number): string[] {
  let prefix = "r";
  let width = 2;
  // BigInt: an id's number may have more digits than a double holds (400 nines made "rInfinity").
  let max = 0n;
  for (const id of existing) {
    const m = /^(.*?)(\d+)$/.exec(id);
    if (!m) continue;
    const value = BigInt(m[2]!);
    if (value >= max) {
      max = value;
      prefix = m[1]!;
      width = m[2]!.length;
    }
  }
  const used = new Set(existing);
  const out: string[] = [];
  for (let n = max + 1n; out.length < count; n++) {
    const id = `${prefix}${String(n).padStart(width, "0")}`;
    if (!used.has(id)) out.push(id);
  }
  return out;
}

export type { Span };
