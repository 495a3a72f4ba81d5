import { readFile } from "node:fs/promises";
import { resolve } from "node:path";
import { LineIndex } from "../../../grammar/src/line-index.js";
import { analyzeDocument } from "../analysis/analyze-document.js";
import type { Diagnostic } from "../analysis/diagnostics.js";
import { choice, parseArguments } from "./arguments.js";
import { findTrialFiles } from "./find-trial-files.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";

export const CHECK_USAGE = `Usage: trialbook check [paths...] [--format text|json]
  Checks .trial files (directories are searched recursively; default: the current directory).
  Prints path:line:column: severity code: message. Exit code 0 when no errors, 1 when any error, 2 on usage errors.`;

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
  const index = new LineIndex(text);
  return diagnostics
    .map((d) => {
      const p = index.positionAt(d.span.start);
      return { severity: d.severity, code: d.code, message: d.message, line: p.line + 1, column: p.character + 1 };
    })
    .sort((a, b) => a.line - b.line || a.column - b.column);
}

/** `trialbook check`: diagnostics for every file, exit code 1 when any is an error. */
export async function checkCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, { format: { type: "string" } });
  const format = choice(values.format, "format", ["text", "json"] as const) ?? "text";
  const { files, missing } = findTrialFiles(positionals.length > 0 ? positionals : ["."], io.cwd);
  if (missing.length > 0) throw new UsageError(`No such file or directory: ${missing.join(", ")}`);

  let errors = 0;
  const report: { file: string; diagnostics: LocatedDiagnostic[] }[] = [];
  for (const file of files) {
    const text = await readFile(resolve(io.cwd, file), "utf8");
    const located = locateDiagnostics(text, analyzeDocument(text).diagnostics);
    errors += located.filter((d) => d.severity === "error").length;
    report.push({ file, diagnostics: located });
  }

  if (format === "json") {
    io.stdout(JSON.stringify({ files: report }, null, 2) + "\n");
  } else {
    const counts = { error: 0, warning: 0, information: 0, hint: 0 };
    for (const { file, diagnostics } of report) {
      for (const d of diagnostics) {
        counts[d.severity]++;
        io.stdout(`${file}:${d.line}:${d.column}: ${d.severity} ${d.code}: ${d.message}\n`);
      }
    }
    io.stderr(
      `${files.length} file${files.length === 1 ? "" : "s"} checked: ${counts.error} error${counts.error === 1 ? "" : "s"}, ${counts.warning} warning${counts.warning === 1 ? "" : "s"}, ${counts.information + counts.hint} note${counts.information + counts.hint === 1 ? "" : "s"}.\n`,
    );
  }
  return errors > 0 ? EXIT_PROBLEMS : EXIT_OK;
}
