/**
 * The shared-pass Levene and Brown-Forsythe tests (server/src/stats/checks/levene.ts) against the
 * straightforward computation they replace, bit for bit: group means by division of observation-order
 * sums, medians by sorting each group, the one-way F of the absolute deviations summed in observation
 * order (the reference below; its results equal car::leveneTest, test/stats/comparisons/comparisons-r.test.ts).
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import fc from "fast-check";
import { leveneTest, leveneTests } from "../../../server/src/stats/checks/levene.js";
import type { FTest } from "../../../server/src/stats/checks/one-way-f.js";
import { fUpperTail } from "../../../server/src/stats/distributions/f-distribution.js";

/** The straightforward one-way F (observation-order sums; group mean divided out per observation). */
function referenceOneWayF(values: ArrayLike<number>, codes: ArrayLike<number>, count: number): FTest | null {
  const n = new Float64Array(count);
  const sum = new Float64Array(count);
  let total = 0;
  let used = 0;
  for (let i = 0; i < values.length; i++) {
    n[codes[i]!]!++;
    sum[codes[i]!] += values[i]!;
    total += values[i]!;
    used++;
  }
  const k = n.filter((x) => x > 0).length;
  const grand = total / used;
  let between = 0;
  for (let g = 0; g < count; g++) if (n[g]! > 0) between += n[g]! * (sum[g]! / n[g]! - grand) ** 2;
  let within = 0;
  for (let i = 0; i < values.length; i++) within += (values[i]! - sum[codes[i]!]! / n[codes[i]!]!) ** 2;
  const df1 = k - 1;
  const df2 = used - k;
  if (df1 < 1 || df2 < 1) return null;
  if (!(within > 1e-12 * (within + between))) return null;
  const statistic = between / df1 / (within / df2);
  return { statistic, df1, df2, p: fUpperTail(statistic, df1, df2) };
}

/** The straightforward Levene / Brown-Forsythe test: centres by sums and by sorting each group. */
function referenceLevene(y: readonly number[], codes: readonly number[], count: number, center: "mean" | "median"): FTest | null {
  const centers = new Float64Array(count);
  for (let g = 0; g < count; g++) {
    const values = y.filter((_, i) => codes[i] === g);
    if (values.length === 0) continue;
    if (center === "mean") {
      let s = 0;
      for (let i = 0; i < y.length; i++) if (codes[i] === g) s += y[i]!;
      centers[g] = s / values.length;
    } else {
      const sorted = Float64Array.from(values).sort();
      const h = sorted.length >> 1;
      centers[g] = sorted.length % 2 ? sorted[h]! : (sorted[h - 1]! + sorted[h]!) / 2;
    }
  }
  return referenceOneWayF(y.map((v, i) => Math.abs(v - centers[codes[i]!]!)), codes, count);
}

const grouped = fc.integer({ min: 1, max: 6 }).chain((count) =>
  fc.tuple(
    fc.constant(count),
    fc.array(fc.tuple(fc.integer({ min: 0, max: count - 1 }), fc.oneof(fc.integer({ min: -30, max: 30 }).map((v) => v / 10), fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e3, max: 1e3 }))), { minLength: 0, maxLength: 1500 }),
  ),
);

describe("leveneTests (shared passes, selected medians)", () => {
  it("equals the straightforward Levene and Brown-Forsythe computation bit for bit on random groups with ties", () => {
    fc.assert(
      fc.property(grouped, ([count, pairs]) => {
        const codes = pairs.map((p) => p[0]);
        const y = pairs.map((p) => p[1]);
        const both = leveneTests(Float64Array.from(y), Int32Array.from(codes), count);
        assert.deepEqual(both.levene, referenceLevene(y, codes, count, "mean"));
        assert.deepEqual(both.brownForsythe, referenceLevene(y, codes, count, "median"));
        assert.deepEqual(leveneTest(y, codes, count, "mean"), both.levene);
        assert.deepEqual(leveneTest(y, codes, count, "median"), both.brownForsythe);
      }),
      { numRuns: 300 },
    );
  });

  it("equals car::leveneTest (center = mean and median) on the R one-way set, and the single tests exactly", () => {
    // eslint-disable-next-line @typescript-eslint/no-explicit-any
    const R: any = JSON.parse(readFileSync(resolve("test/stats/fixtures/r/comparisons/reference.json"), "utf8"));
    const ow = R.oneway;
    const levels: string[] = ow.levels;
    const codes = Int32Array.from(ow.supplier as string[], (s) => levels.indexOf(s));
    const y = Float64Array.from(ow.strength as string[], Number);
    const both = leveneTests(y, codes, levels.length);
    for (const [t, ref] of [[both.levene, ow.levene], [both.brownForsythe, ow.brownForsythe]] as const) {
      assert.ok(t);
      assert.ok(Math.abs(t.statistic - ref.statistic) <= 1e-12 * Math.abs(ref.statistic));
      assert.ok(Math.abs(t.p - ref.p) <= 1e-11 * Math.abs(ref.p));
      assert.equal(t.df1, ref.df1);
      assert.equal(t.df2, ref.df2);
    }
    assert.deepEqual(both.levene, leveneTest(y, codes, levels.length, "mean"));
    assert.deepEqual(both.brownForsythe, leveneTest(y, codes, levels.length, "median"));
  });

  it("the histogram path for many values (with and without the caller's totals) equals the reference on awkward data", () => {
    const n = 40_000;
    let seed = 12345;
    const next = () => ((seed = (seed * 48271) % 2147483647), seed / 2147483647);
    const shapes: Record<string, (i: number, g: number) => number> = {
      "heavy ties": () => Math.round(next() * 8) / 4,
      "far outliers": (i) => (i % 997 === 0 ? 1e9 : next()),
      "one constant group": (_, g) => (g === 0 ? 2.5 : next() * g),
      "skewed": () => -Math.log(next() + 1e-12),
      "two values": () => (next() < 0.5 ? -1 : 1),
      "infinities": (i) => (i === 7 ? Infinity : i === 11 ? -Infinity : next()),
      "a NaN": (i) => (i === 5 ? Number.NaN : next()),
      "all equal": () => 3,
      "tiny spread on a large value": () => 1e6 + Math.round(next() * 4) * 1e-9,
    };
    for (const [name, shape] of Object.entries(shapes)) {
      for (const count of [1, 2, 5, 40]) {
        const codes = Array.from({ length: n }, (_, i) => (i * 7 + (i >> 3)) % count);
        const y = codes.map((g, i) => shape(i, g));
        const sizes = new Array<number>(count).fill(0);
        const sums = new Array<number>(count).fill(0);
        codes.forEach((g, i) => {
          sizes[g]!++;
          sums[g]! += y[i]!;
        });
        const expected = { levene: referenceLevene(y, codes, count, "mean"), brownForsythe: referenceLevene(y, codes, count, "median") };
        assert.deepEqual(leveneTests(Float64Array.from(y), Int32Array.from(codes), count), expected, `${name}, ${count} groups`);
        assert.deepEqual(leveneTests(Float64Array.from(y), Int32Array.from(codes), count, { sizes, sums }), expected, `${name}, ${count} groups, totals`);
      }
    }
  });

  it("medians of groups far larger than the selection's sample size equal the sorted medians", () => {
    const n = 50_001;
    const y = new Float64Array(n);
    const codes = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      codes[i] = (i * 7919) % 3;
      y[i] = (((i * 104729) % 97) - 48) / 10 + codes[i]!;
    }
    const both = leveneTests(y, codes, 3);
    assert.deepEqual(both.brownForsythe, referenceLevene(Array.from(y), Array.from(codes), 3, "median"));
    assert.deepEqual(both.levene, referenceLevene(Array.from(y), Array.from(codes), 3, "mean"));
  });
});
