/**
 * The fused passes of the fit (scanCells, cellLayoutWithStatistics, balancedLayoutFromCells) must give,
 * bit for bit, what the separate passes give: the two-pass cell statistics (cellStatistics), the
 * compensated mean (design-matrix `mean`) and the balanced layout counted over the observations
 * (balancedLayout). Those separate passes are the ones checked against R (r-fixtures.test.ts) and NIST StRD
 * (nist-strd-anova.test.ts); this file checks that fusing them changed no bit. Data are invented, drawn
 * from a fixed-seed generator.
 */

import assert from "node:assert/strict";
import { balancedLayout, balancedLayoutFromCells } from "../../../server/src/stats/linear-model/balanced-fast-path.js";
import { cellLayoutWithStatistics, cellStatistics, scanCells } from "../../../server/src/stats/linear-model/cell-path.js";
import { mean } from "../../../server/src/stats/linear-model/design-matrix.js";
import { fitLinearModel } from "../../../server/src/stats/linear-model/fit-linear-model.js";
import type { LinearModelInput, ModelTerm } from "../../../server/src/stats/linear-model/types.js";

/** Park & Miller (1988) minimal standard generator, so the data are reproducible. */
function generator(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 48271) % 2147483647;
    return s / 2147483647;
  };
}

const t = (...factors: number[]): ModelTerm => ({ factors, covariates: [] });

/** Runs drawn at random cells (or `perCell` runs of every cell, shuffled), around a large constant. */
function input(levels: number[], n: number, terms: ModelTerm[], seed: number, perCell?: number): LinearModelInput {
  const rnd = generator(seed);
  const cells = levels.reduce((a, b) => a * b, 1);
  const total = perCell !== undefined ? cells * perCell : n;
  const order = Array.from({ length: total }, (_, i) => (perCell !== undefined ? i % cells : Math.floor(rnd() * cells)));
  if (perCell !== undefined) {
    for (let i = total - 1; i > 0; i--) {
      const j = Math.floor(rnd() * (i + 1));
      [order[i], order[j]] = [order[j]!, order[i]!];
    }
  }
  const factors = levels.map((l, q) => ({ name: `f${q}`, levelCount: l, codes: new Int32Array(total) }));
  const y = new Float64Array(total);
  order.forEach((cell, i) => {
    let c = cell;
    let v = 0;
    levels.forEach((l, q) => {
      const code = c % l;
      c = Math.floor(c / l);
      factors[q]!.codes[i] = code;
      v += (q + 1) * Math.sin(code + q);
    });
    y[i] = 1e6 + v + (rnd() - 0.5) * 2;
  });
  return { y, factors, covariates: [], terms, ssType: "III" };
}

function sameBits(actual: ArrayLike<number>, expected: ArrayLike<number>, what: string): void {
  assert.equal(actual.length, expected.length, `${what} length`);
  for (let i = 0; i < expected.length; i++) assert.ok(Object.is(actual[i], expected[i]), `${what}[${i}]: ${actual[i]} vs ${expected[i]}`);
}

const cases: { name: string; input: LinearModelInput }[] = [
  { name: "one factor, 5 levels, 200 runs", input: input([5], 200, [t(0)], 41) },
  { name: "4 x 3 full, 1000 runs", input: input([4, 3], 1000, [t(0), t(1), t(0, 1)], 42) },
  { name: "3 x 4 additive, 97 runs", input: input([3, 4], 97, [t(0), t(1)], 43) },
  { name: "4 x 3 full, balanced, 5 per cell", input: input([4, 3], 0, [t(0), t(1), t(0, 1)], 44, 5) },
  { name: "2 x 2 full, balanced, 1 per cell", input: input([2, 2], 0, [t(0), t(1), t(0, 1)], 45, 1) },
];

describe("fused passes of the fit", () => {
  for (const { name, input: data } of cases) {
    it(`scanCells equals the separate passes bit for bit: ${name}`, () => {
      const separate = cellLayoutWithStatistics(data);
      const scanned = scanCells(data);
      if (separate === null) {
        assert.equal(scanned, null);
        return;
      }
      assert.ok(scanned);
      assert.equal(scanned.layout.cellCount, separate.layout.cellCount);
      sameBits(scanned.layout.cellOfRun, separate.layout.cellOfRun, "cellOfRun");
      scanned.layout.cellCodes.forEach((codes, k) => sameBits(codes, separate.layout.cellCodes[k]!, `cellCodes ${k}`));
      // The one-pass statistics against the two-pass function on the same layout.
      const twoPass = cellStatistics(data.y, separate.layout);
      for (const s of [scanned.statistics, separate.statistics]) {
        sameBits(s.counts, twoPass.counts, "counts");
        sameBits(s.means, twoPass.means, "means");
        assert.ok(Object.is(s.withinSs, twoPass.withinSs), "withinSs");
      }
      assert.ok(Object.is(scanned.mean, mean(data.y)), "mean");
      assert.equal(scanned.allEqual, false);
    });

    it(`balancedLayoutFromCells equals balancedLayout: ${name}`, () => {
      const expected = balancedLayout(data);
      const cells = cellLayoutWithStatistics(data);
      if (cells === null) return;
      const actual = balancedLayoutFromCells(data, { ...cells.layout, cellOfRun: cells.layout.cellOfRun.slice() }, cells.statistics.counts);
      if (expected === null) {
        assert.equal(actual, null);
        return;
      }
      assert.ok(actual);
      assert.deepEqual({ ...actual, cellOfRun: [...actual.cellOfRun] }, { ...expected, cellOfRun: [...expected.cellOfRun] });
    });
  }

  it("the balanced case is found (so the comparison above is not vacuous)", () => {
    assert.ok(balancedLayout(cases[3]!.input));
    assert.equal(balancedLayout(cases[1]!.input), null);
  });

  it("scanCells declines what it does not check or cover, and the fit then validates in full", () => {
    const base = input([4, 3], 100, [t(0), t(1), t(0, 1)], 46);
    const nan = { ...base, y: base.y.slice() };
    nan.y[17] = Number.NaN;
    assert.equal(scanCells(nan), null);
    assert.deepEqual(fitLinearModel(nan), { ok: false, code: "invalid-input", reason: "Response value 18 is not a finite number." });
    const codes = base.factors[1]!.codes.slice();
    codes[5] = 3;
    const outside = { ...base, factors: [base.factors[0]!, { ...base.factors[1]!, codes }] };
    assert.equal(scanCells(outside), null);
    assert.deepEqual(fitLinearModel(outside), { ok: false, code: "invalid-input", reason: 'Factor "f1" has level index 3 at observation 6, outside 0..2.' });
    assert.equal(scanCells(input([2, 2, 2], 50, [t(0), t(1), t(2)], 47)), null, "three factors");
    assert.equal(scanCells({ ...base, terms: [t(0)] }), null, "a factor no term uses");
    const equal = { ...base, y: new Float64Array(100).fill(3) };
    assert.equal(scanCells(equal)?.allEqual, true);
    assert.equal(fitLinearModel(equal).ok, false);
  });
});
