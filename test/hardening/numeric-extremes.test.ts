/**
 * Numeric extremes (issue 11, item 5): 1e308, 1e-308, 40-digit values, -0 and 1e400 in responses,
 * covariates, numeric levels and plan values. A value no double can hold gets a clear diagnostic on its
 * text; nothing prints or returns NaN or Infinity (analyze JSON and text, hovers, code lenses, every
 * feature: exerciseText in invariants.ts checks all of them).
 */
import assert from "node:assert/strict";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { analysisText } from "../../server/src/cli/analyze-command.js";
import { locateDiagnostics } from "../../server/src/cli/check-command.js";
import { EXTREME_NUMBERS } from "./generators.js";
import { assertCleanText, assertFiniteDeep, exerciseText } from "./invariants.js";

/** An invented two-level experiment with `value` written into one slot. */
function withValue(slot: "response" | "covariate" | "level" | "spec" | "detect", value: string): string {
  const v = (s: string, here: string) => (slot === s ? value : here);
  return [
    "# Invented: extreme values in one place.",
    "response y spec >= " + v("spec", "1"),
    `factor f levels ${v("level", "10")}, 20`,
    "covariate c",
    "plan",
    `  detect y ${v("detect", "1.5")}`,
    "runs id f c | y",
    `  r1 ${v("level", "10")} ${v("covariate", "1.0")} | ${v("response", "5.1")}`,
    "  r2 20 2.0 | 6.3",
    `  r3 ${v("level", "10")} 1.4 | 5.5`,
    "  r4 20 2.2 | 6.0",
    `  r5 ${v("level", "10")} 1.1 | 4.9`,
    "  r6 20 2.5 | 6.6",
    "",
  ].join("\n");
}

const SLOTS = ["response", "covariate", "level", "spec", "detect"] as const;
/** Values whose magnitude no finite, nonzero double can stand for. */
const UNREPRESENTABLE = new Set(["1e400", "-1e400", "1.8e308", "1e-400", "1e99999999999", "1e-99999999999", "9".repeat(400), "0." + "0".repeat(400) + "1"]);

/**
 * Gaps these tests found and that are not fixed yet (the code lives in files other engineers are editing
 * right now); each is listed as a pending test with its reason, so it shows in every run.
 */
const OVERFLOW = "the fit squares values near the largest double: the ANOVA returns NaN/Infinity sums of squares instead of a value-out-of-range diagnostic (analyze-response.ts / fit-linear-model.ts)";
const UNDERFLOW = "a value that underflows to 0 is taken as 0 with no value-out-of-range diagnostic (build-design.ts reads numeric levels, spec limits and detect without the range check responses get)";
const KNOWN_GAPS = new Map<string, string>([]);

describe("hardening: numeric extremes", function () {
  this.timeout(30_000);

  for (const slot of SLOTS) {
    for (const value of EXTREME_NUMBERS) {
      const label = value.length > 24 ? `${value.slice(0, 12)}…(${value.length} chars)` : value;
      const gap = KNOWN_GAPS.get(`${slot} ${value}`);
      if (gap) {
        it.skip(`${label} as a ${slot}: pending, ${gap}`, () => undefined);
        continue;
      }
      it(`${label} as a ${slot}: no NaN or Infinity anywhere${UNREPRESENTABLE.has(value) ? ", a diagnostic on the value" : ""}`, () => {
        const text = withValue(slot, value);
        const analysis = analyzeDocument(text);
        assertFiniteDeep(analysis.responses, "responses");
        assertFiniteDeep(analysis.design, "design");
        const located = locateDiagnostics(text, analysis.diagnostics);
        assertCleanText(analysisText("x.trial", analysis, located), text, "analyze text");
        exerciseText(text, { at: [text.indexOf(value) / text.length, 0.1, 0.3], newName: "renamed", runSheet: true, previous: withValue(slot, "1") });
        if (UNREPRESENTABLE.has(value)) {
          const at = text.indexOf(value);
          const onValue = analysis.diagnostics.filter((d) => d.span.start <= at && at < d.span.end && d.severity === "error");
          assert.ok(onValue.length > 0, `an error on ${label}: ${analysis.diagnostics.map((d) => `${d.code}@${d.span.start}-${d.span.end}: ${d.message}`).join("; ")}`);
          assert.ok(onValue.some((d) => /represent|too large|too small|range/i.test(d.message)), `the message says the value cannot be represented: ${onValue.map((d) => d.message).join("; ")}`);
        }
      });
    }
  }
});
