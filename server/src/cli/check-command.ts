import { resolve } from "node:path";
import type { Span } from "../../../grammar/src/ast.js";
import type { Diagnostic } from "../analysis/diagnostics.js";
import { choice, parseArguments } from "./arguments.js";
import { findTrialFiles } from "./find-trial-files.js";
import { locateOffsets } from "./locate-offsets.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { type SarifDiagnostic, type SarifRegion, sarifLog } from "./sarif.js";
import { createProgress, severityStyle, terminalStyle } from "./terminal-style.js";
import { analyzeTrialText, readTrialForAnalysis, type TrialText } from "./read-text.js";

export const CHECK_USAGE = `Usage: trialbook check [paths...] [--format text|json|sarif] [--max-warnings N]
  Checks .trial files. Directories are searched recursively (default: the current directory), skipping
  hidden entries, node_modules and whatever the repository's .gitignore files exclude; a file named on the
  command line is always checked.
  Text output: one line per diagnostic, path:line:column: severity code: message, and a summary on stderr.
  --format json    {"files": [{"file", "diagnostics": [...]}], "summary": {...}}
  --format sarif   a SARIF 2.1.0 log for code-scanning services (a rule for every diagnostic code)
  --max-warnings N fail when there are more than N warnings (default: warnings never fail)
  Exit codes: 0 no errors and at most N warnings; 1 any error, or more than N warnings;
              2 usage mistake (unknown option, bad value, missing path).`;

/** A diagnostic located by 1-based line and column, as the CLI and the JSON contract report it. */
export interface LocatedDiagnostic {
  readonly severity: Diagnostic["severity"];
  readonly code: string;
  readonly message: string;
  readonly line: number;
  readonly column: number;
}

/** Converts offset-based diagnostics to 1-based lines and columns (UTF-16 columns, as editors count). */
export function locateDiagnostics(text: string, diagnostics: readonly Diagnostic[]): LocatedDiagnostic[] {
  // Only the diagnostics' own offsets are located (locate-offsets.ts), not every line of the text.
  const positions = locateOffsets(text, diagnostics.map((d) => d.span.start));
  return diagnostics
    .map((d, i) => {
      const p = positions[i]!;
      return { severity: d.severity, code: d.code, message: d.message, line: p.line + 1, column: p.character + 1 };
    })
    .sort((a, b) => a.line - b.line || a.column - b.column);
}

/** Counts of a check, and the exit code they give. */
export interface CheckSummary {
  readonly files: number;
  readonly errors: number;
  readonly warnings: number;
  /** Information and hint diagnostics. */
  readonly notes: number;
  /** The `--max-warnings` limit, or null when none was given. */
  readonly maxWarnings: number | null;
  readonly exitCode: number;
}

/**
 * The exit code of a check: 1 when any diagnostic is an error or when warnings exceed `maxWarnings`
 * (when given), else 0. Usage mistakes (exit 2) are raised before any file is read.
 */
export function checkExitCode(errors: number, warnings: number, maxWarnings: number | null): number {
  return errors > 0 || (maxWarnings !== null && warnings > maxWarnings) ? EXIT_PROBLEMS : EXIT_OK;
}

/** `trialbook check`: diagnostics for every file as text, JSON or SARIF; exit code per `checkExitCode`. */
export async function checkCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, { format: { type: "string" }, "max-warnings": { type: "string" } });
  const format = choice(values.format, "format", ["text", "json", "sarif"] as const) ?? "text";
  const maxWarnings = nonNegativeInteger(values["max-warnings"], "max-warnings");
  const { files, missing } = findTrialFiles(positionals.length > 0 ? positionals : ["."], io.cwd);
  if (missing.length > 0) throw new UsageError(`No such file or directory: ${missing.join(", ")}`);

  const counts = { error: 0, warning: 0, information: 0, hint: 0 };
  const report: { file: string; diagnostics: LocatedDiagnostic[] }[] = [];
  const sarif: SarifDiagnostic[] = [];
  for (const file of files) {
    let read: TrialText;
    try {
      read = await readTrialForAnalysis(resolve(io.cwd, file), io.helperWorker);
    } catch {
      throw new UsageError(`Cannot read '${file}'.`);
    }
    const text = read.text;
    const progress = createProgress(io, text.length);
    progress.update(`Checking ${file} (${Math.round(text.length / 1e6)} MB)...`);
    const diagnostics = analyzeTrialText(read, {}, io).diagnostics;
    progress.done();
    const located = locateDiagnostics(text, diagnostics);
    for (const d of located) counts[d.severity]++;
    report.push({ file, diagnostics: located });
    if (format === "sarif") sarif.push(...sarifDiagnostics(file, text, diagnostics));
  }
  const summary: CheckSummary = {
    files: files.length,
    errors: counts.error,
    warnings: counts.warning,
    notes: counts.information + counts.hint,
    maxWarnings,
    exitCode: checkExitCode(counts.error, counts.warning, maxWarnings),
  };

  if (format === "json") {
    io.stdout(JSON.stringify({ files: report, summary }, null, 2) + "\n");
  } else if (format === "sarif") {
    io.stdout(JSON.stringify(sarifLog(files, sarif), null, 2) + "\n");
  } else {
    const style = terminalStyle(io);
    for (const { file, diagnostics } of report) {
      for (const d of diagnostics) {
        io.stdout(`${style.bold(`${file}:${d.line}:${d.column}`)}: ${severityStyle(style, d.severity)} ${style.dim(d.code)}: ${d.message}\n`);
      }
    }
    io.stderr(summaryLine(summary) + "\n");
  }
  return summary.exitCode;
}

/** "3 files checked: 0 errors, 2 warnings, 5 notes." plus the warning limit when it was exceeded. */
export function summaryLine(s: CheckSummary): string {
  const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;
  const limit = s.maxWarnings !== null && s.warnings > s.maxWarnings ? ` More warnings than --max-warnings ${s.maxWarnings} allows.` : "";
  return `${plural(s.files, "file")} checked: ${plural(s.errors, "error")}, ${plural(s.warnings, "warning")}, ${plural(s.notes, "note")}.${limit}`;
}

/** Diagnostics of one file with full regions (start and end) and related locations, for SARIF. */
export function sarifDiagnostics(file: string, text: string, diagnostics: readonly Diagnostic[]): SarifDiagnostic[] {
  // Every start, end and related location of the file's diagnostics, located in one ascending scan.
  const spans: Span[] = [];
  for (const d of diagnostics) {
    spans.push(d.span);
    for (const r of d.related ?? []) spans.push(r.span);
  }
  const positions = locateOffsets(text, spans.flatMap((span) => [span.start, Math.max(span.start, span.end)]));
  const located = new Map(spans.map((span, i) => [span, i] as const));
  const region = (span: Span): SarifRegion => {
    const i = located.get(span)!;
    const start = positions[2 * i]!;
    const end = positions[2 * i + 1]!;
    return { startLine: start.line + 1, startColumn: start.character + 1, endLine: end.line + 1, endColumn: end.character + 1 };
  };
  return diagnostics
    .map((d) => ({
      file,
      code: d.code,
      severity: d.severity,
      message: d.message,
      region: region(d.span),
      ...(d.related && d.related.length > 0 ? { related: d.related.map((r) => ({ message: r.message, region: region(r.span) })) } : {}),
    }))
    .sort((a, b) => a.region.startLine - b.region.startLine || a.region.startColumn - b.region.startColumn);
}

function nonNegativeInteger(value: unknown, name: string): number | null {
  if (value === undefined) return null;
  if (typeof value === "string" && /^[0-9]+$/.test(value.trim())) return Number(value.trim());
  throw new UsageError(`--${name} must be a whole number of 0 or more, not '${String(value)}'.`);
}
