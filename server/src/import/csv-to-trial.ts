/**
 * Turns a CSV table of runs into a formatted `.trial` file (the `trialbook import` verb).
 *
 * What the produced file holds:
 * - `trial "<title>"` (the `title` option, else the CSV file name without its extension, else
 *   "Imported runs") and a comment `# Imported from <source>`;
 * - one `response NAME` line per response column (units, goals and specs are left for the user);
 * - one `factor NAME levels ...` line per factor column, levels in order of first appearance in
 *   the CSV, with `as block`, `as random` or `as subject` for those roles; one `covariate NAME` line
 *   per covariate column;
 * - a `plan` with `alpha 0.05` and `replicates R`, where R is the smallest number of runs in any
 *   combination of the levels of all factor columns (every role), counting pending runs, because
 *   pending runs are planned runs. `replicates` is left out when it would mean nothing: no factor
 *   columns, no rows, or some combination of levels has no run at all (nested, fractional or
 *   otherwise incomplete designs); a warning then says why.
 * - the runs table with the columns `id`, factors (in the order factors, blocks, random, subjects),
 *   covariates, `|`, responses; one row per CSV row, in CSV order (row order is run order).
 *
 * Values are copied as text, never through a floating-point number. Spaces and tabs around a CSV
 * field are dropped (spreadsheet exports pad fields, and ` north` and `north` must be one level);
 * everything else is kept. A level, id or name is written bare when it is an identifier
 * (`[A-Za-z_][A-Za-z0-9_-]*`, and not a keyword of the language or `id`) or, for levels and ids,
 * a number as the grammar writes numbers; otherwise it is written as a quoted string with `\"` and
 * `\\` escapes. Keywords are compared without regard to case so that a level `Plan` cannot be read
 * as a keyword by a case-insensitive reader either.
 *
 * An empty response or covariate cell, `?` or `NA` is written as `?` (a pending value), with a
 * warning counting them. Any other response or covariate text that is not a number in the
 * grammar's form (`-?digits[.digits][e[+-]digits]`) is an error naming its line; so is an empty or
 * `?` factor cell (every run needs a level) and a value spanning several lines or holding another
 * control character (a `.trial` cell is one line).
 */
import { ALL_KEYWORDS } from "../../../grammar/src/tokens.js";
import { readCsv } from "./csv.js";
import { alignColumns } from "../text/align-columns.js";

/** A problem or warning of an import; `line` is the 1-based CSV line when there is one. */
export interface ImportProblem {
  readonly line?: number;
  readonly message: string;
}

/** Which CSV columns play which part; every name must equal a header field (spaces around it ignored). */
export interface CsvToTrialOptions {
  /** The run-id column; when absent, ids r01, r02 ... are generated (zero-padded to the row count, at least 2 digits). */
  readonly id?: string;
  /** Fixed factor columns. */
  readonly factors: readonly string[];
  /** Block factor columns (`as block`). */
  readonly blocks?: readonly string[];
  /** Random factor columns (`as random`). */
  readonly random?: readonly string[];
  /** Subject columns for repeated measures (`as subject`). */
  readonly subjects?: readonly string[];
  /** Numeric covariate columns. */
  readonly covariates?: readonly string[];
  /** Numeric response columns; at least one. */
  readonly responses: readonly string[];
  /** The trial title; default: the source file name without its extension. */
  readonly title?: string;
  /** Where the CSV came from (a path), written into the `# Imported from` comment. */
  readonly source?: string;
}

/** The produced `.trial` text and warnings, or the problems that stopped the import. */
export type CsvToTrialResult =
  | { readonly ok: true; readonly text: string; readonly warnings: ImportProblem[] }
  | { readonly ok: false; readonly problems: ImportProblem[] };

/**
 * Converts CSV text into the text of a valid, formatted `.trial` file (see the module comment for
 * the exact rules). Never throws: unusable input gives `{ ok: false, problems }`.
 */
export function csvToTrial(csvText: string, options: CsvToTrialOptions): CsvToTrialResult {
  const table = readCsv(csvText);
  if (table.problems.length > 0) return { ok: false, problems: capped(table.problems) };
  if (table.header.length === 0) {
    return { ok: false, problems: [{ message: "the CSV text is empty: it needs a header line naming the columns" }] };
  }
  const headerLine = table.headerLine;
  const names = table.header.map(trimCell);

  const columns = resolveColumns(names, headerLine, options);
  if (!columns.ok) return { ok: false, problems: columns.problems };
  const { id: idColumn, factorLike, covariates, responses } = columns;

  const problems: ImportProblem[] = [];
  const warnings: ImportProblem[] = [];
  const rows = table.rows;

  // Unused columns are reported so that nothing in the CSV disappears without a word.
  const used = new Set<number>([...factorLike.map((c) => c.index), ...covariates, ...responses]);
  if (idColumn !== undefined) used.add(idColumn);
  const unused = names.filter((_, k) => !used.has(k));
  if (unused.length > 0) {
    warnings.push({ line: headerLine, message: `columns not imported: ${unused.map((s) => JSON.stringify(s)).join(", ")}` });
  }
  if (rows.length === 0) warnings.push({ line: headerLine, message: "the CSV has no data rows: the runs table is empty" });

  // Ids.
  const ids: string[] = new Array<string>(rows.length);
  if (idColumn === undefined) {
    const width = Math.max(2, String(rows.length).length);
    for (let r = 0; r < rows.length; r++) ids[r] = "r" + String(r + 1).padStart(width, "0");
  } else {
    const firstLine = new Map<string, number>();
    for (let r = 0; r < rows.length; r++) {
      const row = rows[r]!;
      const value = trimCell(row.fields[idColumn] ?? "");
      if (value === "") problems.push({ line: row.line, message: `the run id (column ${JSON.stringify(names[idColumn])}) is empty` });
      else if (hasControlCharacter(value)) problems.push({ line: row.line, message: oneLineMessage(names[idColumn]!) });
      const seen = firstLine.get(value);
      if (seen !== undefined && value !== "") {
        warnings.push({ line: row.line, message: `run id ${JSON.stringify(value)} repeats the one on line ${seen}` });
      } else firstLine.set(value, row.line);
      ids[r] = renderValue(value);
    }
  }

  // Factor-like columns: levels in order of first appearance.
  const factorCells: string[][] = [];
  const factorLevels: string[][] = [];
  const levelIndex: number[][] = [];
  for (const factor of factorLike) {
    const cells = new Array<string>(rows.length);
    const indexOf = new Map<string, number>();
    const levels: string[] = [];
    const indices = new Array<number>(rows.length);
    for (let r = 0; r < rows.length; r++) {
      const row = rows[r]!;
      const value = trimCell(row.fields[factor.index] ?? "");
      const column = names[factor.index]!;
      if (value === "" || value === "?") {
        problems.push({ line: row.line, message: `factor ${JSON.stringify(column)} has no level on this row (${value === "" ? "empty" : "?"}); every run needs a level` });
      } else if (hasControlCharacter(value)) {
        problems.push({ line: row.line, message: oneLineMessage(column) });
      }
      let k = indexOf.get(value);
      if (k === undefined) {
        k = levels.length;
        indexOf.set(value, k);
        levels.push(value);
      }
      indices[r] = k;
      cells[r] = renderValue(value);
    }
    factorCells.push(cells);
    factorLevels.push(levels);
    levelIndex.push(indices);
  }

  // Numeric columns: covariates and responses.
  const numericColumn = (index: number, role: "covariate" | "response"): string[] => {
    const cells = new Array<string>(rows.length);
    let pending = 0;
    const column = names[index]!;
    for (let r = 0; r < rows.length; r++) {
      const row = rows[r]!;
      const value = trimCell(row.fields[index] ?? "");
      if (value === "" || value === "?" || value === "NA") {
        pending++;
        cells[r] = "?";
      } else if (NUMBER.test(value)) {
        cells[r] = value;
      } else {
        problems.push({
          line: row.line,
          message:
            `${role} ${JSON.stringify(column)}: ${JSON.stringify(value)} is not a number; write digits with a decimal point ` +
            `(12.5, -0.75, 1.2e-3) or leave the cell empty for a pending value`,
        });
        cells[r] = "?";
      }
    }
    if (pending > 0) {
      const what = role === "response" ? "pending values" : "unknown values (those runs cannot enter an analysis with this covariate)";
      warnings.push({ message: `${role} ${JSON.stringify(column)}: ${pending} of ${rows.length} cells were empty, ? or NA and are written as ? - ${what}` });
    }
    return cells;
  };
  const covariateCells = covariates.map((index) => numericColumn(index, "covariate"));
  const responseCells = responses.map((index) => numericColumn(index, "response"));

  if (problems.length > 0) return { ok: false, problems: capped(problems) };

  const replicates = smallestCellCount(levelIndex, factorLevels.map((l) => l.length), rows.length);
  if (!replicates.ok) warnings.push({ message: `replicates is not written in the plan: ${replicates.reason}` });

  // Text.
  const out: string[] = [];
  out.push(`trial ${quote(titleOf(options))}`);
  out.push(`# Imported from ${options.source !== undefined ? oneLine(options.source) : "CSV text"}`);
  out.push("");
  for (const index of responses) out.push(`response ${renderName(names[index]!)}`);
  out.push("");
  const factorLines = factorLike.map((factor, k) => {
    const line = [`factor ${renderName(names[factor.index]!)}`, `levels ${factorLevels[k]!.map(renderValue).join(", ")}`];
    if (factor.role !== "fixed") line.push(`as ${factor.role}`);
    return line;
  });
  out.push(...alignColumns(factorLines));
  for (const index of covariates) out.push(`covariate ${renderName(names[index]!)}`);
  if (factorLike.length > 0 || covariates.length > 0) out.push("");
  out.push("plan");
  if (replicates.ok) out.push(`  replicates ${replicates.value}`);
  out.push("  alpha 0.05");
  out.push("");

  const headerCells = [
    "runs",
    "id",
    ...factorLike.map((f) => renderName(names[f.index]!)),
    ...covariates.map((index) => renderName(names[index]!)),
    "|",
    ...responses.map((index) => renderName(names[index]!)),
  ];
  const tableRows: string[][] = [headerCells];
  for (let r = 0; r < rows.length; r++) {
    tableRows.push([
      "",
      ids[r]!,
      ...factorCells.map((cells) => cells[r]!),
      ...covariateCells.map((cells) => cells[r]!),
      "|",
      ...responseCells.map((cells) => cells[r]!),
    ]);
  }
  out.push(...alignColumns(tableRows));
  return { ok: true, text: out.join("\n") + "\n", warnings };
}

/** The grammar's number form: `-?digits[.digits][e[+-]digits]`. */
const NUMBER = /^-?[0-9]+(?:\.[0-9]+)?(?:[eE][+-]?[0-9]+)?$/;
const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_-]*$/;

/**
 * Words that must not be written bare as a name or level: the top-level keywords, the contextual
 * keywords (safer quoted everywhere, e.g. a cell `excluded` would start an exclusion mark) and `id`
 * (an unquoted `id` in the runs header names the run-id column).
 */
const RESERVED: ReadonlySet<string> = new Set([...ALL_KEYWORDS, "id"]);

/** A name (column header): bare when an identifier that is not reserved, else a quoted string. */
function renderName(text: string): string {
  return IDENTIFIER.test(text) && !RESERVED.has(text.toLowerCase()) ? text : quote(text);
}

/** A level or id: bare when a number or a bare-able name, else a quoted string. */
function renderValue(text: string): string {
  return NUMBER.test(text) ? text : renderName(text);
}

/** A quoted string with `\"` and `\\` escapes (the only escapes the language has). */
function quote(text: string): string {
  return '"' + text.replace(/[\\"]/g, (c) => "\\" + c) + '"';
}

function trimCell(text: string): string {
  return text.replace(/^[ \t]+|[ \t]+$/g, "");
}

function hasControlCharacter(text: string): boolean {
  return /[\u0000-\u001f\u007f]/.test(text);
}

function oneLine(text: string): string {
  return text.replace(/[\u0000-\u001f\u007f]+/g, " ");
}

function oneLineMessage(column: string): string {
  return `column ${JSON.stringify(column)} holds a line break or another control character; a .trial cell is one line`;
}

function titleOf(options: CsvToTrialOptions): string {
  if (options.title !== undefined && options.title.trim() !== "") return oneLine(options.title);
  if (options.source !== undefined) {
    const base = options.source.split(/[\\/]/).pop() ?? "";
    const stem = base.includes(".") && !base.startsWith(".") ? base.slice(0, base.lastIndexOf(".")) : base;
    if (stem.trim() !== "") return oneLine(stem);
  }
  return "Imported runs";
}

function capped(problems: readonly ImportProblem[]): ImportProblem[] {
  const limit = 100;
  if (problems.length <= limit) return [...problems];
  return [...problems.slice(0, limit), { message: `... and ${problems.length - limit} more problems` }];
}

type Role = "fixed" | "block" | "random" | "subject";

type ResolvedColumns =
  | {
      readonly ok: true;
      readonly id: number | undefined;
      readonly factorLike: { readonly index: number; readonly role: Role }[];
      readonly covariates: number[];
      readonly responses: number[];
    }
  | { readonly ok: false; readonly problems: ImportProblem[] };

/** Finds every column named in the options in the header; usage-style problems for names that are missing or reused. */
function resolveColumns(names: readonly string[], headerLine: number, options: CsvToTrialOptions): ResolvedColumns {
  const problems: ImportProblem[] = [];
  const available = names.map((s) => JSON.stringify(s)).join(", ");
  const usedAs = new Map<number, string>();
  const find = (wanted: string, what: string): number | undefined => {
    const name = trimCell(wanted);
    const matches: number[] = [];
    names.forEach((n, k) => {
      if (n === name) matches.push(k);
    });
    if (matches.length === 0) {
      problems.push({ line: headerLine, message: `${what} column ${JSON.stringify(name)} is not in the CSV header; available columns: ${available}` });
      return undefined;
    }
    if (matches.length > 1) {
      problems.push({ line: headerLine, message: `the CSV header has ${matches.length} columns named ${JSON.stringify(name)}; rename them so that each name is unique` });
      return undefined;
    }
    const index = matches[0]!;
    if (name === "") {
      problems.push({ line: headerLine, message: `column ${index + 1} has no name in the CSV header; give it one to use it as a ${what} column` });
      return undefined;
    }
    if (hasControlCharacter(name)) {
      problems.push({ line: headerLine, message: `the ${what} column name ${JSON.stringify(name)} holds a line break or another control character` });
      return undefined;
    }
    const before = usedAs.get(index);
    if (before !== undefined) {
      problems.push({ line: headerLine, message: `column ${JSON.stringify(name)} is named twice (as ${before} and as ${what}); each column has one part` });
      return undefined;
    }
    usedAs.set(index, what);
    return index;
  };

  if (options.responses.length === 0) problems.push({ message: "name at least one response column (responses)" });
  const id = options.id !== undefined ? find(options.id, "id") : undefined;
  const factorLike: { index: number; role: Role }[] = [];
  const roles: [readonly string[] | undefined, Role, string][] = [
    [options.factors, "fixed", "factor"],
    [options.blocks, "block", "block"],
    [options.random, "random", "random factor"],
    [options.subjects, "subject", "subject"],
  ];
  for (const [list, role, what] of roles) {
    for (const name of list ?? []) {
      const index = find(name, what);
      if (index !== undefined) factorLike.push({ index, role });
    }
  }
  const covariates: number[] = [];
  for (const name of options.covariates ?? []) {
    const index = find(name, "covariate");
    if (index !== undefined) covariates.push(index);
  }
  const responses: number[] = [];
  for (const name of options.responses) {
    const index = find(name, "response");
    if (index !== undefined) responses.push(index);
  }
  if (problems.length > 0) return { ok: false, problems };
  return { ok: true, id, factorLike, covariates, responses };
}

/**
 * The smallest number of rows in any combination of factor levels, over the full crossing of all
 * factor columns; not defined when there are no factors or rows, or when a combination is empty.
 */
function smallestCellCount(
  levelIndex: readonly (readonly number[])[],
  levelCounts: readonly number[],
  rowCount: number,
): { ok: true; value: number } | { ok: false; reason: string } {
  if (levelIndex.length === 0) return { ok: false, reason: "there are no factor columns" };
  if (rowCount === 0) return { ok: false, reason: "there are no runs" };
  // The number of combinations, stopping once it exceeds the row count (some would then be empty).
  let combinations = 1;
  for (const count of levelCounts) {
    combinations *= count;
    if (combinations > rowCount) break;
  }
  const counts = new Map<string, number>();
  for (let r = 0; r < rowCount; r++) {
    const key = levelIndex.map((indices) => indices[r]).join(",");
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  if (combinations > rowCount || counts.size < combinations) {
    return {
      ok: false,
      reason: `only ${counts.size} of the ${levelCounts.join(" x ")} combinations of factor levels have runs (the factors are not fully crossed)`,
    };
  }
  let smallest = Infinity;
  for (const count of counts.values()) smallest = Math.min(smallest, count);
  return { ok: true, value: smallest };
}
