/**
 * The balanced cell-sum path agrees with the general QR path to 1e-12 relative on several balanced
 * designs (the QR path is itself checked against R in r-fixtures.test.ts). Data are invented,
 * drawn from a fixed-seed generator.
 */

import assert from "node:assert/strict";
import { balancedLayout } from "../../../server/src/stats/linear-model/balanced-fast-path.js";
import { assembleResult, fitLinearModel } from "../../../server/src/stats/linear-model/fit-linear-model.js";
import { qrModelCore } from "../../../server/src/stats/linear-model/qr-path.js";
import type { LinearModelInput, ModelTerm, SsType } from "../../../server/src/stats/linear-model/types.js";
import { assertClose } from "./helpers.js";

/** Park & Miller (1988) minimal standard generator, so the data are reproducible. */
function generator(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 48271) % 2147483647;
    return s / 2147483647;
  };
}

/** A balanced crossed design with `reps` runs per cell in a shuffled order and effects on every factor. */
function design(levels: number[], reps: number, terms: ModelTerm[], ssType: SsType, seed: number): LinearModelInput {
  const rnd = generator(seed);
  const cells = levels.reduce((a, b) => a * b, 1);
  const n = cells * reps;
  const order = Array.from({ length: n }, (_, i) => i).sort(() => rnd() - 0.5);
  const factors = levels.map((l, q) => ({ name: `f${q}`, levelCount: l, codes: new Int32Array(n) }));
  const y = new Float64Array(n);
  order.forEach((run, i) => {
    let cell = Math.floor(run / reps);
    let v = 0;
    levels.forEach((l, q) => {
      const code = cell % l;
      cell = Math.floor(cell / l);
      factors[q]!.codes[i] = code;
      v += (q + 1) * Math.sin(code + q);
    });
    y[i] = 10 + v + (rnd() - 0.5) * 2;
  });
  return { y, factors, covariates: [], terms, ssType };
}

const t = (...factors: number[]): ModelTerm => ({ factors, covariates: [] });

const cases: { name: string; input: LinearModelInput }[] = [
  { name: "one factor, 5 levels x 4", input: design([5], 4, [t(0)], "I", 11) },
  { name: "3 x 4 full, 2 reps", input: design([3, 4], 2, [t(0), t(1), t(0, 1)], "III", 12) },
  { name: "3 x 4 additive, 1 run per cell", input: design([3, 4], 1, [t(0), t(1)], "II", 13) },
  { name: "2 x 3 x 2 full, 3 reps", input: design([2, 3, 2], 3, [t(0), t(1), t(2), t(0, 1), t(0, 2), t(1, 2), t(0, 1, 2)], "I", 14) },
  { name: "2 x 3 x 4 hierarchical subset A, B, C, A x B", input: design([2, 3, 4], 2, [t(0), t(1), t(2), t(0, 1)], "III", 15) },
  { name: "2 x 2 full, 1 run per cell (no residual df)", input: design([2, 2], 1, [t(0), t(1), t(0, 1)], "I", 16) },
];

describe("balanced fast path vs general QR path (agreement 1e-12 relative)", () => {
  for (const { name, input } of cases) {
    it(name, () => {
      const fast = fitLinearModel(input);
      assert.ok(fast.ok);
      assert.equal(fast.method, "balanced");
      const general = assembleResult(input, qrModelCore(input));
      assert.equal(general.method, "qr");
      // Same shape: identical keys and array lengths.
      assert.deepEqual(Object.keys(fast).sort(), Object.keys(general).sort());
      const scale = Math.sqrt(general.total.ss / input.y.length);
      const close = (a: number | null | undefined, b: number | null, what: string, abs = 1e-12 * scale * scale) => {
        if (b === null) assert.equal(a, null, what);
        else assertClose(a, b, what, 1e-12, abs);
      };
      assert.equal(fast.rank, general.rank);
      general.anova.forEach((g, i) => {
        const f = fast.anova[i]!;
        assert.equal(f.source, g.source);
        assert.equal(f.df, g.df);
        close(f.ss, g.ss, `${g.source} ss`);
        close(f.f, g.f, `${g.source} F`, 1e-12);
        close(f.p, g.p, `${g.source} p`, 1e-15);
      });
      close(fast.residual.ss, general.residual.ss, "residual ss");
      assert.equal(fast.residual.df, general.residual.df);
      close(fast.rSquared, general.rSquared, "R2", 1e-15);
      close(fast.residualSd, general.residualSd, "residual SD", 1e-15);
      for (let i = 0; i < input.y.length; i++) {
        close(fast.fitted[i]!, general.fitted[i]!, `fitted[${i}]`, 1e-12 * scale);
        close(fast.residuals[i]!, general.residuals[i]!, `residual[${i}]`, 1e-12 * scale);
        close(fast.leverage[i]!, general.leverage[i]!, `leverage[${i}]`, 1e-14);
        close(fast.standardized[i]!, general.standardized[i]!, `standardized[${i}]`, 1e-11);
        close(fast.studentized[i]!, general.studentized[i]!, `studentized[${i}]`, 1e-11);
      }
      assert.equal(fast.adjustedMeans.length, general.adjustedMeans.length);
      general.adjustedMeans.forEach((g, k) =>
        g.means.forEach((m, level) => {
          close(fast.adjustedMeans[k]!.means[level]!.mean, m.mean, `${g.factor} adjusted mean ${level}`, 1e-12 * scale);
          close(fast.adjustedMeans[k]!.means[level]!.standardError, m.standardError, `${g.factor} SE ${level}`, 1e-15);
        }),
      );
      assert.deepEqual(fast.notes, general.notes);
    });
  }

  it("is not used for unbalanced, incomplete, non-hierarchical or covariate models", () => {
    const base = design([3, 2], 2, [t(0), t(1), t(0, 1)], "I", 17);
    assert.ok(balancedLayout(base));
    assert.equal(balancedLayout({ ...base, terms: [t(0), t(0, 1)] }), null, "A x B without B");
    const dropped = { ...base, y: base.y.subarray(1), factors: base.factors.map((f) => ({ ...f, codes: f.codes.subarray(1) })) };
    assert.equal(balancedLayout(dropped), null, "one run removed");
    const withCovariate = { ...base, covariates: [{ name: "x", values: Float64Array.from(base.y, (_, i) => i) }], terms: [t(0), { factors: [], covariates: [0] }] };
    assert.equal(balancedLayout(withCovariate), null, "covariate");
  });
});
