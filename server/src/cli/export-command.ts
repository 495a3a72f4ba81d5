import { writeFile } from "node:fs/promises";
import { resolve } from "node:path";
import { parseTrial } from "../../../grammar/src/parse.js";
import { runsToCsv } from "../export/runs-to-csv.js";
import { choice, parseArguments } from "./arguments.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { createProgress } from "./terminal-style.js";
import { readTrialFile } from "./read-text.js";

export const EXPORT_USAGE = `Usage: trialbook export FILE.trial --format csv [-o OUT.csv] [--pending TEXT]
  Writes the runs table as CSV (RFC 4180; stdout without -o), the inverse of 'trialbook import': columns
  in the runs header's order, rows in run order, every value exactly as written. Pending values are
  written as ? (or TEXT, e.g. --pending "" for empty cells); excluded runs get an 'excluded' column with
  the reason.
  Exit codes: 0 exported; 1 the file has no runs table, or syntax problems or rows that do not fit the
  header (what could be read is still written, with warnings on stderr); 2 usage mistake.`;

/** `trialbook export`: the runs of a `.trial` file as CSV. */
export async function exportCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, {
    format: { type: "string" },
    output: { type: "string", short: "o" },
    pending: { type: "string" },
  });
  if (values.format === undefined) throw new UsageError("export needs --format csv (the only format so far).");
  choice(values.format, "format", ["csv"] as const);
  if (positionals.length !== 1) throw new UsageError("export takes exactly one .trial file.");
  const path = positionals[0]!;
  let text: string;
  try {
    text = await readTrialFile(resolve(io.cwd, path));
  } catch {
    throw new UsageError(`Cannot read '${path}'.`);
  }
  const progress = createProgress(io, text.length);
  progress.update(`Reading ${path}...`);
  const file = parseTrial(text);
  progress.done();
  const result = runsToCsv(file, values.pending !== undefined ? { pendingText: values.pending as string } : {});
  if (!result.ok) {
    io.stderr(`${path}: error: ${result.reason}.\n`);
    return EXIT_PROBLEMS;
  }
  for (const w of result.warnings) io.stderr(`${path}:${w.line}: warning: ${w.message}\n`);
  if (file.problems.length > 0) io.stderr(`${path}: warning: ${file.problems.length} syntax problem${file.problems.length === 1 ? "" : "s"}; the export may be incomplete (run 'trialbook check ${path}').\n`);
  if (values.output !== undefined) await writeFile(resolve(io.cwd, values.output as string), result.text, "utf8");
  else io.stdout(result.text);
  return result.warnings.length > 0 || file.problems.length > 0 ? EXIT_PROBLEMS : EXIT_OK;
}
