/**
 * Writes `.trial` text for test data sets, so reference data (NIST StRD, R fixtures) can be run through
 * the whole pipeline: text → parser → design → engine → results.
 */

import { ALL_KEYWORDS } from "../../grammar/src/tokens.js";

const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_-]*$/;
const NUMBER = /^-?\d+(\.\d+)?$/;
const KEYWORDS = new Set<string>(ALL_KEYWORDS);

/** A name as the language accepts it: bare when it is an identifier (or a number, for levels), else quoted. */
export function trialName(name: string, allowNumber = false): string {
  if ((IDENTIFIER.test(name) && !KEYWORDS.has(name)) || (allowNumber && NUMBER.test(name))) return name;
  return `"${name.replace(/\\/g, "\\\\").replace(/"/g, '\\"')}"`;
}

export interface TrialData {
  readonly levels: Readonly<Record<string, readonly string[]>>;
  readonly factors: Readonly<Record<string, readonly string[]>>;
  readonly covariates?: Readonly<Record<string, readonly (number | string)[]>>;
  readonly response: readonly string[];
}

/** A `.trial` file with one response `y`, the given factors and covariates, and optional plan lines. */
export function writeTrial(data: TrialData, planLines: readonly string[] = []): string {
  const factorNames = Object.keys(data.levels);
  const covariateNames = Object.keys(data.covariates ?? {});
  const lines = ['trial "Invented test data"', "response y"];
  for (const f of factorNames) lines.push(`factor ${trialName(f)} levels ${data.levels[f]!.map((l) => trialName(l, true)).join(", ")}`);
  for (const c of covariateNames) lines.push(`covariate ${trialName(c)}`);
  if (planLines.length > 0) lines.push("plan", ...planLines.map((l) => "  " + l));
  lines.push(`runs id ${[...factorNames, ...covariateNames].map((n) => trialName(n)).join(" ")} | y`);
  data.response.forEach((value, i) => {
    const cells = [`r${i + 1}`, ...factorNames.map((f) => trialName(data.factors[f]![i]!, true)), ...covariateNames.map((c) => String(data.covariates![c]![i]))];
    lines.push(`  ${cells.join(" ")} | ${value}`);
  });
  return lines.join("\n") + "\n";
}
