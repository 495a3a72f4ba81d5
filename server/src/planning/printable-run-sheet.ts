/**
 * The printable run sheet for the shop floor: the runs of a `.trial` file in run order with their settings,
 * an empty box per response (and per covariate) to write the measurement in, and a notes column; the
 * file's title and the seed that fixed the order are printed on top. Measured values are shown as
 * recorded and excluded runs are marked, so a half-done sheet can be reprinted.
 *
 * HTML: a standalone page; every string from the file is escaped (`&`, `<`, `>`, `"`, `'`). Markdown: a
 * GitHub-style table; every ASCII punctuation character of a string from the file is backslash-escaped
 * (CommonMark 0.31 §2.4 allows this for any ASCII punctuation), so `|` cannot break the table.
 */
import { parseTrial } from "../../../grammar/src/parse.js";
import { buildDesign } from "../analysis/build-design.js";
import { ValueStatus } from "../analysis/design.js";

/** Output formats of the printable sheet. */
export type SheetFormat = "html" | "md";

/** One row of the sheet: run number, id, setting per factor, then response/covariate cells (blank = box). */
interface SheetRow {
  readonly order: number;
  readonly id: string;
  readonly settings: readonly string[];
  readonly values: readonly string[];
  readonly note: string;
}

/** The printable sheet of `text` in `format`. Never throws; a file without runs gives a sheet that says so. */
export function printableRunSheet(text: string, format: SheetFormat): string {
  const file = parseTrial(text);
  const { design } = buildDesign(file);
  const title = design.title ?? "Untitled trial";
  const seed = design.settings.seed;
  const factorHeads = design.factors.map((f) => (f.unit ? `${f.name} (${f.unit})` : f.name));
  const valueHeads = [...design.covariates.map((c) => (c.unit ? `${c.name} (${c.unit})` : c.name)), ...design.responses.map((r) => (r.unit ? `${r.name} (${r.unit})` : r.name))];
  const rows: SheetRow[] = [];
  const runs = design.runs;
  for (let r = 0; r < runs.count; r++) {
    const settings = design.factors.map((f, k) => {
      const level = runs.levels[k]![r]!;
      return level >= 0 ? f.levels[level]!.name : "";
    });
    const values = [
      ...design.covariates.map((_, k) => (runs.covariateStatus[k]![r] === ValueStatus.Measured ? runs.covariateTexts[k]![r]! : "")),
      ...design.responses.map((_, k) => (runs.responseStatus[k]![r] === ValueStatus.Measured ? runs.responseTexts[k]![r]! : "")),
    ];
    const mark = file.runs?.rows.excluded.get(r);
    rows.push({ order: r + 1, id: runs.ids[r]!, settings, values, note: mark ? `excluded${mark.reason ? `: ${mark.reason.text}` : ""}` : "" });
  }
  const seedText = seed !== undefined ? `seed ${seed}` : "no seed in the file";
  return format === "html" ? html(title, seedText, factorHeads, valueHeads, rows) : markdown(title, seedText, factorHeads, valueHeads, rows);
}

/** Escapes a string for HTML text and attribute values. */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

/** Backslash-escapes every ASCII punctuation character, and writes line breaks as spaces. */
export function escapeMarkdown(s: string): string {
  return s.replace(/[\r\n]+/g, " ").replace(/[!-/:-@[-`{-~]/g, (c) => `\\${c}`);
}

function html(title: string, seedText: string, factorHeads: readonly string[], valueHeads: readonly string[], rows: readonly SheetRow[]): string {
  const e = escapeHtml;
  const head = ["run", "id", ...factorHeads, ...valueHeads, "notes"].map((h) => `<th>${e(h)}</th>`).join("");
  const body = rows
    .map((row) => {
      const cells = [
        `<td class="num">${row.order}</td>`,
        `<td>${e(row.id)}</td>`,
        ...row.settings.map((s) => `<td>${e(s)}</td>`),
        ...row.values.map((v) => (v === "" ? `<td class="box"></td>` : `<td class="num">${e(v)}</td>`)),
        `<td class="box notes">${e(row.note)}</td>`,
      ];
      return `<tr>${cells.join("")}</tr>`;
    })
    .join("\n");
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>Run sheet — ${e(title)}</title>
<style>
body { font-family: sans-serif; margin: 1.5em; }
table { border-collapse: collapse; }
th, td { border: 1px solid #444; padding: 0.35em 0.6em; text-align: left; }
td.num { text-align: right; }
td.box { min-width: 5em; height: 1.6em; }
td.notes { min-width: 14em; }
@media print { body { margin: 0; } tr { page-break-inside: avoid; } }
</style>
</head>
<body>
<h1>Run sheet — ${e(title)}</h1>
<p>Make the runs in this order (${e(seedText)}). Write each measurement in its box; note anything unusual.</p>
<table>
<thead><tr>${head}</tr></thead>
<tbody>
${body}
</tbody>
</table>
</body>
</html>
`;
}

function markdown(title: string, seedText: string, factorHeads: readonly string[], valueHeads: readonly string[], rows: readonly SheetRow[]): string {
  const m = escapeMarkdown;
  const heads = ["run", "id", ...factorHeads, ...valueHeads, "notes"].map(m);
  const lines = [`# Run sheet — ${m(title)}`, "", `Make the runs in this order (${m(seedText)}). Write each measurement in its cell; note anything unusual.`, ""];
  lines.push(`| ${heads.join(" | ")} |`, `|${heads.map((_, k) => (k === 0 ? "---:" : "---")).join("|")}|`);
  for (const row of rows) lines.push(`| ${[String(row.order), m(row.id), ...row.settings.map(m), ...row.values.map(m), m(row.note)].join(" | ")} |`);
  return lines.join("\n") + "\n";
}
