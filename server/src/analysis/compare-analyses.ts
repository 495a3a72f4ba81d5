/**
 * What changed between two revisions of a `.trial` file: the runs (by run id), and for every response the
 * verdicts of the model terms, the level means and p-values, and the power when the analysis reports it.
 * Pure: it reads two `DocumentAnalysis` values and returns plain data; the faces format it (CLI text,
 * Markdown for a pull-request comment, the editor's comparison view).
 */
import { LineIndex } from "../../../grammar/src/line-index.js";
import type { DocumentAnalysis, ResponseAnalysis } from "./results.js";
import { runRowCells } from "./run-row-cells.js";

/** One cell that differs between the two revisions of a run. `undefined` where the column is absent. */
export interface CellChange {
  readonly column: string;
  readonly before: string | undefined;
  readonly after: string | undefined;
}

/** A run added, removed or edited. Lines are 1-based, in the revision where the run exists. */
export interface RunChange {
  readonly id: string;
  readonly kind: "added" | "removed" | "edited";
  readonly lineBefore?: number;
  readonly lineAfter?: number;
  /** For `edited`: the cells that differ, including the `excluded` mark (column `excluded`). */
  readonly cells: readonly CellChange[];
}

/** The test of one model term before and after. Significance is judged at each revision's own alpha. */
export interface TermChange {
  readonly term: string;
  /** `both` when the term is tested in both revisions; otherwise where it is only tested. */
  readonly presence: "both" | "before" | "after";
  readonly pBefore: number | null;
  readonly pAfter: number | null;
  readonly fBefore: number | null;
  readonly fAfter: number | null;
  /** null where no test was possible. */
  readonly significantBefore: boolean | null;
  readonly significantAfter: boolean | null;
  /** True when both verdicts exist and differ. */
  readonly flipped: boolean;
  /** True when the p-value differs beyond rounding noise (or appears or disappears). */
  readonly pMoved: boolean;
}

/** A level (or cell) mean before and after: the effect estimates of the analysis. */
export interface MeanChange {
  readonly term: string;
  readonly level: string;
  readonly meanBefore: number | null;
  readonly meanAfter: number | null;
  readonly nBefore: number | null;
  readonly nAfter: number | null;
  /** After minus before; null when either is missing. */
  readonly shift: number | null;
  /** True when the mean differs beyond rounding noise (or appears or disappears). */
  readonly moved: boolean;
}

/** Power of one test before and after, as the `power` key of the results reports it (when it exists). */
export interface PowerChange {
  /** The term or label the power belongs to ("" for a single value). */
  readonly label: string;
  readonly before: number | null;
  readonly after: number | null;
}

/** Everything that changed for one response. */
export interface ResponseComparison {
  readonly name: string;
  readonly presence: "both" | "before" | "after";
  readonly nBefore: number | null;
  readonly nAfter: number | null;
  readonly alphaBefore: number | null;
  readonly alphaAfter: number | null;
  /** Every term of either revision, in the newer model order then removed terms. */
  readonly terms: readonly TermChange[];
  /** Every level mean of either revision. */
  readonly means: readonly MeanChange[];
  /**
   * Power before and after; `available` is false when neither revision's results carry a `power` key
   * (the power analysis is not part of every build), so faces can say so instead of showing nothing.
   */
  readonly power: { readonly available: boolean; readonly changes: readonly PowerChange[] };
}

/** The comparison of two revisions. */
export interface AnalysisComparison {
  readonly runs: {
    readonly added: readonly RunChange[];
    readonly removed: readonly RunChange[];
    readonly edited: readonly RunChange[];
    readonly unchanged: number;
    /** Run ids that occur more than once in a revision; only their first row is compared. */
    readonly duplicateIds: readonly string[];
  };
  readonly responses: readonly ResponseComparison[];
  readonly errorsBefore: number;
  readonly errorsAfter: number;
}

/** Relative tolerance below which two numbers count as equal (rounding noise of refits, not data changes). */
export const MOVE_TOLERANCE = 1e-9;

/** Compares two analyses of (revisions of) the same file. Never throws. */
export function compareAnalyses(before: DocumentAnalysis, after: DocumentAnalysis): AnalysisComparison {
  return {
    runs: compareRuns(before, after),
    responses: compareResponses(before.responses, after.responses),
    errorsBefore: before.diagnostics.filter((d) => d.severity === "error").length,
    errorsAfter: after.diagnostics.filter((d) => d.severity === "error").length,
  };
}

/** True when `a` and `b` differ beyond `MOVE_TOLERANCE` relative to their size, or exactly one is missing. */
export function moved(a: number | null | undefined, b: number | null | undefined): boolean {
  const x = a ?? null;
  const y = b ?? null;
  if (x === null || y === null) return x !== y;
  return Math.abs(x - y) > MOVE_TOLERANCE * Math.max(1, Math.abs(x), Math.abs(y));
}

interface RunRecord {
  readonly line: number;
  readonly cells: Map<string, string>;
}

function runRecords(analysis: DocumentAnalysis, duplicates: Set<string>): { order: string[]; records: Map<string, RunRecord> } {
  const records = new Map<string, RunRecord>();
  const order: string[] = [];
  const table = analysis.file.runs;
  if (!table) return { order, records };
  const source = analysis.file.source;
  const index = new LineIndex(source);
  const ids = analysis.design.runs.ids;
  for (let r = 0; r < table.rows.count; r++) {
    const id = ids[r] ?? String(r + 1);
    if (records.has(id)) {
      duplicates.add(id);
      continue;
    }
    const cells = new Map<string, string>();
    for (const cell of runRowCells(source, table, r).cells) {
      const column = table.columns[cell.column]!;
      if (!column.quoted && column.text === "id" && cell.column === 0) continue; // the id is the key
      cells.set(column.text, cell.text);
    }
    const mark = table.rows.excluded.get(r);
    if (mark) cells.set("excluded", mark.reason?.text ?? "yes");
    records.set(id, { line: index.positionAt(table.rows.rowStart[r]!).line + 1, cells });
    order.push(id);
  }
  return { order, records };
}

function compareRuns(before: DocumentAnalysis, after: DocumentAnalysis): AnalysisComparison["runs"] {
  const duplicates = new Set<string>();
  const old = runRecords(before, duplicates);
  const now = runRecords(after, duplicates);
  const added: RunChange[] = [];
  const removed: RunChange[] = [];
  const edited: RunChange[] = [];
  let unchanged = 0;
  for (const id of now.order) {
    const a = now.records.get(id)!;
    const b = old.records.get(id);
    if (!b) {
      added.push({ id, kind: "added", lineAfter: a.line, cells: [] });
      continue;
    }
    const columns = [...new Set([...b.cells.keys(), ...a.cells.keys()])];
    const cells: CellChange[] = [];
    for (const column of columns) {
      const x = b.cells.get(column);
      const y = a.cells.get(column);
      if (x !== y) cells.push({ column, before: x, after: y });
    }
    if (cells.length > 0) edited.push({ id, kind: "edited", lineBefore: b.line, lineAfter: a.line, cells });
    else unchanged++;
  }
  for (const id of old.order) {
    if (!now.records.has(id)) removed.push({ id, kind: "removed", lineBefore: old.records.get(id)!.line, cells: [] });
  }
  return { added, removed, edited, unchanged, duplicateIds: [...duplicates] };
}

function compareResponses(before: readonly ResponseAnalysis[], after: readonly ResponseAnalysis[]): ResponseComparison[] {
  const out: ResponseComparison[] = [];
  const oldByName = new Map(before.map((r) => [r.name, r] as const));
  const newNames = new Set(after.map((r) => r.name));
  for (const r of after) out.push(compareResponse(r.name, oldByName.get(r.name), r));
  for (const r of before) if (!newNames.has(r.name)) out.push(compareResponse(r.name, r, undefined));
  return out;
}

function compareResponse(name: string, before: ResponseAnalysis | undefined, after: ResponseAnalysis | undefined): ResponseComparison {
  const powerBefore = before ? readPower(before) : undefined;
  const powerAfter = after ? readPower(after) : undefined;
  return {
    name,
    presence: before && after ? "both" : before ? "before" : "after",
    nBefore: before?.n ?? null,
    nAfter: after?.n ?? null,
    alphaBefore: before?.alpha ?? null,
    alphaAfter: after?.alpha ?? null,
    terms: compareTerms(before, after),
    means: compareMeans(before, after),
    power: { available: powerBefore !== undefined || powerAfter !== undefined, changes: comparePower(powerBefore ?? [], powerAfter ?? []) },
  };
}

type TermRow = { p: number | null; f: number | null; alpha: number };

function termRows(r: ResponseAnalysis | undefined): Map<string, TermRow> {
  const rows = new Map<string, TermRow>();
  for (const row of r?.anova ?? []) {
    if (row.source === "Residual" || row.source === "Total") continue;
    rows.set(row.source, { p: finite(row.p), f: finite(row.f), alpha: r!.alpha });
  }
  return rows;
}

function compareTerms(before: ResponseAnalysis | undefined, after: ResponseAnalysis | undefined): TermChange[] {
  const old = termRows(before);
  const now = termRows(after);
  const names = [...now.keys(), ...[...old.keys()].filter((k) => !now.has(k))];
  return names.map((term) => {
    const b = old.get(term);
    const a = now.get(term);
    const significantBefore = b && b.p !== null ? b.p < b.alpha : null;
    const significantAfter = a && a.p !== null ? a.p < a.alpha : null;
    return {
      term,
      presence: a && b ? "both" : b ? "before" : "after",
      pBefore: b?.p ?? null,
      pAfter: a?.p ?? null,
      fBefore: b?.f ?? null,
      fAfter: a?.f ?? null,
      significantBefore,
      significantAfter,
      flipped: significantBefore !== null && significantAfter !== null && significantBefore !== significantAfter,
      pMoved: moved(b?.p, a?.p),
    };
  });
}

function compareMeans(before: ResponseAnalysis | undefined, after: ResponseAnalysis | undefined): MeanChange[] {
  const key = (term: string, level: string) => `${term}\u0000${level}`;
  const old = new Map((before?.means ?? []).map((m) => [key(m.term, m.level), m] as const));
  const seen = new Set<string>();
  const out: MeanChange[] = [];
  const push = (term: string, level: string) => {
    const k = key(term, level);
    if (seen.has(k)) return;
    seen.add(k);
    const b = old.get(k);
    const a = (after?.means ?? []).find((m) => m.term === term && m.level === level);
    const meanBefore = finite(b?.mean);
    const meanAfter = finite(a?.mean);
    out.push({
      term,
      level,
      meanBefore,
      meanAfter,
      nBefore: b?.n ?? null,
      nAfter: a?.n ?? null,
      shift: meanBefore !== null && meanAfter !== null ? meanAfter - meanBefore : null,
      moved: moved(meanBefore, meanAfter) || (b?.n ?? null) !== (a?.n ?? null),
    });
  };
  for (const m of after?.means ?? []) push(m.term, m.level);
  for (const m of before?.means ?? []) push(m.term, m.level);
  return out;
}

/**
 * Reads the `power` key of a response's results, if any. Its shape is being defined by the power analysis
 * now; accepted until then: a number; an object with a numeric `power` (or `achieved`); an array of such
 * objects labelled by `term`, `source` or `name`; or an object with such an array under `terms`. Anything
 * else counts as present with no readable value. Returns undefined when the key is absent.
 */
export function readPower(result: ResponseAnalysis): PowerChange[] | undefined {
  const value = (result as unknown as Record<string, unknown>)["power"];
  if (value === undefined || value === null) return undefined;
  const number = (x: unknown): number | null => (typeof x === "number" && Number.isFinite(x) ? x : null);
  const fromObject = (o: Record<string, unknown>, fallback: string): PowerChange => {
    const label = [o["term"], o["source"], o["name"]].find((x) => typeof x === "string") as string | undefined;
    return { label: label ?? fallback, before: null, after: number(o["power"]) ?? number(o["achieved"]) };
  };
  if (typeof value === "number") return [{ label: "", before: null, after: number(value) }];
  const list = Array.isArray(value) ? value : typeof value === "object" && Array.isArray((value as Record<string, unknown>)["terms"]) ? ((value as Record<string, unknown>)["terms"] as unknown[]) : undefined;
  if (list) {
    return list.map((item, k) => (typeof item === "object" && item !== null ? fromObject(item as Record<string, unknown>, String(k + 1)) : { label: String(k + 1), before: null, after: number(item) }));
  }
  if (typeof value === "object") return [fromObject(value as Record<string, unknown>, "")];
  return [];
}

function comparePower(before: readonly PowerChange[], after: readonly PowerChange[]): PowerChange[] {
  const labels = [...new Set([...after.map((p) => p.label), ...before.map((p) => p.label)])];
  return labels.map((label) => ({
    label,
    before: before.find((p) => p.label === label)?.after ?? null,
    after: after.find((p) => p.label === label)?.after ?? null,
  }));
}

function finite(x: number | null | undefined): number | null {
  return typeof x === "number" && Number.isFinite(x) ? x : null;
}
