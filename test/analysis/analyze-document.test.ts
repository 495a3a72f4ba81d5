import assert from "node:assert/strict";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";

/** Every number reachable in a value, so tests can assert that none is NaN or Infinity. */
function numbersIn(value: unknown, out: number[] = []): number[] {
  if (typeof value === "number") out.push(value);
  else if (Array.isArray(value) || ArrayBuffer.isView(value)) for (const v of Array.from(value as ArrayLike<unknown>)) numbersIn(v, out);
  else if (value && typeof value === "object") for (const v of Object.values(value)) numbersIn(v, out);
  return out;
}

describe("analyzeDocument", () => {
  it("returns the keys of the JSON contract (design brief §5) for every response", () => {
    const text = `response y
factor a levels p, q, r
runs id a | y
  r1 p | 1.0
  r2 q | 2.0
  r3 r | 3.5
  r4 p | 1.5
  r5 q | 2.2
  r6 r | 3.1
`;
    const [r] = analyzeDocument(text).responses;
    for (const key of ["name", "n", "ssType", "anova", "rSquared", "residualSd", "means", "effectSizes", "residuals"]) assert.ok(key in r!, key);
    assert.deepEqual(r!.anova.map((row) => row.source), ["a", "Residual", "Total"]);
    assert.deepEqual(Object.keys(r!.anova[0]!), ["source", "df", "ss", "ms", "f", "p"]);
    assert.deepEqual(Object.keys(r!.anova[1]!), ["source", "df", "ss", "ms"]);
    assert.deepEqual(Object.keys(r!.anova[2]!), ["source", "df", "ss"]);
    assert.deepEqual(Object.keys(r!.means[0]!), ["term", "level", "n", "mean", "sd", "lower", "upper"]);
    assert.deepEqual(Object.keys(r!.residuals[0]!).slice(0, 1), ["run"]);
    assert.ok(["fitted", "residual", "standardized", "studentized"].every((k) => k in r!.residuals[0]!));
    // Hand check (one-way, n = 2 per level): level means 1.25, 2.1, 3.3; SS_between = 2 * sum (mean_i - 2.2167)^2.
    const grand = (1.25 + 2.1 + 3.3) / 3;
    const ssBetween = 2 * ((1.25 - grand) ** 2 + (2.1 - grand) ** 2 + (3.3 - grand) ** 2);
    assert.ok(Math.abs(r!.anova[0]!.ss - ssBetween) < 1e-12);
    assert.ok(Math.abs(r!.anova[1]!.ss - (0.125 + 0.02 + 0.08)) < 1e-12);
  });

  it("turns degenerate designs into diagnostics and nulls, never NaN or Infinity", () => {
    const cases = [
      "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | ?\n",
      "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 q | 2\n",
      "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 q | 1\n  r3 p | 1\n",
      "response y\nfactor a levels p, q\nfactor b levels u, v\nruns id a b | y\n  r1 p u | 1\n  r2 p v | 2\n  r3 q u | 3\n  r4 q v | 5\n",
      "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 q | 2\n  r3 q | 2\n  r4 q | 2\n",
      "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1e400\n  r2 q | 2\n",
    ];
    const expectedCodes = [["no-data"], ["no-error-df"], ["zero-variance"], ["no-error-df"], ["single-observation"], ["value-out-of-range"]];
    cases.forEach((text, i) => {
      const analysis = analyzeDocument(text);
      for (const n of numbersIn(analysis.responses)) assert.ok(Number.isFinite(n), `case ${i}: ${n}`);
      const codes = analysis.diagnostics.map((d) => d.code);
      for (const code of expectedCodes[i]!) assert.ok(codes.includes(code as never), `case ${i}: expected ${code} in ${codes.join(", ")}`);
    });
  });

  it("reports a level with one measured run on the level's declaration", () => {
    const text = "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 q | 2\n  r3 q | 2.5\n  r4 q | 2.1\n";
    const d = analyzeDocument(text).diagnostics.find((x) => x.code === "single-observation");
    assert.ok(d);
    assert.equal(text.slice(d.span.start, d.span.end), "p");
  });
});
