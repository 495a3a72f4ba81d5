/**
 * The CLI's helper thread (helper-thread.ts over the compiled worker): jobs give what the same functions
 * give on this thread, and their results can be waited for in any order.
 */
import assert from "node:assert/strict";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { parseTrial } from "../../grammar/src/parse.js";
import { analyzeParsed } from "../../server/src/analysis/analyze-document.js";
import { HelperThread } from "../../server/src/cli/helper-thread.js";
import { leveneTests } from "../../server/src/stats/checks/levene.js";
import { accumulateGroupings, type Grouping } from "../../server/src/stats/linear-model/group-means.js";

const SCRIPT = fileURLToPath(new URL("../../server/src/cli/helper-worker.js", import.meta.url));

describe("cli: the helper thread", () => {
  it("answers the level means' passes and the variance tests as this thread computes them, waited for in any order", function () {
    this.timeout(20000);
    const thread = HelperThread.start(SCRIPT, new SharedArrayBuffer(16))!;
    assert.ok(thread, "the worker starts");
    try {
      const n = 50_000;
      const y = new Float64Array(thread.sharedMemory(n * 8));
      const a = new Int32Array(thread.sharedMemory(n * 4));
      const b = new Int32Array(thread.sharedMemory(n * 4));
      // Invented values (a formula).
      for (let i = 0; i < n; i++) {
        a[i] = i % 3;
        b[i] = (i >> 1) % 2;
        y[i] = ((i * 7919) % 1013) / 97 + 0.5 * a[i]!;
      }
      const groupings: Grouping[] = [
        { codes: a, groupCount: 3 },
        { codes: b, groupCount: 2 },
        { codes: a, groupCount: 6, within: { codes: b, levelCount: 2 } },
      ];
      const cells = new Int32Array(thread.sharedMemory(n * 4));
      for (let i = 0; i < n; i++) cells[i] = a[i]! * 2 + b[i]!;
      const means = thread.startGroupAccumulators({ y, groupings })!;
      const tests = thread.startVarianceTests({ y, codes: cells, count: 6 })!;
      const moreTests = thread.startVarianceTests({ y, codes: a, count: 3 })!;
      // Waited for last to first: each answer reaches its own job.
      assert.deepEqual(moreTests(), leveneTests(y, a, 3));
      assert.deepEqual(tests(), leveneTests(y, cells, 6));
      assert.deepEqual(means(), accumulateGroupings(y, groupings));
      assert.equal(thread.variance, 2);
      assert.equal(thread.groups, 1);
    } finally {
      thread.close();
    }
  });

  it("a thread that fails every job changes nothing but speed: the main thread does the work", function () {
    this.timeout(60000);
    // A stand-in worker that starts and answers every job with an error (as a bug in a job would).
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-helper-"));
    const script = path.join(dir, "failing-worker.mjs");
    fs.writeFileSync(
      script,
      [
        'import { workerData } from "node:worker_threads";',
        "const { signal, port } = workerData;",
        'port.on("message", (m) => { port.postMessage({ sequence: m.sequence, error: "failed on purpose" }); Atomics.store(signal, 1, m.sequence); Atomics.notify(signal, 1); });',
        "Atomics.store(signal, 0, 1); Atomics.notify(signal, 0);",
      ].join("\n"),
    );
    // Invented runs, large enough for every job (table halves, quick pass, means, variance tests).
    const rows: string[] = [];
    for (let i = 0; i < 120_000; i++) rows.push(`  r${i + 1} a${(i % 3) + 1} b${((i >> 1) % 2) + 1} | ${(20 + (i % 3) + ((i * 7919) % 101) / 50).toFixed(2)}\n`);
    const text = `response y unit mm\nfactor a levels a1, a2, a3\nfactor b levels b1, b2\nruns id a b | y\n${rows.join("")}`;
    const bytes = new SharedArrayBuffer(text.length);
    Buffer.from(bytes).write(text, "latin1");
    const thread = HelperThread.start(script, bytes)!;
    try {
      const at = text.indexOf("\n", text.length >> 1);
      const continuation = thread.continuation(at, text.length)!;
      const file = parseTrial(text, { continuation });
      const engine = { plainPartHelper: thread, sharedMemory: thread.sharedMemory, analysisHelper: thread };
      const helped = analyzeParsed(file, {}, {}, engine);
      const alone = analyzeParsed(parseTrial(text));
      assert.deepEqual(helped.diagnostics, alone.diagnostics);
      assert.deepEqual(JSON.parse(JSON.stringify(helped.responses)), JSON.parse(JSON.stringify(alone.responses)));
      assert.equal(helped.responses[0]!.n, 120_000);
      // The first failure marks the thread broken: nothing more is asked of it.
      assert.deepEqual([thread.tails, thread.read, thread.groups, thread.variance], [0, 0, 0, 0]);
      assert.equal(thread.startVarianceTests({ y: new Float64Array(1), codes: new Int32Array(1), count: 1 }), undefined);
    } finally {
      thread.close();
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("is not started without its script", () => {
    assert.equal(HelperThread.start("/no/such/helper-worker.cjs", new SharedArrayBuffer(16)), undefined);
  });
});
