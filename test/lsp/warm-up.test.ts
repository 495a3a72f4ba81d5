import { strict as assert } from "node:assert";
import { parseTrial } from "../../grammar/src/parse.js";
import { analyzeParsed } from "../../server/src/analysis/analyze-document.js";
import { warmUpDocument, warmUpEngine } from "../../server/src/lsp/warm-up.js";

describe("lsp: engine warm-up", () => {
  it("analyses an invented document that exercises the fit, the checks and the run diagnostics", () => {
    const analysis = analyzeParsed(parseTrial(warmUpDocument()));
    assert.equal(analysis.file.problems.length, 0, "the warm-up document parses cleanly");
    assert.equal(analysis.responses.length, 2);
    assert.ok(analysis.responses.every((r) => r.anova.length > 2), "both responses are fitted");
    const codes = new Set<string>(analysis.diagnostics.map((d) => d.code));
    for (const code of ["pending-run", "excluded-run", "missing-replicate"]) assert.ok(codes.has(code), `${code} is reported: ${[...codes].join(", ")}`);
  });

  it("runs the requested number of analyses, one per event-loop turn, and stops when cancelled", async () => {
    assert.equal(await warmUpEngine(3).done, 3);
    const stopped = warmUpEngine(1000);
    stopped.cancel();
    assert.ok((await stopped.done) <= 1, "a cancelled warm-up stops at its next turn");
  });
});
