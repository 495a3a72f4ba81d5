import { LineIndex } from "../../../grammar/src/line-index.js";
import type { DesignFactor } from "../analysis/design.js";
import type { DocumentAnalysis, ResponseAnalysis } from "../analysis/results.js";
import { CAUTION } from "../text/caution.js";
import { formatF, formatNumber, formatP, formatStatistic, MISSING } from "../text/format-number.js";
import { termRows, termVerdict } from "../text/verdicts.js";
import { analysisBlocks } from "./analysis-blocks.js";
import type { ReportBlock } from "./blocks.js";
import { runProgress } from "./run-progress.js";

/** A plot of one response after rendering: an SVG, or a note saying why it is missing. */
export type RenderedPlot = { readonly title: string; readonly caption: string; readonly svg: string } | { readonly title: string; readonly note: string };

/**
 * Builds the report's blocks from an analysis and the rendered plots of each response (keyed by response
 * name): title and header, conjecture, design summary, diagnostics, per response the ANOVA table, verdicts,
 * means with intervals, effect sizes, covariate slopes and plots, then excluded runs, the conclusion and
 * the caution. Pure and synchronous; plots are rendered beforehand because rendering is asynchronous.
 */
export function reportBlocks(analysis: DocumentAnalysis, plots: ReadonlyMap<string, readonly RenderedPlot[]>): ReportBlock[] {
  const { file, design } = analysis;
  const blocks: ReportBlock[] = [];
  blocks.push({ kind: "heading", level: 1, text: reportTitle(analysis) });
  const meta: [string, string][] = [];
  if (file.header.owner) meta.push(["Owner", file.header.owner.text]);
  if (file.header.date) meta.push(["Date", file.header.date.text]);
  const progress = runProgress(design);
  meta.push(["Runs", `${progress.done} of ${progress.planned} done${progress.excluded > 0 ? `, ${progress.excluded} excluded` : ""}`]);
  blocks.push({ kind: "meta", items: meta });
  blocks.push({ kind: "caution", text: CAUTION });

  if (file.conjecture?.body?.text.trim()) blocks.push({ kind: "heading", level: 2, text: "Conjecture", id: "conjecture" }, { kind: "text", text: file.conjecture.body.text.trim() });

  blocks.push({ kind: "heading", level: 2, text: "Design", id: "design" }, ...designBlocks(analysis, progress));

  const located = locate(analysis);
  if (located.length > 0) {
    blocks.push({ kind: "heading", level: 2, text: "Diagnostics", id: "diagnostics" });
    blocks.push({ kind: "list", items: located });
  }

  analysis.responses.forEach((response, k) => {
    blocks.push({ kind: "heading", level: 2, text: `Response: ${response.name}`, id: `response-${k + 1}` });
    blocks.push(...responseBlocks(analysis, response, plots.get(response.name) ?? []));
  });

  const excluded = excludedRuns(analysis);
  if (excluded.length > 0) blocks.push({ kind: "heading", level: 2, text: "Excluded runs", id: "excluded" }, { kind: "list", items: excluded });

  blocks.push({ kind: "heading", level: 2, text: "Conclusion", id: "conclusion" });
  if (file.conclusion?.body?.text.trim()) blocks.push({ kind: "text", text: file.conclusion.body.text.trim() });
  else blocks.push({ kind: "note", text: "No conclusion written yet." });
  blocks.push({ kind: "caution", text: CAUTION });
  return blocks;
}

/** The report's title: the trial's title, or a neutral one for a file without `trial "..."`. */
export function reportTitle(analysis: DocumentAnalysis): string {
  return analysis.design.title?.trim() || "Untitled trial";
}

function roleText(f: DesignFactor, factors: readonly DesignFactor[]): string {
  const role = f.role === "fixed" ? "fixed" : f.role;
  return f.within !== undefined ? `${role}, within ${factors[f.within]?.name ?? "?"}` : role;
}

function designBlocks(analysis: DocumentAnalysis, progress: ReturnType<typeof runProgress>): ReportBlock[] {
  const { design } = analysis;
  const blocks: ReportBlock[] = [];
  if (design.factors.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Factors",
      header: ["Factor", "Role", "Levels", "Control", "Unit"],
      numeric: [false, false, false, false, false],
      rows: design.factors.map((f) => [f.name, roleText(f, design.factors), f.levels.map((l) => l.name).join(", "), f.control !== undefined ? (f.levels[f.control]?.name ?? "") : "", f.unit ?? ""]),
    });
  }
  if (design.covariates.length > 0) {
    blocks.push({ kind: "table", caption: "Covariates", header: ["Covariate", "Unit"], numeric: [false, false], rows: design.covariates.map((c) => [c.name, c.unit ?? ""]) });
  }
  if (design.responses.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Responses",
      header: ["Response", "Unit", "Goal", "Specification", "Difference worth finding", "Measured runs"],
      numeric: [false, false, false, false, true, true],
      rows: design.responses.map((r, k) => [r.name, r.unit ?? "", goalText(r.goal, r.target), specText(r.specLower, r.specUpper), r.detect !== undefined ? formatNumber(r.detect) : "", String(progress.measured[k]?.runs ?? 0)]),
    });
  }
  const s = design.settings;
  const plan: [string, string][] = [
    ["Model", design.terms.map((t) => t.name).join(", ") || MISSING],
    ["Replicates", s.replicates !== undefined ? String(s.replicates) : "not stated"],
    ["Runs", `${progress.planned} planned, ${progress.done} done, ${progress.pending} pending, ${progress.excluded} excluded`],
    ["Sums of squares", `Type ${s.ssType}`],
    ["Significance level", String(s.alpha)],
    ["Confidence", `${formatNumber(s.confidence * 100)}%`],
  ];
  if (s.seed !== undefined) plan.push(["Seed", String(s.seed)]);
  blocks.push({ kind: "meta", items: plan });
  return blocks;
}

function goalText(goal: string | undefined, target: number | undefined): string {
  if (goal === "target") return target !== undefined ? `target ${formatNumber(target)}` : "target";
  return goal ?? "";
}

function specText(lower: number | undefined, upper: number | undefined): string {
  if (lower !== undefined && upper !== undefined) return `${formatNumber(lower)} to ${formatNumber(upper)}`;
  if (lower !== undefined) return `≥ ${formatNumber(lower)}`;
  if (upper !== undefined) return `≤ ${formatNumber(upper)}`;
  return "";
}

const SEVERITY_ORDER = { error: 0, warning: 1, information: 2, hint: 3 } as const;

/** Errors and warnings with their line and column (1-based), in file order. */
function locate(analysis: DocumentAnalysis): string[] {
  const index = new LineIndex(analysis.file.source);
  return analysis.diagnostics
    .filter((d) => d.severity === "error" || d.severity === "warning")
    .map((d) => ({ d, p: index.positionAt(d.span.start) }))
    .sort((a, b) => SEVERITY_ORDER[a.d.severity] - SEVERITY_ORDER[b.d.severity] || a.p.line - b.p.line || a.p.character - b.p.character)
    .map(({ d, p }) => `Line ${p.line + 1}, column ${p.character + 1}: ${d.severity} ${d.code}: ${d.message}`);
}

function responseBlocks(analysis: DocumentAnalysis, r: ResponseAnalysis, plots: readonly RenderedPlot[]): ReportBlock[] {
  const unit = analysis.design.responses.find((x) => x.name === r.name)?.unit;
  const blocks: ReportBlock[] = [];
  blocks.push({ kind: "paragraph", text: `${r.n} measured run${r.n === 1 ? "" : "s"}, Type ${r.ssType} sums of squares, significance level ${r.alpha}.` });
  if (r.anova.length === 0) {
    blocks.push({ kind: "note", text: "No analysis yet: see the diagnostics above." });
    return blocks;
  }
  blocks.push({
    kind: "table",
    caption: "Analysis of variance",
    header: ["Source", "df", "Sum of squares", "Mean square", "F", "p"],
    numeric: [false, true, true, true, true, true],
    rows: r.anova.map((row) => [row.source, String(row.df), formatStatistic(row.ss), row.ms === undefined ? "" : formatStatistic(row.ms), row.f === undefined ? "" : formatF(row.f), row.p === undefined ? "" : formatP(row.p)]),
  });
  blocks.push({ kind: "paragraph", text: `R² = ${formatNumber(r.rSquared)}, residual SD = ${formatNumber(r.residualSd)}${unit && r.residualSd !== null ? ` ${unit}` : ""}.` });
  const verdicts = termRows(r).map((row) => termVerdict(row, r));
  if (verdicts.length > 0) blocks.push({ kind: "list", items: verdicts });
  if (r.means.length > 0) {
    const level = formatNumber(r.confidence * 100);
    blocks.push({
      kind: "table",
      caption: `Means with ${level}% confidence intervals`,
      header: ["Term", "Level", "n", "Mean", "SD", "Lower", "Upper"],
      numeric: [false, false, true, true, true, true, true],
      rows: r.means.map((m) => [m.term, m.level, String(m.n), formatNumber(m.mean, 5), formatNumber(m.sd), formatNumber(m.lower, 5), formatNumber(m.upper, 5)]),
    });
  }
  if (r.effectSizes.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Effect sizes",
      header: ["Term", "η²", "partial η²", "ω²"],
      numeric: [false, true, true, true],
      rows: r.effectSizes.map((e) => [e.term, formatNumber(e.etaSquared, 3), formatNumber(e.partialEtaSquared, 3), formatNumber(e.omegaSquared, 3)]),
    });
  }
  if (r.slopes.length > 0) {
    blocks.push({ kind: "table", caption: "Covariate slopes", header: ["Covariate", "Slope", "Standard error"], numeric: [false, true, true], rows: r.slopes.map((s) => [s.covariate, formatNumber(s.slope), formatNumber(s.standardError)]) });
  }
  if (r.adjustedMeans.length > 0) {
    blocks.push({ kind: "table", caption: analysis.design.covariates.length > 0 ? "Means adjusted to the covariate means" : "Model-adjusted (least-squares) means", header: ["Term", "Level", "Adjusted mean", "Standard error"], numeric: [false, false, true, true], rows: r.adjustedMeans.map((m) => [m.term, m.level, formatNumber(m.mean, 5), formatNumber(m.standardError)]) });
  }
  if (r.slopeHomogeneity.length > 0) {
    blocks.push({ kind: "list", items: r.slopeHomogeneity.map((h) => `Equal slopes of ${h.covariate} across ${h.term}: F(${h.df1}, ${h.df2}) = ${formatF(h.f)}, p = ${formatP(h.p)}.`) });
  }
  blocks.push(...analysisBlocks(r));
  for (const plot of plots) {
    if ("svg" in plot) blocks.push({ kind: "plot", title: plot.title, caption: plot.caption, svg: plot.svg });
    else blocks.push({ kind: "heading", level: 3, text: plot.title }, { kind: "note", text: plot.note });
  }
  return blocks;
}

function excludedRuns(analysis: DocumentAnalysis): string[] {
  const rows = analysis.file.runs?.rows;
  if (!rows) return [];
  const items: string[] = [];
  for (const [row, mark] of [...rows.excluded.entries()].sort((a, b) => a[0] - b[0])) {
    const id = analysis.design.runs.ids[row] || `row ${row + 1}`;
    items.push(`${id}: ${mark.reason?.text.trim() || "no reason given"}`);
  }
  return items;
}
