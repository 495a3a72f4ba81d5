// Several groupings summarised at once (groupMeansOfGroupings) must equal one groupMeans call per grouping
// bit for bit (so the groupings' accumulators do not mix), and two-factor cells formed on the fly
// (`within`) must equal groupMeans over the stored cellCodes of the two factors. The reference values are
// groupMeans's, which the level means of r-fixtures.test.ts check against R (test/stats/fixtures/r/anova).

import assert from "node:assert/strict";
import fc from "fast-check";

import { summarizeGroupsWithSums } from "../../../server/src/stats/comparisons/group-summary.js";
import { cellCodes, groupMeans, groupMeansOfGroupings, groupStatisticsOfGroupings } from "../../../server/src/stats/linear-model/group-means.js";

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

  it("gives the comparisons' group summaries and sums, equal to summarizeGroupsWithSums bit for bit, fused and separate (property test)", () => {
    fc.assert(
      fc.property(data, ({ y, a, b, ms, df }) => {
        const values = Float64Array.from(y);
        const aCodes = Int32Array.from(a);
        const bCodes = Int32Array.from(b);
        const cells = cellCodes([
          { levelCount: 4, codes: aCodes },
          { levelCount: 3, codes: bCodes },
        ]);
        const three = [
          { codes: aCodes, groupCount: 4 },
          { codes: bCodes, groupCount: 3 },
          { codes: aCodes, groupCount: 12, within: { codes: bCodes, levelCount: 3 } },
        ];
        const reference = [summarizeGroupsWithSums(values, aCodes, 4), summarizeGroupsWithSums(values, bCodes, 3), summarizeGroupsWithSums(values, cells.codes, cells.count)];
        // Three groupings take the fused passes; a fourth sends them all through the separate ones.
        for (const groupings of [three, [...three, { codes: aCodes, groupCount: 4 }]]) {
          const { summarized } = groupStatisticsOfGroupings(values, groupings, { ms, df }, 0.9);
          reference.forEach((expected, q) => {
            const got = summarized[q]!;
            assert.equal(got.summaries.length, expected.summaries.length);
            got.summaries.forEach((g, k) => {
              const h = expected.summaries[k]!;
              for (const key of ["n", "mean", "variance"] as const) assert.ok(Object.is(g[key], h[key]), `grouping ${q} group ${k} ${key}: ${g[key]} vs ${h[key]}`);
            });
            assert.deepEqual(Array.from(got.sums), Array.from(expected.sums));
            got.sums.forEach((v, k) => assert.ok(Object.is(v, expected.sums[k]), `grouping ${q} sum ${k}`));
          });
        }
      }),
      { numRuns: 1000 },
    );
  });
});
