import { resolve } from "node:path";
import { analyzeDocument } from "../analysis/analyze-document.js";
import { compareAnalyses } from "../analysis/compare-analyses.js";
import { choice, parseArguments } from "./arguments.js";
import { comparisonMarkdown, comparisonText, type ComparisonLabels } from "./compare-report.js";
import { readFileAtRevision } from "./git-show.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { createProgress, terminalStyle } from "./terminal-style.js";
import { readTrialFile } from "./read-text.js";

export const COMPARE_USAGE = `Usage: trialbook compare OLD.trial NEW.trial [--format text|md]
       trialbook compare FILE.trial --rev REV [--format text|md]
  Shows what changed between two revisions of an experiment: runs added, removed and edited (matched by
  run id), model terms whose verdict flipped at the file's alpha, p-values and level means that moved, and
  power before and after when the analysis reports it. With --rev, the old text is FILE as committed at
  REV (any git revision: HEAD, HEAD~1, main, a commit hash) and the new text is FILE in the working tree.
  --format md writes Markdown for a pull-request comment.
  Exit codes: 0 compared; 1 compared, but the new revision has errors (see 'trialbook check');
              2 usage mistake (wrong arguments, unreadable file, unknown revision, not a git repository).`;

/** `trialbook compare`: the comparison of two revisions as text or Markdown. */
export async function compareCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, { format: { type: "string" }, rev: { type: "string" } });
  const format = choice(values.format, "format", ["text", "md"] as const) ?? "text";
  const rev = values.rev as string | undefined;

  let beforeText: string;
  let afterText: string;
  let labels: ComparisonLabels;
  if (rev !== undefined) {
    if (positionals.length !== 1) throw new UsageError("compare --rev REV takes exactly one .trial file.");
    const file = positionals[0]!;
    afterText = await readText(io, file);
    const old = await readFileAtRevision(io.cwd, file, rev);
    if (!old.ok) throw new UsageError(`Cannot read '${file}' at revision '${rev}': ${old.reason}`);
    beforeText = old.text;
    labels = { file, before: rev, after: "working tree" };
  } else {
    if (positionals.length !== 2) throw new UsageError("compare takes two .trial files (OLD NEW), or one file with --rev REV.");
    const [oldFile, newFile] = positionals as [string, string];
    beforeText = await readText(io, oldFile);
    afterText = await readText(io, newFile);
    labels = { file: newFile, before: oldFile, after: newFile };
  }

  const progress = createProgress(io, beforeText.length + afterText.length);
  progress.update("Analysing the old revision...");
  const before = analyzeDocument(beforeText);
  progress.update("Analysing the new revision...");
  const after = analyzeDocument(afterText);
  progress.done();
  const comparison = compareAnalyses(before, after);
  io.stdout(format === "md" ? comparisonMarkdown(comparison, labels) : comparisonText(comparison, labels, terminalStyle(io)));
  return comparison.errorsAfter > 0 ? EXIT_PROBLEMS : EXIT_OK;
}

async function readText(io: CliIo, path: string): Promise<string> {
  try {
    return await readTrialFile(resolve(io.cwd, path));
  } catch {
    throw new UsageError(`Cannot read '${path}'.`);
  }
}
