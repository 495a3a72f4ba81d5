import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { halfNormalPoints, normalProbabilityPoints, observationsOf, twoLevelEffects } from "../../server/src/report/plot-data.js";
import { planPlots } from "../../server/src/report/plot-specs.js";
import { renderPlots } from "../../server/src/report/render-report.js";
import { writeTrial } from "../support/trial-writer.js";

const reference = JSON.parse(readFileSync(resolve("test/report/fixtures/r/report-reference.json"), "utf8"));

/** Relative closeness for quantiles computed by two implementations of the normal quantile. */
function close(actual: number, expected: number, tolerance = 1e-13): void {
  assert.ok(Math.abs(actual - expected) <= tolerance * Math.max(1, Math.abs(expected)), `${actual} vs ${expected}`);
}

describe("report plot data: positions against R", () => {
  for (const n of [5, 12]) {
    it(`normal probability positions for n = ${n} are R's qnorm((i - 3/8) / (n + 1/4)) (Blom 1958)`, () => {
      // Values given in reverse so that the sort is exercised.
      const points = normalProbabilityPoints(Array.from({ length: n }, (_, i) => ({ value: n - i, label: `r${i}` })));
      const expected: number[] = reference[`blom${n}`];
      points.forEach((p, i) => close(p.quantile, expected[i]!));
      assert.deepEqual(points.map((p) => p.value), Array.from({ length: n }, (_, i) => i + 1));
    });
  }

  it("half-normal positions for m = 7 are R's qnorm(0.5 + 0.5 (i - 0.5) / m) (Daniel 1959), of the absolute values", () => {
    const points = halfNormalPoints([-3, 1, -0.5, 2, 0.25, -6, 4].map((value, i) => ({ value, label: `e${i}` })));
    (reference.halfNormal7 as number[]).forEach((q, i) => close(points[i]!.quantile, q));
    assert.deepEqual(points.map((p) => p.value), [0.25, 0.5, 1, 2, 3, 4, 6]);
  });
});

describe("report plot data: two-level effects against R", () => {
  const t = reference.twoLevel;
  const text = writeTrial(
    { levels: { temp: ["cool", "warm"], time: ["short", "long"], agitation: ["off", "on"] }, factors: { temp: t.temp, time: t.time, agitation: t.agitation }, response: t.y.map((y: number) => y.toFixed(2)) },
    ["model temp, time, agitation, temp x time"],
  );

  it("estimates the effects of a balanced 2^3 design as twice R's ±1-coded regression coefficients", () => {
    const analysis = analyzeDocument(text);
    const response = analysis.responses[0]!;
    const result = twoLevelEffects(analysis.design, response, observationsOf(analysis.design, response));
    assert.ok(result.ok, JSON.stringify(result));
    assert.deepEqual(result.effects.map((e) => e.term), t.terms);
    result.effects.forEach((e, i) => close(e.effect, t.effects[i], 1e-10));
  });

  it("draws the half-normal plot for that design and skips it with a reason once a run is dropped", async () => {
    const analysis = analyzeDocument(text);
    const plans = planPlots(analysis.design, analysis.responses[0]!);
    assert.ok("spec" in plans.find((p) => p.id === "half-normal")!);
    const plots = await renderPlots(analysis);
    assert.ok(plots.get("y")!.some((p) => p.title === "Half-normal plot of effects" && "svg" in p));
    const unbalanced = analyzeDocument(text.replace(/\n {2}r16 [^\n]*\n/, "\n"));
    const skipped = planPlots(unbalanced.design, unbalanced.responses[0]!).find((p) => p.id === "half-normal")!;
    assert.ok("note" in skipped && /balanced/.test(skipped.note), JSON.stringify(skipped));
  });

  it("rebuilds each observation as fitted + residual, equal to the value in the file", () => {
    const analysis = analyzeDocument(text);
    const observations = observationsOf(analysis.design, analysis.responses[0]!);
    assert.equal(observations.length, 16);
    observations.forEach((o) => close(o.y, t.y[o.order - 1], 1e-12));
  });
});
