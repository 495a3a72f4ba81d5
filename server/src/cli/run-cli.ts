import { analyzeCommand, ANALYZE_USAGE } from "./analyze-command.js";
import { checkCommand, CHECK_USAGE } from "./check-command.js";
import { compareCommand, COMPARE_USAGE } from "./compare-command.js";
import { exportCommand, EXPORT_USAGE } from "./export-command.js";
import { importCommand, IMPORT_USAGE } from "./import-command.js";
import { type CliIo, EXIT_OK, EXIT_USAGE, UsageError } from "./io.js";
import { planCommand, PLAN_USAGE } from "./plan-command.js";
import { reportCommand, REPORT_USAGE } from "./report-command.js";
import { VERSION } from "../version.js";

const VERBS: Record<string, { run: (args: readonly string[], io: CliIo) => Promise<number>; usage: string }> = {
  check: { run: checkCommand, usage: CHECK_USAGE },
  analyze: { run: analyzeCommand, usage: ANALYZE_USAGE },
  import: { run: importCommand, usage: IMPORT_USAGE },
  plan: { run: planCommand, usage: PLAN_USAGE },
  compare: { run: compareCommand, usage: COMPARE_USAGE },
  export: { run: exportCommand, usage: EXPORT_USAGE },
  report: { run: reportCommand, usage: REPORT_USAGE },
};

const USAGE = `trialbook ${VERSION}: designed experiments in plain-text .trial files

Usage: trialbook <verb> [arguments]

Verbs:
  check     diagnostics for .trial files; exit code 1 on errors
  analyze   ANOVA tables and means for one file (--format text|json)
  import    write a .trial file from a CSV table
  report    the analysis report with plots as HTML or Markdown
  plan      write the randomized run sheet into a .trial file (or print it as HTML/Markdown)
  export    write the runs of a .trial file as CSV
  compare   what changed between two revisions of a file (text or Markdown)

Run 'trialbook <verb> --help' for a verb's options.`;

/**
 * Runs the CLI on arguments (without `node` and the script name) and returns the exit code. Never
 * throws: usage mistakes exit 2 with help, and an unexpected failure is reported as an internal error.
 */
export async function runCli(argv: readonly string[], io: CliIo): Promise<number> {
  const [verb, ...args] = argv;
  if (verb === undefined || verb === "--help" || verb === "-h" || verb === "help") {
    io.stdout(USAGE + "\n");
    return verb === undefined ? EXIT_USAGE : EXIT_OK;
  }
  if (verb === "--version" || verb === "-v") {
    io.stdout(VERSION + "\n");
    return EXIT_OK;
  }
  const command = VERBS[verb];
  if (!command) {
    io.stderr(`trialbook: unknown verb '${verb}'.\n\n${USAGE}\n`);
    return EXIT_USAGE;
  }
  if (args.includes("--help") || args.includes("-h")) {
    io.stdout(command.usage + "\n");
    return EXIT_OK;
  }
  try {
    return await command.run(args, io);
  } catch (error) {
    if (error instanceof UsageError) {
      io.stderr(`trialbook ${verb}: ${error.message}\n\n${command.usage}\n`);
      return EXIT_USAGE;
    }
    io.stderr(`trialbook ${verb}: internal error: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\nPlease report this with the file that caused it.\n`);
    return 3;
  }
}
