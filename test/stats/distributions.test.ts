// Reference values: R 4.2.2 (nmath; pbeta is TOMS 708, Didonato & Morris 1992), committed with their
// generator in test/stats/fixtures/r/ (distributions.R -> distributions.json; see the README there).
// Each set states its relative tolerance; exact equality is checked first.

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";

import { logGamma } from "../../server/src/stats/special/log-gamma.js";
import {
  incompleteBetaPair,
  regularizedIncompleteBeta,
  regularizedIncompleteBetaComplement,
} from "../../server/src/stats/special/incomplete-beta.js";
import { fCdf, fQuantile, fUpperTail } from "../../server/src/stats/distributions/f-distribution.js";
import { tCdf, tQuantile, tTwoSidedP, tUpperTail } from "../../server/src/stats/distributions/t-distribution.js";
import { normalCdf, normalDensity, normalQuantile, normalUpperTail } from "../../server/src/stats/distributions/normal-distribution.js";

type Row = Record<string, number>;
const fixture = JSON.parse(readFileSync(path.resolve("test/stats/fixtures/r/distributions.json"), "utf8")) as Record<
  string,
  Row[]
> & { source: string };

/** Asserts |actual - expected| <= tolerance·|expected| (after an exact-equality check). */
function assertClose(actual: number, expected: number, tolerance: number, label: string): void {
  if (actual === expected) return;
  const error = Math.abs(actual - expected) / Math.abs(expected);
  assert.ok(error <= tolerance, `${label}: got ${actual}, R ${expected}, relative error ${error.toExponential(2)} > ${tolerance}`);
}

describe("stats distributions against R 4.2.2 (test/stats/fixtures/r/distributions.json)", () => {
  it("fixture records the R version it came from", () => {
    assert.match(fixture.source, /^R version 4\.2\.2/);
  });

  it("logGamma: 2e-14 relative, absolute where |lgamma| < 1 (near the zeros at 1 and 2)", () => {
    for (const r of fixture.lgamma) {
      const v = logGamma(r.x);
      if (v === r.value) continue;
      const error = Math.abs(v - r.value) / Math.max(1, Math.abs(r.value));
      assert.ok(error <= 2e-14, `lgamma(${r.x}): ${v} vs R ${r.value}`);
    }
  });

  it("incomplete beta, both tails: 1e-13 relative (pbeta, lower.tail TRUE and FALSE)", () => {
    for (const r of fixture.pbeta) {
      const label = `I_${r.x}(${r.a}, ${r.b})`;
      assertClose(regularizedIncompleteBeta(r.x, r.a, r.b), r.lower, 1e-13, label);
      assertClose(regularizedIncompleteBetaComplement(r.x, r.a, r.b), r.upper, 1e-13, `1 - ${label}`);
    }
  });

  it("F upper tail and CDF: 1e-13 (p >= 1e-100) and 3e-13 (down to 1e-300) for df <= 18000", () => {
    for (const r of fixture.pf.filter((row) => row.df1 < 1e6 && row.df2 < 1e6)) {
      const label = `F(${r.df1}, ${r.df2}) at ${r.f}`;
      assertClose(fUpperTail(r.f, r.df1, r.df2), r.upper, r.upper >= 1e-100 ? 1e-13 : 3e-13, `upper ${label}`);
      assertClose(fCdf(r.f, r.df1, r.df2), r.lower, r.lower >= 1e-100 ? 1e-13 : 3e-13, `lower ${label}`);
    }
  });

  it("F tails with a df of 1e6: 3e-12 (known gap: no asymptotic expansion for huge df near the centre)", () => {
    const rows = fixture.pf.filter((row) => row.df1 >= 1e6 || row.df2 >= 1e6);
    assert.ok(rows.length > 40);
    for (const r of rows) {
      const label = `F(${r.df1}, ${r.df2}) at ${r.f}`;
      assertClose(fUpperTail(r.f, r.df1, r.df2), r.upper, 3e-12, `upper ${label}`);
      assertClose(fCdf(r.f, r.df1, r.df2), r.lower, 3e-12, `lower ${label}`);
    }
  });

  it("F upper tail of 60 on (3, 100) df is 2.84e-22, not 0", () => {
    // R: pf(60, 3, 100, lower.tail = FALSE) = 2.8423531217581...e-22 (fixture row f = 60, df 3, 100).
    const row = fixture.pf.find((r) => r.f === 60 && r.df1 === 3 && r.df2 === 100);
    assert.ok(row);
    assertClose(fUpperTail(60, 3, 100), row.upper, 1e-13, "pf(60, 3, 100, lower = FALSE)");
    assert.ok(row.upper > 2.84e-22 && row.upper < 2.85e-22);
  });

  it("t CDF and upper tail: 2e-13 relative, df 0.5 to 1e6 (R's pbeta form for df 1e6)", () => {
    for (const r of fixture.pt) {
      const label = `t(${r.df}) at ${r.t}`;
      assertClose(tCdf(r.t, r.df), r.lower, 2e-13, `cdf ${label}`);
      assertClose(tUpperTail(r.t, r.df), r.upper, 2e-13, `upper ${label}`);
      const twoSided = 2 * Math.min(r.lower, r.upper);
      if (twoSided <= 1) assertClose(tTwoSidedP(r.t, r.df), twoSided, 2e-13, `two-sided ${label}`);
    }
  });

  it("t quantile: 1e-13 relative for p in {1e-12 ... 1 - 1e-9}, df 1 to 1e6", () => {
    for (const r of fixture.qt) assertClose(tQuantile(r.p, r.df), r.value, 1e-13, `qt(${r.p}, ${r.df})`);
  });

  it("t quantile: asked again (kept recent values, and after they were cleared), still the R reference", () => {
    const check = (label: string) => {
      for (const r of fixture.qt) assertClose(tQuantile(r.p, r.df), r.value, 1e-13, `qt(${r.p}, ${r.df}) ${label}`);
    };
    check("first");
    check("kept");
    // More other quantiles than are kept: the set is cleared, and the references are computed afresh.
    for (let df = 2; df < 200; df++) assert.ok(tQuantile(0.975, df) > 1.9);
    check("after clearing");
  });

  it("F quantile: 1e-13 relative (reference refined on R's pf, see README)", () => {
    for (const r of fixture.qf) assertClose(fQuantile(r.p, r.df1, r.df2), r.value, 1e-13, `qf(${r.p}, ${r.df1}, ${r.df2})`);
  });

  it("normal tails: 1e-14 relative, z from -37.5 to 37", () => {
    for (const r of fixture.pnorm) {
      assertClose(normalCdf(r.z), r.lower, 1e-14, `pnorm(${r.z})`);
      assertClose(normalUpperTail(r.z), r.upper, 1e-14, `pnorm(${r.z}, lower = FALSE)`);
    }
  });

  it("normal density: 1e-15 relative (R 4.2.2 dnorm, values below)", () => {
    const dnorm: [number, number][] = [
      [-8.5, 8.1662356316695502e-17],
      [-3, 0.0044318484119380075],
      [-1, 0.24197072451914337],
      [0, 0.3989422804014327],
      [0.5, 0.35206532676429952],
      [2.25, 0.031739651835667418],
      [6, 6.0758828498232861e-9],
    ];
    for (const [z, value] of dnorm) assertClose(normalDensity(z), value, 1e-15, `dnorm(${z})`);
  });

  it("normal quantile: 1e-15 relative", () => {
    for (const r of fixture.qnorm) assertClose(normalQuantile(r.p), r.value, 1e-15, `qnorm(${r.p})`);
  });
});

describe("stats distribution kernels: invalid parameters give NaN, limits are exact", () => {
  it("returns NaN for invalid degrees of freedom, probabilities and beta arguments", () => {
    assert.ok(Number.isNaN(fUpperTail(1, 0, 5)));
    assert.ok(Number.isNaN(fCdf(1, 3, -1)));
    assert.ok(Number.isNaN(fQuantile(1.5, 3, 4)));
    assert.ok(Number.isNaN(tCdf(1, 0)));
    assert.ok(Number.isNaN(tQuantile(-0.1, 5)));
    assert.ok(Number.isNaN(normalQuantile(2)));
    assert.ok(Number.isNaN(regularizedIncompleteBeta(1.5, 1, 1)));
    assert.ok(Number.isNaN(incompleteBetaPair(0.5, 0.5, 0, 1).lower));
  });

  it("gives the closed forms at the ends of the range", () => {
    assert.equal(fUpperTail(0, 3, 4), 1);
    assert.equal(fCdf(Infinity, 3, 4), 1);
    assert.equal(tQuantile(0.5, 7), 0);
    assert.equal(tQuantile(0, 7), -Infinity);
    assert.equal(fQuantile(0, 2, 9), 0);
    // F(2, d2) upper tail is (1 + 2f/d2)^(-d2/2) exactly (A&S 26.6.4); here (1 + 2·9/6)^(-3) = 4^-3.
    assertClose(fUpperTail(9, 2, 6), 1 / 64, 1e-15, "F(2, 6) at 9");
  });
});
