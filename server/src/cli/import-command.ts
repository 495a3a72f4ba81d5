import { writeFile } from "node:fs/promises";
import { basename, resolve } from "node:path";
import { csvToTrial } from "../import/csv-to-trial.js";
import { parseArguments } from "./arguments.js";
import { type CliIo, EXIT_OK, EXIT_PROBLEMS, UsageError } from "./io.js";
import { readTextFile } from "./read-text.js";

export const IMPORT_USAGE = `Usage: trialbook import <data.csv|-> --factor COL... --response COL... [--id COL] [--block COL...]
                        [--random COL...] [--subject COL...] [--covariate COL...] [--title TEXT] [-o FILE]
  Writes a .trial file from a CSV table (stdout without -o). Values are copied exactly as written;
  rows keep their CSV order, which is the run order.`;

/** `trialbook import`: CSV to a formatted `.trial` file. */
export async function importCommand(args: readonly string[], io: CliIo): Promise<number> {
  const list = { type: "string", multiple: true } as const;
  const { values, positionals } = parseArguments(args, {
    id: { type: "string" },
    factor: list,
    block: list,
    random: list,
    subject: list,
    covariate: list,
    response: list,
    title: { type: "string" },
    output: { type: "string", short: "o" },
  });
  if (positionals.length !== 1) throw new UsageError("import takes exactly one CSV file (or - for standard input).");
  const factors = (values.factor as string[] | undefined) ?? [];
  const responses = (values.response as string[] | undefined) ?? [];
  if (responses.length === 0) throw new UsageError("import needs at least one --response column.");
  const input = positionals[0]!;
  const csvText = input === "-" ? await io.readStdin() : await readTextFile(resolve(io.cwd, input)).catch(() => {
    throw new UsageError(`Cannot read '${input}'.`);
  });

  const result = csvToTrial(csvText, {
    factors,
    responses,
    ...(values.id !== undefined ? { id: values.id as string } : {}),
    ...(values.block ? { blocks: values.block as string[] } : {}),
    ...(values.random ? { random: values.random as string[] } : {}),
    ...(values.subject ? { subjects: values.subject as string[] } : {}),
    ...(values.covariate ? { covariates: values.covariate as string[] } : {}),
    ...(values.title !== undefined ? { title: values.title as string } : {}),
    ...(input !== "-" ? { source: basename(input) } : {}),
  });
  const where = input === "-" ? "<stdin>" : input;
  if (!result.ok) {
    for (const p of result.problems) io.stderr(`${where}${p.line !== undefined ? `:${p.line}` : ""}: error: ${p.message}\n`);
    return EXIT_PROBLEMS;
  }
  for (const p of result.warnings) io.stderr(`${where}${p.line !== undefined ? `:${p.line}` : ""}: warning: ${p.message}\n`);
  if (values.output !== undefined) await writeFile(resolve(io.cwd, values.output as string), result.text, "utf8");
  else io.stdout(result.text);
  return EXIT_OK;
}
