/**
 * The whole pipeline (text → parseTrial → buildDesign → analyzeResponse → results) against outside
 * references: the NIST StRD ANOVA certified values and the R fixtures of test/stats/fixtures/r/anova/
 * (R 4.2.2 with car 3.1.1; generator and versions recorded there). The stats tests check the engine on
 * arrays; these check that nothing between the file and the engine loses digits or mislabels a term.
 */

import assert from "node:assert/strict";
import fs from "node:fs";
import path from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import type { ResponseAnalysis } from "../../server/src/analysis/results.js";
import { lre, NIST_DATASETS, readDataset } from "../support/nist-strd.js";
import { trialName, writeTrial } from "../support/trial-writer.js";

function row(result: ResponseAnalysis, source: string) {
  const found = result.anova.find((r) => r.source === source);
  assert.ok(found, `no ANOVA row '${source}' in ${result.anova.map((r) => r.source).join(", ")}`);
  return found;
}

function errorsOf(text: string) {
  return analyzeDocument(text).diagnostics.filter((d) => d.severity === "error");
}

describe("pipeline: NIST StRD ANOVA certified values through .trial text (LRE >= 12)", () => {
  const table: string[] = [];
  after(() => console.log(["dataset  SS-b  SS-w  MS-b  MS-w  F     R2    sd", ...table].join("\n")));
  for (const name of NIST_DATASETS) {
    it(name, () => {
      const { certified, groups, responses } = readDataset(name);
      const levels = [...new Set(groups)].sort((a, b) => a - b).map(String);
      const text = writeTrial({ levels: { treatment: levels }, factors: { treatment: groups.map(String) }, response: responses });
      assert.deepEqual(errorsOf(text), []);
      const result = analyzeDocument(text).responses[0]!;
      const between = row(result, "treatment");
      const within = row(result, "Residual");
      assert.equal(between.df, certified.betweenDf);
      assert.equal(within.df, certified.withinDf);
      const scores = [
        lre(between.ss, certified.betweenSs),
        lre(within.ss, certified.withinSs),
        lre(between.ms ?? null, certified.betweenMs),
        lre(within.ms ?? null, certified.withinMs),
        lre(between.f ?? null, certified.f),
        lre(result.rSquared, certified.rSquared),
        lre(result.residualSd, certified.residualSd),
      ];
      table.push(`${name.padEnd(8)} ${scores.map((s) => s.toFixed(1).padStart(4)).join("  ")}`);
      for (const s of scores) assert.ok(s >= 12, `${name}: LRE ${s.toFixed(2)} < 12 (${scores.map((x) => x.toFixed(1)).join(", ")})`);
    });
  }
});

interface FixtureRow { source: string; df: number; ss: number; ms?: number; f?: number; p?: number }
interface Fixture {
  source: string;
  data: { levels: Record<string, string[]>; factors: Record<string, string[]>; covariates?: Record<string, number[]>; response: string[] };
  fits: { terms: string[][]; ssType: "I" | "II" | "III"; anova: FixtureRow[]; rSquared: number; residualSd: number; fitted: number[]; residuals: number[]; studentized: (number | null)[]; slopes?: Record<string, number>; adjustedMeans?: Record<string, { level: string; mean: number; se: number }[]> }[];
  means: Record<string, { level: string; n: number; mean: number; sd: number | null; lower: number; upper: number }[]>;
}

/** Relative agreement with R to 1e-9 (R prints 17 digits; our algorithms round differently), absolute floor 1e-12. */
function close(actual: number | null | undefined, expected: number, what: string, floor = 1e-12): void {
  assert.ok(actual !== null && actual !== undefined, `${what}: missing`);
  const tolerance = Math.max(1e-9 * Math.abs(expected), floor);
  assert.ok(Math.abs(actual - expected) <= tolerance, `${what}: ${actual} vs R ${expected}`);
}

describe("pipeline: R fixtures through .trial text", () => {
  const dir = path.resolve("test/stats/fixtures/r/anova");
  for (const file of fs.readdirSync(dir).filter((f) => f.endsWith(".json")).sort()) {
    const fixture = JSON.parse(fs.readFileSync(path.join(dir, file), "utf8")) as Fixture;
    fixture.fits.forEach((fit, k) => {
      it(`${file} fit ${k + 1}: Type ${fit.ssType} of ${fit.terms.map((t) => t.join(" x ")).join(", ")}`, () => {
        const model = fit.terms.map((t) => t.map((n) => trialName(n)).join(" x ")).join(", ");
        const text = writeTrial(fixture.data, [`model ${model}`, `sums-of-squares ${fit.ssType}`]);
        assert.deepEqual(errorsOf(text), []);
        const result = analyzeDocument(text).responses[0]!;
        assert.equal(result.ssType, fit.ssType);
        const sources = result.anova.map((r) => r.source).filter((s) => s !== "Total");
        assert.deepEqual(sources, fit.anova.map((r) => r.source));
        for (const expected of fit.anova) {
          const actual = row(result, expected.source);
          assert.equal(actual.df, expected.df, `${expected.source} df`);
          close(actual.ss, expected.ss, `${expected.source} SS`);
          if (expected.ms !== undefined) close(actual.ms, expected.ms, `${expected.source} MS`);
          if (expected.f !== undefined) close(actual.f, expected.f, `${expected.source} F`);
          if (expected.p !== undefined) close(actual.p, expected.p, `${expected.source} p`, 1e-15);
        }
        close(result.rSquared, fit.rSquared, "R²");
        close(result.residualSd, fit.residualSd, "residual SD");
        // Residual-type values: absolute floor scaled by the residual SD (fixture README, near-zero residuals).
        const floor = 1e-10 * fit.residualSd;
        result.residuals.forEach((r, i) => {
          assert.equal(r.run, `r${i + 1}`);
          close(r.fitted, fit.fitted[i]!, `fitted ${r.run}`, floor);
          close(r.residual, fit.residuals[i]!, `residual ${r.run}`, floor);
          const s = fit.studentized[i];
          if (s === null || s === undefined) assert.equal(r.studentized, null, `studentized ${r.run}`);
          else close(r.studentized, s, `studentized ${r.run}`, 1e-9);
        });
        for (const [covariate, slope] of Object.entries(fit.slopes ?? {})) {
          close(result.slopes.find((s) => s.covariate === covariate)?.slope, slope, `slope ${covariate}`);
        }
        for (const [factor, means] of Object.entries(fit.adjustedMeans ?? {})) {
          for (const m of means) {
            const actual = result.adjustedMeans.find((a) => a.term === factor && a.level === m.level);
            close(actual?.mean, m.mean, `adjusted mean ${factor}=${m.level}`);
            close(actual?.standardError, m.se, `adjusted mean SE ${factor}=${m.level}`);
          }
        }
        if (k === 0) {
          for (const [term, means] of Object.entries(fixture.means)) {
            for (const m of means) {
              const actual = result.means.find((a) => a.term === term && a.level === m.level);
              assert.ok(actual, `means of ${term} ${m.level}`);
              assert.equal(actual.n, m.n);
              close(actual.mean, m.mean, `mean ${term} ${m.level}`);
              if (m.sd === null) assert.equal(actual.sd, null);
              else close(actual.sd, m.sd, `sd ${term} ${m.level}`);
              close(actual.lower, m.lower, `lower ${term} ${m.level}`);
              close(actual.upper, m.upper, `upper ${term} ${m.level}`);
            }
          }
        }
      });
    });
  }
});
