/**
 * The typed-array `orderClustering` (server/src/analysis/checks/systematic-order.ts) against the
 * straightforward Kruskal-Wallis H of run positions (Kruskal & Wallis 1952) it replaces, a map of level
 * sizes and rank sums summed in order of first appearance: equal bit for bit, with and without the
 * level count. (The H values themselves are checked against R's kruskal.test in systematic-order.test.ts.)
 */

import assert from "node:assert/strict";
import fc from "fast-check";
import { orderClustering } from "../../../server/src/analysis/checks/systematic-order.js";

function reference(levels: readonly number[]) {
  const sums = new Map<number, { n: number; rankSum: number }>();
  let n = 0;
  for (const level of levels) {
    if (level < 0) continue;
    n++;
    const s = sums.get(level) ?? { n: 0, rankSum: 0 };
    s.n++;
    s.rankSum += n;
    sums.set(level, s);
  }
  const k = sums.size;
  if (k < 2 || n <= k) return undefined;
  let sum = 0;
  for (const s of sums.values()) sum += (s.rankSum * s.rankSum) / s.n;
  const h = Math.max(0, (12 / (n * (n + 1))) * sum - 3 * (n + 1));
  const corrected = Math.min(1, Math.max(0, (h - (k - 1)) / (n - k)));
  return { n, k, h, correlation: Math.sqrt(corrected) };
}

describe("orderClustering on typed arrays", () => {
  it("equals the map-based computation bit for bit, with unknown (-1) runs, with and without the level count", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 8 }).chain((count) => fc.tuple(fc.constant(count), fc.array(fc.integer({ min: -1, max: count - 1 }), { maxLength: 3000 }))), ([count, levels]) => {
        const expected = reference(levels);
        assert.deepEqual(orderClustering(Int32Array.from(levels), count), expected);
        assert.deepEqual(orderClustering(levels), expected);
      }),
      { numRuns: 400 },
    );
  });

  it("a level index past the given count falls back to the exact computation", () => {
    assert.deepEqual(orderClustering([0, 0, 5, 5, 0, 5], 2), reference([0, 0, 5, 5, 0, 5]));
  });
});
