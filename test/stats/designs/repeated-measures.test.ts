/**
 * Repeated-measures strata, Mauchly's test and the GG/HF epsilons against R 4.2.2 (fixtures in
 * test/stats/fixtures/r/designs/, script generate.R there): aov with Error(subject/(...)) strata,
 * mauchly.test on an mlm, the epsilons by their published formulas, and car::Anova on the mlm with
 * idata/idesign (summary(..., multivariate = FALSE)) for the corrected p-values.
 */

import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { chiSquareUpperTail } from "../../../server/src/stats/distributions/chi-square-distribution.js";
import { repeatedMeasuresAnova, type RepeatedMeasuresInput, type StratumRow, type TermSphericity } from "../../../server/src/stats/repeated-measures/strata.js";
import { assertClose } from "../linear-model/helpers.js";

interface RmFixture {
  subjects: number;
  within: number[];
  withinNames: string[];
  between: { name: string; levels: number; codes: number[] } | null;
  y: number[];
  aovStrata: { stratum: string; source: string; df: number; ss: number; f: number | null; p: number | null }[];
  sphericity: { term: string; contrasts: number; gg: number; hf: number; mauchlyW?: number; mauchlyP_R?: number; mauchlyW_formula?: number; chisq?: number; mauchlyP_formula?: number }[];
  carAdjustments: { source: string; gg: number; ggP: number; hf: number; hfP: number }[];
}

function load(name: string): RmFixture {
  return JSON.parse(readFileSync(path.resolve("test/stats/fixtures/r/designs", `${name}.json`), "utf8")) as RmFixture;
}

function input(fx: RmFixture): RepeatedMeasuresInput {
  return {
    subjectName: "subject",
    subjects: fx.subjects,
    within: fx.within.map((k, i) => ({ name: fx.withinNames[i]!, levelCount: k })),
    y: Float64Array.from(fx.y),
    between: fx.between ? [{ name: fx.between.name, levelCount: fx.between.levels, codes: Int32Array.from(fx.between.codes) }] : [],
  };
}

/** R's aov source names ("G:W1", "Residuals") in our naming. */
function ourSource(stratum: string, source: string): string {
  if (source !== "Residuals") return source.replace(/:/g, " x ");
  if (stratum === "Error: subject") return "subject";
  const within = stratum.replace("Error: subject:", "").split(":").join(" x ");
  return `${within} x subject`;
}

for (const name of ["rm-oneway", "rm-between", "rm-unequal", "rm-twowithin"]) {
  describe(`repeated measures vs R: ${name}`, () => {
    const fx = load(name);
    const result = repeatedMeasuresAnova(input(fx));
    it("fits", () => assert.ok(result.ok, result.ok ? "" : result.reason));
    if (!result.ok) return;

    it("every aov Error() stratum row: df, SS, F, p", () => {
      for (const ref of fx.aovStrata) {
        const source = ourSource(ref.stratum, ref.source);
        const row: StratumRow | undefined = result.rows.find((r) => r.source === source);
        assert.ok(row, `row ${source} missing`);
        assert.equal(row.df, ref.df, `${source} df`);
        assertClose(row.ss, ref.ss, `${source} SS`, 1e-10);
        if (ref.f !== null) {
          assertClose(row.f, ref.f, `${source} F`, 1e-9);
          assertClose(row.p, ref.p!, `${source} p`, 1e-8);
        }
      }
      assert.equal(result.rows.length, fx.aovStrata.length, "same number of rows as the aov strata");
    });

    it("error strata are named on each tested row", () => {
      for (const row of result.rows) {
        if (row.isError) continue;
        assert.ok(result.rows.some((r) => r.isError && r.source === row.error), `${row.source} names ${row.error}`);
      }
    });

    it("Mauchly's W (mauchly.test), chi-square and p (formula; R's p within 1e-6), GG and HF epsilons (formula)", () => {
      for (const ref of fx.sphericity) {
        const s: TermSphericity | undefined = result.sphericity.find((x) => x.term === ref.term);
        assert.ok(s, `term ${ref.term}`);
        assert.equal(s.statistics.p, ref.contrasts);
        assertClose(s.statistics.greenhouseGeisser, ref.gg, `${ref.term} GG`, 1e-10);
        assertClose(s.statistics.huynhFeldt, ref.hf, `${ref.term} HF`, 1e-10);
        if (ref.mauchlyW !== undefined) {
          assertClose(s.statistics.mauchlyW, ref.mauchlyW, `${ref.term} W vs mauchly.test`, 1e-9);
          assertClose(s.statistics.mauchlyW, ref.mauchlyW_formula!, `${ref.term} W vs formula`, 1e-11);
          assertClose(s.statistics.chiSquare, ref.chisq!, `${ref.term} chi-square`, 1e-10);
          assertClose(s.statistics.mauchlyP, ref.mauchlyP_formula!, `${ref.term} p vs formula`, 1e-9);
          // R's mauchly.test writes 3·p + 2 in ω₂ with p = the number of columns of the mlm where Anderson
          // (1958) has the number of contrasts; that moves p by about 1e-3 relative at most here.
          assertClose(s.statistics.mauchlyP, ref.mauchlyP_R!, `${ref.term} p vs mauchly.test`, 2e-3);
        } else {
          assert.equal(s.statistics.mauchlyW, null, "no Mauchly test for one contrast");
        }
      }
    });

    it("GG and HF corrected p-values agree with car::Anova (HF capped at 1)", () => {
      for (const ref of fx.carAdjustments) {
        // With unequal group sizes car's Type III test of the within main effect differs from the sequential
        // (aov) one used here; only the rows the two share are compared (the interaction, fitted last).
        if (name === "rm-unequal" && ref.source === "W1") continue;
        const s: TermSphericity | undefined = result.sphericity.find((x) => x.corrected.some((c) => c.source === ref.source));
        assert.ok(s, `corrected p for ${ref.source}`);
        const c = s.corrected.find((x) => x.source === ref.source)!;
        assertClose(s.statistics.greenhouseGeisser, ref.gg, `${ref.source} GG eps (car)`, 1e-9);
        assertClose(s.statistics.huynhFeldt, ref.hf, `${ref.source} HF eps (car)`, 1e-9);
        assertClose(c.greenhouseGeisserP, ref.ggP, `${ref.source} GG p (car)`, 1e-7);
        assertClose(c.huynhFeldtP, ref.hfP, `${ref.source} HF p (car)`, 1e-7);
      }
    });
  });
}

describe("chi-square upper tail", () => {
  it("matches pchisq values (R 4.2.2: pchisq(x, df, lower.tail = FALSE))", () => {
    // R 4.2.2: print(pchisq(c(0.5, 50, 200), c(5, 4, 9), lower.tail = FALSE), digits = 17).
    assertClose(chiSquareUpperTail(0.5, 5), 9.921232932326296e-01, "x=0.5 df=5", 1e-13);
    assertClose(chiSquareUpperTail(50, 4), 3.6108654048906463e-10, "x=50 df=4", 1e-11);
    assertClose(chiSquareUpperTail(200, 9), 3.3129923939095528e-38, "x=200 df=9", 1e-10);
  });
  it("rejects invalid degrees of freedom", () => {
    assert.ok(Number.isNaN(chiSquareUpperTail(1, 0)));
  });
});
