/**
 * Hovers: a response's ANOVA table, verdicts, letter groups, best level, model checks and power; a factor's
 * level means with their letter groups; a level's statistics; a value cell's fitted value and residuals; and
 * on `replicates` the power of each main effect and the replicates the power target needs.
 */
import { symbolAt } from "../analysis/symbol-at.js";
import type { LevelMean, PowerResult, ResponseAnalysis } from "../analysis/results.js";
import { sigmaSourceWords } from "../text/comparisons-text.js";
import { formatF, formatNumber, formatP, formatStatistic, MISSING } from "../text/format-number.js";
import { designsText } from "../text/designs-text.js";
import { termRows, termVerdict } from "../text/verdicts.js";
import { type Hover, MarkupKind, type Position } from "vscode-languageserver";
import { positionToOffset, spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** The hover at `position`, or null where there is nothing to say. */
export function hover(doc: AnalyzedDocument, position: Position): Hover | null {
  const { file } = doc;
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
    const power = powerLines(r, unit);
    if (power.length > 0) lines.push("", ...power);
    return lines.join("\n");
  }
  // Designs with error strata test terms against other rows: the column says which.
  const strata = r.anova.some((row) => row.error !== undefined);
  lines.push(`| Source | df | SS | MS | F | p |${strata ? " Tested against |" : ""}`, `|:--|--:|--:|--:|--:|--:|${strata ? ":--|" : ""}`);
  for (const row of r.anova) {
    lines.push(
      `| ${md(row.source)} | ${row.df} | ${formatStatistic(row.ss)} | ${row.ms === undefined ? "" : formatStatistic(row.ms)} | ${row.f === undefined ? "" : formatF(row.f)} | ${row.p === undefined ? "" : formatP(row.p)} |${strata ? ` ${md(row.error ?? "")} |` : ""}`,
    );
  }
  lines.push("", `R² = ${formatNumber(r.rSquared)} · residual SD = ${formatNumber(r.residualSd)}${unit && r.residualSd !== null ? ` ${md(unit)}` : ""}`);
  const verdicts = termRows(r).map((row) => `- ${md(termVerdict(row, r))}`);
  if (verdicts.length > 0) lines.push("", ...verdicts);
  for (const term of [...new Set((r.groups ?? []).map((g) => g.term))]) {
    const groups = r.groups!.filter((g) => g.term === term).map((g) => `${md(g.level)} **${md(g.letters)}**`);
    lines.push("", `Groups of ${md(term)} (Tukey HSD, α = ${r.alpha}; levels sharing a letter do not differ): ${groups.join(" · ")}`);
    const best = bestLine(r, term);
    if (best) lines.push("", best);
  }
  const design = designsText(r).filter((l) => l.trim() !== "").map((l) => l.replace(/^  /, ""));
  if (design.length > 0) lines.push("", "```text", ...design, "```");
  const checks = checksLine(r);
  if (checks) lines.push("", checks);
  const power = powerLines(r, unit);
  if (power.length > 0) lines.push("", ...power);
  return lines.join("\n");
}

/** The best level of `term` by the response's goal, with the levels indistinguishable from it. */
function bestLine(r: ResponseAnalysis, term: string): string | undefined {
  const best = r.best?.find((b) => b.term === term);
  if (!best) return undefined;
  const others = best.indistinguishable.length > 0 ? `; not distinguishable from it: ${best.indistinguishable.map(md).join(", ")}` : "; it differs from every other level";
  return `Best ${md(term)} by goal (${best.goal}): **${md(best.level)}**${others}.`;
}

/** One line with the model checks that could be computed, or undefined when there are none. */
function checksLine(r: ResponseAnalysis): string | undefined {
  const k = r.checks;
  if (!k) return undefined;
  const parts: string[] = [];
  if (k.brownForsythe) parts.push(`Brown–Forsythe F(${k.brownForsythe.df1}, ${k.brownForsythe.df2}) = ${formatF(k.brownForsythe.statistic)}, p = ${formatP(k.brownForsythe.p)}`);
  if (k.levene) parts.push(`Levene F = ${formatF(k.levene.statistic)}, p = ${formatP(k.levene.p)}`);
  if (k.bartlett) parts.push(`Bartlett χ²(${k.bartlett.df}) = ${formatF(k.bartlett.statistic)}, p = ${formatP(k.bartlett.p)}`);
  if (k.shapiroWilk) parts.push(`Shapiro–Wilk W = ${formatNumber(k.shapiroWilk.w, 4)}, p = ${formatP(k.shapiroWilk.p)}`);
  if (k.outliers) parts.push(k.outliers.length === 0 ? "no outlier (Bonferroni)" : `outliers: ${k.outliers.map((o) => md(o.run)).join(", ")}`);
  if (parts.length === 0) return undefined;
  return `Checks${k.groupsBy ? ` (groups: ${md(k.groupsBy)})` : ""}: ${parts.join("; ")}.`;
}

/** One bullet per main effect: its power, the σ it used and where σ came from, and the replicates needed. */
function powerLines(r: ResponseAnalysis, unit: string | undefined): string[] {
  return (r.power ?? []).map((p) => `- ${powerSentence(r.name, p, unit)}`);
}

function powerSentence(response: string, p: PowerResult, unit: string | undefined): string {
  const u = unit ? ` ${md(unit)}` : "";
  const needed = p.replicatesNeeded === null ? "no count up to 1000 reaches it" : `${p.replicatesNeeded} replicate${p.replicatesNeeded === 1 ? "" : "s"} reach it`;
  return `Power of ${md(p.term)} for ${md(response)}: ${formatNumber(p.power, 2)} with ${p.replicates} replicate${p.replicates === 1 ? "" : "s"} to detect ${p.difference}${u} (σ = ${formatNumber(p.sigma, 3)}${u} ${sigmaSourceWords(p.sigmaSource)}); target ${p.target}: ${needed}.`;
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
    const letters = new Map((r.groups ?? []).filter((g) => g.term === factor).map((g) => [g.level, g.letters] as const));
    if (letters.size > 0) {
      parts.push("", "| Level | n | Mean | SD | CI | Group |", "|:--|--:|--:|--:|:--|:--|");
      for (const m of means) parts.push(`| ${md(m.level)} | ${m.n} | ${formatNumber(m.mean)} | ${formatNumber(m.sd)} | ${interval(m)} | ${md(letters.get(m.level) ?? "")} |`);
      parts.push("", "Levels sharing a letter do not differ (Tukey HSD).");
    } else {
      parts.push("", "| Level | n | Mean | SD | CI |", "|:--|--:|--:|--:|:--|");
      for (const m of means) parts.push(`| ${md(m.level)} | ${m.n} | ${formatNumber(m.mean)} | ${formatNumber(m.sd)} | ${interval(m)} |`);
    }
    const best = bestLine(r, factor);
    if (best) parts.push("", best);
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

/**
 * Markdown for `replicates`: per response with `plan detect`, the power of each main effect's F test and the
 * replicates the power target needs (extensions/power.ts); what is missing when power cannot be computed.
 */
export function replicatesHover(doc: AnalyzedDocument): string {
  const { design, responses } = doc.analysis;
  const n = design.settings.replicates;
  const lines = [`**replicates${n !== undefined ? ` ${n}` : ""}**: runs per cell of the design.`];
  const sized = design.responses.filter((x) => x.detect !== undefined);
  if (sized.length === 0) {
    lines.push("", "Power is computed for a response with `detect <response> <difference>` in the plan, and `sigma <response> <value>` until runs are measured.");
    return lines.join("\n");
  }
  for (const response of sized) {
    const r = responses.find((x) => x.name === response.name);
    const power = r?.power ?? [];
    if (power.length === 0) {
      const why = response.sigma === undefined ? ` no error SD yet: add \`sigma ${md(response.name)} <value>\` to the plan` : " see the diagnostics on `detect` for why";
      lines.push("", `${md(response.name)}: power not computed:${why}.`);
      continue;
    }
    const most = power.some((p) => p.replicatesNeeded === null) ? null : Math.max(...power.map((p) => p.replicatesNeeded!));
    lines.push("", ...power.map((p) => `- ${powerSentence(response.name, p, response.unit)}`));
    lines.push("", most === null ? `${md(response.name)}: no number of replicates up to 1000 reaches the target for every term.` : `${md(response.name)}: **${most}** replicate${most === 1 ? "" : "s"} reach the target ${power[0]!.target} for every term.`);
  }
  return lines.join("\n");
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
