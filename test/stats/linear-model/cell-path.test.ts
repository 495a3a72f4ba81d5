/**
 * The cell path (QR on the weighted cell-level design) agrees with the general QR path on the full
 * design to 1e-12 relative: unbalanced designs, empty cells (aliased interaction columns), Type I, II and
 * III sums of squares, non-hierarchical models and one-run cells. The general path is itself checked
 * against R in r-fixtures.test.ts and against NIST StRD in nist-strd-anova.test.ts. Data are invented,
 * drawn from a fixed-seed generator.
 */

import assert from "node:assert/strict";
import { cellLayout, cellModelCore } from "../../../server/src/stats/linear-model/cell-path.js";
import { assembleResult, fitLinearModel } from "../../../server/src/stats/linear-model/fit-linear-model.js";
import { qrModelCore } from "../../../server/src/stats/linear-model/qr-path.js";
import type { LinearModelInput, LinearModelResult, ModelTerm, SsType } from "../../../server/src/stats/linear-model/types.js";
import { assertClose } from "./helpers.js";

/** Park & Miller (1988) minimal standard generator, so the data are reproducible. */
function generator(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 48271) % 2147483647;
    return s / 2147483647;
  };
}

/**
 * An unbalanced crossed design: each run's cell is drawn at random, cells listed in `empty` (mixed radix,
 * first factor fastest) never occur. Values have an effect on every factor, an interaction and noise,
 * around a large constant so that the within-cell sums of squares must be computed with care.
 */
function design(levels: number[], n: number, terms: ModelTerm[], ssType: SsType, seed: number, empty: number[] = [], centre = 10): LinearModelInput {
  const rnd = generator(seed);
  const cells = levels.reduce((a, b) => a * b, 1);
  const allowed = Array.from({ length: cells }, (_, c) => c).filter((c) => !empty.includes(c));
  const factors = levels.map((l, q) => ({ name: `f${q}`, levelCount: l, codes: new Int32Array(n) }));
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    // Every allowed cell once first (so each holds a run), then at random.
    let cell = i < allowed.length ? allowed[i]! : allowed[Math.floor(rnd() * allowed.length)]!;
    let v = 0;
    const codes: number[] = [];
    levels.forEach((l, q) => {
      const code = cell % l;
      cell = Math.floor(cell / l);
      factors[q]!.codes[i] = code;
      codes.push(code);
      v += (q + 1) * Math.sin(code + q);
    });
    v += 0.7 * Math.cos(codes.reduce((a, b) => a + b, 0));
    y[i] = centre + v + (rnd() - 0.5) * 2;
  }
  return { y, factors, covariates: [], terms, ssType };
}

const t = (...factors: number[]): ModelTerm => ({ factors, covariates: [] });

const full2 = [t(0), t(1), t(0, 1)];
const full3 = [t(0), t(1), t(2), t(0, 1), t(0, 2), t(1, 2), t(0, 1, 2)];
const cases: { name: string; input: LinearModelInput }[] = [];
for (const ss of ["I", "II", "III"] as const) {
  cases.push({ name: `one factor, 4 levels, unbalanced, Type ${ss}`, input: design([4], 37, [t(0)], ss, 21) });
  cases.push({ name: `4 x 3 full, unbalanced, Type ${ss}`, input: design([4, 3], 150, full2, ss, 22) });
  cases.push({ name: `3 x 4 full, two empty cells, Type ${ss}`, input: design([3, 4], 80, full2, ss, 23, [4, 9]) });
  cases.push({ name: `2 x 3 x 2 full, one empty cell, Type ${ss}`, input: design([2, 3, 2], 90, full3, ss, 24, [7]) });
  cases.push({ name: `3 x 3 additive, unbalanced, Type ${ss}`, input: design([3, 3], 40, [t(0), t(1)], ss, 25) });
  cases.push({ name: `2 x 2 x 3, non-hierarchical A, A x B, C, Type ${ss}`, input: design([2, 2, 3], 60, [t(0), t(0, 1), t(2)], ss, 26) });
}
// A cell with a single run (leverage 1 in a saturated cell), and a model that uses only some factors.
cases.push({ name: "3 x 2 full with a one-run cell", input: design([3, 2], 7, full2, "III", 28) });
cases.push({ name: "3 x 2 x 2, model on f0 and f2 only", input: design([3, 2, 2], 50, [t(0), t(2), t(0, 2)], "II", 29) });

/** Compares two results field by field: `rel` relative, with an absolute floor scaled to the data. */
function assertAgree(cells: LinearModelResult, general: LinearModelResult, input: LinearModelInput): void {
  const scale = Math.sqrt(general.total.ss / input.y.length);
  const close = (a: number | null | undefined, b: number | null, what: string, abs = 1e-12 * scale * scale) => {
    if (b === null) assert.equal(a, null, what);
    else assertClose(a, b, what, 1e-12, abs);
  };
  // The cell path adds its per-cell view (`runCells`), checked below to spread back to the per-run arrays.
  assert.deepEqual(Object.keys(cells).filter((k) => k !== "runCells").sort(), Object.keys(general).sort());
  assert.ok(cells.runCells && general.runCells === undefined);
  const view = cells.runCells;
  for (let i = 0; i < input.y.length; i++) {
    const c = view.cellOfRun[i]!;
    assert.ok(Object.is(cells.fitted[i], view.fitted[c]) && Object.is(cells.leverage[i], view.leverage[c]), `cell view of run ${i}`);
    assert.ok(Object.is(cells.residuals[i], view.y[i]! - view.fitted[c]!), `cell view residual of run ${i}`);
  }
  assert.equal(cells.rank, general.rank);
  assert.deepEqual(cells.aliased, general.aliased);
  assert.deepEqual(cells.notes, general.notes);
  general.anova.forEach((g, i) => {
    const f = cells.anova[i]!;
    assert.equal(f.source, g.source);
    assert.equal(f.df, g.df, `${g.source} df`);
    close(f.ss, g.ss, `${g.source} ss`);
    close(f.ms, g.ms, `${g.source} ms`);
    close(f.f, g.f, `${g.source} F`, 1e-11);
    close(f.p, g.p, `${g.source} p`, 1e-15);
  });
  close(cells.residual.ss, general.residual.ss, "residual ss");
  assert.equal(cells.residual.df, general.residual.df);
  close(cells.total.ss, general.total.ss, "total ss");
  close(cells.rSquared, general.rSquared, "R2", 1e-15);
  close(cells.residualSd, general.residualSd, "residual SD", 1e-15);
  for (let i = 0; i < input.y.length; i++) {
    close(cells.fitted[i]!, general.fitted[i]!, `fitted[${i}]`, 1e-12 * scale);
    close(cells.residuals[i]!, general.residuals[i]!, `residual[${i}]`, 1e-12 * scale);
    close(cells.leverage[i]!, general.leverage[i]!, `leverage[${i}]`, 1e-14);
    close(cells.standardized[i] ?? null, general.standardized[i] ?? null, `standardized[${i}]`, 1e-11);
    close(cells.studentized[i] ?? null, general.studentized[i] ?? null, `studentized[${i}]`, 1e-11);
  }
  assert.equal(cells.adjustedMeans.length, general.adjustedMeans.length);
  general.adjustedMeans.forEach((g, k) =>
    g.means.forEach((m, level) => {
      close(cells.adjustedMeans[k]!.means[level]!.mean, m.mean, `${g.factor} adjusted mean ${level}`, 1e-12 * scale);
      close(cells.adjustedMeans[k]!.means[level]!.standardError, m.standardError, `${g.factor} SE ${level}`, 1e-15);
    }),
  );
  general.effectSizes.forEach((g, i) => {
    close(cells.effectSizes[i]!.etaSquared, g.etaSquared, `${g.source} eta2`, 1e-15);
    close(cells.effectSizes[i]!.partialEtaSquared, g.partialEtaSquared, `${g.source} partial eta2`, 1e-15);
    close(cells.effectSizes[i]!.omegaSquared, g.omegaSquared, `${g.source} omega2`, 1e-15);
  });
}

describe("cell path vs general QR path (agreement 1e-12 relative)", () => {
  for (const { name, input } of cases) {
    it(name, () => {
      const cells = fitLinearModel(input);
      assert.ok(cells.ok);
      assert.equal(cells.method, "cells");
      const general = assembleResult(input, qrModelCore(input));
      assert.equal(general.method, "qr");
      assertAgree(cells, general, input);
    });
  }

  it("uncentred values near 1e6: agrees with the general path on the exactly centred values to 1e-9", () => {
    // Values in [1e6 - 4, 1e6 + 4] minus 1e6 are exact in doubles (Sterbenz 1974), so the general path on
    // the centred values is a reference for the raw ones; the raw doubles carry ~1e-10 rounding themselves.
    for (const ss of ["I", "II", "III"] as const) {
      const raw = design([4, 3], 200, full2, ss, 27, [], 1e6);
      const centred = { ...raw, y: Float64Array.from(raw.y, (v) => v - 1e6) };
      const cells = fitLinearModel(raw);
      assert.ok(cells.ok && cells.method === "cells");
      const reference = assembleResult(centred, qrModelCore(centred));
      reference.anova.forEach((g, i) => assertClose(cells.anova[i]!.ss, g.ss, `Type ${ss} ${g.source} ss`, 1e-9));
      assertClose(cells.residual.ss, reference.residual.ss, `Type ${ss} residual ss`, 1e-12);
    }
  });

  it("an empty cell is reported aliased exactly as the general path reports it", () => {
    const input = design([3, 4], 80, full2, "III", 23, [4, 9]);
    const r = fitLinearModel(input);
    assert.ok(r.ok && r.method === "cells");
    // 12 cells, 2 empty: the interaction keeps 6 - 2 = 4 of its 6 df (rank = 10 non-empty cells).
    assert.equal(r.rank, 10);
    assert.deepEqual(r.aliased, [{ source: "f0 x f1", nominalDf: 6, estimableDf: 4 }]);
  });

  it("is not used with a covariate term or when every run is its own cell", () => {
    const base = design([3, 2], 30, full2, "I", 30);
    assert.ok(cellLayout(base));
    const withCovariate = { ...base, covariates: [{ name: "x", values: Float64Array.from(base.y, (_, i) => i) }], terms: [t(0), { factors: [], covariates: [0] }] };
    assert.equal(cellLayout(withCovariate), null, "covariate");
    assert.equal(cellModelCore(withCovariate), null, "covariate core");
    // A x B without B: not hierarchical, so the balanced path does not take it either.
    const distinct = design([3, 2], 6, [t(0), t(0, 1)], "I", 31);
    assert.equal(cellLayout(distinct), null, "six runs in six cells");
    assert.equal(fitLinearModel(distinct).ok && (fitLinearModel(distinct) as LinearModelResult).method, "qr");
  });
});
