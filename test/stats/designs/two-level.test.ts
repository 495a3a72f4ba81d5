/**
 * Two-level designs: effects, Lenth's method, curvature and pure error against R 4.2.2
 * (test/stats/fixtures/r/designs/generate.R: effects as twice the lm coefficients on ±1 columns, Lenth by its
 * published formula with qt); Lenth's t multipliers against the values tabulated in Lenth (1989) as
 * recalled (marked below); defining relations and resolutions against the table of 2^(k-p) designs in
 * Montgomery (2017, Design and Analysis of Experiments, 9th ed., Table 8.14), each also re-derived here
 * independently by brute force from the run matrix.
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { aliasesOf, aliasSets, definingRelation, type FractionGenerator } from "../../../server/src/stats/two-level/aliases.js";
import { curvatureTest, pureError } from "../../../server/src/stats/two-level/curvature.js";
import { twoLevelEffects } from "../../../server/src/stats/two-level/effects.js";
import { lenth } from "../../../server/src/stats/two-level/lenth.js";
import { halfNormalPlotPoints, normalPlotPoints, paretoBars } from "../../../server/src/stats/two-level/plot-data.js";
import { wordName, wordOf } from "../../../server/src/stats/two-level/words.js";
import { assertClose } from "../linear-model/helpers.js";

const fixture = (name: string) => JSON.parse(readFileSync(path.resolve("test/stats/fixtures/r/designs", `${name}.json`), "utf8"));

describe("two-level effects, Lenth and curvature vs R: twolevel-fraction", () => {
  const fx = fixture("twolevel-fraction") as {
    design: number[][];
    y: number[];
    centre: number[];
    mean: number;
    effects: Record<string, number>;
    lenth: { s0: number; pse: number; df: number; me: number; sme: number };
    curvature: { ss: number; pureErrorSs: number; pureErrorDf: number; f: number; p: number };
  };
  const names = ["A", "B", "C", "D", "E"];
  const words = Object.keys(fx.effects).map((label) => wordOf(label.split(" x ").map((n) => names.indexOf(n))));
  const result = twoLevelEffects({ coded: fx.design.map((c) => Int8Array.from(c)), y: Float64Array.from(fx.y) }, words);

  it("effects are 2 x the lm coefficients; coefficients are half the effects", () => {
    assert.ok(result.ok, result.ok ? "" : result.reason);
    assertClose(result.mean, fx.mean, "mean", 1e-12);
    result.effects.forEach((e) => {
      const label = wordName(e.word, names);
      assertClose(e.effect, fx.effects[label]!, `effect ${label}`, 1e-10, 1e-12);
      assertClose(e.coefficient, fx.effects[label]! / 2, `coefficient ${label}`, 1e-10, 1e-12);
    });
  });

  it("Lenth's s0, PSE, df, ME and SME", () => {
    assert.ok(result.ok);
    const l = lenth(result.effects.map((e) => e.effect));
    assert.ok(l.ok);
    assertClose(l.s0, fx.lenth.s0, "s0", 1e-12);
    assertClose(l.pse, fx.lenth.pse, "PSE", 1e-10);
    assert.equal(l.df, fx.lenth.df);
    assertClose(l.me, fx.lenth.me, "ME", 1e-10);
    assertClose(l.sme, fx.lenth.sme, "SME", 1e-10);
  });

  it("curvature from the centre points against pure error", () => {
    const pe = pureError(Float64Array.from(fx.centre), new Int32Array(fx.centre.length));
    assertClose(pe.ss, fx.curvature.pureErrorSs, "pure error SS", 1e-12);
    assert.equal(pe.df, fx.curvature.pureErrorDf);
    const c = curvatureTest(fx.y, fx.centre, pe);
    assert.ok(c.ok);
    assertClose(c.ss, fx.curvature.ss, "curvature SS", 1e-10);
    assertClose(c.f, fx.curvature.f, "curvature F", 1e-10);
    assertClose(c.p, fx.curvature.p, "curvature p", 1e-9);
  });

  it("refuses aliased (non-orthogonal) effects", () => {
    const r = twoLevelEffects({ coded: fx.design.map((c) => Int8Array.from(c)), y: Float64Array.from(fx.y) }, [wordOf([4]), wordOf([0, 1, 2, 3])]);
    assert.equal(r.ok, false);
  });

  it("plot data: normal scores increase with the effects, half-normal scores are positive, Pareto bars descend", () => {
    assert.ok(result.ok);
    const effects = result.effects.map((e) => e.effect);
    const normal = normalPlotPoints(effects);
    for (let i = 1; i < normal.length; i++) assert.ok(normal[i]!.value >= normal[i - 1]!.value && normal[i]!.score > normal[i - 1]!.score);
    // Φ⁻¹((1 - 0.5)/15) for the smallest of 15 (R: qnorm(0.5/15) = -1.833914635815914185).
    assertClose(normal[0]!.score, -1.8339146358159142, "first normal score", 1e-12);
    const half = halfNormalPlotPoints(effects);
    // Φ⁻¹(0.5 + 0.5·(0.5/15)) (R: qnorm(0.5 + 0.25/15) = 0.041789297816453949).
    assertClose(half[0]!.score, 0.041789297816453949, "first half-normal score", 1e-12);
    const bars = paretoBars(effects, 0.3375);
    assert.equal(bars[0]!.index, 0, "A is the largest effect");
    assertClose(bars[0]!.standardized, 7.7 / 0.3375, "A standardized", 1e-10);
    assert.deepEqual(paretoBars(effects, 0), []);
  });
});

describe("Lenth's t multipliers", () => {
  const fx = fixture("lenth-multipliers") as { multipliers: { m: number; tMe: number; tSme: number }[] };
  it("agree with R's qt(0.975, m/3) and qt((1 + 0.95^(1/m))/2, m/3)", () => {
    for (const ref of fx.multipliers) {
      const effects = Array.from({ length: ref.m }, (_, i) => (i % 2 === 0 ? 1 : -1) * (1 + i / ref.m));
      const l = lenth(effects);
      assert.ok(l.ok);
      assertClose(l.tMe, ref.tMe, `t ME m=${ref.m}`, 1e-10);
      assertClose(l.tSme, ref.tSme, `t SME m=${ref.m}`, 1e-9);
    }
  });
  it("agree with Lenth (1989) Table 1 to the printed two decimals (values recalled from the paper, not re-read: m = 7: 3.76, 9.01; m = 15: 2.57, 5.22; m = 31: 2.22, 4.22)", () => {
    const table = [
      { m: 7, me: 3.76, sme: 9.01 },
      { m: 15, me: 2.57, sme: 5.22 },
      { m: 31, me: 2.22, sme: 4.22 },
    ];
    for (const row of table) {
      const l = lenth(Array.from({ length: row.m }, (_, i) => i + 1));
      assert.ok(l.ok);
      assert.ok(Math.abs(l.tMe - row.me) <= 0.005, `m=${row.m} ME multiplier ${l.tMe}`);
      assert.ok(Math.abs(l.tSme - row.sme) <= 0.005, `m=${row.m} SME multiplier ${l.tSme}`);
    }
  });
  it("PSE by hand on a small set: |c| = 1..7 gives s0 = 6, all kept, PSE = 1.5 x 4 = 6", () => {
    const l = lenth([1, -2, 3, -4, 5, -6, 7]);
    assert.ok(l.ok);
    assert.equal(l.s0, 6);
    assert.equal(l.pse, 6);
  });
  it("fails (no NaN) when half the effects are zero", () => {
    assert.equal(lenth([0, 0, 0, 1]).ok, false);
  });
});

/** Montgomery (2017), Table 8.14: generators written as letters, and the resolution. */
const PUBLISHED: { k: number; generators: string[]; resolution: number }[] = [
  { k: 3, generators: ["C=AB"], resolution: 3 },
  { k: 4, generators: ["D=ABC"], resolution: 4 },
  { k: 5, generators: ["E=ABCD"], resolution: 5 },
  { k: 5, generators: ["D=AB", "E=AC"], resolution: 3 },
  { k: 6, generators: ["E=ABC", "F=BCD"], resolution: 4 },
  { k: 6, generators: ["F=ABCDE"], resolution: 6 },
  { k: 6, generators: ["D=AB", "E=AC", "F=BC"], resolution: 3 },
  { k: 7, generators: ["E=ABC", "F=BCD", "G=ACD"], resolution: 4 },
  { k: 7, generators: ["D=AB", "E=AC", "F=BC", "G=ABC"], resolution: 3 },
  { k: 8, generators: ["E=BCD", "F=ACD", "G=ABC", "H=ABD"], resolution: 4 },
];
const LETTERS = "ABCDEFGH";

function parseGenerators(gens: string[]): FractionGenerator[] {
  return gens.map((g) => {
    const [lhs, rhs] = g.split("=");
    return { generated: LETTERS.indexOf(lhs!), product: [...rhs!].map((ch) => LETTERS.indexOf(ch)) };
  });
}

/** Independent check: build the runs, then find every word whose ±1 column is +1 on every run. */
function bruteForceRelation(k: number, gens: FractionGenerator[]): number[] {
  const base = Array.from({ length: k }, (_, i) => i).filter((i) => !gens.some((g) => g.generated === i));
  const runs: number[][] = [];
  for (let r = 0; r < 1 << base.length; r++) {
    const x = new Array<number>(k).fill(0);
    base.forEach((f, j) => (x[f] = (r >> j) & 1 ? 1 : -1));
    for (const g of gens) x[g.generated] = g.product.reduce((a, f) => a * x[f]!, 1);
    runs.push(x);
  }
  const words: number[] = [];
  for (let w = 0; w < 1 << k; w++) {
    if (runs.every((x) => x.reduce((a, v, f) => ((w >> f) & 1 ? a * v : a), 1) === 1)) words.push(w);
  }
  return words.sort((a, b) => a - b);
}

describe("defining relation, resolution and aliases (Montgomery 2017, Table 8.14)", () => {
  for (const design of PUBLISHED) {
    it(`2^(${design.k}-${design.generators.length}) ${design.generators.join(", ")} is resolution ${design.resolution}`, () => {
      const gens = parseGenerators(design.generators);
      const rel = definingRelation(gens, design.k);
      assert.ok(rel.ok);
      assert.equal(rel.resolution, design.resolution);
      assert.deepEqual([...rel.words].sort((a, b) => a - b), bruteForceRelation(design.k, gens));
    });
  }
  it("2^(4-1) D = ABC: A aliased with BCD, AB with CD (Box, Hunter & Hunter 2005, §6.3)", () => {
    const rel = definingRelation(parseGenerators(["D=ABC"]), 4);
    assert.ok(rel.ok);
    assert.deepEqual(aliasesOf(wordOf([0]), rel).map((w) => wordName(w, [..."ABCD"])), ["B x C x D"]);
    assert.deepEqual(aliasesOf(wordOf([0, 1]), rel).map((w) => wordName(w, [..."ABCD"])), ["C x D"]);
    const sets = aliasSets([wordOf([0, 1]), wordOf([0, 2]), wordOf([2, 3]), wordOf([1, 3])], rel);
    assert.deepEqual(sets.map((s) => s.map((w) => wordName(w, [..."ABCD"]))), [["A x B", "C x D"], ["A x C", "B x D"]]);
  });
  it("rejects dependent generators and self-reference", () => {
    assert.equal(definingRelation(parseGenerators(["D=AB", "E=AB"]), 5).ok, true, "D=AB and E=AB are independent words (ABD, ABE)");
    assert.equal(definingRelation([{ generated: 3, product: [0, 1] }, { generated: 3, product: [0, 1] }], 4).ok, false);
    assert.equal(definingRelation([{ generated: 2, product: [2, 1] }], 3).ok, false);
  });
});
