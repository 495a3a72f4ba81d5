/**
 * Power from `plan sigma` before any run is measured, through analyzeDocument, against R 4.2.2
 * (test/stats/fixtures/r/plan-sigma/generate.R and reference.json): power.anova.test for a one-way layout
 * and pf with a noncentrality for the main effect of a two-factor crossed layout.
 *
 * How `detect` converts to power.anova.test: `detect y D` means two level means D apart and the others at the
 * grand mean, so between.var (the variance of the k level means, divisor k - 1) = D² / (2 (k - 1)), and
 * within.var = sigma² with sigma the planned `plan sigma` value.
 */
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";

// eslint-disable-next-line @typescript-eslint/no-explicit-any
const R: any = JSON.parse(readFileSync(resolve("test/stats/fixtures/r/plan-sigma/reference.json"), "utf8"));

function close(actual: number | undefined, expected: number, tolerance: number, what: string): void {
  assert.ok(actual !== undefined && Math.abs(actual - expected) <= tolerance, `${what}: ${actual} vs R ${expected}`);
}

// Invented: lap-shear strength of an adhesive under three cure profiles (and two lines), nothing measured yet.
const oneWay = (replicates: number, extra = "") =>
  `response strength unit MPa maximize\nfactor profile levels ramp-fast, ramp-slow, step\nplan\n  replicates ${replicates}\n  detect strength ${R.oneWay.detect}\n  sigma strength ${R.oneWay.sigma}\n${extra}`;
const twoFactor = (replicates: number) =>
  `response strength unit MPa\nfactor profile levels ramp-fast, ramp-slow, step\nfactor line levels north, south\nplan\n  replicates ${replicates}\n  detect strength ${R.twoFactor.detect}\n  sigma strength ${R.twoFactor.sigma}\n`;

describe("analysis: power from plan sigma before any data", () => {
  it("equals R's power.anova.test for a one-way layout at 2..6 replicates", () => {
    R.oneWay.replicates.forEach((r: number, i: number) => {
      const a = analyzeDocument(oneWay(r));
      const p = a.responses[0]!.power;
      assert.ok(p && p.length === 1, `power for ${r} replicates`);
      assert.equal(p[0]!.term, "profile");
      assert.equal(p[0]!.sigmaSource, "planned");
      assert.equal(p[0]!.sigma, R.oneWay.sigma);
      assert.equal(p[0]!.replicates, r);
      close(p[0]!.power, R.oneWay.power[i], 1e-9, `power at ${r} replicates`);
    });
  });

  it("replicates needed for power 0.8 is the ceiling of power.anova.test's n (13.38 -> 14)", () => {
    const p = analyzeDocument(oneWay(2)).responses[0]!.power![0]!;
    assert.equal(p.target, 0.8);
    assert.equal(p.replicatesNeeded, Math.ceil(R.oneWay.nForPower08));
    assert.equal(p.replicatesNeeded, 14);
  });

  it("equals R's pf with ncp for the profile main effect of a 3 x 2 crossed layout", () => {
    R.twoFactor.replicates.forEach((r: number, i: number) => {
      const p = analyzeDocument(twoFactor(r)).responses[0]!.power!;
      const profile = p.find((x) => x.term === "profile")!;
      close(profile.power, R.twoFactor.powerProfile[i], 1e-9, `profile power at ${r} replicates`);
    });
  });

  it("warns low-power on replicates, naming the planned sigma and the replicates that reach the target", () => {
    const text = oneWay(3);
    const a = analyzeDocument(text);
    const low = a.diagnostics.filter((d) => d.code === "low-power");
    assert.equal(low.length, 1);
    const at = text.indexOf("replicates 3") + "replicates ".length;
    assert.deepEqual(low[0]!.span, { start: at, end: at + 1 });
    assert.match(low[0]!.message, /σ = 1\.2 MPa planned \('plan sigma'\)/);
    assert.match(low[0]!.message, /Set 'replicates 14'/);
  });

  it("uses the residual SD once runs are measured, and says so", () => {
    const text =
      oneWay(2) +
      "runs id profile | strength\n r1 ramp-fast | 20.1\n r2 ramp-slow | 21.4\n r3 step | 19.2\n r4 ramp-fast | 20.9\n r5 ramp-slow | 22.0\n r6 step | 18.7\n";
    const r = analyzeDocument(text).responses[0]!;
    const p = r.power![0]!;
    assert.equal(p.sigmaSource, "observed");
    assert.equal(p.sigma, r.residualSd);
    assert.notEqual(p.sigma, R.oneWay.sigma);
  });

  it("reports a sigma for an undeclared response and a sigma that is not positive", () => {
    const unknown = analyzeDocument(oneWay(2, "  sigma voids 0.3\n"));
    const u = unknown.diagnostics.find((d) => d.code === "unknown-response");
    assert.ok(u, "unknown-response");
    assert.match(u.message, /'voids' is not a declared response/);
    for (const bad of ["0", "-1.5"]) {
      const text = `response y\nfactor a levels p, q\nplan\n  detect y 1\n  sigma y ${bad}\n`;
      const a = analyzeDocument(text);
      const d = a.diagnostics.find((x) => x.code === "invalid-setting");
      assert.ok(d, `invalid-setting for ${bad}`);
      assert.match(d.message, /must be positive/);
      assert.equal(a.design.responses[0]!.sigma, undefined);
      assert.equal(a.responses[0]!.power, undefined);
    }
  });

  it("gives no power without sigma and without data (nothing to size from)", () => {
    const a = analyzeDocument("response y\nfactor a levels p, q\nplan\n  replicates 3\n  detect y 1\n");
    assert.equal(a.responses[0]!.power, undefined);
  });
});
