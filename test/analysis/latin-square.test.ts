/**
 * The Latin-square sample (rows and columns declared as blocks) analysed as rows + columns + treatment,
 * against R 4.2.2 `anova(lm(y ~ operator + shift + setting))` on the same invented data
 * (test/analysis/fixtures/r/latin-square/, generator committed).
 */
import assert from "node:assert/strict";
import fs from "node:fs";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";

interface Row { source: string; df: number; ss: number; ms: number; f: number | null; p: number | null }

describe("Latin square (samples/latin-square.trial) against R", () => {
  const expected = JSON.parse(fs.readFileSync("test/analysis/fixtures/r/latin-square/latin-square.json", "utf8")) as { anova: Row[]; rSquared: number; residualSd: number };
  const analysis = analyzeDocument(fs.readFileSync("samples/latin-square.trial", "utf8"));

  it("has no errors or warnings (no empty-cell noise for the square's missing combinations)", () => {
    assert.deepEqual(analysis.diagnostics.filter((d) => d.severity === "error" || d.severity === "warning").map((d) => d.message), []);
  });

  it("gives R's table: rows, columns and treatment, each on 3 df, residual on 6", () => {
    const r = analysis.responses[0]!;
    for (const row of expected.anova) {
      const actual = r.anova.find((a) => a.source === row.source);
      assert.ok(actual, row.source);
      assert.equal(actual.df, row.df);
      const close = (a: number | null | undefined, e: number | null, what: string) => {
        if (e === null) return;
        assert.ok(a !== null && a !== undefined && Math.abs(a - e) <= 1e-9 * Math.abs(e), `${row.source} ${what}: ${a} vs R ${e}`);
      };
      close(actual.ss, row.ss, "SS");
      close(actual.ms, row.ms, "MS");
      close(actual.f, row.f, "F");
      close(actual.p, row.p, "p");
    }
    assert.ok(Math.abs(r.rSquared! - expected.rSquared) <= 1e-12);
    assert.ok(Math.abs(r.residualSd! - expected.residualSd) <= 1e-12);
  });
});
