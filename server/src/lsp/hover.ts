/**
 * Hovers: a response's ANOVA table and verdicts, a factor's level means, a level's statistics, a value
 * cell's fitted value and residuals, and what `replicates` will show once power exists.
 */
import { symbolAt } from "../analysis/symbol-at.js";
import type { LevelMean, ResponseAnalysis } from "../analysis/results.js";
import { formatF, formatNumber, formatP, formatStatistic, MISSING } from "../text/format-number.js";
import { termRows, termVerdict } from "../text/verdicts.js";
import { type Hover, MarkupKind, type Position } from "vscode-languageserver";
import { positionToOffset, spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** The hover at `position`, or null where there is nothing to say. */
export function hover(doc: AnalyzedDocument, position: Position): Hover | null {
  const { file } = doc.analysis;
  const found = symbolAt(file, positionToOffset(doc.lineIndex, position));
  if (!found) return null;
  let markdown: string | undefined;
  switch (found.kind) {
    case "symbol":
      if (found.key.kind === "response") markdown = responseHover(doc, found.key.name);
      else if (found.key.kind === "factor") markdown = factorHover(doc, found.key.name);
      else if (found.key.kind === "level") markdown = levelHover(doc, found.key.factor, found.key.name);
      else markdown = covariateHover(doc, found.key.name);
      break;
    case "value":
      markdown = valueHover(doc, found.response, found.row);
      break;
    case "plan-keyword":
      if (found.keyword === "replicates") markdown = replicatesHover(doc);
      break;
    default:
      break;
  }
  return markdown === undefined ? null : { contents: { kind: MarkupKind.Markdown, value: markdown }, range: spanToRange(doc.lineIndex, found.span) };
}

/** Markdown for a response: ANOVA table, R², residual SD and one verdict per term. */
export function responseHover(doc: AnalyzedDocument, name: string): string {
  const r = doc.analysis.responses.find((x) => x.name === name);
  const unit = doc.analysis.design.responses.find((x) => x.name === name)?.unit;
  if (!r) return `**${md(name)}**: not analysed (see the diagnostics on its declaration).`;
  const lines = [`**${md(name)}**${unit ? ` (${md(unit)})` : ""} · ${r.n} measured run${r.n === 1 ? "" : "s"} · Type ${r.ssType} sums of squares`, ""];
  if (r.anova.length === 0) {
    lines.push("No ANOVA yet: see the diagnostics for why.");
    return lines.join("\n");
  }
  lines.push("| Source | df | SS | MS | F | p |", "|:--|--:|--:|--:|--:|--:|");
  for (const row of r.anova) {
    lines.push(
      `| ${md(row.source)} | ${row.df} | ${formatStatistic(row.ss)} | ${row.ms === undefined ? "" : formatStatistic(row.ms)} | ${row.f === undefined ? "" : formatF(row.f)} | ${row.p === undefined ? "" : formatP(row.p)} |`,
    );
  }
  lines.push("", `R² = ${formatNumber(r.rSquared)} · residual SD = ${formatNumber(r.residualSd)}${unit && r.residualSd !== null ? ` ${md(unit)}` : ""}`);
  const verdicts = termRows(r).map((row) => `- ${md(termVerdict(row, r))}`);
  if (verdicts.length > 0) lines.push("", ...verdicts);
  return lines.join("\n");
}

/** Markdown for a factor: per response, the mean of each level with its confidence interval. */
export function factorHover(doc: AnalyzedDocument, factor: string): string {
  const f = doc.analysis.design.factors.find((x) => x.name === factor);
  const head = `**factor ${md(factor)}**${f ? ` · ${f.levels.length} level${f.levels.length === 1 ? "" : "s"} · ${f.role}` : ""}`;
  const parts = [head];
  for (const r of doc.analysis.responses) {
    const means = r.means.filter((m) => m.term === factor);
    parts.push("", `${md(r.name)}: level means with ${percent(r.confidence)} intervals`);
    if (means.length === 0) {
      parts.push("", "No means yet (no measured runs, or the factor is not in the analysis).");
      continue;
    }
    parts.push("", "| Level | n | Mean | SD | CI |", "|:--|--:|--:|--:|:--|");
    for (const m of means) parts.push(`| ${md(m.level)} | ${m.n} | ${formatNumber(m.mean)} | ${formatNumber(m.sd)} | ${interval(m)} |`);
  }
  return parts.join("\n");
}

/** Markdown for a level: per response, its n, mean, SD and confidence interval. */
export function levelHover(doc: AnalyzedDocument, factor: string, level: string): string {
  const declared = doc.analysis.design.factors.find((x) => x.name === factor)?.levels.some((l) => l.name === level) ?? false;
  const parts = [`**${md(level)}** · level of factor ${md(factor)}${declared ? "" : " (not declared)"}`];
  for (const r of doc.analysis.responses) {
    const m = r.means.find((x) => x.term === factor && x.level === level);
    parts.push(
      "",
      m
        ? `${md(r.name)}: n = ${m.n}, mean = ${formatNumber(m.mean)}, SD = ${formatNumber(m.sd)}, ${percent(r.confidence)} CI ${interval(m)}`
        : `${md(r.name)}: no measured runs at this level yet.`,
    );
  }
  return parts.join("\n");
}

/** Markdown for a value cell: fitted value, residual and studentized residual of that run. */
export function valueHover(doc: AnalyzedDocument, response: string, row: number): string {
  const r = doc.analysis.responses.find((x) => x.name === response);
  const id = doc.analysis.design.runs.ids[row] ?? String(row + 1);
  const head = `**${md(response)}**, run ${md(id)}`;
  if (doc.analysis.design.runs.excluded[row]) return `${head}: excluded from the analysis.`;
  const residual = r?.residuals.find((x) => x.row === row);
  if (!r || !residual) return `${head}: not in the analysis (pending, not a number, or the ANOVA could not be fitted).`;
  return [
    head,
    "",
    `fitted = ${formatNumber(residual.fitted)} · residual = ${formatNumber(residual.residual)} · studentized residual = ${formatNumber(residual.studentized)}`,
  ].join("\n");
}

/** Markdown for a covariate: its common slope per response (ANCOVA). */
export function covariateHover(doc: AnalyzedDocument, covariate: string): string {
  const parts = [`**covariate ${md(covariate)}**`];
  for (const r of doc.analysis.responses) {
    const s = r.slopes.find((x) => x.covariate === covariate);
    parts.push("", s ? `${md(r.name)}: slope = ${formatNumber(s.slope)} (SE ${formatNumber(s.standardError)})` : `${md(r.name)}: no slope estimated.`);
  }
  return parts.join("\n");
}

/** Markdown for `replicates`: power is not computed yet, and the hover says so instead of guessing. */
export function replicatesHover(doc: AnalyzedDocument): string {
  const n = doc.analysis.design.settings.replicates;
  return [
    `**replicates${n !== undefined ? ` ${n}` : ""}**: runs per cell of the design.`,
    "",
    "Power and the replicates needed to detect the `detect` difference are not available yet: Trialbook does not compute power so far.",
  ].join("\n");
}

function interval(m: LevelMean): string {
  return m.lower === null || m.upper === null ? MISSING : `[${formatNumber(m.lower)}, ${formatNumber(m.upper)}]`;
}

function percent(confidence: number): string {
  return `${formatNumber(confidence * 100)}%`;
}

/** Escapes Markdown table and emphasis characters in user text. */
function md(text: string): string {
  return text.replace(/[\\|*_`[\]<>]/g, (c) => `\\${c}`);
}

export type { ResponseAnalysis };
