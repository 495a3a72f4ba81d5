/**
 * Checks a `LinearModelInput` before any arithmetic, so that bad input becomes a `ModelFailure`
 * with a sentence for the user instead of an exception or a NaN.
 */

import type { LinearModelInput, ModelFailure } from "./types.js";

/** Returns a failure describing the first problem found, or null when the input is well formed. */
export function validateModelInput(input: LinearModelInput): ModelFailure | null {
  const n = input.y.length;
  const fail = (reason: string): ModelFailure => ({ ok: false, code: "invalid-input", reason });
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(input.y[i]!)) return fail(`Response value ${i + 1} is not a finite number.`);
  }
  for (const f of input.factors) {
    if (!Number.isInteger(f.levelCount) || f.levelCount < 1) {
      return fail(`Factor "${f.name}" must declare at least one level.`);
    }
    if (f.codes.length !== n) return fail(`Factor "${f.name}" has ${f.codes.length} codes for ${n} observations.`);
    for (let i = 0; i < n; i++) {
      const c = f.codes[i]!;
      if (c < 0 || c >= f.levelCount) return fail(`Factor "${f.name}" has level index ${c} at observation ${i + 1}, outside 0..${f.levelCount - 1}.`);
    }
  }
  for (const c of input.covariates) {
    if (c.values.length !== n) return fail(`Covariate "${c.name}" has ${c.values.length} values for ${n} observations.`);
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(c.values[i]!)) return fail(`Covariate "${c.name}" value ${i + 1} is not a finite number.`);
    }
  }
  return validateModelTerms(input);
}

/**
 * The checks of {@link validateModelInput} that read no observation (the terms and the sums-of-squares
 * type): the first problem among them, or null. For a caller that has checked the values in a pass of its own.
 */
export function validateModelTerms(input: LinearModelInput): ModelFailure | null {
  const fail = (reason: string): ModelFailure => ({ ok: false, code: "invalid-input", reason });
  const seen = new Set<string>();
  for (const [t, term] of input.terms.entries()) {
    if (term.factors.length + term.covariates.length === 0) return fail(`Term ${t + 1} names no factor and no covariate.`);
    for (const f of term.factors) {
      if (!Number.isInteger(f) || f < 0 || f >= input.factors.length) return fail(`Term ${t + 1} refers to factor ${f}, which does not exist.`);
    }
    for (const c of term.covariates) {
      if (!Number.isInteger(c) || c < 0 || c >= input.covariates.length) return fail(`Term ${t + 1} refers to covariate ${c}, which does not exist.`);
    }
    if (new Set(term.factors).size !== term.factors.length || new Set(term.covariates).size !== term.covariates.length) {
      return fail(`Term ${t + 1} names the same factor or covariate twice.`);
    }
    const key = termKey(term.factors, term.covariates);
    if (seen.has(key)) return fail(`Term ${t + 1} repeats an earlier term.`);
    seen.add(key);
  }
  if (input.ssType !== "I" && input.ssType !== "II" && input.ssType !== "III") {
    return fail(`Unknown sums-of-squares type "${String(input.ssType)}".`);
  }
  return null;
}

function termKey(factors: readonly number[], covariates: readonly number[]): string {
  return `${[...factors].sort((a, b) => a - b).join(",")}|${[...covariates].sort((a, b) => a - b).join(",")}`;
}
