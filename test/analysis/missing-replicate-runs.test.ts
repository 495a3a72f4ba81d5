/**
 * The missing-replicate quick fix draws from the planner's generator: for a seed, the order in which it
 * adds runs is the Fisher–Yates shuffle by `planRandom(seed)` (planning/seeded-random.ts, whose outputs are
 * pinned against the reference xoroshiro128+ in test/planning), so the fix and `trialbook plan` agree.
 */
import assert from "node:assert/strict";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { planMissingReplicateRuns } from "../../server/src/analysis/missing-replicate-runs.js";
import { planRandom, shuffleInPlace } from "../../server/src/planning/seeded-random.js";

// Invented: a coating bath, two factors, two replicates, one run made so far.
const text = (seed: number) =>
  `response gloss\nfactor temp levels cool, warm, hot\nfactor dwell levels short, long\nplan\n  replicates 2\n  seed ${seed}\nruns id temp dwell | gloss\n r01 cool short | 81.2\n`;

describe("analysis: missing-replicate runs use the planner's seeded generator", () => {
  for (const seed of [1, 4187, 2 ** 33 + 5]) {
    it(`adds the runs in the order planRandom(${seed}) shuffles them`, () => {
      const { design } = analyzeDocument(text(seed));
      const plan = planMissingReplicateRuns(design);
      assert.ok(plan.ok);
      assert.equal(plan.seed, seed);
      // Cells in mixed-radix order (temp slowest), each missing replicate once: cell 0 misses one run.
      const cells: number[] = [];
      for (let c = 0; c < 6; c++) for (let k = c === 0 ? 1 : 0; k < 2; k++) cells.push(c);
      shuffleInPlace(cells, planRandom(seed));
      const expected = cells.map((c) => [Math.floor(c / 2), c % 2]);
      assert.deepEqual(
        plan.runs.map((r) => r.levels),
        expected,
      );
      // No pending rows: every new run goes after the last row.
      assert.ok(plan.runs.every((r) => r.beforeRow === 1));
    });
  }
});
