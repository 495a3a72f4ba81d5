/**
 * The comparisons, model checks, alternatives and power extensions through the whole pipeline: a .trial
 * text (test/support/trial-writer.ts) through analyzeDocument gives the values R computed for the same
 * invented data (test/stats/fixtures/r/comparisons/reference.json, generate.R, R 4.2.2).
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { writeTrial } from "../support/trial-writer.js";

// eslint-disable-next-line @typescript-eslint/no-explicit-any
const R: any = JSON.parse(readFileSync(resolve("test/stats/fixtures/r/comparisons/reference.json"), "utf8"));
const ow = R.oneway;

function close(actual: number | null | undefined, expected: number, tolerance: number, what: string): void {
  assert.ok(actual !== null && actual !== undefined && Math.abs(actual - expected) <= tolerance * Math.max(1, Math.abs(expected)), `${what}: ${actual} vs R ${expected}`);
}

function supplierTrial(planLines: string[] = []): string {
  const text = writeTrial({ levels: { supplier: ow.levels }, factors: { supplier: ow.supplier }, response: ow.strength }, planLines);
  // Declare the control level and a goal (writeTrial writes neither).
  return text.replace(/^factor supplier levels (.*)$/m, "factor supplier levels $1 control incumbent").replace(/^response y$/m, "response y unit MPa maximize spec >= 18.5");
}

describe("comparisons through analyzeDocument (invented supplier data)", () => {
  const analysis = analyzeDocument(supplierTrial(["detect y 1.5", "replicates 5"]));
  const r = analysis.responses[0]!;

  it("Tukey, Holm and Dunnett rows equal R's TukeyHSD, pairwise.t.test and mvtnorm", () => {
    for (const ref of ow.pairs) {
      const tukey = r.comparisons!.find((c) => c.method === "tukey" && c.a === ref.a && c.b === ref.b)!;
      close(tukey.diff, ref.tukeyDiff, 1e-12, "Tukey diff");
      // R's interval uses qtukey (documented to the 4th decimal; here within 4e-8 relative).
      close(tukey.lower, ref.tukeyLower, 1e-6, "Tukey lower");
      close(tukey.p, ref.tukeyP, 1e-7, "Tukey p");
      const holm = r.comparisons!.find((c) => c.method === "holm" && c.a === ref.a && c.b === ref.b)!;
      close(holm.p, ref.holmP, 1e-10, "Holm p");
    }
    const dunnett = r.comparisons!.filter((c) => c.method === "dunnett");
    assert.deepEqual(dunnett.map((c) => c.a), ow.dunnett.level);
    dunnett.forEach((c, i) => close(c.p, ow.dunnett.pMvtnorm[i], 5e-6, "Dunnett p"));
  });

  it("letters follow the Tukey results and the best level is the highest mean (goal maximize)", () => {
    const groups = r.groups!.filter((g) => g.term === "supplier");
    assert.equal(groups.length, 4);
    assert.ok(groups[0]!.letters.startsWith("a"));
    const byLevel = new Map(groups.map((g) => [g.level, g.letters]));
    // Every pair Tukey calls significant (p < 0.05) shares no letter; every other pair shares one.
    for (const ref of ow.pairs) {
      const shared = [...byLevel.get(ref.a)!].some((ch) => byLevel.get(ref.b)!.includes(ch));
      assert.equal(shared, ref.tukeyP >= 0.05, `${ref.a} vs ${ref.b}`);
    }
    assert.equal(r.best![0]!.level, groups[0]!.level);
  });

  it("checks and alternatives equal car::leveneTest, bartlett.test, shapiro.test, oneway.test, kruskal.test", () => {
    const c = r.checks!;
    assert.equal(c.groupsBy, "supplier");
    close(c.levene!.statistic, ow.levene.statistic, 1e-11, "Levene");
    close(c.brownForsythe!.p, ow.brownForsythe.p, 1e-11, "Brown-Forsythe p");
    close(c.bartlett!.statistic, ow.bartlett.statistic, 1e-11, "Bartlett");
    close(c.shapiroWilk!.w, ow.shapiroWilk.w, 1e-11, "Shapiro-Wilk W");
    close(r.alternatives!.welch!.statistic, ow.welch.statistic, 1e-11, "Welch F");
    close(r.alternatives!.kruskalWallis!.statistic, ow.kruskalWallis.statistic, 1e-11, "Kruskal-Wallis H");
  });

  it("the invented supplier data fail the normality check (R: Shapiro-Wilk p = 0.049) and pass Brown-Forsythe (p = 0.21)", () => {
    assert.ok(ow.shapiroWilk.p < 0.05 && ow.brownForsythe.p >= 0.05, "fixture premise");
    const d = analysis.diagnostics.find((x) => x.code === "non-normal-residuals");
    assert.ok(d, "non-normal-residuals diagnostic");
    assert.match(d.message, /transformation/);
    assert.ok(!analysis.diagnostics.some((x) => x.code === "unequal-variance"));
  });

  it("power uses the observed residual SD and the one-way layout; low-power names the replicates that reach the target", () => {
    const p = r.power!.find((x) => x.term === "supplier")!;
    close(p.sigma, Math.sqrt(ow.mse), 1e-12, "sigma");
    assert.equal(p.replicates, 5);
    if (p.power < 0.8) {
      const d = analysis.diagnostics.find((x) => x.code === "low-power")!;
      assert.match(d.message, new RegExp(`replicates ${p.replicatesNeeded}`));
    } else assert.ok(!analysis.diagnostics.some((x) => x.code === "low-power"));
  });

  it("out-of-spec marks each value below the spec on its cell", () => {
    const below = (ow.strength as string[]).filter((v) => Number(v) < 18.5).length;
    assert.equal(analysis.diagnostics.filter((d) => d.code === "out-of-spec").length, below);
  });
});

describe("pairwise A x B through analyzeDocument", () => {
  // Invented: a 2 x 2 coating trial with three runs per cell and one wild value (run r12).
  const data = {
    levels: { bath: ["b1", "b2"], dwell: ["short", "long"] },
    factors: { bath: ["b1", "b1", "b1", "b1", "b1", "b1", "b2", "b2", "b2", "b2", "b2", "b2"], dwell: ["short", "short", "short", "long", "long", "long", "short", "short", "short", "long", "long", "long"] },
    response: ["10.1", "10.3", "10.2", "11.0", "11.2", "11.1", "10.6", "10.4", "10.5", "11.9", "12.0", "15.0"],
  };
  const analysis = analyzeDocument(writeTrial(data, ["pairwise bath x dwell"]));
  const r = analysis.responses[0]!;

  it("compares the four cells (six pairs per method) with labels 'a x b'", () => {
    const cells = r.comparisons!.filter((c) => c.term === "bath x dwell" && c.method === "tukey");
    assert.equal(cells.length, 6);
    assert.ok(cells.some((c) => c.a === "b1 x short" && c.b === "b1 x long"));
  });

  it("a pairwise naming an undeclared factor is an unknown-factor error on that name", () => {
    const bad = analyzeDocument(writeTrial(data, ["pairwise bath x speed"]));
    const d = bad.diagnostics.find((x) => x.code === "unknown-factor");
    assert.ok(d && /speed/.test(d.message));
  });
});

describe("Tukey comparisons with one residual degree of freedom", () => {
  // Invented: three coating baths, four runs, so the one-way model leaves 1 residual df. R's ptukey and
  // qtukey give NaN below 2 df, and so did the tables here before: dashes, with every level sharing one
  // letter (a false "do not differ"). The distribution itself is checked at 1 df against R in
  // test/stats/distributions/studentized-range.test.ts.
  const trial = [
    "# Invented: three coating baths, four runs.",
    "response y unit mm",
    "factor bath levels 1, 2, 3",
    "runs id bath | y",
    "  r1 1 | 10.1",
    "  r2 1 | 10.4",
    "  r3 2 | 11.2",
    "  r4 3 | 12.0",
    "",
  ].join("\n");
  const analysis = analyzeDocument(trial);
  const r = analysis.responses[0]!;

  it("gives every Tukey row an interval and a p-value, and letters from them", () => {
    assert.equal(r.anova.find((row) => row.source === "Residual")?.df, 1);
    const tukey = r.comparisons!.filter((c) => c.method === "tukey");
    assert.equal(tukey.length, 3);
    assert.ok(tukey.every((c) => c.p !== null && c.lower !== null && c.upper !== null && c.lower < c.diff && c.diff < c.upper));
    assert.equal(analysis.diagnostics.some((d) => d.code === "check-skipped" && d.message.includes("Tukey")), false);
    assert.deepEqual(r.groups?.map((g) => g.level), ["3", "2", "1"]);
  });

  it("the Tukey interval is wider than the unadjusted LSD one and narrower than Bonferroni's at 3 pairs", () => {
    for (const pair of r.comparisons!.filter((c) => c.method === "tukey")) {
      const width = (method: string) => {
        const c = r.comparisons!.find((x) => x.method === method && x.a === pair.a && x.b === pair.b)!;
        return c.upper! - c.lower!;
      };
      assert.ok(width("lsd") < width("tukey") && width("tukey") < width("bonferroni"), `${pair.a} - ${pair.b}`);
    }
  });
});
