import { parseArgs, type ParseArgsConfig } from "node:util";
import { UsageError } from "./io.js";

type Options = NonNullable<ParseArgsConfig["options"]>;

export interface ParsedArguments {
  readonly values: Record<string, string | boolean | string[] | undefined>;
  readonly positionals: string[];
}

/**
 * Parses a verb's arguments with Node's `util.parseArgs`, adding one convention: a list option
 * (`multiple: true`) also takes the plain words that follow it, so `--factor oven line` means
 * `--factor oven --factor line`. Unknown options and missing values become `UsageError`s.
 */
export function parseArguments(args: readonly string[], options: Options): ParsedArguments {
  let parsed;
  try {
    parsed = parseArgs({ args: [...args], options, allowPositionals: true, strict: true, tokens: true });
  } catch (error) {
    throw new UsageError(error instanceof Error ? error.message.replace(/\. To specify a positional.*$/s, ".") : String(error));
  }
  const values = { ...parsed.values } as Record<string, string | boolean | string[] | undefined>;
  const positionals: string[] = [];
  let listOption: string | undefined;
  for (const token of parsed.tokens ?? []) {
    if (token.kind === "option") {
      listOption = options[token.name]?.multiple && token.value !== undefined ? token.name : undefined;
    } else if (token.kind === "positional") {
      if (listOption) (values[listOption] as string[]).push(token.value);
      else positionals.push(token.value);
    } else {
      listOption = undefined;
    }
  }
  return { values, positionals };
}

/** Reads a string option restricted to a set of choices. */
export function choice<T extends string>(value: unknown, name: string, allowed: readonly T[]): T | undefined {
  if (value === undefined) return undefined;
  if (typeof value === "string" && (allowed as readonly string[]).includes(value)) return value as T;
  throw new UsageError(`--${name} must be one of ${allowed.join(", ")}, not '${String(value)}'.`);
}

/** Reads a probability option (strictly between 0 and 1). */
export function probability(value: unknown, name: string): number | undefined {
  if (value === undefined) return undefined;
  const n = Number(value);
  if (typeof value === "string" && n > 0 && n < 1) return n;
  throw new UsageError(`--${name} must be a number between 0 and 1, not '${String(value)}'.`);
}
