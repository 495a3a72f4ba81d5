import type { Span } from "../../../grammar/src/ast.js";

/** How much a diagnostic matters; the same four levels as LSP and SARIF's `level`. */
export type Severity = "error" | "warning" | "information" | "hint";

/** Static facts about one diagnostic code: its default severity and a sentence for rule listings. */
export interface DiagnosticRule {
  readonly severity: Severity;
  readonly summary: string;
}

/**
 * Every diagnostic code Trialbook emits, with its default severity and one-sentence description.
 * Codes are stable kebab-case words that tests, quick fixes and CI configurations key on: add codes, never
 * rename one.
 */
export const DIAGNOSTIC_RULES = {
  syntax: { severity: "error", summary: "The text cannot be read as the .trial language." },
  "unknown-factor": { severity: "error", summary: "A name is used as a factor or covariate but no such factor or covariate is declared." },
  "unknown-response": { severity: "error", summary: "A name is used as a response but no such response is declared." },
  "unknown-level": { severity: "error", summary: "A run uses a level its factor does not declare." },
  "duplicate-name": { severity: "error", summary: "Two factors, covariates or responses share a name." },
  "duplicate-level": { severity: "error", summary: "A factor declares the same level twice." },
  "duplicate-run": { severity: "error", summary: "Two runs share an id." },
  "column-count": { severity: "error", summary: "A run row has more or fewer cells than the runs header has columns." },
  "missing-column": { severity: "warning", summary: "A declared factor, covariate or response has no column in the runs table." },
  "not-a-number": { severity: "error", summary: "A response or covariate value is not a number." },
  "invalid-setting": { severity: "error", summary: "A plan setting has a value outside its allowed range." },
  "missing-replicate": { severity: "warning", summary: "A cell of the design has fewer runs than the plan's replicates." },
  "unbalanced-cells": { severity: "information", summary: "The cells of the design hold different numbers of measured runs." },
  "empty-cell": { severity: "warning", summary: "A combination of levels has no run, so a term involving it cannot be fully estimated." },
  "pending-run": { severity: "information", summary: "A planned run has no measured value yet." },
  "excluded-run": { severity: "hint", summary: "A run is kept in the file but excluded from the analysis." },
  "no-data": { severity: "information", summary: "A response has no measured values to analyse yet." },
  "no-error-df": { severity: "warning", summary: "The model leaves no residual degrees of freedom, so no F test is possible." },
  "zero-variance": { severity: "warning", summary: "The residuals are all zero, so F tests are undefined." },
  "aliased-term": { severity: "warning", summary: "A model term cannot be separated from other terms with the runs available." },
  "single-observation": { severity: "information", summary: "A level or cell has a single measured run, so its spread is unknown." },
  "internal-error": { severity: "error", summary: "Part of the analysis failed because of a bug in Trialbook; the rest is still reported." },
  "value-out-of-range": { severity: "error", summary: "A number is too large or too small to be represented." },
  "systematic-order": { severity: "warning", summary: "The run order is tied to the levels of a treatment factor, so a drift over time would be confounded with its effect." },
  "missing-condition": { severity: "warning", summary: "A subject of a repeated-measures design has no run in a condition of the within-subject factors." },
  "incomplete-subject": { severity: "information", summary: "A subject without a measured value in every condition is left out of the repeated-measures analysis." },
  "negative-variance-component": { severity: "information", summary: "A variance component estimated by the ANOVA method is negative and is reported as zero." },
  "special-design": { severity: "information", summary: "A repeated-measures, mixed-model or two-level analysis could not be made; the fixed-effects table is shown instead." },
  "unequal-variance": { severity: "warning", summary: "The spread of the response differs between groups (Brown-Forsythe test), so pooled F tests and intervals may mislead." },
  "non-normal-residuals": { severity: "warning", summary: "The residuals depart from a normal distribution (Shapiro-Wilk test), so small-sample p-values may be off." },
  outlier: { severity: "warning", summary: "A run's externally studentized residual exceeds the Bonferroni bound." },
  "out-of-spec": { severity: "information", summary: "A measured value lies outside the response's specification limits." },
  "low-power": { severity: "warning", summary: "The planned replicates give less than the target power to detect the difference the plan names." },
  "check-skipped": { severity: "hint", summary: "A comparison, model check or power calculation could not be computed for this response." },
} as const satisfies Record<string, DiagnosticRule>;

/** A diagnostic code: one of the keys of `DIAGNOSTIC_RULES`. */
export type DiagnosticCode = keyof typeof DIAGNOSTIC_RULES;

/** Another place in the document that matters for a diagnostic (the first of two duplicates, say). */
export interface RelatedLocation {
  readonly span: Span;
  readonly message: string;
}

/** A problem in a document, located by offsets. Faces convert spans to lines and columns. */
export interface Diagnostic {
  readonly severity: Severity;
  readonly code: DiagnosticCode;
  readonly message: string;
  readonly span: Span;
  readonly related?: readonly RelatedLocation[];
}

/** Builds a diagnostic with the code's default severity. */
export function diagnostic(
  code: DiagnosticCode,
  span: Span,
  message: string,
  related?: readonly RelatedLocation[],
): Diagnostic {
  const severity = DIAGNOSTIC_RULES[code].severity;
  return related && related.length > 0 ? { severity, code, message, span, related } : { severity, code, message, span };
}

/**
 * Collects diagnostics, keeping at most `perCodeLimit` of each code and summarising the rest in one more
 * diagnostic of that code, so a million pending runs do not become a million editor squiggles.
 */
export class DiagnosticSink {
  private readonly items: Diagnostic[] = [];
  private readonly counts = new Map<DiagnosticCode, number>();
  private readonly firstOverflowSpan = new Map<DiagnosticCode, Span>();

  constructor(private readonly perCodeLimit = 200) {}

  add(d: Diagnostic): void {
    const count = (this.counts.get(d.code) ?? 0) + 1;
    this.counts.set(d.code, count);
    if (count <= this.perCodeLimit) this.items.push(d);
    else if (count === this.perCodeLimit + 1) this.firstOverflowSpan.set(d.code, d.span);
  }

  /** The diagnostics collected, plus one summary per code that overflowed its limit. */
  finish(): Diagnostic[] {
    const out = this.items.slice();
    for (const [code, span] of this.firstOverflowSpan) {
      const hidden = (this.counts.get(code) ?? 0) - this.perCodeLimit;
      out.push(diagnostic(code, span, `${hidden} more '${code}' diagnostics like the ones above are not listed.`));
    }
    return out;
  }
}
