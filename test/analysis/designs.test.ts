/**
 * Designs beyond complete randomization through the whole pipeline: .trial text → analyzeDocument, with
 * the values compared to the R 4.2.2 fixtures of test/stats/fixtures/r/designs/ (script generate.R there):
 * aov Error() strata and mauchly.test for repeated measures, aov and the unrestricted EMS formulas for the
 * nested random design, lm effects and the curvature formula for the two-level fraction.
 */

import assert from "node:assert/strict";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { assertClose } from "../stats/linear-model/helpers.js";

const fixture = (name: string) => JSON.parse(readFileSync(path.resolve("test/stats/fixtures/r/designs", `${name}.json`), "utf8"));

function trialText(header: string[], columns: string[], rows: string[][]): string {
  return [...header, `runs id ${columns.join(" ")} | y`, ...rows.map((r, i) => `  r${i + 1} ${r.slice(0, -1).join(" ")} | ${r[r.length - 1]}`)].join("\n") + "\n";
}

describe("repeated measures through analyzeDocument (R: rm-between)", () => {
  const fx = fixture("rm-between");
  const k = fx.within[0] as number;
  const rows: string[][] = [];
  for (let s = 0; s < fx.subjects; s++)
    for (let c = k - 1; c >= 0; c--) rows.push([`s${s + 1}`, `g${fx.between.codes[s] + 1}`, `w${c + 1}`, String(fx.y[s * k + c])]);
  const text = trialText(
    ['trial "Invented test data"', "response y", "factor W1 levels w1, w2, w3", "factor G levels g1, g2", `factor subject levels ${Array.from({ length: fx.subjects }, (_, i) => `s${i + 1}`).join(", ")} as subject`],
    ["subject", "G", "W1"],
    rows,
  );
  const analysis = analyzeDocument(text);
  const r = analysis.responses[0]!;
  it("replaces the fixed-effects table by the strata, each term naming its error row", () => {
    assert.equal(r.designAnalysis, "repeated-measures");
    const expected: Record<string, { source: string; error?: string }> = {
      "Error: subject|G": { source: "G", error: "subject" },
      "Error: subject|Residuals": { source: "subject" },
      "Error: subject:W1|W1": { source: "W1", error: "W1 x subject" },
      "Error: subject:W1|G:W1": { source: "G x W1", error: "W1 x subject" },
      "Error: subject:W1|Residuals": { source: "W1 x subject" },
    };
    for (const ref of fx.aovStrata) {
      const want = expected[`${ref.stratum}|${ref.source}`]!;
      const row = r.anova.find((a) => a.source === want.source);
      assert.ok(row, want.source);
      assert.equal(row.df, ref.df);
      assertClose(row.ss, ref.ss, `${want.source} SS`, 1e-9);
      assert.equal(row.error, want.error);
      if (ref.f !== null) assertClose(row.f, ref.f, `${want.source} F`, 1e-9);
    }
  });
  it("reports sphericity with GG and HF corrected p-values (car::Anova) and which to read", () => {
    const s = r.sphericity?.[0];
    assert.ok(s);
    assertClose(s.mauchlyW, fx.sphericity[0].mauchlyW, "W", 1e-9);
    const car = fx.carAdjustments.find((c: { source: string }) => c.source === "W1");
    assertClose(s.greenhouseGeisser.epsilon, car.gg, "GG", 1e-9);
    assertClose(s.greenhouseGeisser.p, car.ggP, "GG p", 1e-7);
    assertClose(s.huynhFeldt.p, car.hfP, "HF p", 1e-7);
    assert.equal(s.recommended, car.gg > 0.75 ? "huynhFeldt" : "greenhouseGeisser");
  });
  it("has no errors or warnings", () => {
    assert.deepEqual(analysis.diagnostics.filter((d) => d.severity === "error" || d.code === "aliased-term"), []);
  });
  it("warns when a subject misses a condition, and leaves the subject out", () => {
    const lines = text.split("\n");
    const cut = lines.filter((l) => !/^\s+r1\s/.test(l)).join("\n");
    const a = analyzeDocument(cut);
    assert.ok(a.diagnostics.some((d) => d.code === "missing-condition" && /s1/.test(d.message) && /W1=w3/.test(d.message)));
    assert.ok(a.diagnostics.some((d) => d.code === "incomplete-subject"));
    const g = a.responses[0]!.anova.find((x) => x.source === "subject");
    assert.equal(g?.df, fx.subjects - 1 - 2, "one subject fewer in the between stratum");
  });
});

describe("random nested factors through analyzeDocument (R: mixed-nested)", () => {
  const fx = fixture("mixed-nested");
  const rows = (fx.y as number[]).map((y, i) => [`b${fx.levels.batch[i] + 1}`, `s${fx.levels.sample[i] + 1}`, String(y)]);
  const text = trialText(['trial "Invented test data"', "response y", "factor batch levels b1, b2, b3, b4, b5 as random", "factor sample levels s1, s2, s3 as random within batch"], ["batch", "sample"], rows);
  const analysis = analyzeDocument(text);
  const r = analysis.responses[0]!;
  it("tests batch against sample(batch) and sample(batch) against the residual", () => {
    assert.equal(r.designAnalysis, "mixed-model");
    const batch = r.anova.find((a) => a.source === "batch")!;
    const sample = r.anova.find((a) => a.source === "sample(batch)")!;
    assertClose(batch.ss, fx.anova.batch.ss, "batch SS", 1e-9);
    assertClose(sample.ss, fx.anova["batch:sample"].ss, "sample(batch) SS", 1e-9);
    assert.equal(batch.error, "sample(batch)");
    assert.equal(sample.error, "Residual");
    assertClose(batch.f, fx.tests[0].f, "batch F", 1e-9);
    assertClose(batch.p, fx.tests[0].p, "batch p", 1e-8);
    assertClose(sample.f, fx.tests[1].f, "sample F", 1e-9);
  });
  it("variance components and ICC", () => {
    const vc = new Map(r.varianceComponents!.map((c) => [c.source, c.variance]));
    assertClose(vc.get("batch"), fx.components.batch, "batch variance", 1e-9);
    assertClose(vc.get("sample(batch)"), fx.components["sample(batch)"], "sample variance", 1e-9);
    assertClose(vc.get("Residual"), fx.components.Residual, "residual variance", 1e-9);
    assert.equal(r.icc?.source, "batch");
    assertClose(r.icc?.value, fx.icc, "ICC", 1e-9);
  });
  it("has no errors, no empty-cell or aliased-term warnings", () => {
    assert.deepEqual(analysis.diagnostics.filter((d) => d.severity === "error" || d.code === "empty-cell" || d.code === "aliased-term" || d.code === "no-error-df"), []);
  });
});

describe("two-level fraction with centre points through analyzeDocument (R: twolevel-fraction)", () => {
  const fx = fixture("twolevel-fraction");
  const names = ["A", "B", "C", "D", "E"];
  const rows: string[][] = (fx.y as number[]).map((y, i) => [...names.map((_, f) => String(fx.design[f][i])), String(y)]);
  for (const c of fx.centre as number[]) rows.push([...names.map(() => "0"), String(c)]);
  const text = trialText(
    ['trial "Invented test data"', "response y", ...names.map((n) => `factor ${n} levels -1, 0, 1`), "plan", "  fraction E = A x B x C x D", "  centre-points 4"],
    names,
    rows,
  );
  const analysis = analyzeDocument(text);
  const r = analysis.responses[0]!;
  it("effects and coefficients of the 15 estimable terms", () => {
    assert.equal(r.designAnalysis, "two-level");
    assert.equal(r.effects?.length, 15);
    for (const e of r.effects!) {
      assertClose(e.effect, fx.effects[e.term], `effect ${e.term}`, 1e-9, 1e-12);
      assertClose(e.coefficient, fx.effects[e.term] / 2, `coefficient ${e.term}`, 1e-9, 1e-12);
    }
  });
  it("curvature test against centre-point pure error; defining relation, resolution and aliases", () => {
    assertClose(r.curvature?.ss, fx.curvature.ss, "curvature SS", 1e-9);
    assertClose(r.curvature?.f, fx.curvature.f, "curvature F", 1e-9);
    assertClose(r.curvature?.p, fx.curvature.p, "curvature p", 1e-8);
    assert.deepEqual(r.definingRelation, ["I = A x B x C x D x E"]);
    assert.equal(r.resolution, 5);
    assert.deepEqual(r.aliases?.find((a) => a.term === "A x B")?.aliasedWith, ["C x D x E"]);
    const residual = r.anova.find((a) => a.source === "Residual");
    assert.equal(residual?.df, 3);
    assertClose(residual?.ss, fx.curvature.pureErrorSs, "pure error", 1e-9);
  });
  it("Lenth's PSE, ME and SME for the same design without centre points", () => {
    const noCentre = text.split("\n").filter((l) => !/\|\s/.test(l) || !/^\s+r\d+\s+0\s/.test(l)).join("\n").replace("  centre-points 4\n", "");
    const a = analyzeDocument(noCentre.replace(/levels -1, 0, 1/g, "levels -1, 1"));
    const l = a.responses[0]!.lenth;
    assert.ok(l);
    assertClose(l.pse, fx.lenth.pse, "PSE", 1e-9);
    assertClose(l.me, fx.lenth.me, "ME", 1e-9);
    assertClose(l.sme, fx.lenth.sme, "SME", 1e-9);
  });
  it("an aliased-term diagnostic when the model lists two aliased terms", () => {
    const t = text.replace("  centre-points 4", "  centre-points 4\n  model A, B, C, D, E, A x B, C x D x E");
    const a = analyzeDocument(t);
    assert.ok(a.diagnostics.some((d) => d.code === "aliased-term" && /'C x D x E' is aliased with 'A x B'/.test(d.message)));
  });
});

describe("design samples", () => {
  for (const file of ["repeated-measures", "batch-variation", "screening-fraction"]) {
    it(`samples/${file}.trial analyses without errors and with its special-design result`, () => {
      const a = analyzeDocument(readFileSync(path.resolve("samples", `${file}.trial`), "utf8"));
      assert.deepEqual(a.diagnostics.filter((d) => d.severity === "error"), []);
      assert.ok(a.responses[0]!.designAnalysis, "special analysis made");
    });
  }
  it("the samples folder holds them", () => {
    assert.ok(readdirSync(path.resolve("samples")).includes("batch-variation.trial"));
  });
});
