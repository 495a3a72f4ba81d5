/**
 * Comparisons, model checks, alternatives, power and their distributions against R 4.2.2 (car 3.1.1,
 * multcomp 1.4.22, mvtnorm 1.1.3): test/stats/fixtures/r/comparisons/generate.R wrote reference.json.
 * All data are invented (see each set's "scenario").
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { friedman, kruskalWallis } from "../../../server/src/stats/alternatives/rank-tests.js";
import { welchAnova, welchT } from "../../../server/src/stats/alternatives/welch.js";
import { bartlettTest } from "../../../server/src/stats/checks/bartlett.js";
import { leveneTest } from "../../../server/src/stats/checks/levene.js";
import { shapiroWilk } from "../../../server/src/stats/checks/shapiro-wilk.js";
import { summarizeGroups } from "../../../server/src/stats/comparisons/group-summary.js";
import { letterDisplay } from "../../../server/src/stats/comparisons/letter-display.js";
import { dunnett, gamesHowell, pairwiseT, tukeyHsd } from "../../../server/src/stats/comparisons/pairwise.js";
import { polynomialCoefficients, polynomialContrasts } from "../../../server/src/stats/comparisons/polynomial-contrasts.js";
import { chiSquareUpperTail } from "../../../server/src/stats/distributions/chi-square-distribution.js";
import { dunnettTwoSidedCdf, dunnettTwoSidedQuantile } from "../../../server/src/stats/distributions/dunnett.js";
import { noncentralFPair } from "../../../server/src/stats/distributions/noncentral-f.js";
import { studentizedRangeQuantile, studentizedRangeUpperTail } from "../../../server/src/stats/distributions/studentized-range.js";
import { mainEffectPower, replicatesNeeded } from "../../../server/src/stats/power/f-test-power.js";

// eslint-disable-next-line @typescript-eslint/no-explicit-any
const R: any = JSON.parse(readFileSync(resolve("test/stats/fixtures/r/comparisons/reference.json"), "utf8"));

function close(actual: number | null | undefined, expected: number, rel: number, abs = 0, what = ""): void {
  assert.ok(actual !== null && actual !== undefined && Number.isFinite(actual), `${what}: got ${actual}`);
  const err = Math.abs(actual - expected);
  assert.ok(err <= Math.max(abs, rel * Math.abs(expected)), `${what}: ${actual} vs R ${expected} (error ${err})`);
}

const ow = R.oneway;
const levels: string[] = ow.levels;
const codes = Int32Array.from(ow.supplier as string[], (s) => levels.indexOf(s));
const y = Float64Array.from(ow.strength as string[], Number);
const groups = summarizeGroups(y, codes, levels.length);
const pooled = { ms: ow.mse, df: ow.dfe };

describe("comparisons against R (invented supplier data, unbalanced one-way)", () => {
  it("Tukey-Kramer equals TukeyHSD (diff, interval, adjusted p)", () => {
    const t = tukeyHsd(groups, pooled, 0.95);
    assert.ok(t.ok);
    for (const ref of ow.pairs) {
      const pair = t.pairs.find((p) => levels[p.a] === ref.a && levels[p.b] === ref.b)!;
      close(pair.diff, ref.tukeyDiff, 1e-12, 1e-13, `diff ${ref.a}-${ref.b}`);
      // TukeyHSD's interval uses qtukey, which R documents as accurate to the 4th decimal place (its
      // secant iteration stops at a step of 1e-4; here it is within 4e-8): our quantile is checked far
      // tighter against the defining integral (test/stats/distributions/studentized-range.test.ts).
      close(pair.lower, ref.tukeyLower, 1e-6, 1e-9, `lower ${ref.a}-${ref.b}`);
      close(pair.upper, ref.tukeyUpper, 1e-6, 1e-9, `upper ${ref.a}-${ref.b}`);
      close(pair.p, ref.tukeyP, 1e-7, 1e-10, `p ${ref.a}-${ref.b}`);
    }
  });

  it("LSD, Bonferroni and Holm p-values equal pairwise.t.test with p.adjust none/bonferroni/holm", () => {
    for (const [method, key] of [["lsd", "lsdP"], ["bonferroni", "bonferroniP"], ["holm", "holmP"]] as const) {
      const out = pairwiseT(groups, pooled, 0.95, method);
      assert.ok(out.ok);
      for (const ref of ow.pairs) {
        const pair = out.pairs.find((p) => levels[p.a] === ref.a && levels[p.b] === ref.b)!;
        close(pair.p, ref[key], 1e-10, 1e-14, `${method} ${ref.a}-${ref.b}`);
      }
    }
  });

  it("Tukey and Games-Howell of more than 100 levels are skipped with the reason", () => {
    const many = Array.from({ length: 101 }, (_, i) => ({ n: 3, mean: i, variance: 1 }));
    for (const outcome of [tukeyHsd(many, { ms: 1, df: 202 }, 0.95), gamesHowell(many, 0.95)]) {
      assert.equal(outcome.ok, false);
      assert.match((outcome as { reason: string }).reason, /101 levels are more than the 100 the studentized range is computed for/);
    }
  });

  it("Games-Howell equals its formula computed in R with ptukey/qtukey", () => {
    const out = gamesHowell(groups, 0.95);
    assert.ok(out.ok);
    for (const ref of ow.gamesHowell) {
      const pair = out.pairs.find((p) => levels[p.a] === ref.a && levels[p.b] === ref.b)!;
      close(pair.diff, ref.diff, 1e-12, 1e-13, "diff");
      close(pair.lower, ref.lower, 1e-7, 1e-8, "lower");
      close(pair.upper, ref.upper, 1e-7, 1e-8, "upper");
      close(pair.p, ref.p, 1e-6, 1e-9, "p");
    }
  });

  it("Dunnett equals mvtnorm (tight tolerance) and multcomp's glht (its default randomised precision)", () => {
    const out = dunnett(groups, 0, pooled, 0.95);
    assert.ok(out.ok);
    out.pairs.forEach((pair, i) => {
      assert.equal(levels[pair.a], ow.dunnett.level[i]);
      close(pair.diff, ow.dunnett.diff[i], 1e-12, 1e-13, "diff");
      close(pair.p, ow.dunnett.pMvtnorm[i], 0, 5e-6, "p vs mvtnorm");
      close(pair.p, ow.dunnett.pMultcomp[i], 0, 1e-3, "p vs multcomp");
      close(pair.lower, ow.dunnett.lowerMultcomp[i], 0, 2e-3, "lower vs multcomp");
      close(pair.upper, ow.dunnett.upperMultcomp[i], 0, 2e-3, "upper vs multcomp");
    });
    const lambdas = [1, 2, 3].map((i) => Math.sqrt(groups[i]!.n / (groups[i]!.n + groups[0]!.n)));
    // qmvt finds its quantile by uniroot on a randomised pmvt, good to a few 1e-5; our own quantile must
    // reproduce the confidence level through our CDF far more tightly.
    const critical = dunnettTwoSidedQuantile(0.95, lambdas, ow.dfe);
    close(critical, ow.dunnett.critical, 0, 5e-5, "critical value vs qmvt");
    close(dunnettTwoSidedCdf(critical, lambdas, ow.dfe), 0.95, 0, 1e-9, "CDF at the critical value");
  });

  it("Levene (center = mean), Brown-Forsythe (center = median) equal car::leveneTest; Bartlett equals bartlett.test", () => {
    for (const [center, ref] of [["mean", ow.levene], ["median", ow.brownForsythe]] as const) {
      const t = leveneTest(y, codes, levels.length, center)!;
      close(t.statistic, ref.statistic, 1e-12, 0, `${center} F`);
      assert.equal(t.df1, ref.df1);
      assert.equal(t.df2, ref.df2);
      close(t.p, ref.p, 1e-11, 0, `${center} p`);
    }
    const b = bartlettTest(groups)!;
    close(b.statistic, ow.bartlett.statistic, 1e-12, 0, "Bartlett K2");
    close(b.p, ow.bartlett.p, 1e-11, 0, "Bartlett p");
  });

  it("Shapiro-Wilk of the one-way residuals equals shapiro.test", () => {
    const residuals = Float64Array.from(y, (v, i) => v - groups[codes[i]!]!.mean);
    const sw = shapiroWilk(residuals);
    assert.ok(sw.ok);
    close(sw.w, ow.shapiroWilk.w, 1e-12, 0, "W");
    close(sw.p, ow.shapiroWilk.p, 1e-9, 0, "p");
  });

  it("Welch's ANOVA equals oneway.test; Kruskal-Wallis (with ties) equals kruskal.test; Welch's t equals t.test", () => {
    const w = welchAnova(groups)!;
    close(w.statistic, ow.welch.statistic, 1e-12, 0, "Welch F");
    close(w.df2, ow.welch.df2, 1e-12, 0, "Welch df2");
    close(w.p, ow.welch.p, 1e-11, 0, "Welch p");
    const kw = kruskalWallis(y, codes, levels.length)!;
    close(kw.statistic, ow.kruskalWallis.statistic, 1e-12, 0, "H");
    close(kw.p, ow.kruskalWallis.p, 1e-11, 0, "KW p");
    const t = welchT(groups[0]!, groups[3]!)!;
    close(t.statistic, ow.welchT.statistic, 1e-12, 0, "t");
    close(t.df, ow.welchT.df, 1e-12, 0, "df");
    close(t.p, ow.welchT.p, 1e-11, 0, "p");
  });

  it("Friedman equals friedman.test on the invented blocked gloss data", () => {
    const rc = R.rcbd;
    const recipes = [...new Set<string>(rc.recipe)];
    const panels = [...new Set<string>(rc.panel)];
    const table = panels.map(() => new Array<number>(recipes.length).fill(0));
    (rc.gloss as string[]).forEach((g, i) => (table[panels.indexOf(rc.panel[i])]![recipes.indexOf(rc.recipe[i])] = Number(g)));
    const f = friedman(table)!;
    close(f.statistic, rc.friedman.statistic, 1e-12, 0, "Friedman statistic");
    close(f.p, rc.friedman.p, 1e-11, 0, "Friedman p");
  });

  it("polynomial contrasts equal contr.poly and lm's temp.L / temp.Q rows (balanced)", () => {
    const pc = R.polynomial;
    const coefficients = polynomialCoefficients([150, 175, 200, 225], 3);
    coefficients.forEach((c, d) => c.forEach((v, i) => close(v, pc.coefficients[d][i], 1e-12, 1e-15, `contr.poly[${i},${d}]`)));
    const tl = ["150", "175", "200", "225"];
    const tc = Int32Array.from(pc.temp as string[], (t) => tl.indexOf(t));
    const ty = Float64Array.from(pc.cure as string[], Number);
    const g = summarizeGroups(ty, tc, 4);
    let ss = 0;
    ty.forEach((v, i) => (ss += (v - g[tc[i]!]!.mean) ** 2));
    const out = polynomialContrasts(g, [150, 175, 200, 225], { ms: ss / 12, df: 12 }, 0.95, 2);
    for (const [c, ref] of [[out[0]!, pc.linear], [out[1]!, pc.quadratic]] as const) {
      close(c.estimate, ref.estimate, 1e-11, 1e-13, "estimate");
      close(c.standardError, ref.se, 1e-11, 0, "se");
      close(c.t, ref.t, 1e-10, 1e-12, "t");
      close(c.p, ref.p, 1e-9, 1e-15, "p");
    }
  });
});

describe("distributions against R", () => {
  it("studentized range upper tail equals ptukey(lower.tail = FALSE) on a grid (k 2-10, df 2-60) within ptukey's own error", () => {
    // R's ptukey is a reference only to its own accuracy: R's QUADPACK integral of the definition gives
    // 0.005557878295156 for P(Q > 8; 3, 5), ours 0.005557878295160 and ptukey 0.005557802133189 (7.6e-8
    // off); at 2 df it is off by up to 1e-4. The tight checks against those integrals are in
    // test/stats/distributions/studentized-range.test.ts.
    const g = R.ptukeyUpper;
    g.q.forEach((q: number, i: number) => close(studentizedRangeUpperTail(q, g.k[i], g.df[i]), Math.max(g.p[i], 1e-10), 0, g.df[i] >= 3 ? 1e-7 : 2e-4, `ptukey(${q}, ${g.k[i]}, ${g.df[i]})`));
  });

  it("studentized range quantile equals qtukey on a grid (df 5-60) within qtukey's documented 4th decimal", () => {
    // At 2 df qtukey inverts ptukey's 1e-4 errors (1.3e-3 off in q): not a reference there.
    const g = R.qtukey;
    g.p.forEach((p: number, i: number) => {
      if (g.df[i] >= 3) close(studentizedRangeQuantile(p, g.k[i], g.df[i]), g.q[i], 0, 1e-4, `qtukey(${p}, ${g.k[i]}, ${g.df[i]})`);
    });
  });

  it("noncentral F both tails equal pf(ncp =) within pf's own accuracy, 1e-9 (ncp 0-300, df1 1-7, df2 4-200)", () => {
    // R's pnbeta stops at errmax = 1e-9 (documented in R's pnbeta.c). At f = 4, df 1 and 4, ncp 0.5, R's own
    // direct sum sum(dpois(j, 0.25) * pbeta(0.5, 2, 0.5 + j)) gives 0.1809743482457799, which ours matches to
    // 1e-16 while pf gives 0.1809743484976023.
    const g = R.noncentralF;
    close(noncentralFPair(4, 1, 4, 0.5).upper, 0.1809743482457799, 1e-14, 0, "direct Poisson sum in R");
    g.f.forEach((f: number, i: number) => {
      const pair = noncentralFPair(f, g.df1[i], g.df2[i], g.ncp[i]);
      close(pair.upper, g.upper[i], 0, 1e-9, `upper f=${f} df=${g.df1[i]},${g.df2[i]} ncp=${g.ncp[i]}`);
      close(pair.lower, g.lower[i], 0, 1e-9, `lower f=${f} df=${g.df1[i]},${g.df2[i]} ncp=${g.ncp[i]}`);
    });
  });

  it("chi-square upper tail equals pchisq(lower.tail = FALSE)", () => {
    const g = R.chiSquare;
    g.x.forEach((x: number, i: number) => close(chiSquareUpperTail(x, g.df[i]), g.upper[i], 1e-12, 1e-300, `pchisq(${x}, ${g.df[i]})`));
  });

  it("Dunnett CDF for one treatment equals the exact |T| identity 2·pt(c, ν) - 1 (R 4.2.2 values), any λ", () => {
    // One treatment against the control: max |T_i| is |T_ν|. Reference values: R 4.2.2, 2 * pt(c, df) - 1.
    const exact: [number, number, number][] = [
      [40, 1, 0.984087820175948],
      [12, 2, 0.993127066322842],
      [3, 1, 0.795167235300867],
      [2.5, 12, 0.972084600428675],
    ];
    for (const [c, df, cdf] of exact) for (const lambda of [0.3, 0.7, 0.95]) close(dunnettTwoSidedCdf(c, [lambda], df), cdf, 0, 1e-12, `c = ${c}, df = ${df}, λ = ${lambda}`);
  });

  it("Dunnett CDF equals mvtnorm::pmvt (product correlation, unequal lambdas, df 1-40) within pmvt's error", () => {
    for (const d of R.dunnettCdf) close(dunnettTwoSidedCdf(d.c, d.lambdas, d.df), d.cdf, 0, 3 * d.error + 1e-8, `lambdas ${d.lambdas} df ${d.df}`);
  });

  it("Shapiro-Wilk equals shapiro.test for n = 3, 4, 5, 7, 11, 12, 30, 200", () => {
    for (const s of R.shapiroWilk) {
      const out = shapiroWilk(s.x);
      assert.ok(out.ok);
      close(out.w, s.w, 1e-11, 0, `W n=${s.x.length}`);
      close(out.p, s.p, 1e-8, 1e-15, `p n=${s.x.length}`);
    }
  });
});

describe("power against R's power.anova.test", () => {
  // detect D (two level means D apart, the rest at the grand mean) is power.anova.test's
  // between.var = D^2 / (2 (k - 1)) with within.var = sigma^2; a one-way layout has runsPerReplicate = k and
  // modelDf = k - 1, and n replicates per level.
  it("mainEffectPower equals power.anova.test's power on a grid of k, n, D, sigma", () => {
    const g = R.powerAnova;
    g.k.forEach((k: number, i: number) => {
      const out = mainEffectPower({ levels: k, runsPerReplicate: k, modelDf: k - 1, difference: g.D[i], sigma: g.sigma[i], alpha: 0.05 }, g.n[i]);
      assert.ok(out.ok);
      close(out.power, g.power[i], 1e-8, 1e-12, `k=${k} n=${g.n[i]} D=${g.D[i]} sigma=${g.sigma[i]}`);
    });
  });

  it("replicatesNeeded is the ceiling of power.anova.test's fractional n", () => {
    const g = R.powerAnovaN;
    g.k.forEach((k: number, i: number) => {
      const out = replicatesNeeded({ levels: k, runsPerReplicate: k, modelDf: k - 1, difference: g.D[i], sigma: g.sigma[i], alpha: 0.05 }, 0.8);
      assert.ok(out.ok);
      assert.equal(out.replicates, Math.ceil(g.n[i]));
      assert.ok(out.power >= 0.8);
    });
  });

  it("reports why no power can be computed instead of NaN", () => {
    const bad = mainEffectPower({ levels: 3, runsPerReplicate: 3, modelDf: 2, difference: 1, sigma: 0, alpha: 0.05 }, 2);
    assert.equal(bad.ok, false);
    const noDf = mainEffectPower({ levels: 3, runsPerReplicate: 3, modelDf: 2, difference: 1, sigma: 1, alpha: 0.05 }, 1);
    assert.equal(noDf.ok, false);
  });
});

describe("compact letter display (hand-checked)", () => {
  it("A > B > C > D with A-C, A-D, B-D significant gives a, ab, bc, c", () => {
    // Hand check: A and B do not differ (share a), B and C do not (share b), C and D do not (share c);
    // every significant pair shares no letter.
    const sig = new Set(["0,2", "0,3", "1,3"]);
    const letters = letterDisplay(4, [0, 1, 2, 3], (i, j) => sig.has(`${Math.min(i, j)},${Math.max(i, j)}`));
    assert.deepEqual(letters, ["a", "ab", "bc", "c"]);
  });

  it("no significant pair gives one letter; all pairs significant give one letter each", () => {
    assert.deepEqual(letterDisplay(3, [2, 0, 1], () => false), ["a", "a", "a"]);
    assert.deepEqual(letterDisplay(3, [2, 0, 1], () => true), ["b", "c", "a"]);
  });

  it("Piepho's (2004) non-consecutive case: 1-2 and 3-4 significant only", () => {
    // Hand check: columns {1,3}, {1,4}, {2,3}, {2,4} are the maximal sets without a significant pair.
    const sig = new Set(["0,1", "2,3"]);
    const letters = letterDisplay(4, [0, 1, 2, 3], (i, j) => sig.has(`${Math.min(i, j)},${Math.max(i, j)}`));
    for (const [i, j] of [[0, 1], [2, 3]]) assert.ok(![...letters[i]!].some((c) => letters[j]!.includes(c)), "significant pair shares a letter");
    for (const [i, j] of [[0, 2], [0, 3], [1, 2], [1, 3]]) assert.ok([...letters[i]!].some((c) => letters[j]!.includes(c)), `pair ${i}-${j} shares no letter`);
    assert.equal(letters[0]![0], "a");
  });
});
