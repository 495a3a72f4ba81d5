/**
 * The interpolation table shared by the studentized range and Dunnett's distribution, against functions
 * of the same kind with exact values: (2Φ(x) - 1)^m, the probability that m independent standard normals
 * all lie within ±x (its slope 2mφ(x)(2Φ(x) - 1)^(m-1)), with Φ from our normal CDF (checked against R
 * elsewhere).
 */

import assert from "node:assert/strict";
import { normalUpperTail } from "../../../server/src/stats/distributions/normal-distribution.js";
import { interpolateStep, stepTable, type ValueAndSlope } from "../../../server/src/stats/distributions/step-table.js";

function allWithin(x: number, m: number, out: ValueAndSlope): void {
  const inside = 1 - 2 * normalUpperTail(x);
  out.value = inside ** m;
  out.slope = ((2 * m * Math.exp(-0.5 * x * x)) / Math.sqrt(2 * Math.PI)) * inside ** (m - 1);
}

describe("step table (barycentric interpolation on Chebyshev intervals)", () => {
  for (const [m, width, bound] of [
    [3, 1, 1e-13],
    [12, 0.5, 1e-13],
    [20, 0.5, 1e-13],
  ] as const) {
    it(`interpolates (2Φ(x) - 1)^${m} and its slope at width ${width} within ${bound}`, () => {
      const calls: number[] = [];
      const table = stepTable(9, width, (x, out) => {
        calls.push(x);
        allWithin(x, m, out);
      });
      const got: ValueAndSlope = { value: 0, slope: 0 };
      const exact: ValueAndSlope = { value: 0, slope: 0 };
      for (let i = 1; i < 900; i++) {
        const x = i * 0.00997;
        interpolateStep(table, x, got);
        allWithin(x, m, exact);
        assert.ok(Math.abs(got.value - exact.value) <= bound, `value at ${x}: ${got.value} vs ${exact.value}`);
        assert.ok(Math.abs(got.slope - exact.slope) <= 100 * bound, `slope at ${x}`);
      }
      // Each interval is filled once, 16 nodes each, and only the intervals asked for.
      assert.equal(calls.length, 16 * Math.ceil(9 / width));
    });
  }

  it("is 1 with slope 0 from the top on, without evaluating", () => {
    let evaluations = 0;
    const table = stepTable(8.2, 1, (_x, out) => {
      evaluations++;
      out.value = 0.5;
      out.slope = 1;
    });
    const out: ValueAndSlope = { value: 0, slope: 0 };
    interpolateStep(table, 9, out);
    assert.deepEqual([out.value, out.slope, evaluations, table.top], [1, 0, 0, 9]);
    interpolateStep(table, 0.25, out);
    assert.equal(evaluations, 16);
  });
});
