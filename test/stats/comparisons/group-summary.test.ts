/**
 * `summarizeGroupings` (several groupings summarised in shared passes) against `summarizeGroups` of each
 * grouping alone, bit for bit, including codes outside 0..count-1 (left out); `summarizeGroups` itself is
 * checked against R in comparisons-r.test.ts. The plain sums equal a left-to-right sum per group.
 */

import assert from "node:assert/strict";
import fc from "fast-check";
import { summarizeGroupings, summarizeGroups, summarizeGroupsWithSums } from "../../../server/src/stats/comparisons/group-summary.js";

const data = fc.integer({ min: 1, max: 5 }).chain((m) =>
  fc.tuple(
    fc.array(fc.integer({ min: 1, max: 7 }), { minLength: m, maxLength: m }),
    fc.array(fc.oneof(fc.integer({ min: -50, max: 50 }).map((v) => v / 8), fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 })), { maxLength: 400 }),
    fc.nat(),
  ),
);

describe("summarizeGroupings", () => {
  it("equals summarizeGroups of each grouping alone, bit for bit, for one to five groupings", () => {
    fc.assert(
      fc.property(data, ([counts, y, seed]) => {
        let s = seed || 1;
        const next = () => ((s = (s * 48271) % 2147483647), s);
        // Codes from -1 to count (both ends outside the groups).
        const codes = counts.map((count) => Int32Array.from(y, () => (next() % (count + 2)) - 1));
        const all = summarizeGroupings(Float64Array.from(y), codes, counts);
        assert.equal(all.length, counts.length);
        counts.forEach((count, j) => {
          assert.deepEqual(all[j]!.summaries, summarizeGroups(y, codes[j]!, count));
          assert.deepEqual(all[j]!, summarizeGroupsWithSums(y, codes[j]!, count));
          const sums = new Float64Array(count);
          y.forEach((v, i) => {
            const g = codes[j]![i]!;
            if (g >= 0 && g < count) sums[g] += v;
          });
          assert.deepEqual(all[j]!.sums, sums);
        });
      }),
      { numRuns: 300 },
    );
  });
});
