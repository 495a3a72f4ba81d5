import { strict as assert } from "node:assert";
import { parseTrial } from "../../grammar/src/parse.js";
import { analyzeParsed } from "../../server/src/analysis/analyze-document.js";
import { QUIET_MS, WARM_UP_LOG_PREFIX, warmUpDocument, warmUpEngine } from "../../server/src/lsp/warm-up.js";
import { ensureServerBundle, ProtocolClient } from "./protocol-client.js";

describe("lsp: engine warm-up", () => {
  before(async function () {
    this.timeout(120_000);
    await ensureServerBundle();
  });

  it("analyses an invented document that exercises the fit, the checks and the run diagnostics", () => {
    const analysis = analyzeParsed(parseTrial(warmUpDocument()));
    assert.equal(analysis.file.problems.length, 0, "the warm-up document parses cleanly");
    assert.equal(analysis.responses.length, 2);
    assert.ok(analysis.responses.every((r) => r.anova.length > 2), "both responses are fitted");
    const codes = new Set<string>(analysis.diagnostics.map((d) => d.code));
    for (const code of ["pending-run", "excluded-run", "missing-replicate"]) assert.ok(codes.has(code), `${code} is reported: ${[...codes].join(", ")}`);
  });

  it("runs the requested number of analyses, one per event-loop turn, and stops when cancelled", async () => {
    const three = await warmUpEngine({ maxAnalyses: 3 }).done;
    assert.equal(three.analyses, 3);
    assert.ok(three.ms > 0, `time spent is reported (${three.ms} ms)`);
    const stopped = warmUpEngine({ maxAnalyses: 1000 });
    stopped.cancel();
    assert.ok((await stopped.done).analyses <= 1, "a cancelled warm-up stops at its next turn");
  });

  it("stops at its time budget", async () => {
    assert.equal((await warmUpEngine({ budgetMs: 0, maxAnalyses: 1000 }).done).analyses, 0, "no budget, no analysis");
    // The budget is checked before each analysis: it is spent, and the count stays far below the maximum
    // (1,000 analyses of the 160- and 800-run documents take seconds, not 30 ms, on any machine).
    const summary = await warmUpEngine({ budgetMs: 30, maxAnalyses: 1000 }).done;
    assert.ok(summary.ms >= 30, `spent ${summary.ms} ms`);
    assert.ok(summary.analyses >= 1 && summary.analyses < 1000, `${summary.analyses} analyses`);
  });

  it("waits while the user is busy and goes on when they stop", async () => {
    let busy = true;
    const run = warmUpEngine({ maxAnalyses: 2, busy: () => busy });
    let finished = false;
    void run.done.then(() => (finished = true));
    await new Promise((resolve) => setTimeout(resolve, QUIET_MS * 2 + 50));
    assert.equal(finished, false, "nothing ran while busy");
    busy = false;
    assert.equal((await run.done).analyses, 2);
  });

  it("the server logs when the warm-up has finished", async () => {
    const client = await ProtocolClient.start();
    try {
      const line = await client.waitForLog((m) => m.startsWith(WARM_UP_LOG_PREFIX));
      assert.match(line, /^engine warm-up finished: [1-9][0-9]* analyses, [0-9]+ ms$/);
    } finally {
      await client.stop();
    }
  });
});
