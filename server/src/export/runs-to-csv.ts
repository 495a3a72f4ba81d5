/**
 * Writes the runs table of a `.trial` file as CSV (RFC 4180, Shafranovich 2005): the inverse of
 * `csvToTrial` in server/src/import/. One header record with the runs table's column names in file order
 * (`id` first when the table has one, then factors and covariates, then responses), one record per run in
 * run order, every value exactly as written in the file (unquoted, never through a number). A pending
 * value is written as `pendingText` (default `?`, which `import` reads back as pending). When any run is
 * excluded, a last column `excluded` holds the reason (`yes` when none was given) and is empty elsewhere;
 * `import` reports such a column as not imported rather than dropping it silently.
 *
 * Fields are quoted only when they must be (they hold a comma, a double quote, a line break, or begin or
 * end with a space or tab, which CSV readers commonly trim), with `"` doubled; records end in CRLF as RFC
 * 4180 §2 prescribes. Known limit: `import` trims spaces around every field, quoted or not, so a value
 * with leading or trailing spaces does not survive a round trip.
 */
import type { TrialFile } from "../../../grammar/src/ast.js";
import { LineIndex } from "../../../grammar/src/line-index.js";
import { runRowCells } from "../analysis/run-row-cells.js";

/** Options of `runsToCsv`. */
export interface RunsToCsvOptions {
  /** Written for a pending (`?`) cell; default `?`. */
  readonly pendingText?: string;
}

/** A problem found while exporting, at a 1-based line of the `.trial` file. */
export interface ExportWarning {
  readonly line: number;
  readonly message: string;
}

/** The CSV text and what could not be exported faithfully, or why nothing could be exported. */
export type RunsToCsvResult =
  | { readonly ok: true; readonly text: string; readonly rows: number; readonly warnings: readonly ExportWarning[] }
  | { readonly ok: false; readonly reason: string };

/** Exports the runs of a parsed file as CSV text. Never throws. */
export function runsToCsv(file: TrialFile, options: RunsToCsvOptions = {}): RunsToCsvResult {
  const table = file.runs;
  if (!table) return { ok: false, reason: "the file has no runs table" };
  const pendingText = options.pendingText ?? "?";
  const source = file.source;
  const rows = table.rows;
  const index = new LineIndex(source);
  const lineOf = (offset: number) => index.positionAt(offset).line + 1;
  const header = table.columns.map((c) => c.text);
  const hasExcluded = rows.excluded.size > 0;
  if (hasExcluded) header.push(uniqueName("excluded", header));

  const warnings: ExportWarning[] = [];
  const records: string[] = [header.map(csvField).join(",")];
  for (let r = 0; r < rows.count; r++) {
    const fields = new Array<string>(header.length).fill("");
    const { cells, extra } = runRowCells(source, table, r);
    for (const cell of cells) fields[cell.column] = cell.pending ? pendingText : cell.text;
    if (extra > 0 || cells.length < table.columns.length) {
      warnings.push({
        line: lineOf(rows.rowStart[r]!),
        message: extra > 0 ? `${extra} cell${extra === 1 ? "" : "s"} beyond the header's columns not exported` : `${table.columns.length - cells.length} missing cell${table.columns.length - cells.length === 1 ? "" : "s"} exported as empty`,
      });
    }
    if (hasExcluded) {
      const mark = rows.excluded.get(r);
      fields[header.length - 1] = mark ? (mark.reason?.text ?? "yes") : "";
    }
    records.push(fields.map(csvField).join(","));
  }
  return { ok: true, text: records.join("\r\n") + "\r\n", rows: rows.count, warnings };
}

/** One CSV field, quoted when RFC 4180 requires it or when surrounding blanks would be trimmed by readers. */
export function csvField(text: string): string {
  return /[",\r\n]|^[ \t]|[ \t]$/.test(text) ? '"' + text.replace(/"/g, '""') + '"' : text;
}

function uniqueName(name: string, taken: readonly string[]): string {
  if (!taken.includes(name)) return name;
  for (let k = 2; ; k++) if (!taken.includes(`${name}-${k}`)) return `${name}-${k}`;
}
