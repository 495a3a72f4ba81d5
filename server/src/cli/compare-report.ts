/**
 * Formats an `AnalysisComparison` as terminal text or as Markdown for a pull-request comment. Pure: no
 * process, file or git access, so the editor's "Trialbook: Compare with Previous Revision" command can use
 * `compareTextsToMarkdown` directly.
 */
import { analyzeDocument } from "../analysis/analyze-document.js";
import type { AnalysisSettings } from "../analysis/build-design.js";
import { type AnalysisComparison, compareAnalyses, type MeanChange, type ResponseComparison, type RunChange, type TermChange } from "../analysis/compare-analyses.js";
import { alignColumns } from "../text/align-columns.js";
import { formatNumber, formatP, MISSING } from "../text/format-number.js";
import { CAUTION } from "../text/caution.js";
import { type TerminalStyle, terminalStyle } from "./terminal-style.js";

/** How the two revisions are named in the output. */
export interface ComparisonLabels {
  /** The file, as the user named it. */
  readonly file: string;
  /** E.g. `HEAD~1` or the old file's path. */
  readonly before: string;
  /** E.g. `working tree` or the new file's path. */
  readonly after: string;
}

/** At most this many runs of each kind (added, removed, edited) are listed; the rest are counted. */
export const RUN_LIST_LIMIT = 50;

const PLAIN: TerminalStyle = terminalStyle({ isTty: false, env: {} });

/** The comparison as aligned plain text (coloured when `style` is enabled). */
export function comparisonText(c: AnalysisComparison, labels: ComparisonLabels, style: TerminalStyle = PLAIN): string {
  const out: string[] = [];
  out.push(style.bold(`Comparing ${labels.file}: ${labels.before} → ${labels.after}`));
  out.push("", runSummary(c));
  const runRows: string[][] = [];
  for (const [kind, sign] of [["added", "+"], ["removed", "-"], ["edited", "~"]] as const) {
    const list = c.runs[kind];
    for (const run of list.slice(0, RUN_LIST_LIMIT)) runRows.push([`  ${sign}`, run.id, runDetail(run)]);
    if (list.length > RUN_LIST_LIMIT) runRows.push([`  ${sign}`, "", `... and ${list.length - RUN_LIST_LIMIT} more ${kind} runs`]);
  }
  if (runRows.length > 0) out.push(...alignColumns(runRows).map((line) => paintRunLine(line, style)));
  if (c.runs.duplicateIds.length > 0) out.push(`  Run ids used more than once (only the first row is compared): ${c.runs.duplicateIds.join(", ")}`);
  if (c.errorsBefore + c.errorsAfter > 0) out.push("", `Errors in the file: ${c.errorsBefore} before, ${c.errorsAfter} after (run 'trialbook check' for details).`);

  for (const r of c.responses) {
    out.push("", style.bold(responseHeading(r)));
    if (r.presence !== "both") continue;
    const flips = r.terms.filter((t) => t.flipped);
    if (flips.length > 0) {
      out.push("  Verdicts that changed:");
      for (const t of flips) out.push(`    ${style.yellow(flipSentence(t, r))}`);
    } else {
      out.push("  No verdict changed.");
    }
    const termsShown = r.terms.filter((t) => t.pMoved || t.presence !== "both");
    if (termsShown.length > 0) {
      const table = [["Term", "p before", "p after", "Verdict before", "Verdict after"]];
      for (const t of termsShown) table.push([t.term, pText(t.pBefore, t.presence !== "after"), pText(t.pAfter, t.presence !== "before"), verdictWord(t.significantBefore, t.presence !== "after"), verdictWord(t.significantAfter, t.presence !== "before")]);
      out.push("", ...alignColumns(table, { align: ["left", "right", "right", "left", "left"] }).map((l) => "  " + l));
    }
    const unchangedTerms = r.terms.length - termsShown.length;
    if (unchangedTerms > 0) out.push(`  ${unchangedTerms} term${unchangedTerms === 1 ? "" : "s"} with unchanged p-value${unchangedTerms === 1 ? "" : "s"}.`);
    const means = r.means.filter((m) => m.moved);
    if (means.length > 0) {
      const table = [["Term", "Level", "n before", "n after", "Mean before", "Mean after", "Shift"]];
      for (const m of means) table.push(meanRow(m));
      out.push("", "  Means that moved:", ...alignColumns(table, { align: ["left", "left", "right", "right", "right", "right", "right"] }).map((l) => "  " + l));
    } else if (r.means.length > 0) {
      out.push("  No level mean moved.");
    }
    out.push(...powerLines(r).map((l) => "  " + l));
  }
  out.push("", CAUTION, "");
  return out.join("\n");
}

/** The comparison as GitHub-flavoured Markdown, ready to post as a pull-request comment. */
export function comparisonMarkdown(c: AnalysisComparison, labels: ComparisonLabels): string {
  const out: string[] = [];
  out.push(`### Trialbook: \`${code(labels.file)}\` (${md(labels.before)} → ${md(labels.after)})`);
  out.push("", `**Runs:** ${runSummary(c).replace(/^Runs: /, "")}`);
  const rows: string[][] = [];
  for (const kind of ["added", "removed", "edited"] as const) {
    const list = c.runs[kind];
    for (const run of list.slice(0, RUN_LIST_LIMIT)) rows.push([kind, `\`${code(run.id)}\``, md(runDetail(run))]);
    if (list.length > RUN_LIST_LIMIT) rows.push([kind, "", `... and ${list.length - RUN_LIST_LIMIT} more`]);
  }
  if (rows.length > 0) out.push("", ...markdownTable(["Change", "Run", "Detail"], rows));
  if (c.runs.duplicateIds.length > 0) out.push("", `Run ids used more than once (only the first row is compared): ${c.runs.duplicateIds.map((id) => `\`${code(id)}\``).join(", ")}`);
  if (c.errorsBefore + c.errorsAfter > 0) out.push("", `> **Errors in the file:** ${c.errorsBefore} before, ${c.errorsAfter} after.`);

  for (const r of c.responses) {
    out.push("", `#### ${md(responseHeading(r))}`);
    if (r.presence !== "both") continue;
    const flips = r.terms.filter((t) => t.flipped);
    if (flips.length > 0) {
      out.push("", "**Verdicts that changed:**", "");
      for (const t of flips) out.push(`- ${md(flipSentence(t, r))}`);
    } else {
      out.push("", "No verdict changed.");
    }
    const termsShown = r.terms.filter((t) => t.pMoved || t.presence !== "both");
    if (termsShown.length > 0) {
      out.push(
        "",
        ...markdownTable(
          ["Term", "p before", "p after", "Verdict before", "Verdict after"],
          termsShown.map((t) => [md(t.term), pText(t.pBefore, t.presence !== "after"), pText(t.pAfter, t.presence !== "before"), verdictWord(t.significantBefore, t.presence !== "after"), t.flipped ? `**${verdictWord(t.significantAfter, true)}**` : verdictWord(t.significantAfter, t.presence !== "before")]),
          ["left", "right", "right", "left", "left"],
        ),
      );
    }
    const means = r.means.filter((m) => m.moved);
    if (means.length > 0) {
      out.push("", "<details><summary>Means that moved</summary>", "");
      out.push(...markdownTable(["Term", "Level", "n before", "n after", "Mean before", "Mean after", "Shift"], means.map((m) => meanRow(m).map(md)), ["left", "left", "right", "right", "right", "right", "right"]));
      out.push("", "</details>");
    } else if (r.means.length > 0) {
      out.push("", "No level mean moved.");
    }
    const power = powerLines(r);
    if (power.length > 0) out.push("", ...power.map(md));
  }
  out.push("", `<sub>${md(CAUTION)}</sub>`, "");
  return out.join("\n");
}

/**
 * Analyses two texts of a `.trial` file and returns the Markdown comparison: the function behind the
 * editor command "Trialbook: Compare with Previous Revision". `defaults` are editor settings (the file's
 * own plan wins over them). Never throws.
 */
export function compareTextsToMarkdown(
  beforeText: string,
  afterText: string,
  labels: ComparisonLabels = { file: "file", before: "previous revision", after: "current" },
  defaults: AnalysisSettings = {},
): string {
  return comparisonMarkdown(compareAnalyses(analyzeDocument(beforeText, defaults), analyzeDocument(afterText, defaults)), labels);
}

function runSummary(c: AnalysisComparison): string {
  const { added, removed, edited, unchanged } = c.runs;
  return `Runs: ${added.length} added, ${removed.length} removed, ${edited.length} edited, ${unchanged} unchanged.`;
}

function runDetail(run: RunChange): string {
  if (run.kind === "added") return `line ${run.lineAfter}`;
  if (run.kind === "removed") return `was line ${run.lineBefore}`;
  return run.cells.map((cell) => `${cell.column} ${cell.before ?? "(none)"} → ${cell.after ?? "(none)"}`).join("; ");
}

function paintRunLine(line: string, style: TerminalStyle): string {
  const sign = line.trimStart()[0];
  return sign === "+" ? style.green(line) : sign === "-" ? style.red(line) : line;
}

function responseHeading(r: ResponseComparison): string {
  if (r.presence === "after") return `${r.name}: new response (${r.nAfter} measured runs)`;
  if (r.presence === "before") return `${r.name}: response removed`;
  const alpha = r.alphaBefore === r.alphaAfter ? `alpha ${r.alphaAfter}` : `alpha ${r.alphaBefore} → ${r.alphaAfter}`;
  return `${r.name}: ${r.nBefore} → ${r.nAfter} measured runs, ${alpha}`;
}

function flipSentence(t: TermChange, r: ResponseComparison): string {
  const p = `p ${formatP(t.pBefore)} → ${formatP(t.pAfter)}`;
  const interaction = t.term.includes(" x ");
  if (t.significantAfter) {
    return interaction ? `${t.term}: now an interaction on ${r.name} at alpha ${r.alphaAfter} (${p}).` : `${t.term}: now changes ${r.name} at alpha ${r.alphaAfter} (${p}).`;
  }
  return interaction
    ? `${t.term}: no longer evidence of an interaction on ${r.name} at alpha ${r.alphaAfter} (${p}).`
    : `${t.term}: no longer evidence that it changes ${r.name} at alpha ${r.alphaAfter} (${p}).`;
}

function verdictWord(significant: boolean | null, present: boolean): string {
  if (!present) return "not in model";
  return significant === null ? "no test" : significant ? "effect" : "no evidence";
}

function pText(p: number | null, present: boolean): string {
  return present ? formatP(p) : MISSING;
}

function meanRow(m: MeanChange): string[] {
  return [
    m.term,
    m.level,
    m.nBefore === null ? MISSING : String(m.nBefore),
    m.nAfter === null ? MISSING : String(m.nAfter),
    formatNumber(m.meanBefore, 5),
    formatNumber(m.meanAfter, 5),
    m.shift === null ? MISSING : (m.shift > 0 ? "+" : "") + formatNumber(m.shift, 4),
  ];
}

function powerLines(r: ResponseComparison): string[] {
  if (!r.power.available) return ["Power: not reported by this analysis (no power results in either revision)."];
  if (r.power.changes.length === 0) return ["Power: reported, but in a form this comparison cannot read."];
  return r.power.changes.map((p) => `Power${p.label ? ` (${p.label})` : ""}: ${formatNumber(p.before, 3)} → ${formatNumber(p.after, 3)}`);
}

/** Escapes text for a Markdown table cell or paragraph: backslash-escapes the characters that format. */
function md(text: string): string {
  return text.replace(/[\\`*_{}[\]<>|#]/g, (c) => "\\" + c).replace(/\r?\n/g, " ");
}

/** Text inside a code span: backticks cannot be escaped there, so they are replaced by a look-alike. */
function code(text: string): string {
  return text.replace(/`/g, "ˋ").replace(/\|/g, "\\|");
}

function markdownTable(header: readonly string[], rows: readonly (readonly string[])[], align?: readonly ("left" | "right")[]): string[] {
  const rule = header.map((_, k) => (align?.[k] === "right" ? "---:" : "---"));
  return [`| ${header.join(" | ")} |`, `| ${rule.join(" | ")} |`, ...rows.map((r) => `| ${r.join(" | ")} |`)];
}
