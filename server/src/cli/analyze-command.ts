import { resolve } from "node:path";
import type { SumsOfSquaresType } from "../analysis/design.js";
import { alignColumns } from "../text/align-columns.js";
import { CAUTION } from "../text/caution.js";
import { formatF, formatNumber, formatP, formatStatistic, MISSING } from "../text/format-number.js";
import { termRows, termVerdict } from "../text/verdicts.js";
import { comparisonsText } from "../text/comparisons-text.js";
import { designsText } from "../text/designs-text.js";
import type { DocumentAnalysis, ResponseAnalysis } from "../analysis/results.js";
import { VERSION } from "../version.js";
import { choice, parseArguments, probability } from "./arguments.js";
import { locateDiagnostics } from "./check-command.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { analyzeTrialText, readTrialForAnalysis } from "./read-text.js";

export const ANALYZE_USAGE = `Usage: trialbook analyze FILE... [--format text|json] [--ss-type I|II|III] [--alpha A] [--confidence C]
  Prints the ANOVA table, R², residual SD and means of every response (JSON: one file at a time).
  Flags override the file's plan for this run only. Exit code 1 when a file has errors, 0 otherwise.`;

/** `trialbook analyze`: results of one file as text or as the JSON contract. */
export async function analyzeCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, {
    format: { type: "string" },
    "ss-type": { type: "string" },
    alpha: { type: "string" },
    confidence: { type: "string" },
  });
  const format = choice(values.format, "format", ["text", "json"] as const) ?? "text";
  if (positionals.length === 0) throw new UsageError("analyze needs a .trial file.");
  if (format === "json" && positionals.length !== 1) throw new UsageError("analyze --format json takes exactly one .trial file.");
  const ssType = choice<SumsOfSquaresType>(values["ss-type"], "ss-type", ["I", "II", "III"]);
  const alpha = probability(values.alpha, "alpha");
  const confidence = probability(values.confidence, "confidence");
  let exit = EXIT_OK;
  for (const path of positionals) {
    const read = await readTrialForAnalysis(resolve(io.cwd, path), io.helperWorker).catch(() => {
      throw new UsageError(`Cannot read '${path}'.`);
    });
    const text = read.text;
    const analysis = analyzeTrialText(read, { ...(ssType ? { ssType } : {}), ...(alpha ? { alpha } : {}), ...(confidence ? { confidence } : {}) }, io);
    const diagnostics = locateDiagnostics(text, analysis.diagnostics);
    io.stdout(format === "json" ? JSON.stringify(analysisJson(path, analysis, diagnostics), null, 2) + "\n" : analysisText(path, analysis, diagnostics));
    if (diagnostics.some((d) => d.severity === "error")) exit = EXIT_PROBLEMS;
  }
  return exit;
}

/** The `analyze --format json` document (design brief §5; docs/json-output.md). */
export function analysisJson(path: string, analysis: DocumentAnalysis, diagnostics: ReturnType<typeof locateDiagnostics>): unknown {
  return { trialbook: VERSION, file: path, diagnostics, responses: analysis.responses };
}

/** The text report: per response an aligned ANOVA table, fit summary, verdicts in words and means. */
export function analysisText(path: string, analysis: DocumentAnalysis, diagnostics: ReturnType<typeof locateDiagnostics>): string {
  const out: string[] = [];
  const title = analysis.design.title;
  out.push(title ? `${path}: ${title}` : path);
  const errors = diagnostics.filter((d) => d.severity === "error");
  const warnings = diagnostics.filter((d) => d.severity === "warning");
  if (errors.length + warnings.length > 0) {
    out.push("");
    for (const d of [...errors, ...warnings]) out.push(`  ${path}:${d.line}:${d.column}: ${d.severity} ${d.code}: ${d.message}`);
  }
  for (const response of analysis.responses) out.push("", ...responseText(response, analysis));
  out.push("", CAUTION, "");
  return out.join("\n");
}

function responseText(r: ResponseAnalysis, analysis: DocumentAnalysis): string[] {
  const unit = analysis.design.responses.find((x) => x.name === r.name)?.unit;
  const lines = [`${r.name}${unit ? ` (${unit})` : ""}: ${r.n} measured run${r.n === 1 ? "" : "s"}, Type ${r.ssType} sums of squares`];
  if (r.anova.length === 0) {
    lines.push("  No analysis yet (see the diagnostics above).");
    return lines;
  }
  // Designs with error strata test terms against other rows: show which, so the F can be checked by hand.
  const strata = r.anova.some((row) => row.error !== undefined);
  const table = [["Source", "df", "SS", "MS", "F", "p", ...(strata ? ["Tested against"] : [])]];
  for (const row of r.anova) {
    table.push([
      row.source,
      String(row.df),
      formatStatistic(row.ss),
      row.ms === undefined ? "" : formatStatistic(row.ms),
      row.f === undefined ? "" : formatF(row.f),
      row.p === undefined ? "" : formatP(row.p),
      ...(strata ? [row.error ?? ""] : []),
    ]);
  }
  lines.push("", ...alignColumns(table, { align: ["left", "right", "right", "right", "right", "right", "left"] }).map((l) => "  " + l));
  lines.push("", `  R² = ${formatNumber(r.rSquared)}   residual SD = ${formatNumber(r.residualSd)}${unit && r.residualSd !== null ? ` ${unit}` : ""}`);
  const verdicts = termRows(r).map((row) => termVerdict(row, r));
  if (verdicts.length > 0) lines.push("", ...verdicts.map((v) => "  " + v));
  if (r.means.length > 0) {
    const level = Math.round(r.confidence * 100);
    const means = [["Term", "Level", "n", "Mean", "SD", `${level}% CI`]];
    for (const m of r.means) {
      means.push([m.term, m.level, String(m.n), formatNumber(m.mean, 5), formatNumber(m.sd), m.lower === null || m.upper === null ? MISSING : `${formatNumber(m.lower, 5)} to ${formatNumber(m.upper, 5)}`]);
    }
    lines.push("", ...alignColumns(means, { align: ["left", "left", "right", "right", "right", "left"] }).map((l) => "  " + l));
  }
  if (r.slopes.length > 0) {
    lines.push("");
    for (const s of r.slopes) lines.push(`  Slope of ${r.name} on ${s.covariate}: ${formatNumber(s.slope)} (SE ${formatNumber(s.standardError)})`);
    for (const h of r.slopeHomogeneity) lines.push(`  Equal slopes across ${h.term}: F(${h.df1}, ${h.df2}) = ${formatF(h.f)}, p = ${formatP(h.p)}`);
  }
  // Comparisons, checks, alternatives and power (server/src/text/comparisons-text.ts).
  lines.push(...comparisonsText(r));
  lines.push(...designsText(r));
  return lines;
}
