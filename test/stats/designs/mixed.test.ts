/**
 * Balanced mixed models against R 4.2.2 (test/stats/fixtures/r/designs/generate.R): sums of squares from
 * aov (crossed, nested with `/` and `batch:sample`), F tests whose denominators follow the unrestricted
 * expected mean squares (written out per design in the script, Satterthwaite df for the synthetic ones),
 * ANOVA-method variance components by formula, and the ICC of the nested design.
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { type BalancedFactor, balancedAnova } from "../../../server/src/stats/mixed/balanced-terms.js";
import { emsText, type MixedTermTest, mixedModelTests, type VarianceComponent } from "../../../server/src/stats/mixed/expected-mean-squares.js";
import { assertClose } from "../linear-model/helpers.js";

interface MixedFixture {
  levels: Record<string, number[]>;
  y: number[];
  anova: Record<string, { df: number; ss: number; ms: number }>;
  tests: { term: string; denominatorMs: number; denominatorDf: number; f: number; p: number }[];
  components?: Record<string, number>;
  icc?: number;
}

function load(name: string): MixedFixture {
  return JSON.parse(readFileSync(path.resolve("test/stats/fixtures/r/designs", `${name}.json`), "utf8")) as MixedFixture;
}

/** R's aov labels in our term names. */
const R_NAMES: Record<string, string> = { "batch:sample": "sample(batch)", "A:batch:sample": "A x sample(batch)", Residuals: "Residual" };
const ourName = (label: string) => R_NAMES[label] ?? label.replace(/:/g, " x ");

const CASES: { name: string; factors: BalancedFactor[] }[] = [
  { name: "mixed-crossed", factors: [{ name: "gauge", levels: 3, random: false }, { name: "part", levels: 4, random: true }] },
  { name: "mixed-nested", factors: [{ name: "batch", levels: 5, random: true }, { name: "sample", levels: 3, parent: 0, random: true }] },
  { name: "mixed-three", factors: [{ name: "A", levels: 2, random: false }, { name: "B", levels: 3, random: true }, { name: "C", levels: 4, random: true }] },
  { name: "mixed-negative", factors: [{ name: "lot", levels: 6, random: true }] },
  {
    name: "mixed-crossed-nested",
    factors: [{ name: "A", levels: 2, random: false }, { name: "batch", levels: 3, random: true }, { name: "sample", levels: 2, parent: 1, random: true }],
  },
  { name: "mixed-noreps", factors: [{ name: "A", levels: 4, random: false }, { name: "block", levels: 5, random: true }] },
];

for (const c of CASES) {
  describe(`balanced mixed model vs R: ${c.name}`, () => {
    const fx = load(c.name);
    const anova = balancedAnova({ factors: c.factors, codes: c.factors.map((f) => Int32Array.from(fx.levels[f.name]!)), y: Float64Array.from(fx.y) });
    it("is balanced and analysed", () => assert.ok(anova.ok, anova.ok ? "" : anova.reason));
    if (!anova.ok) return;
    const mixed = mixedModelTests(c.factors, anova);

    it("every aov row: df and SS", () => {
      for (const [label, ref] of Object.entries(fx.anova)) {
        const name = ourName(label);
        const row: { df: number; ss: number } | undefined = name === "Residual" ? anova.residual : anova.terms.find((t) => t.name === name);
        assert.ok(row, `term ${name}`);
        assert.equal(row.df, ref.df, `${name} df`);
        assertClose(row.ss, ref.ss, `${name} SS`, 1e-10, 1e-11);
      }
      assert.equal(anova.terms.length + 1, Object.keys(fx.anova).length, "no extra terms");
    });

    it("F tests against the unrestricted-EMS denominators (Satterthwaite df where synthetic)", () => {
      for (const ref of fx.tests) {
        const index: number = anova.terms.findIndex((t) => t.name === ref.term);
        const test: MixedTermTest = mixed.tests[index]!;
        if (ref.denominatorMs <= 0) {
          assert.equal(test.denominator, null, `${ref.term}: a synthetic denominator that is not positive gives no test`);
          assert.equal(test.f, null);
          assert.match(test.note ?? "", /not positive/);
          continue;
        }
        assert.ok(test.denominator, `${ref.term} denominator`);
        assertClose(test.denominator.ms, ref.denominatorMs, `${ref.term} denominator MS`, 1e-10);
        assertClose(test.denominator.df, ref.denominatorDf, `${ref.term} denominator df`, 1e-10);
        assertClose(test.f, ref.f, `${ref.term} F`, 1e-10);
        assertClose(test.p, ref.p, `${ref.term} p`, 1e-8);
      }
    });

    if (fx.components) {
      it("ANOVA-method variance components; negative estimates reported as zero", () => {
        for (const [label, value] of Object.entries(fx.components!)) {
          const comp: VarianceComponent | undefined = mixed.components.find((x) => (x.term < 0 ? "Residual" : anova.terms[x.term]!.name) === label);
          assert.ok(comp, `component ${label}`);
          assertClose(comp.estimate, value, `${label} estimate`, 1e-10, 1e-12);
          assertClose(comp.variance, Math.max(0, value), `${label} reported`, 1e-10, 1e-12);
          assert.equal(comp.truncated, value < 0);
        }
        const shares = mixed.components.reduce((a, x) => a + (x.share ?? 0), 0);
        assertClose(shares, 1, "shares add to 1", 1e-12);
      });
    }
    if (fx.icc !== undefined) {
      it("intraclass correlation of the top random factor", () => {
        assert.ok(mixed.icc);
        assertClose(mixed.icc.value, fx.icc!, "ICC", 1e-10);
      });
    }
  });
}

describe("expected mean squares (unrestricted convention)", () => {
  it("writes the textbook EMS of a fixed x random two-factor design (Searle, Casella & McCulloch 1992, Table 4.8 form)", () => {
    const fx = load("mixed-crossed");
    const factors: BalancedFactor[] = [{ name: "gauge", levels: 3, random: false }, { name: "part", levels: 4, random: true }];
    const anova = balancedAnova({ factors, codes: factors.map((f) => Int32Array.from(fx.levels[f.name]!)), y: Float64Array.from(fx.y) });
    assert.ok(anova.ok);
    const mixed = mixedModelTests(factors, anova);
    const text = mixed.tests.map((t) => emsText(t.ems, t.term, anova.terms));
    // r = 2 repeats, a = 3 gauges, b = 4 parts.
    assert.deepEqual(text, ["σ²(Residual) + 2·σ²(gauge x part) + Q(gauge)", "σ²(Residual) + 6·σ²(part) + 2·σ²(gauge x part)", "σ²(Residual) + 2·σ²(gauge x part)"]);
  });
  it("refuses an unbalanced layout with a reason", () => {
    const r = balancedAnova({ factors: [{ name: "a", levels: 2, random: true }], codes: [Int32Array.of(0, 0, 1)], y: Float64Array.of(1, 2, 3) });
    assert.equal(r.ok, false);
  });
});
