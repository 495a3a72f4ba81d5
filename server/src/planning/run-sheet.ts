/**
 * `planRunSheet`: writes or updates the `runs` table of a `.trial` file so that it holds every run the
 * design needs, in randomized order, as minimal text edits.
 *
 * The promise (design brief §6, "nothing the user typed is lost"): a row that is measured (any response has
 * a value), excluded, or cannot be read cleanly is never changed: its text stays byte-identical and the
 * kept rows stay in their order. Only pending rows (every response `?`) are moved, and rows are only ever
 * added, never removed. After the edits are applied the result is parsed again and this promise is checked;
 * if it failed, no edits are returned.
 *
 * Order: pending runs go after the last kept row (a pending row that sits before a measured one was
 * skipped, and is moved there). Within that tail the runs are put in a canonical order (block, levels, then
 * id) and shuffled with the seeded generator of `seeded-random.ts` — the whole tail when the design has no
 * blocks, within each block (blocks in declared order) otherwise, within each row for a Latin square. So the
 * order depends only on the seed and on which runs are pending, never on how the file happened to list them.
 * When nothing needs adding or moving, the file is left as it is (re-running `plan` changes nothing) unless
 * a new seed or a reshuffle is asked for.
 */
import type { TrialFile } from "../../../grammar/src/ast.js";
import { parseTrial } from "../../../grammar/src/parse.js";
import { isPendingCell } from "../../../grammar/src/runs-table.js";
import { buildDesign } from "../analysis/build-design.js";
import type { Design } from "../analysis/design.js";
import { alignColumns, codePointLength } from "../text/align-columns.js";
import { type DesignKind, type DesignRun, type GeneratedDesign, type PlanProblem, blockIndexOf, generateDesign } from "./generate-design.js";
import { planRandom, shuffleInPlace } from "./seeded-random.js";
import { cellSource, compareNatural, lineEndAt, lineEnding, lineStartAt, newRunIds, nextLineStart } from "./sheet-text.js";

/** A replacement of the text `[start, end)` of the original document by `newText` (offsets in UTF-16 units). */
export interface TextEdit {
  readonly start: number;
  readonly end: number;
  readonly newText: string;
}

/** Options of `planRunSheet`. */
export interface PlanOptions {
  /** A seed that replaces the file's `plan seed` (the file is updated) and re-randomizes the pending runs. */
  readonly seed?: number;
  /**
   * The seed to write when the file has no `plan seed` and `seed` is not given. The caller draws it (the
   * CLI and the editor use a cryptographic random number), so this module stays pure.
   */
  readonly fallbackSeed?: number;
  /** Re-randomize the order of the pending runs even when none need adding or moving. */
  readonly reshuffle?: boolean;
}

/** What the plan did, for `--dry-run`, the editor's message and the printable sheet. */
export interface PlanSummary {
  readonly kind: DesignKind;
  readonly seed: number;
  /** Where the seed came from: the file, the `seed` option, or `fallbackSeed` (then written into the file). */
  readonly seedSource: "file" | "option" | "new";
  /** Runs the design needs in all (treatment runs times replicates times blocks, plus centre points). */
  readonly runsInDesign: number;
  /** Rows kept byte-identical: measured, excluded, or not readable as a clean pending row. */
  readonly keptRows: number;
  /** Pending rows already in the file (kept, possibly moved). */
  readonly pendingRows: number;
  /** Pending rows added. */
  readonly addedRows: number;
  /** Pending rows moved from before a kept row to the pending tail. */
  readonly movedRows: number;
  /** Rows with valid levels that the design does not call for (kept; the design is then over-complete). */
  readonly extraRows: number;
  /** True when the returned edits change the text. */
  readonly changed: boolean;
  readonly blockFactors: readonly string[];
  readonly treatmentFactors: readonly string[];
  readonly replicates: number;
  readonly replicatesFromFile: boolean;
  readonly centrePoints: number;
  readonly generators: readonly string[];
  readonly definingWords: readonly string[];
  readonly resolution?: number;
}

/** The outcome of `planRunSheet`. */
export type PlanResult =
  | { readonly ok: true; readonly text: string; readonly edits: readonly TextEdit[]; readonly summary: PlanSummary }
  | { readonly ok: false; readonly problems: readonly PlanProblem[] };

/** Design-level diagnostics that make a plan meaningless: the planner refuses until they are fixed. */
const BLOCKING_CODES = new Set(["duplicate-name", "duplicate-level", "unknown-factor", "unknown-response", "invalid-setting"]);

/** One run of the pending tail: an existing pending row (moved verbatim) or a new one. */
interface TailRun {
  readonly levels: readonly number[];
  readonly block: number;
  readonly key: string;
  /** The existing row's full line text, or undefined for a new run. */
  readonly line?: string;
  readonly id?: string;
}

/**
 * Plans the run sheet of `text`. Pure: the caller supplies any fresh seed. Never throws; a file that
 * cannot be planned safely gives `{ ok: false, problems }` and no edits.
 */
export function planRunSheet(text: string, options: PlanOptions = {}): PlanResult {
  try {
    return plan(text, options);
  } catch (error) {
    return { ok: false, problems: [{ message: `Planning failed because of a bug in Trialbook (${error instanceof Error ? error.message : String(error)}); the file was not changed. Please report it with this file.` }] };
  }
}

/** Applies non-overlapping edits (offsets into `text`) and returns the new text. */
export function applyEdits(text: string, edits: readonly TextEdit[]): string {
  const sorted = [...edits].sort((a, b) => a.start - b.start || a.end - b.end);
  let out = "";
  let at = 0;
  for (const e of sorted) {
    out += text.slice(at, e.start) + e.newText;
    at = e.end;
  }
  return out + text.slice(at);
}

function plan(text: string, options: PlanOptions): PlanResult {
  const file = parseTrial(text);
  if (file.problems.length > 0) {
    return { ok: false, problems: file.problems.map((p) => ({ message: `Fix this first (the planner only edits a file it can read completely): ${p.message}`, span: p.span })) };
  }
  const { design, diagnostics } = buildDesign(file);
  const blocking = diagnostics.filter((d) => d.severity === "error" && BLOCKING_CODES.has(d.code));
  if (blocking.length > 0) return { ok: false, problems: blocking.map((d) => ({ message: d.message, span: d.span })) };
  for (const o of [options.seed, options.fallbackSeed]) {
    if (o !== undefined && !(Number.isSafeInteger(o) && o >= 0)) return { ok: false, problems: [{ message: `A seed must be a whole number of at least 0, not ${o}.` }] };
  }

  const fileSeed = design.settings.seed;
  let seed: number;
  let seedSource: PlanSummary["seedSource"];
  if (options.seed !== undefined) [seed, seedSource] = [options.seed, fileSeed === options.seed ? "file" : "option"];
  else if (fileSeed !== undefined) [seed, seedSource] = [fileSeed, "file"];
  else if (options.fallbackSeed !== undefined) [seed, seedSource] = [options.fallbackSeed, "new"];
  else return { ok: false, problems: [{ message: "The file has no 'plan seed' and no seed was given: pass one (e.g. --seed 4187)." }] };

  // The order of draws is pinned (see seeded-random.ts): Latin squares first, then the shuffles of the tail.
  const random = planRandom(seed);
  const generated = generateDesign(file, design, random);
  if (!generated.ok) return generated;
  const gen = generated.design;

  const table = file.runs;
  if (table) {
    const present = new Set(table.columns.map((c) => c.text));
    const missing = design.factors.filter((f) => !present.has(f.name));
    if (missing.length > 0) {
      return { ok: false, problems: missing.map((f) => ({ message: `The runs table has no column for factor '${f.name}': add it to the runs header before the '|' so planned runs can name its level.`, span: table.keywordSpan })) };
    }
  }

  // Classify rows and count what the design still needs.
  const needed = new Map<string, number>();
  for (const run of gen.runs) needed.set(keyOf(run.levels), (needed.get(keyOf(run.levels)) ?? 0) + 1);
  const rows = classifyRows(file, design);
  let extraRows = 0;
  for (const r of rows.kept) {
    if (design.runs.excluded[r] || !rows.levelsValid[r]) continue;
    const key = rowKey(design, r);
    const n = needed.get(key) ?? 0;
    if (n > 0) needed.set(key, n - 1);
    else extraRows++;
  }
  const lastKept = rows.kept.length > 0 ? rows.kept[rows.kept.length - 1]! : -1;
  const tail: TailRun[] = [];
  let movedRows = 0;
  for (const r of rows.pending) {
    if (r < lastKept) movedRows++;
    const levels = design.factors.map((_, f) => design.runs.levels[f]![r]!);
    const key = keyOf(levels);
    const n = needed.get(key) ?? 0;
    if (n > 0) needed.set(key, n - 1);
    else extraRows++;
    const start = lineStartAt(text, design.runs.rowSpans[r]!.start);
    tail.push({ levels, block: blockOf(gen, design, levels), key, line: text.slice(start, lineEndAt(text, start)), ...(rows.hasIds ? { id: design.runs.ids[r]! } : {}) });
  }
  let addedRows = 0;
  for (const run of gen.runs) {
    const key = keyOf(run.levels);
    const n = needed.get(key) ?? 0;
    if (n <= 0) continue;
    needed.set(key, n - 1);
    tail.push({ levels: run.levels, block: blockOf(gen, design, run.levels), key });
    addedRows++;
  }

  const summaryBase = {
    kind: gen.kind,
    seed,
    seedSource,
    runsInDesign: gen.runs.length,
    keptRows: rows.kept.length,
    pendingRows: rows.pending.length,
    addedRows,
    movedRows,
    extraRows,
    blockFactors: gen.blockFactors.map((f) => design.factors[f]!.name),
    treatmentFactors: gen.treatmentFactors.map((f) => design.factors[f]!.name),
    replicates: gen.replicates,
    replicatesFromFile: gen.replicatesFromFile,
    centrePoints: gen.centrePoints,
    generators: gen.generators,
    definingWords: gen.definingWords,
    ...(gen.resolution !== undefined ? { resolution: gen.resolution } : {}),
  };
  const seedChanged = options.seed !== undefined && options.seed !== fileSeed;
  if (addedRows === 0 && movedRows === 0 && !seedChanged && !options.reshuffle) {
    return { ok: true, text, edits: [], summary: { ...summaryBase, changed: false } };
  }

  const ordered = orderTail(tail, random);
  const eol = lineEnding(text);
  const edits: TextEdit[] = [];
  if (table) {
    const seedEdit = seedEditOf(file, text, seed, fileSeed, eol);
    if (seedEdit) edits.push(seedEdit);
    edits.push(...tableEdits(file, design, text, rows, lastKept, ordered, eol));
  } else if (file.plan) {
    const seedEdit = seedEditOf(file, text, seed, fileSeed, eol);
    if (seedEdit) edits.push(seedEdit);
    edits.push(newTableEdit(file, design, text, ordered, eol, ""));
  } else {
    // Neither a plan nor a table: both are written together, the plan block first.
    edits.push(newTableEdit(file, design, text, ordered, eol, `plan${eol}  seed ${seed}${eol}${eol}`));
  }
  const merged = mergeEdits(edits);
  const result = applyEdits(text, merged);

  const broken = verifyKeptRows(file, design, rows.kept, result);
  if (broken) return { ok: false, problems: [{ message: `Planning would have changed a measured or excluded run (${broken}); the file was not changed. This is a bug in Trialbook: please report it with this file.` }] };
  return { ok: true, text: result, edits: merged, summary: { ...summaryBase, changed: result !== text } };
}

// ---------------------------------------------------------------------------------------------------------
// Rows

interface RowClasses {
  /** Rows never touched, in file order. */
  readonly kept: number[];
  /** Clean pending rows, in file order. */
  readonly pending: number[];
  /** Per row: every factor cell names a declared level. */
  readonly levelsValid: boolean[];
  readonly hasIds: boolean;
}

/**
 * A row is pending (movable) only when its shape matches the header, it is not excluded, every factor cell
 * names a declared level, and every response cell is an unquoted `?`. Everything else is kept as written.
 */
function classifyRows(file: TrialFile, design: Design): RowClasses {
  const kept: number[] = [];
  const pending: number[] = [];
  const levelsValid: boolean[] = [];
  const table = file.runs;
  if (!table) return { kept, pending, levelsValid, hasIds: false };
  const rows = table.rows;
  const leftCount = table.responseStart;
  const total = table.columns.length;
  for (let r = 0; r < rows.count; r++) {
    const valid = design.factors.every((_, f) => design.runs.levels[f]![r]! >= 0);
    levelsValid.push(valid);
    const first = rows.cellOffset[r]!;
    const n = rows.cellOffset[r + 1]! - first;
    const pipe = rows.pipeCell[r]!;
    const shapeOk = table.headerHasPipe ? pipe === leftCount && n === total : pipe < 0 && n === total;
    let allPending = shapeOk;
    for (let k = leftCount; allPending && k < total; k++) allPending = isPendingCell(file.source, rows, first + k);
    if (allPending && valid && !rows.excluded.has(r)) pending.push(r);
    else kept.push(r);
  }
  return { kept, pending, levelsValid, hasIds: table.columns[0]?.text === "id" && !table.columns[0].quoted };
}

function keyOf(levels: readonly number[]): string {
  return levels.join(",");
}

function rowKey(design: Design, r: number): string {
  return design.factors.map((_, f) => design.runs.levels[f]![r]!).join(",");
}

/** The block a run belongs to for randomization: its block in standard order, or its row of a Latin square. */
function blockOf(gen: GeneratedDesign, design: Design, levels: readonly number[]): number {
  if (gen.kind === "latin-square") return levels[gen.blockFactors[0]!]!;
  return blockIndexOf(levels, gen.blockFactors, design.factors);
}

/**
 * Canonical order (block, levels, existing before new, id, line text), then a Fisher–Yates shuffle within
 * each block, blocks in ascending order.
 */
function orderTail(tail: readonly TailRun[], random: ReturnType<typeof planRandom>): TailRun[] {
  const canonical = [...tail].sort(
    (a, b) =>
      a.block - b.block ||
      compareLevels(a.levels, b.levels) ||
      (a.line === undefined ? 1 : 0) - (b.line === undefined ? 1 : 0) ||
      compareNatural(a.id ?? "", b.id ?? "") ||
      compareNatural(a.line ?? "", b.line ?? ""),
  );
  const out: TailRun[] = [];
  for (let i = 0; i < canonical.length; ) {
    let j = i;
    while (j < canonical.length && canonical[j]!.block === canonical[i]!.block) j++;
    out.push(...shuffleInPlace(canonical.slice(i, j), random));
    i = j;
  }
  return out;
}

function compareLevels(a: readonly number[], b: readonly number[]): number {
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return a[k]! - b[k]!;
  return 0;
}

// ---------------------------------------------------------------------------------------------------------
// Edits

/** Replaces the file's seed, or inserts `seed N` into the plan block; undefined when the file already says so. */
function seedEditOf(file: TrialFile, text: string, seed: number, fileSeed: number | undefined, eol: string): TextEdit | undefined {
  const settings = file.plan?.settings ?? [];
  const existing = [...settings].reverse().find((s) => s.kind === "seed");
  if (existing && existing.kind === "seed" && existing.value) {
    if (fileSeed === seed) return undefined;
    return { start: existing.value.span.start, end: existing.value.span.end, newText: String(seed) };
  }
  if (existing) {
    // `seed` written without a value: complete it.
    return { start: existing.keywordSpan.end, end: existing.keywordSpan.end, newText: ` ${seed}` };
  }
  if (file.plan) {
    const last = settings.length > 0 ? settings[settings.length - 1]! : undefined;
    const anchor = last ? last.span.end : file.plan.keywordSpan.end;
    const firstSettingLine = settings.length > 0 ? lineStartAt(text, settings[0]!.span.start) : -1;
    const indent = firstSettingLine >= 0 && firstSettingLine !== lineStartAt(text, file.plan.keywordSpan.start) ? (/^[ \t]*/.exec(text.slice(firstSettingLine))![0] || "  ") : "  ";
    const at = lineEndAt(text, anchor);
    return { start: at, end: at, newText: `${eol}${indent}seed ${seed}` };
  }
  // No plan block: add one just before the runs table.
  const at = file.runs ? lineStartAt(text, file.runs.keywordSpan.start) : newTablePosition(file, text);
  return { start: at, end: at, newText: `plan${eol}  seed ${seed}${eol}${eol}` };
}

/** Deletes pending rows that sit before kept rows and rewrites the pending tail after the last kept row. */
function tableEdits(file: TrialFile, design: Design, text: string, rows: RowClasses, lastKept: number, tail: readonly TailRun[], eol: string): TextEdit[] {
  const table = file.runs!;
  const edits: TextEdit[] = [];
  for (const r of rows.pending) {
    if (r > lastKept) break;
    const start = lineStartAt(text, design.runs.rowSpans[r]!.start);
    edits.push({ start, end: nextLineStart(text, start), newText: "" });
  }
  const newLines = formatTail(file, design, text, tail);
  const anchor = lastKept >= 0 ? design.runs.rowSpans[lastKept]!.start : table.keywordSpan.start;
  const anchorEnd = lineEndAt(text, anchor);
  const lastRow = table.rows.count - 1;
  if (lastRow <= lastKept) {
    if (newLines.length > 0) edits.push({ start: anchorEnd, end: anchorEnd, newText: eol + newLines.join(eol) });
    return edits;
  }
  // The region after the last kept row holds only pending rows, whole-line comments and blank lines:
  // comments are kept (at the top of the tail), blank lines inside the table are dropped.
  const start = nextLineStart(text, anchorEnd);
  const end = lineEndAt(text, design.runs.rowSpans[lastRow]!.start);
  const comments: string[] = [];
  for (let at = start; at < end; ) {
    const lineEnd = lineEndAt(text, at);
    const line = text.slice(at, lineEnd);
    if (/^[ \t]*#/.test(line)) comments.push(line);
    at = nextLineStart(text, lineEnd);
  }
  edits.push(trimEdit(text, { start, end, newText: [...comments, ...newLines].join(eol) }));
  return edits;
}

/**
 * The lines of the tail: existing pending rows verbatim, new rows laid out on the header's columns (cells
 * start where the header's names start, or further right when a cell is wider), with new run ids.
 */
function formatTail(file: TrialFile, design: Design, text: string, tail: readonly TailRun[]): string[] {
  const table = file.runs!;
  const hasIds = table.columns[0]?.text === "id" && !table.columns[0].quoted;
  const ids = hasIds ? newRunIds(design.runs.ids.slice(0, table.rows.count), tail.filter((t) => t.line === undefined).length) : [];
  const headerLine = lineStartAt(text, table.keywordSpan.start);
  const columnOf = (offset: number) => codePointLength(text.slice(headerLine, offset));
  // Header layout: column k starts at starts[k]; the '|' (when present) sits at pipeAt.
  const cells: string[][] = [];
  let nextId = 0;
  for (const run of tail) {
    if (run.line !== undefined) continue;
    cells.push(rowCells(file, design, run, hasIds ? ids[nextId++]! : ""));
  }
  const starts: number[] = [];
  table.columns.forEach((c, k) => {
    if (table.headerHasPipe && k === table.responseStart) starts.push(columnOf(pipeOffset(text, table)));
    starts.push(columnOf(c.span.start));
  });
  if (table.headerHasPipe && table.responseStart === table.columns.length) starts.push(columnOf(pipeOffset(text, table)));
  // Widen columns so every new cell fits, keeping two spaces between cells and one around the '|'.
  const pipeIndex = table.headerHasPipe ? table.responseStart : -1;
  for (let k = 1; k < starts.length; k++) {
    const gap = k === pipeIndex || k - 1 === pipeIndex ? 1 : 2;
    let width = 0;
    for (const row of cells) width = Math.max(width, codePointLength(row[k - 1] ?? ""));
    starts[k] = Math.max(starts[k]!, starts[k - 1]! + width + gap);
  }
  const newLines = cells.map((row) => {
    let line = "";
    row.forEach((cell, k) => {
      const target = starts[k]!;
      const pad = Math.max(k === 0 ? 0 : 1, target - codePointLength(line));
      line += " ".repeat(pad) + cell;
    });
    return line;
  });
  let n = 0;
  return tail.map((run) => (run.line !== undefined ? run.line : newLines[n++]!));
}

/** The cells of a new row in header order, with `|` where the header has it. */
function rowCells(file: TrialFile, design: Design, run: TailRun, id: string): string[] {
  const table = file.runs;
  const columns = table ? table.columns.map((c) => c.text) : defaultColumns(design);
  const responseStart = table ? table.responseStart : columns.length - design.responses.length;
  const withPipe = table ? table.headerHasPipe : true;
  const out: string[] = [];
  columns.forEach((name, k) => {
    if (withPipe && k === responseStart) out.push("|");
    if (k === 0 && name === "id" && (!table || !table.columns[0]!.quoted)) out.push(id);
    else if (k >= responseStart) out.push("?");
    else {
      const f = design.factors.findIndex((x) => x.name === name);
      // Covariates are measured when the run is made: `?` until then.
      out.push(f >= 0 ? cellSource(design.factors[f]!.levels[run.levels[f]!]!.name) : "?");
    }
  });
  if (withPipe && responseStart === columns.length) out.push("|");
  return out;
}

/** Offset of the header's `|`. */
function pipeOffset(text: string, table: NonNullable<TrialFile["runs"]>): number {
  const from = table.responseStart > 0 ? table.columns[table.responseStart - 1]!.span.end : table.keywordSpan.end;
  const at = text.indexOf("|", from);
  return at >= 0 ? at : from + 1;
}

/** Header of a new table: `id`, factors, covariates, then responses. */
function defaultColumns(design: Design): string[] {
  return ["id", ...design.factors.map((f) => f.name), ...design.covariates.map((c) => c.name), ...design.responses.map((r) => r.name)];
}

/** Where a new runs table goes: before the `conclusion` block when there is one, else at the end. */
function newTablePosition(file: TrialFile, text: string): number {
  return file.conclusion ? lineStartAt(text, file.conclusion.keywordSpan.start) : text.length;
}

/** A whole new runs table, laid out by `alignColumns`, after `prefix` (a new plan block, or ""). */
function newTableEdit(file: TrialFile, design: Design, text: string, tail: readonly TailRun[], eol: string, prefix: string): TextEdit {
  const at = newTablePosition(file, text);
  const ids = newRunIds([], tail.length);
  const header = ["runs", ...defaultColumns(design).map((c, k) => (k === 0 ? c : cellSource(c)))];
  const responseStart = 1 + 1 + design.factors.length + design.covariates.length;
  header.splice(responseStart, 0, "|");
  const body = tail.map((run, k) => ["", ...rowCells(file, design, run, ids[k]!)]);
  const lines = alignColumns([header, ...body]);
  const head = text.slice(0, at);
  const before = at === 0 || /\n[ \t]*\r?\n$/.test(head) ? "" : head.endsWith("\n") ? eol : eol + eol;
  const after = at < text.length ? eol + eol : eol;
  return { start: at, end: at, newText: before + prefix + lines.join(eol) + after };
}

/** Shrinks an edit to the part that differs, cut at line boundaries so diffs show whole lines. */
function trimEdit(text: string, edit: TextEdit): TextEdit {
  const old = text.slice(edit.start, edit.end);
  const neu = edit.newText;
  let p = 0;
  const maxP = Math.min(old.length, neu.length);
  while (p < maxP && old.charCodeAt(p) === neu.charCodeAt(p)) p++;
  p = p === old.length && p === neu.length ? p : old.lastIndexOf("\n", p - 1) + 1;
  let s = 0;
  const maxS = Math.min(old.length, neu.length) - p;
  while (s < maxS && old.charCodeAt(old.length - 1 - s) === neu.charCodeAt(neu.length - 1 - s)) s++;
  // Keep the suffix only from a line start, so the edit ends just before a whole unchanged line.
  while (s > 0 && old.charCodeAt(old.length - s - 1) !== 10) s--;
  return { start: edit.start + p, end: edit.end - s, newText: neu.slice(p, neu.length - s) };
}

/** Combines edits that touch the same offset (a seed insertion where a table is inserted) and sorts them. */
function mergeEdits(edits: readonly TextEdit[]): TextEdit[] {
  const sorted = edits.filter((e) => !(e.start === e.end && e.newText === "")).sort((a, b) => a.start - b.start || a.end - b.end);
  const out: TextEdit[] = [];
  for (const e of sorted) {
    const prev = out[out.length - 1];
    if (prev && prev.end === e.start && prev.start === prev.end && e.start === e.end) out[out.length - 1] = { start: prev.start, end: prev.end, newText: prev.newText + e.newText };
    else out.push(e);
  }
  return out;
}

/**
 * Re-reads the planned text and checks that the kept rows are still there, byte for byte and in order;
 * returns a description of the first difference, or undefined.
 */
function verifyKeptRows(file: TrialFile, design: Design, kept: readonly number[], result: string): string | undefined {
  if (kept.length === 0) return undefined;
  const after = parseTrial(result);
  const rows = after.runs?.rows;
  if (!rows) return "the runs table is gone";
  const lines: string[] = [];
  for (let r = 0; r < rows.count; r++) {
    const start = lineStartAt(result, rows.rowStart[r]!);
    lines.push(result.slice(start, lineEndAt(result, start)));
  }
  let at = 0;
  for (const r of kept) {
    const start = lineStartAt(file.source, design.runs.rowSpans[r]!.start);
    const line = file.source.slice(start, lineEndAt(file.source, start));
    while (at < lines.length && lines[at] !== line) at++;
    if (at === lines.length) return `row ${r + 1}`;
    at++;
  }
  return undefined;
}
