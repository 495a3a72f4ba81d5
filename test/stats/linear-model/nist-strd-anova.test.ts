/**
 * Accuracy on the eleven NIST StRD ANOVA datasets (test/stats/fixtures/nist-strd-anova/, certified
 * values from NIST/ITL Statistical Reference Datasets). Responses are centred exactly as decimals
 * (centerDecimals) before any floating-point step, then the one-way model is fitted. Every certified
 * value must reach a log relative error of at least 12; the table of LREs is printed.
 */

import assert from "node:assert/strict";
import { NIST_DATASETS as names, lre, readDataset } from "../../support/nist-strd.js";
import { assembleResult, fitLinearModel } from "../../../server/src/stats/linear-model/fit-linear-model.js";
import { qrModelCore } from "../../../server/src/stats/linear-model/qr-path.js";
import type { LinearModelResult } from "../../../server/src/stats/linear-model/types.js";
import { centerDecimals } from "../../../server/src/stats/decimal/center-decimals.js";

describe("linear model vs NIST StRD ANOVA certified values (LRE >= 12)", () => {
  const table: string[] = [];
  after(() => {
    console.log(["dataset path     SS-b  SS-w  MS-b  MS-w  F     R2    sd", ...table].join("\n"));
  });
  for (const name of names) for (const path of ["auto", "qr"] as const) {
    it(`${name} (${path === "auto" ? "automatic path" : "general QR path forced"})`, () => {
      const { certified, groups, responses } = readDataset(name);
      const centred = centerDecimals(responses);
      assert.ok(centred.ok);
      const levelCount = Math.max(...groups);
      const input = {
        y: centred.values,
        factors: [{ name: "treatment", levelCount, codes: Int32Array.from(groups, (g) => g - 1) }],
        covariates: [],
        terms: [{ factors: [0], covariates: [] }],
        ssType: "I" as const,
      };
      // The SmLs sets are balanced, so the automatic path is the cell-sum one; forcing QR covers both.
      const result: LinearModelResult | { ok: false } = path === "auto" ? fitLinearModel(input) : assembleResult(input, qrModelCore(input));
      assert.ok(result.ok);
      const row = result.anova[0]!;
      assert.equal(row.df, certified.betweenDf);
      assert.equal(result.residual.df, certified.withinDf);
      const lres = [
        lre(row.ss, certified.betweenSs),
        lre(result.residual.ss, certified.withinSs),
        lre(row.ms, certified.betweenMs),
        lre(result.residual.ms, certified.withinMs),
        lre(row.f, certified.f),
        lre(result.rSquared, certified.rSquared),
        lre(result.residualSd, certified.residualSd),
      ];
      table.push(`${name.padEnd(7)} ${result.method.padEnd(8)} ${lres.map((v) => v.toFixed(1).padStart(5)).join(" ")}`);
      const labels = ["between SS", "within SS", "between MS", "within MS", "F", "R2", "residual SD"];
      lres.forEach((v, i) => assert.ok(v >= 12, `${name} ${labels[i]}: LRE ${v.toFixed(2)} < 12`));
    });
  }
});
