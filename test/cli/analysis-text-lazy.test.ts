/**
 * The text report reads only what it prints: the per-run residuals (built lazily, one object per run) are
 * never read by `analyze --format text` or `check`. Checked on the repository's samples by making the
 * residuals unreadable and comparing the text with the report of an untouched analysis (the samples'
 * reports themselves are checked against R in the golden tests).
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { analysisText } from "../../server/src/cli/analyze-command.js";
import { locateDiagnostics } from "../../server/src/cli/check-command.js";

const SAMPLES = ["one-way.trial", "two-factor.trial", "blocked.trial", "covariate.trial", "latin-square.trial", "repeated-measures.trial", "screening-fraction.trial", "batch-variation.trial"];

describe("analysisText never reads the per-run residuals", () => {
  for (const name of SAMPLES) {
    it(name, () => {
      const text = readFileSync(resolve("samples", name), "utf8");
      const expected = (() => {
        const analysis = analyzeDocument(text);
        return analysisText(name, analysis, locateDiagnostics(text, analysis.diagnostics));
      })();
      const analysis = analyzeDocument(text);
      for (const response of analysis.responses) {
        Object.defineProperty(response, "residuals", {
          get() {
            throw new Error("the text report read the residuals");
          },
        });
      }
      assert.equal(analysisText(name, analysis, locateDiagnostics(text, analysis.diagnostics)), expected);
    });
  }
});
