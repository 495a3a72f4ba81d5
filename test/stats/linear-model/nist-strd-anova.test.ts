/**
 * Accuracy on the eleven NIST StRD ANOVA datasets (test/stats/fixtures/nist-strd-anova/, certified
 * values from NIST/ITL Statistical Reference Datasets). Responses are centred exactly as decimals
 * (centerDecimals) before any floating-point step, then the one-way model is fitted. Every certified
 * value must reach a log relative error of at least 12; the table of LREs is printed.
 */

import assert from "node:assert/strict";
import fs from "node:fs";
import path from "node:path";
import { assembleResult, fitLinearModel } from "../../../server/src/stats/linear-model/fit-linear-model.js";
import { qrModelCore } from "../../../server/src/stats/linear-model/qr-path.js";
import type { LinearModelResult } from "../../../server/src/stats/linear-model/types.js";
import { centerDecimals } from "../../../server/src/stats/decimal/center-decimals.js";

const dir = path.resolve("test/stats/fixtures/nist-strd-anova");
const names = ["SiRstv", "SmLs01", "SmLs02", "SmLs03", "AtmWtAg", "SmLs04", "SmLs05", "SmLs06", "SmLs07", "SmLs08", "SmLs09"];

interface Certified {
  betweenDf: number;
  betweenSs: number;
  betweenMs: number;
  f: number;
  withinDf: number;
  withinSs: number;
  withinMs: number;
  rSquared: number;
  residualSd: number;
}

/** Reads the certified block (the "Between"/"Within" lines and the two labelled values) and the data lines. */
function readDataset(name: string): { certified: Certified; groups: number[]; responses: string[] } {
  const lines = fs.readFileSync(path.join(dir, `${name}.dat`), "utf8").split(/\r?\n/);
  const numbers = (line: string) => line.trim().split(/\s+/).slice(2).map(Number);
  const between = numbers(lines.find((l) => /^\s*Between /.test(l))!);
  const within = numbers(lines.find((l) => /^\s*Within /.test(l))!);
  const r2 = Number(lines.find((l) => /Certified R-Squared/.test(l))!.trim().split(/\s+/).pop());
  const sd = Number(lines.find((l) => /Standard Deviation/.test(l))!.trim().split(/\s+/).pop());
  // The data header is the last line starting "Data:" (an earlier one describes the design).
  let start = 0;
  lines.forEach((l, i) => {
    if (/^Data:/.test(l)) start = i + 1;
  });
  const groups: number[] = [];
  const responses: string[] = [];
  for (const line of lines.slice(start)) {
    const cells = line.trim().split(/\s+/);
    if (cells.length !== 2) continue;
    groups.push(Number(cells[0]));
    responses.push(cells[1]!);
  }
  return {
    certified: {
      betweenDf: between[0]!, betweenSs: between[1]!, betweenMs: between[2]!, f: between[3]!,
      withinDf: within[0]!, withinSs: within[1]!, withinMs: within[2]!, rSquared: r2, residualSd: sd,
    },
    groups,
    responses,
  };
}

/** Log relative error capped at 15; the absolute error is used when the certified value is 0. */
function lre(computed: number | null, certified: number): number {
  if (computed === null) return 0;
  const err = certified === 0 ? Math.abs(computed) : Math.abs(computed - certified) / Math.abs(certified);
  return err === 0 ? 15 : Math.min(15, -Math.log10(err));
}

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
