/**
 * `trialbook plan FILE [-o FILE] [--dry-run] [--format trial|html|md] [--seed N] [--reshuffle]`.
 *
 * Rule for writing: without `-o` nothing is written; the planned file (or the printable sheet) goes to
 * standard output. With `-o OUT` the output is written to OUT — `-o FILE` with the input's own name updates
 * it in place — through a temporary file in the same directory that is then renamed over OUT, so a failure
 * half-way never leaves a truncated file. `--dry-run` only prints the summary (including the replicates
 * the power target needs) and writes nothing.
 */
import { randomInt } from "node:crypto";
import { rename, unlink, writeFile } from "node:fs/promises";
import { basename, dirname, join, resolve } from "node:path";
import { LineIndex } from "../../../grammar/src/line-index.js";
import { analyzeDocument } from "../analysis/analyze-document.js";
import { planSummaryLines } from "../planning/plan-summary-text.js";
import { printableRunSheet } from "../planning/printable-run-sheet.js";
import { replicatesNeededLine } from "../planning/replicates-needed-text.js";
import { planRunSheet } from "../planning/run-sheet.js";
import { choice, parseArguments } from "./arguments.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { readTrialFile } from "./read-text.js";

export const PLAN_USAGE = `Usage: trialbook plan FILE [-o OUT] [--dry-run] [--format trial|html|md] [--seed N] [--reshuffle]
  Writes the randomized run sheet into the runs table: every run the design needs, pending (?), in random
  order fixed by 'plan seed' (added when missing). Measured and excluded runs are never changed.
  Without -o the result goes to standard output; -o OUT writes it (use -o FILE to update FILE in place).
  --format html|md   a printable run sheet instead of the .trial text
  --dry-run          print what would be done (design, runs kept and added, seed, replicates needed)
  --seed N           use seed N (written into the file) and re-randomize the pending runs
  --reshuffle        re-randomize the pending runs even when none need adding`;

/** `trialbook plan`: plans one file. */
export async function planCommand(args: readonly string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseArguments(args, {
    output: { type: "string", short: "o" },
    "dry-run": { type: "boolean" },
    format: { type: "string" },
    seed: { type: "string" },
    reshuffle: { type: "boolean" },
  });
  const format = choice(values.format, "format", ["trial", "html", "md"] as const) ?? "trial";
  if (positionals.length !== 1) throw new UsageError("plan takes exactly one .trial file.");
  let seed: number | undefined;
  if (values.seed !== undefined) {
    seed = Number(values.seed);
    if (!/^\d+$/.test(String(values.seed)) || !Number.isSafeInteger(seed)) throw new UsageError(`--seed must be a whole number of at least 0, not '${String(values.seed)}'.`);
  }
  const path = positionals[0]!;
  const text = await readTrialFile(resolve(io.cwd, path)).catch(() => {
    throw new UsageError(`Cannot read '${path}'.`);
  });
  // A new seed when the file has none: from the operating system's cryptographic generator, below 2^31.
  const result = planRunSheet(text, { ...(seed !== undefined ? { seed } : {}), fallbackSeed: randomInt(1, 0x7fff_ffff), ...(values.reshuffle ? { reshuffle: true } : {}) });
  if (!result.ok) {
    const index = new LineIndex(text);
    for (const p of result.problems) {
      const at = p.span ? index.positionAt(p.span.start) : undefined;
      io.stderr(`${path}${at ? `:${at.line + 1}:${at.character + 1}` : ""}: ${p.message}\n`);
    }
    io.stderr(`trialbook plan: ${path} was not changed.\n`);
    return EXIT_PROBLEMS;
  }
  if (values["dry-run"]) {
    io.stdout(`${path}: plan (dry run, nothing written)\n${planSummaryLines(result.summary, replicatesNeededLine(analyzeDocument(text))).map((l) => `  ${l}\n`).join("")}`);
    return EXIT_OK;
  }
  const output = format === "trial" ? result.text : printableRunSheet(result.text, format);
  if (format !== "trial" && result.summary.changed && values.output === undefined) {
    io.stderr(`trialbook plan: this sheet includes runs that are not in ${path} yet; run 'trialbook plan ${path} -o ${path}' first so the file and the sheet agree.\n`);
  }
  if (typeof values.output === "string") {
    await writeAtomically(resolve(io.cwd, values.output), output);
    io.stderr(`trialbook plan: wrote ${values.output} (${result.summary.addedRows} runs added, ${result.summary.movedRows} moved, seed ${result.summary.seed}).\n`);
  } else {
    io.stdout(output);
  }
  return EXIT_OK;
}

/** Writes `text` to a temporary file next to `target` and renames it over `target`. */
async function writeAtomically(target: string, text: string): Promise<void> {
  const temp = join(dirname(target), `.${basename(target)}.${process.pid}.${randomInt(0, 1e9)}.tmp`);
  try {
    await writeFile(temp, text, "utf8");
    await rename(temp, target);
  } catch (error) {
    await unlink(temp).catch(() => undefined);
    throw new UsageError(`Cannot write '${target}': ${error instanceof Error ? error.message : String(error)}`);
  }
}
