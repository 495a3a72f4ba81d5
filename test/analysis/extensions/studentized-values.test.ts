/**
 * `studentizedValues` (server/src/analysis/extensions/studentized-values.ts) against the fit's own
 * `studentized` residuals, which the outlier check used to read (and which equal R's rstudent, see the
 * linear-model tests): the same values bit for bit, NaN where the fit has null, on the repository's
 * samples and on fits with no residual df and with a zero residual. The screened candidates give the
 * same Bonferroni outliers as all residuals (whose flags equal car::outlierTest, see the pipeline tests),
 * on the samples and on invented data with planted outliers at several alphas (for a fit on cell
 * statistics, screened from its per-cell view of residuals and leverages).
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { analyzeResponse } from "../../../server/src/analysis/analyze-response.js";
import { buildDesign } from "../../../server/src/analysis/build-design.js";
import { studentizedCandidates, studentizedValues } from "../../../server/src/analysis/extensions/studentized-values.js";
import { bonferroniOutliers, bonferroniOutliersAmong, bonferroniScreen } from "../../../server/src/stats/checks/outliers.js";
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
    for (const alpha of [0.05, 0.5, 0.999]) {
      const n = fit.residuals.length;
      const screen = bonferroniScreen(n, fit.residual.df, alpha);
      const among = screen === null ? [] : (() => {
        const c = studentizedCandidates(fit, screen);
        c.index.forEach((i, j) => assert.ok(Object.is(c.studentized[j], values[i]), `${what}: candidate ${i}`));
        return bonferroniOutliersAmong(c.index, c.studentized, n, fit.residual.df, alpha);
      })();
      assert.deepEqual(among, bonferroniOutliers(fit.studentized, fit.residual.df, alpha), `${what}, alpha ${alpha}`);
    }
  }
  return fits.length;
}

describe("studentizedValues equals the fit's studentized residuals", () => {
  for (const name of SAMPLES) it(name, () => assert.ok(assertSame(readFileSync(resolve("samples", name), "utf8"), name) > 0));

  it("planted outliers among many runs are found from the screened candidates alone", () => {
    let seed = 7;
    const next = () => ((seed = (seed * 48271) % 2147483647), seed / 2147483647);
    const rows: string[] = [];
    for (let i = 0; i < 3000; i++) {
      const a = `a${1 + (i % 3)}`;
      const b = `b${1 + ((i >> 2) % 2)}`;
      const planted = i % 701 === 5 ? 9 : i % 977 === 3 ? -6 : 0;
      rows.push(`  r${i} ${a} ${b} | ${(10 + (i % 3) + Math.round(next() * 100) / 100 + planted).toFixed(2)}`);
    }
    const text = 'trial "invented molding line"\nresponse y\nfactor a levels a1, a2, a3\nfactor b levels b1, b2\nruns id a b | y\n' + rows.join("\n") + "\n";
    assert.equal(assertSame(text, "planted"), 1);
    const fit = fitsOf(text)[0]!;
    // Unbalanced (every seventh run left out), the same data are fitted on cell statistics, and the
    // candidates come from the per-cell view instead of per-run arrays.
    const unbalanced = 'trial "invented molding line"\nresponse y\nfactor a levels a1, a2, a3\nfactor b levels b1, b2\nruns id a b | y\n' + rows.filter((_, i) => i % 7 !== 0).join("\n") + "\n";
    assert.equal(assertSame(unbalanced, "planted, unbalanced"), 1);
    assert.ok(fitsOf(unbalanced)[0]!.runCells, "the cell path's per-cell view");
    const flagged = bonferroniOutliers(fit.studentized, fit.residual.df, 0.05);
    assert.ok(flagged.length >= 4, `planted outliers flagged: ${flagged.length}`);
    const c = studentizedCandidates(fit, bonferroniScreen(fit.residuals.length, fit.residual.df, 0.05)!);
    assert.ok(c.index.length < 100, `few candidates: ${c.index.length}`);
  });

  it("a saturated fit (no residual df) and an exact fit (zero residual) give no values", () => {
    const head = 'trial "invented saturated"\nresponse y\nfactor a levels a1, a2, a3\nruns id a | y\n';
    assert.equal(assertSame(head + "  r1 a1 | 1.5\n  r2 a2 | 2.5\n  r3 a3 | 4\n", "saturated"), 1);
    assert.equal(assertSame(head + "  r1 a1 | 1.5\n  r2 a1 | 1.5\n  r3 a2 | 2.5\n  r4 a2 | 2.5\n  r5 a3 | 4\n  r6 a3 | 4\n", "exact"), 1);
    const exact = fitsOf(head + "  r1 a1 | 1.5\n  r2 a1 | 1.5\n  r3 a2 | 2.5\n  r4 a2 | 2.5\n  r5 a3 | 4\n  r6 a3 | 4\n")[0]!;
    assert.ok(exact.notes.some((n) => n.code === "zero-residual-variance"));
    assert.ok(studentizedValues(exact).every((v) => Number.isNaN(v)));
  });
});
