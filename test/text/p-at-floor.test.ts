/**
 * Comparison p-values at their floor are shown as "< floor", not as a value: the Tukey and Games-Howell
 * p-values are 1 - CDF of the studentized range and Dunnett's of its multivariate t, so a smaller p is
 * not resolved (docs/json-output-comparisons.md); the CLI text and the report show every comparison row
 * through `formatPAtFloor`.
 */
import assert from "node:assert/strict";
import { studentizedRangeUpperTail } from "../../server/src/stats/distributions/studentized-range.js";
import { comparisonPFloor, DUNNETT_P_FLOOR, STUDENTIZED_RANGE_P_FLOOR } from "../../server/src/stats/distributions/p-floors.js";
import { comparisonsText } from "../../server/src/text/comparisons-text.js";
import { formatPAtFloor } from "../../server/src/text/format-number.js";
import { dunnett } from "../../server/src/stats/comparisons/pairwise.js";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";

describe("comparison p-values at their floor", () => {
  it("shows the floor as '< floor' and every other value as formatP does", () => {
    assert.equal(formatPAtFloor(1e-10, comparisonPFloor("tukey")), "< 1e-10");
    assert.equal(formatPAtFloor(1e-10, comparisonPFloor("games-howell")), "< 1e-10");
    assert.equal(formatPAtFloor(1e-9, comparisonPFloor("dunnett")), "< 1e-9");
    assert.equal(formatPAtFloor(1e-10, comparisonPFloor("lsd")), "1.0e-10");
    assert.equal(formatPAtFloor(2e-10, comparisonPFloor("tukey")), "2.0e-10");
    assert.equal(formatPAtFloor(0.0312, comparisonPFloor("tukey")), "0.0312");
    assert.equal(formatPAtFloor(null, comparisonPFloor("tukey")), formatPAtFloor(null, undefined));
    // The floors are what the distributions give far in the tail.
    assert.equal(studentizedRangeUpperTail(40, 4, 1000), STUDENTIZED_RANGE_P_FLOOR);
    const separated = [{ n: 10, mean: 0, variance: 1 }, { n: 10, mean: 50, variance: 1 }, { n: 10, mean: 0.3, variance: 1 }];
    const control = dunnett(separated, 0, { ms: 1, df: 27 }, 0.95);
    assert.ok(control.ok);
    assert.equal(control.pairs[0]!.p, DUNNETT_P_FLOOR);
    assert.ok(control.pairs[1]!.p! > 0.1);
  });

  it("the CLI text shows widely separated levels as p < 1e-10", () => {
    const rows = Array.from({ length: 60 }, (_, i) => `  r${i + 1} a${(i % 3) + 1} | ${(10 * (i % 3) + (i % 5) / 10).toFixed(1)}`);
    const text = `trial "invented"\nresponse y\nfactor a levels a1, a2, a3\nruns id a | y\n${rows.join("\n")}\n`;
    const analysis = analyzeDocument(text);
    const out = analysis.responses.flatMap((r) => comparisonsText(r)).join("\n");
    assert.match(out, /tukey\s+a1 − a2 .*< 1e-10/);
    assert.doesNotMatch(out, /1\.0e-10/);
  });
});
