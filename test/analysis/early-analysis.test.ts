/**
 * Parts of a large file's analysis started on another thread (early-analysis.ts): the level means' passes
 * and the variance tests give the results this thread computes itself, the tests are taken only for
 * exactly the cells they were started for, and the groups of those cells use the codes made for them. The
 * other thread is played here by a helper that runs the same functions on this thread (the CLI's worker is
 * tested in test/cli/launcher.test.ts).
 */
import assert from "node:assert/strict";
import { parseTrial } from "../../grammar/src/parse.js";
import { analyzeParsed } from "../../server/src/analysis/analyze-document.js";
import { crossedCodes, startVarianceTests, takeVarianceTests, ELSEWHERE_FROM } from "../../server/src/analysis/early-analysis.js";
import type { EngineOptions, GroupAccumulatorsJob, VarianceTestsJob } from "../../server/src/analysis/engine-options.js";
import { plainColumns } from "../../server/src/analysis/read-plain-runs.js";
import { leveneTests } from "../../server/src/stats/checks/levene.js";
import { accumulateGroupings } from "../../server/src/stats/linear-model/group-means.js";

/** An engine whose "other thread" runs here, keeping the jobs it was given. */
function sameThreadEngine(): EngineOptions & { jobs: VarianceTestsJob[]; groupJobs: GroupAccumulatorsJob[] } {
  const jobs: VarianceTestsJob[] = [];
  const groupJobs: GroupAccumulatorsJob[] = [];
  return {
    jobs,
    groupJobs,
    sharedMemory: (bytes) => new SharedArrayBuffer(bytes),
    // The table's columns in shared memory, read on this thread (as the CLI's reader makes them).
    plainPartHelper: { columns: (kinds, rows) => plainColumns(kinds, rows, (bytes) => new SharedArrayBuffer(bytes)), start: () => undefined },
    analysisHelper: {
      startVarianceTests(job) {
        jobs.push(job);
        const tests = leveneTests(job.y, job.codes, job.count);
        return () => tests;
      },
      startGroupAccumulators(job) {
        groupJobs.push(job);
        const accumulators = accumulateGroupings(job.y, job.groupings);
        return () => accumulators;
      },
    },
  };
}

describe("variance tests started early on another thread", () => {
  it("give this thread's own means, tables and checks, for the cells of the fixed factors in the model", function () {
    this.timeout(60000);
    // Invented: spread growing with the level of a, a random lot factor (not in the cells).
    const rows: string[] = [];
    const n = ELSEWHERE_FROM + 2000;
    for (let i = 0; i < n; i++) {
      const a = i % 3;
      const y = (20 + a + ((i * 7919) % 101) / (50 - 10 * a)).toFixed(2);
      rows.push(`  r${i + 1} a${a + 1} ${["low", "high"][(i >> 1) % 2]} L${(i % 5) + 1} | ${y}\n`);
    }
    const text = `response y unit mm\nfactor a levels a1, a2, a3\nfactor b levels low, high\nfactor lot levels L1, L2, L3, L4, L5 as random\nruns id a b lot | y\n${rows.join("")}`;
    const file = parseTrial(text);
    const engine = sameThreadEngine();
    const early = analyzeParsed(file, {}, {}, engine);
    const alone = analyzeParsed(file);
    assert.equal(engine.jobs.length, 1, "one variance job: the cells of a x b");
    // The level means of a and b (not of the random lot) and the cells of a x b, in one job.
    assert.deepEqual(engine.groupJobs.map((job) => job.groupings.map((g) => g.groupCount)), [[3, 2, 6]]);
    assert.equal(engine.jobs[0]!.count, 6);
    assert.ok(engine.jobs[0]!.y.buffer instanceof SharedArrayBuffer && engine.jobs[0]!.codes.buffer instanceof SharedArrayBuffer);
    const checks = early.responses[0]!.checks!;
    assert.ok(checks.levene && checks.brownForsythe && checks.brownForsythe.p < 1e-6, "the planted unequal spread is found");
    assert.deepEqual(JSON.parse(JSON.stringify(early.responses)), JSON.parse(JSON.stringify(alone.responses)));
    assert.deepEqual(early.diagnostics, alone.diagnostics);
  });

  it("are taken only for the groups they were started for, and waited for in any case", () => {
    const y = new Float64Array(new SharedArrayBuffer(8 * ELSEWHERE_FROM));
    for (let i = 0; i < y.length; i++) y[i] = ((i * 7919) % 997) / 10;
    const shared = (values: number[]) => {
      const codes = new Int32Array(new SharedArrayBuffer(4 * y.length));
      for (let i = 0; i < y.length; i++) codes[i] = values[i % values.length]!;
      return codes;
    };
    const a = shared([0, 1, 2]);
    const b = shared([0, 1]);
    let starts = 0;
    let waited = 0;
    const engine: EngineOptions = {
      sharedMemory: (bytes) => new SharedArrayBuffer(bytes),
      analysisHelper: {
        startGroupAccumulators: () => undefined,
        startVarianceTests: (job) => {
          starts++;
          return () => {
            waited++;
            return leveneTests(job.y, job.codes, job.count);
          };
        },
      },
    };
    const cells = crossedCodes([a, b], [3, 2]);
    assert.deepEqual(Array.from(cells.subarray(0, 6)), [0, 3, 4, 1, 2, 5]);
    startVarianceTests(engine, y, [0, 1], [{ codes: a, levels: [0, 1, 2] }, { codes: b, levels: [0, 1] }]);
    // Other codes (one value changed): not taken, but waited for.
    const other = cells.slice();
    other[12345] = (other[12345]! + 1) % 6;
    assert.equal(takeVarianceTests(y, other, 6), undefined);
    assert.equal(waited, 1);
    // Taken once for the same codes, value for value.
    startVarianceTests(engine, y, [0, 1], [{ codes: a, levels: [0, 1, 2] }, { codes: b, levels: [0, 1] }]);
    assert.deepEqual(takeVarianceTests(y, cells.slice(), 6), leveneTests(y, cells, 6));
    assert.equal(takeVarianceTests(y, cells, 6), undefined, "a result is taken once");
    assert.equal(starts, 2);
    // Values not in shared memory, too few values, or no engine thread: nothing is started.
    startVarianceTests(engine, y.slice(), [0], [{ codes: a, levels: [0, 1, 2] }]);
    startVarianceTests(engine, y.subarray(0, 10), [0], [{ codes: a.subarray(0, 10), levels: [0, 1, 2] }]);
    startVarianceTests({}, y, [0], [{ codes: a, levels: [0, 1, 2] }]);
    assert.equal(starts, 2);
    assert.equal(waited, 2);
  });
});
