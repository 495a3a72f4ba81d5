/**
 * The studentized range distribution against R: the defining integrals evaluated with R's QUADPACK
 * `integrate` (test/stats/fixtures/r/studentized-range/generate.R, independent of ptukey), R's ptukey and
 * qtukey where they are accurate, and the exact identity for two means.
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { studentizedRangeCdf, studentizedRangeQuantile, studentizedRangeUpperTail, STUDENTIZED_RANGE_P_FLOOR } from "../../../server/src/stats/distributions/studentized-range.js";

interface Reference {
  R: string;
  cdf: { k: number[]; df: (number | string)[]; q: number[]; cdf: number[]; upper: number[]; ptukey: (number | null)[] };
  quantile: { p: number[]; k: number[]; df: (number | string)[]; q: number[]; qtukey: (number | null)[] };
}

const R: Reference = JSON.parse(readFileSync(resolve("test/stats/fixtures/r/studentized-range/reference.json"), "utf8"));
const dfOf = (df: number | string): number => (df === "Infinity" ? Infinity : Number(df));

describe("studentized range against R's integration of its definition", () => {
  it("the CDF equals the QUADPACK double integral to 1e-12 for k 2-20, df 1-1000 and infinite, q 0.5-20", () => {
    const g = R.cdf;
    assert.equal(g.q.length, 880);
    g.q.forEach((q, i) => {
      const ours = studentizedRangeCdf(q, g.k[i]!, dfOf(g.df[i]!));
      const error = Math.abs(ours - g.cdf[i]!);
      assert.ok(error <= 1e-12, `P(Q <= ${q}; ${g.k[i]}, ${g.df[i]}): ${ours} vs R ${g.cdf[i]} (error ${error})`);
    });
  });

  it("the upper tail equals R's integral of 1 - W to 1e-12 absolute, floored at 1e-10", () => {
    const g = R.cdf;
    g.q.forEach((q, i) => {
      const ours = studentizedRangeUpperTail(q, g.k[i]!, dfOf(g.df[i]!));
      const expected = Math.max(STUDENTIZED_RANGE_P_FLOOR, g.upper[i]!);
      assert.ok(Math.abs(ours - expected) <= 1e-12, `P(Q > ${q}; ${g.k[i]}, ${g.df[i]}): ${ours} vs R ${g.upper[i]}`);
    });
  });

  it("R's ptukey, where it gives a value, is within 1e-3 of the integral below 5 df, 5e-5 from 5 df, 5e-8 at infinite df", () => {
    // Why ours is not a port of ptukey (nor checked against it tightly): these are ptukey's own errors,
    // measured against R's integrals (largest: 6e-4 at 2 df, 2.7e-4 at 3 df, 2.1e-5 at 5 df, 1.2e-8 at
    // infinite df; the fixture's `checks` lists them by df).
    const g = R.cdf;
    let compared = 0;
    g.q.forEach((q, i) => {
      const ptukey = g.ptukey[i];
      if (ptukey === null || ptukey === undefined) return;
      compared++;
      const df = dfOf(g.df[i]!);
      const bound = df === Infinity ? 5e-8 : df >= 5 ? 5e-5 : 1e-3;
      assert.ok(Math.abs(ptukey - g.cdf[i]!) <= bound, `ptukey(${q}, ${g.k[i]}, ${g.df[i]})`);
    });
    assert.ok(compared > 500);
  });
});

describe("studentized range quantile", () => {
  it("equals uniroot on R's integral to 5e-11 relative (p 0.9-0.99, k 2-20, df 1 to infinite)", () => {
    assert.equal(R.quantile.p.length, 168);
    // Measured: within 1e-13 from 2 df on, 1.2e-11 at 1 df (where the density at the 95% point is small,
    // so the integrals' 1e-13 turn into more in q, on both sides).
    const g = R.quantile;
    g.p.forEach((p, i) => {
      const ours = studentizedRangeQuantile(p, g.k[i]!, dfOf(g.df[i]!));
      assert.ok(Math.abs(ours - g.q[i]!) <= 5e-11 * g.q[i]!, `q(${p}; ${g.k[i]}, ${g.df[i]}): ${ours} vs R ${g.q[i]}`);
    });
  });

  it("is within qtukey's documented accuracy (the 4th decimal) of R's qtukey from 10 df on", () => {
    // Below that qtukey is further off than documented: 0.17 relative at 2 df (p 0.99, k 20: qtukey 44.53,
    // the integral 37.94), 9e-3 at 3 df, 3.5e-5 at 5 df (the fixture's `checks`).
    const g = R.quantile;
    let compared = 0;
    g.p.forEach((p, i) => {
      const qtukey = g.qtukey[i];
      if (qtukey === null || qtukey === undefined || dfOf(g.df[i]!) < 10) return;
      compared++;
      assert.ok(Math.abs(studentizedRangeQuantile(p, g.k[i]!, dfOf(g.df[i]!)) - qtukey) <= 1e-4, `qtukey(${p}, ${g.k[i]}, ${g.df[i]})`);
    });
    assert.ok(compared > 50);
  });

  it("gives NaN, not a number, outside the domain (k 2-100, df >= 1, 0 < p < 1)", () => {
    assert.ok(Number.isNaN(studentizedRangeCdf(3, 101, 10)));
    assert.ok(Number.isFinite(studentizedRangeCdf(3, 100, 10)));
    assert.ok(Number.isNaN(studentizedRangeQuantile(0.95, 1, 10)));
    assert.ok(Number.isNaN(studentizedRangeQuantile(0.95, 3, 0.5)));
    assert.ok(Number.isNaN(studentizedRangeQuantile(1, 3, 10)));
    assert.ok(Number.isNaN(studentizedRangeCdf(2, 3.5, 10)));
    assert.equal(studentizedRangeCdf(0, 3, 10), 0);
    assert.equal(studentizedRangeCdf(Infinity, 3, 10), 1);
  });
});
