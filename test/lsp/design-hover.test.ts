import assert from "node:assert/strict";
import fs from "node:fs";
import { responseHover } from "../../server/src/lsp/hover.js";
import { formatNumber } from "../../server/src/text/format-number.js";
import { open } from "./helpers.js";

/**
 * Hovers of the special designs show what the engine computed (the numbers are checked against R in
 * test/stats/designs/ and test/analysis/): the error stratum each term is tested against, sphericity with
 * its epsilons, variance components.
 */
describe("lsp: response hovers of special designs", () => {
  it("repeated measures: the tested-against column and the sphericity line", () => {
    const doc = open(fs.readFileSync("samples/repeated-measures.trial", "utf8"));
    const r = doc.analysis.responses[0]!;
    const hover = responseHover(doc, r.name);
    assert.match(hover, /\| Source \| df \| SS \| MS \| F \| p \| Tested against \|/);
    assert.match(hover, /\| coating \| 2 \| .* \| coating x operator \|/);
    const s = r.sphericity![0]!;
    assert.ok(hover.includes(`epsilon GG = ${formatNumber(s.greenhouseGeisser.epsilon, 3)}, HF = ${formatNumber(s.huynhFeldt.epsilon, 3)}`), hover);
    assert.ok(hover.includes("F(2, 8)"), "the coating verdict uses its stratum's df");
  });

  it("random factors: the variance components", () => {
    const doc = open(fs.readFileSync("samples/batch-variation.trial", "utf8"));
    const r = doc.analysis.responses[0]!;
    const hover = responseHover(doc, r.name);
    const batch = r.varianceComponents!.find((v) => v.source === "batch")!;
    assert.ok(hover.includes("Variance component"), hover);
    assert.ok(hover.includes(formatNumber(batch.variance)), hover);
  });
});
