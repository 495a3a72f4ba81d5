/**
 * Floyd-Rivest selection (server/src/stats/checks/select.ts) against the reference it replaces: the
 * engine's numeric sort (Float64Array.prototype.sort, ECMAScript §23.2.3.29) of the same values. Data are
 * random, with many ties (values on a coarse grid, as decimal measurements are), odd and even counts, and
 * ranges long enough (> 600) for the sampling step.
 */

import assert from "node:assert/strict";
import fc from "fast-check";
import { medianInPlace, selectInPlace } from "../../../server/src/stats/checks/select.js";

/** The median a sort gives: the middle value, or the mean of the two middle values. */
function sortedMedian(values: Float64Array): number {
  const sorted = Float64Array.from(values).sort();
  const h = sorted.length >> 1;
  return sorted.length % 2 ? sorted[h]! : (sorted[h - 1]! + sorted[h]!) / 2;
}

/** Deterministic pseudo-random values on a grid of `levels` steps (ties galore when levels is small). */
function gridValues(n: number, levels: number, seed: number): Float64Array {
  let s = seed >>> 0 || 1;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    s ^= s << 13;
    s ^= s >>> 17;
    s ^= s << 5;
    out[i] = ((s >>> 0) % levels) / 100 - 3;
  }
  return out;
}

const values = fc.oneof(
  fc.array(fc.integer({ min: -20, max: 20 }).map((v) => v / 4), { minLength: 1, maxLength: 2000 }),
  fc.array(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), { minLength: 1, maxLength: 2000 }),
);

describe("selectInPlace / medianInPlace (Floyd & Rivest 1975)", () => {
  it("the median equals the sorted median on random data with ties, odd and even counts", () => {
    fc.assert(
      fc.property(values, (list) => {
        const a = Float64Array.from(list);
        assert.equal(medianInPlace(a, 0, a.length), sortedMedian(Float64Array.from(list)));
        // Selection only permutes the values.
        assert.deepEqual(Float64Array.from(a).sort(), Float64Array.from(list).sort());
      }),
      { numRuns: 300 },
    );
  });

  it("places the k-th smallest value at k with no greater value before it and no smaller after it", () => {
    fc.assert(
      fc.property(values, fc.nat(), (list, pick) => {
        const a = Float64Array.from(list);
        const k = pick % a.length;
        selectInPlace(a, k, 0, a.length - 1);
        const sorted = Float64Array.from(list).sort();
        assert.equal(a[k], sorted[k]);
        for (let i = 0; i < k; i++) assert.ok(a[i]! <= a[k]!);
        for (let i = k + 1; i < a.length; i++) assert.ok(a[i]! >= a[k]!);
      }),
      { numRuns: 300 },
    );
  });

  it("works on a sub-range and leaves the rest untouched", () => {
    fc.assert(
      fc.property(values, fc.nat(), fc.nat(), (list, x, y) => {
        const from = Math.min(x, y) % list.length;
        const to = from + 1 + (Math.max(x, y) % (list.length - from));
        const a = Float64Array.from(list);
        const median = medianInPlace(a, from, to);
        assert.equal(median, sortedMedian(Float64Array.from(list.slice(from, to))));
        for (let i = 0; i < from; i++) assert.equal(a[i], list[i]);
        for (let i = to; i < list.length; i++) assert.equal(a[i], list[i]);
      }),
      { numRuns: 200 },
    );
  });

  it("equals the sorted median on large arrays: heavy ties, sorted and reversed input, odd and even", () => {
    for (const n of [100_000, 100_001]) {
      for (const levels of [2, 7, 1000, 1_000_000]) {
        const data = gridValues(n, levels, n + levels);
        const expected = sortedMedian(data);
        assert.equal(medianInPlace(Float64Array.from(data), 0, n), expected, `n ${n}, ${levels} levels`);
        assert.equal(medianInPlace(Float64Array.from(data).sort(), 0, n), expected, `sorted, n ${n}, ${levels} levels`);
        assert.equal(medianInPlace(Float64Array.from(data).sort().reverse(), 0, n), expected, `reversed, n ${n}, ${levels} levels`);
      }
    }
    // All equal.
    assert.equal(medianInPlace(new Float64Array(5000).fill(2.5), 0, 5000), 2.5);
  });
});
