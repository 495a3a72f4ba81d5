/**
 * The CLI's helper thread (helper-thread.ts over the compiled worker): jobs give what the same functions
 * give on this thread, and their results can be waited for in any order.
 */
import assert from "node:assert/strict";
import { fileURLToPath } from "node:url";
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

  it("is not started without its script", () => {
    assert.equal(HelperThread.start("/no/such/helper-worker.cjs", new SharedArrayBuffer(16)), undefined);
  });
});
