// Several groupings summarised at once (groupMeansOfGroupings) must equal one groupMeans call per grouping
// bit for bit (so the groupings' accumulators do not mix), and two-factor cells formed on the fly
// (`within`) must equal groupMeans over the stored cellCodes of the two factors. The reference values are
// groupMeans's, which the level means of r-fixtures.test.ts check against R (test/stats/fixtures/r/anova).

import assert from "node:assert/strict";
import fc from "fast-check";

import { cellCodes, groupMeans, groupMeansOfGroupings } from "../../../server/src/stats/linear-model/group-means.js";

const data = fc.integer({ min: 1, max: 60 }).chain((n) =>
  fc.record({
    y: fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: n, maxLength: n }),
    a: fc.array(fc.integer({ min: 0, max: 3 }), { minLength: n, maxLength: n }),
    b: fc.array(fc.integer({ min: 0, max: 2 }), { minLength: n, maxLength: n }),
    ms: fc.option(fc.double({ min: 0, max: 100, noNaN: true }), { nil: null }),
    df: fc.integer({ min: 0, max: 30 }),
  }),
);

describe("groupMeansOfGroupings", () => {
  it("equals one groupMeans per grouping, and per cellCodes for two-factor cells, bit for bit (property test)", () => {
    fc.assert(
      fc.property(data, ({ y, a, b, ms, df }) => {
        const values = Float64Array.from(y);
        const aCodes = Int32Array.from(a);
        const bCodes = Int32Array.from(b);
        const pooled = { ms, df };
        const cells = cellCodes([
          { levelCount: 4, codes: aCodes },
          { levelCount: 3, codes: bCodes },
        ]);
        const together = groupMeansOfGroupings(
          values,
          [
            { codes: aCodes, groupCount: 4 },
            { codes: bCodes, groupCount: 3 },
            { codes: aCodes, groupCount: 12, within: { codes: bCodes, levelCount: 3 } },
          ],
          pooled,
          0.9,
        );
        const separate = [groupMeans(values, aCodes, 4, pooled, 0.9), groupMeans(values, bCodes, 3, pooled, 0.9), groupMeans(values, cells.codes, cells.count, pooled, 0.9)];
        assert.equal(together.length, 3);
        together.forEach((groups, q) => {
          assert.equal(groups.length, separate[q]!.length);
          groups.forEach((g, k) => {
            const h = separate[q]![k]!;
            for (const key of ["group", "n", "mean", "sd", "lower", "upper"] as const) assert.ok(Object.is(g[key], h[key]), `grouping ${q} group ${k} ${key}: ${g[key]} vs ${h[key]}`);
          });
        });
      }),
      { numRuns: 1000 },
    );
  });

  it("up to three groupings read in one pair of passes equal the one-grouping-at-a-time passes taken beyond three, bit for bit (property test)", () => {
    fc.assert(
      fc.property(data, ({ y, a, b, ms, df }) => {
        const values = Float64Array.from(y);
        const aCodes = Int32Array.from(a);
        const bCodes = Int32Array.from(b);
        const pooled = { ms, df };
        const three = [
          { codes: aCodes, groupCount: 4 },
          { codes: bCodes, groupCount: 3 },
          { codes: aCodes, groupCount: 12, within: { codes: bCodes, levelCount: 3 } },
        ];
        const fused = groupMeansOfGroupings(values, three, pooled, 0.9);
        // A fourth grouping sends all four through the separate passes.
        const separate = groupMeansOfGroupings(values, [...three, { codes: bCodes, groupCount: 3 }], pooled, 0.9);
        fused.forEach((groups, q) => {
          groups.forEach((g, k) => {
            const h = separate[q]![k]!;
            for (const key of ["group", "n", "mean", "sd", "lower", "upper"] as const) assert.ok(Object.is(g[key], h[key]), `grouping ${q} group ${k} ${key}: ${g[key]} vs ${h[key]}`);
          });
        });
      }),
      { numRuns: 1000 },
    );
  });
});
