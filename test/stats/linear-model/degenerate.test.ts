/**
 * Degenerate inputs: each returns a clear failure or a result with notes, never NaN or Infinity
 * (checked by walking every number of the result, typed arrays included). Expected sums of squares
 * are hand computations from the textbook formulas named beside each check (invented data).
 */

import assert from "node:assert/strict";
import fc from "fast-check";
import { fitLinearModel } from "../../../server/src/stats/linear-model/fit-linear-model.js";
import type { LinearModelInput, LinearModelResult, ModelFailure } from "../../../server/src/stats/linear-model/types.js";
import { assertClose, nonFiniteNumbers } from "./helpers.js";

const factor = (name: string, levelCount: number, codes: number[]) => ({ name, levelCount, codes: Int32Array.from(codes) });
const ok = (r: LinearModelResult | ModelFailure): LinearModelResult => {
  assert.ok(r.ok, JSON.stringify(r));
  assert.deepEqual(nonFiniteNumbers(r), []);
  return r;
};
const failure = (r: LinearModelResult | ModelFailure, code: string): void => {
  assert.equal(r.ok, false);
  assert.equal((r as ModelFailure).code, code);
  assert.ok((r as ModelFailure).reason.length > 10);
};

describe("linear model: degenerate cases", () => {
  it("no residual df (one run per cell, full model): table with SS and df, F and p null, note no-error-df", () => {
    // Invented 2 x 2 curing trial, one run per cell: y = 1, 2, 4, 7 for (a1b1, a2b1, a1b2, a2b2).
    const input: LinearModelInput = {
      y: Float64Array.from([1, 2, 4, 7]),
      factors: [factor("oven", 2, [0, 1, 0, 1]), factor("primer", 2, [0, 0, 1, 1])],
      covariates: [],
      terms: [{ factors: [0], covariates: [] }, { factors: [1], covariates: [] }, { factors: [0, 1], covariates: [] }],
      ssType: "III",
    };
    const r = ok(fitLinearModel(input));
    // 2 x 2 contrasts (Box, Hunter & Hunter 2005, ch. 5): SS = (contrast)^2 / 4.
    // A: (2 + 7 - 1 - 4)^2 / 4 = 4; B: (4 + 7 - 1 - 2)^2 / 4 = 16; AB: (1 + 7 - 2 - 4)^2 / 4 = 1.
    [4, 16, 1].forEach((ss, i) => {
      assertClose(r.anova[i]!.ss, ss, `SS ${i}`);
      assert.equal(r.anova[i]!.df, 1);
      assert.equal(r.anova[i]!.f, null);
      assert.equal(r.anova[i]!.p, null);
    });
    assert.equal(r.residual.df, 0);
    assert.equal(r.residual.ms, null);
    assert.equal(r.residualSd, null);
    assert.ok(r.notes.some((n) => n.code === "no-error-df"));
    assert.ok(r.standardized.every((v) => v === null) && r.studentized.every((v) => v === null));
    assert.ok(r.effectSizes.every((e) => e.omegaSquared === null));
    // The same through the general path (an unbalanced pattern with one empty level forces QR).
    const unbalanced = ok(fitLinearModel({ ...input, y: Float64Array.from([1, 2, 4]), factors: input.factors.map((f) => ({ ...f, codes: f.codes.subarray(0, 3) })), terms: input.terms.slice(0, 2) }));
    assert.equal(unbalanced.method, "qr");
    assert.equal(unbalanced.residual.df, 0);
    assert.ok(unbalanced.notes.some((n) => n.code === "no-error-df"));
  });

  it("zero residual variance: F and p null, note zero-residual-variance", () => {
    const input: LinearModelInput = {
      y: Float64Array.from([1, 1, 2, 2, 1, 2]),
      factors: [factor("bath", 2, [0, 0, 1, 1, 0, 1])],
      covariates: [],
      terms: [{ factors: [0], covariates: [] }],
      ssType: "I",
    };
    const r = ok(fitLinearModel(input));
    // One-way SS between = sum n_i (mean_i - mean)^2 = 6 * 0.25 = 1.5 (Montgomery 2017, eq. 3.6).
    assertClose(r.anova[0]!.ss, 1.5, "SS between");
    assert.equal(r.anova[0]!.f, null);
    assert.equal(r.anova[0]!.p, null);
    assertClose(r.rSquared, 1, "R2");
    assert.ok(r.notes.some((n) => n.code === "zero-residual-variance"));
    // Same with unequal groups (QR on the weighted cell-level design, residuals of order 1e-16 rather than exactly 0).
    const qr = ok(fitLinearModel({ ...input, y: Float64Array.from([0.1, 0.1, 0.3, 0.3, 0.1, 0.3, 0.3]), factors: [factor("bath", 2, [0, 0, 1, 1, 0, 1, 1])] }));
    assert.equal(qr.method, "cells");
    assert.equal(qr.anova[0]!.f, null);
    assert.ok(qr.notes.some((n) => n.code === "zero-residual-variance"));
  });

  it("an empty cell makes the interaction partly inestimable: reported aliased, main effects still tested", () => {
    // Invented 2 x 3 trial, cell (a2, b3) empty, two runs in every other cell.
    const a = [0, 0, 0, 0, 0, 0, 1, 1, 1, 1];
    const b = [0, 0, 1, 1, 2, 2, 0, 0, 1, 1];
    const y = [5.1, 4.9, 6.2, 6.0, 7.1, 6.7, 5.8, 5.4, 7.9, 8.3];
    const input: LinearModelInput = {
      y: Float64Array.from(y),
      factors: [factor("A", 2, a), factor("B", 3, b)],
      covariates: [],
      terms: [{ factors: [0], covariates: [] }, { factors: [1], covariates: [] }, { factors: [0, 1], covariates: [] }],
      ssType: "I",
    };
    const r = ok(fitLinearModel(input));
    assert.deepEqual(r.aliased, [{ source: "A x B", nominalDf: 2, estimableDf: 1 }]);
    assert.ok(r.notes.some((n) => n.code === "aliased-term"));
    assert.equal(r.anova[2]!.df, 1);
    // Five non-empty cells: residual = within-cell SS = 5 cells x (d^2 / 2) with d the pair difference
    // (0.2, 0.2, 0.4, 0.4, 0.4): 0.02 + 0.02 + 0.08 + 0.08 + 0.08 = 0.28 on 10 - 5 = 5 df.
    assertClose(r.residual.ss, 0.28, "residual SS");
    assert.equal(r.residual.df, 5);
    // Type I SS of A first is the one-way SS: means 6.0 (n 6) and 6.85 (n 4), grand 6.34:
    // 6 (0.34)^2 + 4 (0.51)^2 = 1.734.
    assertClose(r.anova[0]!.ss, 1.734, "SS A");
    for (const row of r.anova) assert.ok(row.f !== null && row.p !== null, `${row.source} tested`);
    // Adjusted means are equal-weight averages of cell means (Searle, Speed & Milliken 1980); a level
    // whose average needs the empty cell (a2, b3) is not estimable. a1: (5.0 + 6.1 + 6.9) / 3 = 6.0 with
    // SE sqrt(MSE (1/9)(1/2 + 1/2 + 1/2)) = sqrt(0.056 / 6); b1: (5.0 + 5.6) / 2 = 5.3, b2: (6.1 + 8.1) / 2.
    const [am, bm] = r.adjustedMeans;
    assertClose(am!.means[0]!.mean, 6.0, "a1 adjusted mean", 1e-12);
    assertClose(am!.means[0]!.standardError, Math.sqrt(0.056 / 6), "a1 SE", 1e-12);
    assert.deepEqual([am!.means[1]!.mean, am!.means[1]!.standardError], [null, null]);
    assertClose(bm!.means[0]!.mean, 5.3, "b1 adjusted mean", 1e-12);
    assertClose(bm!.means[1]!.mean, 7.1, "b2 adjusted mean", 1e-12);
    assert.equal(bm!.means[2]!.mean, null);
    for (const ssType of ["II", "III"] as const) {
      const t = ok(fitLinearModel({ ...input, ssType }));
      assert.deepEqual(t.aliased, r.aliased);
      assert.ok(t.anova.every((row) => row.f !== null), `Type ${ssType} tests every term`);
      assert.deepEqual(t.anova.map((row) => row.df), [1, 2, 1]);
    }
  });

  it("a single observation, no observations, constant response, malformed input: failures", () => {
    const one = { y: Float64Array.from([3]), factors: [factor("A", 2, [0])], covariates: [], terms: [{ factors: [0], covariates: [] }], ssType: "I" as const };
    failure(fitLinearModel(one), "single-observation");
    failure(fitLinearModel({ ...one, y: new Float64Array(0), factors: [factor("A", 2, [])] }), "no-data");
    failure(fitLinearModel({ ...one, y: Float64Array.from([2, 2, 2]), factors: [factor("A", 2, [0, 1, 1])] }), "zero-variance");
    failure(fitLinearModel({ ...one, y: Float64Array.from([1, Number.NaN]), factors: [factor("A", 2, [0, 1])] }), "invalid-input");
    failure(fitLinearModel({ ...one, y: Float64Array.from([1, 2]), factors: [factor("A", 2, [0, 2])] }), "invalid-input");
    failure(fitLinearModel({ ...one, y: Float64Array.from([1, 2]), factors: [factor("A", 2, [0, 1])], terms: [{ factors: [3], covariates: [] }] }), "invalid-input");
  });

  it("a collinear covariate is reported aliased and gets no slope; the other covariate keeps its slope", () => {
    const x1 = [1, 2, 3, 4, 5, 6, 7, 8];
    const x2 = x1.map((v) => 2 * v + 3);
    // y = 1 + 0.5 x1 + small invented deviations; least-squares slope by the textbook formula
    // Sxy / Sxx (Draper & Smith 1998, eq. 1.2.9): Sxx = 42, Sxy = 21.4 -> 0.50952380952...
    const dev = [0.1, -0.1, 0.2, 0, -0.2, 0.1, 0, 0.3];
    const y = x1.map((v, i) => 1 + 0.5 * v + dev[i]!);
    const input: LinearModelInput = {
      y: Float64Array.from(y),
      factors: [],
      covariates: [{ name: "x1", values: Float64Array.from(x1) }, { name: "x2", values: Float64Array.from(x2) }],
      terms: [{ factors: [], covariates: [0] }, { factors: [], covariates: [1] }],
      ssType: "II",
    };
    const r = ok(fitLinearModel(input));
    assert.deepEqual(r.aliased, [{ source: "x2", nominalDf: 1, estimableDf: 0 }]);
    assert.equal(r.anova[1]!.df, 0);
    assert.equal(r.anova[1]!.f, null);
    assert.deepEqual(r.slopes.map((s) => s.covariate), ["x1"]);
    let sxy = 0;
    for (let i = 0; i < 8; i++) sxy += (x1[i]! - 4.5) * (y[i]! - y.reduce((s, v) => s + v, 0) / 8);
    assertClose(r.slopes[0]!.estimate, sxy / 42, "slope", 1e-12);
    const constant = ok(fitLinearModel({ ...input, covariates: [input.covariates[0]!, { name: "x2", values: new Float64Array(8).fill(5) }] }));
    assert.deepEqual(constant.aliased, [{ source: "x2", nominalDf: 1, estimableDf: 0 }]);
  });

  it("never throws and never returns NaN or Infinity on random small designs (property test)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 12 }),
        fc.integer({ min: 1, max: 4 }),
        fc.integer({ min: 1, max: 3 }),
        fc.array(fc.integer({ min: -3, max: 3 }), { minLength: 36, maxLength: 36 }),
        fc.array(fc.nat(11), { minLength: 24, maxLength: 24 }),
        fc.constantFrom("I" as const, "II" as const, "III" as const),
        fc.boolean(),
        (n, la, lb, values, codeSeeds, ssType, withCovariate) => {
          const y = Float64Array.from(values.slice(0, n));
          const factors = [
            factor("A", la, codeSeeds.slice(0, n).map((c) => c % la)),
            factor("B", lb, codeSeeds.slice(12, 12 + n).map((c) => c % lb)),
          ];
          const covariates = withCovariate ? [{ name: "x", values: Float64Array.from(values.slice(12, 12 + n)) }] : [];
          const terms: { factors: number[]; covariates: number[] }[] = [{ factors: [0], covariates: [] }, { factors: [1], covariates: [] }, { factors: [0, 1], covariates: [] }];
          if (withCovariate) terms.push({ factors: [], covariates: [0] });
          const r = fitLinearModel({ y, factors, covariates, terms, ssType });
          assert.deepEqual(nonFiniteNumbers(r), []);
        },
      ),
      { seed: 20261201, numRuns: 400 },
    );
  });
});
