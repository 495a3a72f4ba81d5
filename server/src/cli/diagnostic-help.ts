import { DIAGNOSTIC_RULES, type DiagnosticRule } from "../analysis/diagnostics.js";

/** What a rule listing (SARIF `reportingDescriptor`, `--help` pages) says about one diagnostic code. */
export interface DiagnosticHelp {
  /** Why the problem matters, in a few sentences. */
  readonly fullDescription: string;
  /** What to do about it. */
  readonly help: string;
}

/**
 * Longer descriptions and remedies for the codes of `DIAGNOSTIC_RULES`. A code without an entry here (one
 * added by another module later) still gets a rule from `diagnosticHelp`, built from its summary.
 */
const HELP: Readonly<Record<string, DiagnosticHelp>> = {
  syntax: {
    fullDescription: "Part of the file does not follow the .trial language, so it was skipped; the rest of the file is still read and analysed.",
    help: "Follow the message: it names what was expected. docs/language.md shows every construct with an example.",
  },
  "unknown-factor": {
    fullDescription: "A column of the runs table or a model term names a factor or covariate that no `factor` or `covariate` line declares, so its values cannot be used.",
    help: "Fix the spelling, or declare it: `factor NAME levels a, b` or `covariate NAME`.",
  },
  "unknown-response": {
    fullDescription: "A column after `|` in the runs table, or `plan detect`, names a response that no `response` line declares.",
    help: "Fix the spelling, or declare it: `response NAME unit U`.",
  },
  "unknown-level": {
    fullDescription: "A run is recorded at a level its factor does not declare; the run cannot be placed in a cell of the design and is left out of the analysis.",
    help: "Fix the spelling in the run, or add the level to the factor's `levels` list.",
  },
  "duplicate-name": {
    fullDescription: "Two declarations share a name, so columns and model terms that use it are ambiguous.",
    help: "Rename one of them; names are compared exactly.",
  },
  "duplicate-level": {
    fullDescription: "A factor lists the same level twice; the second is ignored.",
    help: "Remove the repeated level from the `levels` list.",
  },
  "duplicate-run": {
    fullDescription: "Two rows of the runs table share a run id, so a run cannot be identified in reviews, comparisons and residual listings.",
    help: "Give every run its own id.",
  },
  "column-count": {
    fullDescription: "A row of the runs table has more or fewer cells than the header has columns, so its values cannot be matched to columns reliably.",
    help: "Add or remove cells so that every column has one value; write ? for a value not measured yet.",
  },
  "missing-column": {
    fullDescription: "A declared factor, covariate or response has no column in the runs table, so it takes no part in the analysis.",
    help: "Add the column to the runs header and a value to each row, or remove the declaration.",
  },
  "not-a-number": {
    fullDescription: "A response or covariate cell holds text that is not a number, so that run is left out of the analysis of the value's column.",
    help: "Write the value as a decimal number (12.5, -0.75, 1.2e-3), or ? when it has not been measured yet.",
  },
  "invalid-setting": {
    fullDescription: "A plan setting has a value outside its allowed range, so the default is used instead.",
    help: "Use a value in the range the message gives (alpha and confidence strictly between 0 and 1, replicates a positive whole number).",
  },
  "missing-replicate": {
    fullDescription: "A cell of the design has fewer runs than `plan replicates` asks for, so the experiment is smaller than planned and its power is lower.",
    help: "Add the missing runs (the quick fix writes them as pending rows), or lower `replicates` if the plan changed.",
  },
  "unbalanced-cells": {
    fullDescription: "The cells of the design hold different numbers of measured runs. The analysis remains valid, but Type I, II and III sums of squares then differ and the choice matters.",
    help: "Measure the pending runs to restore balance, or choose the sums-of-squares type deliberately with `plan sums-of-squares`.",
  },
  "empty-cell": {
    fullDescription: "A combination of levels has no measured run, so interaction terms involving it cannot be fully estimated.",
    help: "Add runs for the combination, or drop the interaction from `plan model`.",
  },
  "pending-run": {
    fullDescription: "A planned run has no measured value yet; it counts as planned, not as data.",
    help: "Record the measured value in place of ? when the run is made.",
  },
  "excluded-run": {
    fullDescription: "A run is kept in the file but marked `excluded`, so it takes no part in the analysis.",
    help: "Keep the reason up to date; remove the mark if the run should count after all.",
  },
  "no-data": {
    fullDescription: "A response has no measured values yet, so it cannot be analysed.",
    help: "Record measured values for the response in the runs table.",
  },
  "no-error-df": {
    fullDescription: "The model uses up every degree of freedom, so no residual variance is left to test the terms against and no F test is possible.",
    help: "Add replicate runs, or remove terms (often the highest interaction) from `plan model`.",
  },
  "zero-variance": {
    fullDescription: "The residuals are all zero, so F ratios are undefined; the data are probably copied or rounded too coarsely.",
    help: "Check the recorded values and their resolution.",
  },
  "aliased-term": {
    fullDescription: "A model term cannot be separated from other terms with the runs available, so its effect cannot be estimated on its own.",
    help: "Add runs that separate the terms, or remove the aliased term from `plan model`.",
  },
  "single-observation": {
    fullDescription: "A level or cell has a single measured run, so the spread within it is unknown and its mean is weakly supported.",
    help: "Add replicate runs for that level or cell.",
  },
  "internal-error": {
    fullDescription: "Part of the analysis failed because of a bug in Trialbook; the rest of the results are still reported.",
    help: "Please report the problem together with the file that caused it.",
  },
  "value-out-of-range": {
    fullDescription: "A number is too large or too small to be represented as a double-precision value, so it cannot be analysed.",
    help: "Rescale the values (change the unit) so they fit.",
  },
  "systematic-order": {
    fullDescription: "The runs were made in an order tied to the levels of a treatment factor, so a drift over time (tool wear, warm-up, a change of operator) cannot be told apart from the factor's effect.",
    help: "Run the remaining runs in a randomized order (`trialbook plan` writes a seeded random run sheet), or block on time.",
  },
};

/** The help entry for a code, built from the rule's summary when no entry is written for it. */
export function diagnosticHelp(code: string): DiagnosticHelp {
  const written = HELP[code];
  if (written) return written;
  const rule = (DIAGNOSTIC_RULES as Readonly<Record<string, DiagnosticRule>>)[code];
  return { fullDescription: rule?.summary ?? code, help: "See the message for what to change." };
}

/** True when a code has a written help entry (tests use this to keep the table complete). */
export function hasWrittenHelp(code: string): boolean {
  return HELP[code] !== undefined;
}
