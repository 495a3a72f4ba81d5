import assert from "node:assert/strict";
import { parseTrial } from "../../grammar/src/parse.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import { ValueStatus } from "../../server/src/analysis/design.js";
import type { Diagnostic } from "../../server/src/analysis/diagnostics.js";

/** Builds the design of `text` and returns it with its diagnostics. */
function build(text: string, overrides = {}) {
  return buildDesign(parseTrial(text), {}, overrides);
}

/** The diagnostics of one code, each with the text its span covers. */
function found(diagnostics: readonly Diagnostic[], text: string, code: string) {
  return diagnostics.filter((d) => d.code === code).map((d) => ({ at: text.slice(d.span.start, d.span.end), message: d.message, severity: d.severity }));
}

const BASE = `trial "Invented: bracket weld strength"
response strength unit kN maximize
factor wire levels solid, flux
factor gas levels argon, mix
plan
  replicates 2
  seed 11
runs  id   wire   gas    | strength
      r01  solid  argon  | 10.1
      r02  flux   mix    | 11.4
      r03  solid  mix    | 10.9
      r04  flux   argon  | 12.2
      r05  solid  argon  | 10.4
      r06  flux   mix    | 11.0
      r07  solid  mix    | ?
      r08  flux   argon  | 12.5     excluded "clamp loose"
`;

describe("buildDesign", () => {
  it("resolves factors, levels, responses, runs and default model terms", () => {
    const { design, diagnostics } = build(BASE);
    assert.deepEqual(design.factors.map((f) => [f.name, f.levels.map((l) => l.name)]), [
      ["wire", ["solid", "flux"]],
      ["gas", ["argon", "mix"]],
    ]);
    assert.deepEqual(design.terms.map((t) => t.name), ["wire", "gas", "wire x gas"]);
    assert.equal(design.runs.count, 8);
    assert.deepEqual(design.runs.ids, ["r01", "r02", "r03", "r04", "r05", "r06", "r07", "r08"]);
    assert.deepEqual([...design.runs.levels[0]!], [0, 1, 0, 1, 0, 1, 0, 1]);
    assert.deepEqual([...design.runs.levels[1]!], [0, 1, 1, 0, 0, 1, 1, 0]);
    assert.deepEqual(design.runs.responseTexts[0]!.slice(0, 2), ["10.1", "11.4"]);
    assert.equal(design.runs.responseStatus[0]![6], ValueStatus.Pending);
    assert.deepEqual([...design.runs.excluded], [0, 0, 0, 0, 0, 0, 0, 1]);
    assert.equal(design.settings.replicates, 2);
    assert.equal(design.settings.ssType, "III");
    assert.equal(design.settings.alpha, 0.05);
    assert.deepEqual(found(diagnostics, BASE, "syntax"), []);
  });

  it("reports a cell short of replicates once excluded runs are discounted, pointing at the cell's runs", () => {
    const { diagnostics } = build(BASE);
    const missing = diagnostics.filter((d) => d.code === "missing-replicate");
    assert.equal(missing.length, 1);
    assert.match(missing[0]!.message, /wire=flux, gas=argon has 1 of 2 replicates: add 1 run/);
    assert.equal(BASE.slice(missing[0]!.span.start, missing[0]!.span.end).trim().split(/\s+/)[0], "r04");
  });

  it("marks pending and excluded runs with information and hint diagnostics on the right text", () => {
    const { diagnostics } = build(BASE);
    assert.deepEqual(found(diagnostics, BASE, "pending-run"), [{ at: "?", message: "Run r07 is pending: strength not measured yet.", severity: "information" }]);
    const excluded = found(diagnostics, BASE, "excluded-run");
    assert.equal(excluded.length, 1);
    assert.equal(excluded[0]!.severity, "hint");
    assert.match(excluded[0]!.message, /r08 is excluded from the analysis: clamp loose/);
  });

  it("reports unknown levels, unknown columns, duplicate runs, column counts and non-numbers on their cells", () => {
    const text = `response y
factor a levels low, high
runs id a b | y z
     r1 low 1 | 2.0 3
     r1 mid 1 | x 3
     r3 high | 2.5 1
`;
    const { diagnostics } = build(text);
    assert.deepEqual(found(diagnostics, text, "unknown-level").map((d) => d.at), ["mid"]);
    assert.match(found(diagnostics, text, "unknown-level")[0]!.message, /'mid' is not a level of factor 'a'.*\(declared: low, high\)/);
    assert.deepEqual(found(diagnostics, text, "unknown-factor").map((d) => d.at), ["b"]);
    assert.deepEqual(found(diagnostics, text, "unknown-response").map((d) => d.at), ["z"]);
    assert.deepEqual(found(diagnostics, text, "duplicate-run").map((d) => d.at), ["r1"]);
    const duplicate = diagnostics.find((d) => d.code === "duplicate-run")!;
    assert.equal(text.slice(duplicate.related![0]!.span.start, duplicate.related![0]!.span.end), "r1 low 1 | 2.0 3");
    assert.deepEqual(found(diagnostics, text, "not-a-number").map((d) => d.at), ["x"]);
    assert.deepEqual(found(diagnostics, text, "column-count").map((d) => d.at), ["r3 high | 2.5 1"]);
  });

  it("reports duplicate levels and names, unknown control levels and model terms", () => {
    const text = `response y
factor a levels p, q, p control r
factor a levels s, t
covariate y
plan
  model a, b, a x a
`;
    const { diagnostics } = build(text);
    assert.deepEqual(found(diagnostics, text, "duplicate-level").map((d) => d.at), ["p"]);
    assert.deepEqual(found(diagnostics, text, "duplicate-name").map((d) => d.at), ["a", "y"]);
    assert.deepEqual(found(diagnostics, text, "unknown-level").map((d) => d.at), ["r"]);
    assert.deepEqual(found(diagnostics, text, "unknown-factor").map((d) => d.at), ["b"]);
    assert.deepEqual(found(diagnostics, text, "invalid-setting").map((d) => d.at), ["a x a"]);
  });

  it("reports an empty cell with the interaction it affects", () => {
    const text = `response y
factor a levels p, q
factor b levels u, v
runs id a b | y
     r1 p u | 1
     r2 p v | 2
     r3 q u | 3
`;
    const { diagnostics } = build(text);
    const empty = found(diagnostics, text, "empty-cell");
    assert.equal(empty.length, 1);
    assert.equal(empty[0]!.at, "runs");
    assert.match(empty[0]!.message, /No run has a=q, b=v\. The a x b interaction cannot be fully estimated/);
  });

  it("validates plan settings and applies precedence: CLI override, then file, then defaults", () => {
    const text = `plan
  alpha 1.5
  replicates 2.5
  sums-of-squares IV
  confidence 0.9
`;
    const { design, diagnostics } = build(text);
    assert.deepEqual(found(diagnostics, text, "invalid-setting").map((d) => d.at), ["1.5", "2.5", "IV"]);
    assert.equal(design.settings.alpha, 0.05);
    assert.equal(design.settings.confidence, 0.9);
    const withFile = buildDesign(parseTrial("plan\n  alpha 0.01\n  sums-of-squares I\n"), { alpha: 0.1, ssType: "II" }, {});
    assert.equal(withFile.design.settings.alpha, 0.01);
    assert.equal(withFile.design.settings.ssType, "I");
    const withFlag = buildDesign(parseTrial("plan\n  alpha 0.01\n"), { alpha: 0.1 }, { alpha: 0.2, ssType: "II" });
    assert.equal(withFlag.design.settings.alpha, 0.2);
    assert.equal(withFlag.design.settings.ssType, "II");
    assert.equal(buildDesign(parseTrial(""), { alpha: 0.1 }).design.settings.alpha, 0.1);
  });

  it("puts covariates and blocks before the crossed fixed factors in the default model", () => {
    const text = `response y
covariate hum
factor lot levels l1, l2 as block
factor a levels p, q
factor b levels u, v
`;
    assert.deepEqual(build(text).design.terms.map((t) => t.name), ["hum", "lot", "a", "b", "a x b"]);
  });

  it("caps repeated diagnostics of one code and summarises the rest", () => {
    const rows = Array.from({ length: 250 }, (_, i) => `  r${i} p | ?`).join("\n");
    const text = `response y\nfactor a levels p, q\nruns id a | y\n${rows}\n`;
    const pending = build(text).diagnostics.filter((d) => d.code === "pending-run");
    assert.equal(pending.length, 201);
    assert.equal(pending[200]!.message, "50 more 'pending-run' diagnostics like the ones above are not listed.");
  });
});
