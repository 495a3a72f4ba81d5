/**
 * `studentizedValues` (server/src/analysis/extensions/studentized-values.ts) against the fit's own
 * `studentized` residuals, which the outlier check used to read (and which equal R's rstudent, see the
 * linear-model tests): the same values bit for bit, NaN where the fit has null, on the repository's
 * samples and on fits with no residual df and with a zero residual.
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { analyzeResponse } from "../../../server/src/analysis/analyze-response.js";
import { buildDesign } from "../../../server/src/analysis/build-design.js";
import { studentizedValues } from "../../../server/src/analysis/extensions/studentized-values.js";
import { parseTrial } from "../../../grammar/src/parse.js";

const SAMPLES = ["one-way.trial", "two-factor.trial", "blocked.trial", "covariate.trial", "latin-square.trial", "repeated-measures.trial", "screening-fraction.trial", "batch-variation.trial", "incomplete.trial"];

function fitsOf(text: string) {
  const { design } = buildDesign(parseTrial(text));
  return design.responses.flatMap((response, k) => {
    const { context } = analyzeResponse(design, k, { response: response.span, terms: new Map() });
    return context ? [context.fit] : [];
  });
}

function assertSame(text: string, what: string): number {
  const fits = fitsOf(text);
  for (const fit of fits) {
    const values = studentizedValues(fit);
    assert.equal(values.length, fit.studentized.length, what);
    fit.studentized.forEach((t, i) => assert.ok(t === null ? Number.isNaN(values[i]) : Object.is(values[i], t), `${what}, run ${i}: ${values[i]} vs ${t}`));
  }
  return fits.length;
}

describe("studentizedValues equals the fit's studentized residuals", () => {
  for (const name of SAMPLES) it(name, () => assert.ok(assertSame(readFileSync(resolve("samples", name), "utf8"), name) > 0));

  it("a saturated fit (no residual df) and an exact fit (zero residual) give no values", () => {
    const head = 'trial "invented saturated"\nresponse y\nfactor a levels a1, a2, a3\nruns id a | y\n';
    assert.equal(assertSame(head + "  r1 a1 | 1.5\n  r2 a2 | 2.5\n  r3 a3 | 4\n", "saturated"), 1);
    assert.equal(assertSame(head + "  r1 a1 | 1.5\n  r2 a1 | 1.5\n  r3 a2 | 2.5\n  r4 a2 | 2.5\n  r5 a3 | 4\n  r6 a3 | 4\n", "exact"), 1);
    const exact = fitsOf(head + "  r1 a1 | 1.5\n  r2 a1 | 1.5\n  r3 a2 | 2.5\n  r4 a2 | 2.5\n  r5 a3 | 4\n  r6 a3 | 4\n")[0]!;
    assert.ok(exact.notes.some((n) => n.code === "zero-residual-variance"));
    assert.ok(studentizedValues(exact).every((v) => Number.isNaN(v)));
  });
});
