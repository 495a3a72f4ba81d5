import { writeFile } from "node:fs/promises";
import { extname, resolve } from "node:path";
import { analyzeDocument } from "../analysis/analyze-document.js";
import type { SumsOfSquaresType } from "../analysis/design.js";
import { choice, parseArguments, probability } from "./arguments.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { readTrialFile } from "./read-text.js";

export const REPORT_USAGE = `Usage: trialbook report FILE -o OUT.html|OUT.md [--format html|markdown] [--ss-type I|II|III] [--alpha A] [--confidence C]
  Writes the analysis report with its plots: a self-contained HTML page (inline SVG, no scripts, no
  external resources) or Markdown with inline SVG. The format follows the extension of OUT unless
  --format says otherwise; '-o -' writes to standard output. Exit code 1 when the file has errors.`;

/** `trialbook report`: the report of one file as HTML or Markdown, written to a file or stdout. */
export async function reportCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, {
    output: { type: "string", short: "o" },
    format: { type: "string" },
    "ss-type": { type: "string" },
    alpha: { type: "string" },
    confidence: { type: "string" },
  });
  if (positionals.length !== 1) throw new UsageError("report takes exactly one .trial file.");
  const output = values.output;
  if (typeof output !== "string" || output === "") throw new UsageError("Say where to write the report with -o OUT.html or -o OUT.md.");
  const format = choice(values.format, "format", ["html", "markdown"] as const) ?? formatOf(output);
  const ssType = choice<SumsOfSquaresType>(values["ss-type"], "ss-type", ["I", "II", "III"]);
  const alpha = probability(values.alpha, "alpha");
  const confidence = probability(values.confidence, "confidence");
  const path = positionals[0]!;
  const text = await readTrialFile(resolve(io.cwd, path)).catch(() => {
    throw new UsageError(`Cannot read '${path}'.`);
  });
  const analysis = analyzeDocument(text, {}, { ...(ssType ? { ssType } : {}), ...(alpha ? { alpha } : {}), ...(confidence ? { confidence } : {}) });
  // Loaded on demand: the plotting libraries are most of the bundle, and no other verb needs them.
  const { renderReportHtml, renderReportMarkdown } = await import("../report/render-report.js");
  const report = format === "markdown" ? await renderReportMarkdown(analysis) : await renderReportHtml(analysis);
  if (output === "-") io.stdout(report);
  else {
    try {
      await writeFile(resolve(io.cwd, output), report, "utf8");
    } catch (error) {
      io.stderr(`trialbook report: cannot write '${output}' (${error instanceof Error ? error.message : String(error)}).\n`);
      return EXIT_PROBLEMS;
    }
    io.stderr(`trialbook report: wrote ${output}\n`);
  }
  return analysis.diagnostics.some((d) => d.severity === "error") ? EXIT_PROBLEMS : EXIT_OK;
}

function formatOf(output: string): "html" | "markdown" {
  const ext = extname(output).toLowerCase();
  if (ext === ".md" || ext === ".markdown") return "markdown";
  if (ext === ".html" || ext === ".htm" || output === "-") return "html";
  throw new UsageError(`Cannot tell the format from '${output}': use an .html or .md name, or --format.`);
}
