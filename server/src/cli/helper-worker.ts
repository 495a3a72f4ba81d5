/**
 * The CLI's helper thread (bundled to dist/helper-worker.cjs), working on the file's bytes in shared
 * memory while the main thread works on the first half (helper-thread.ts): the quick pass's facts
 * of the text's second half ("tail", while the main thread lexes), the later half of a large plain runs
 * table (`readPlainPart`, "part") into the same shared columns, then the level means' passes ("groups")
 * and the variance tests ("variance") of each response. It holds no state between jobs.
 */
import { workerData } from "node:worker_threads";
import { scanPlainRunsBody } from "../../../grammar/src/plain-runs-body.js";
import { readPlainPart } from "../analysis/read-plain-runs.js";
import { leveneTests } from "../stats/checks/levene.js";
import { accumulateGroupings } from "../stats/linear-model/group-means.js";
import { byteChunks } from "./byte-chunks.js";
import { type HelperAnswer, type HelperJobMessage, type HelperStart, Signal } from "./helper-protocol.js";

const { bytes, signal, port } = workerData as HelperStart;
// The main thread's text is the Latin-1 copy of these bytes, all ASCII: the same characters at the same offsets.
const load = byteChunks(new Uint8Array(bytes));

port.on("message", (message: HelperJobMessage) => {
  const sequence = message.sequence;
  let answer: HelperAnswer;
  try {
    if (message.kind === "tail") {
      // The text from the line feed at `at` on: its facts as the quick pass would find them there, with
      // the first row after `at` as the middle row (QuickPassContinuation in plain-runs-body.ts).
      const tail = Buffer.from(bytes, message.at).toString("latin1");
      answer = { sequence, facts: scanPlainRunsBody(tail, 0, tail.length, 0) ?? null };
    } else if (message.kind === "groups") {
      answer = { sequence, accumulators: accumulateGroupings(message.job.y, message.job.groupings) };
    } else if (message.kind === "variance") {
      // The same function on the same arrays (shared memory) as the main thread would call.
      const { y, codes, count } = message.job;
      answer = { sequence, tests: leveneTests(y, codes, count) };
    } else {
      const part = readPlainPart(load, message.job);
      answer = part ? { sequence, part } : { sequence };
      // The thread waits for the main thread's fit next: time to train the analysis code it will run.
      if (part) setImmediate(trainAnalysis);
    }
  } catch (error) {
    answer = { sequence, error: error instanceof Error ? error.message : String(error) };
  }
  port.postMessage(answer);
  // After the answer is on the port: the main thread wakes up and takes it synchronously.
  Atomics.store(signal, Signal.Answered, sequence);
  Atomics.notify(signal, Signal.Answered);
});
/**
 * Runs the level means' passes and the variance tests once on invented numbers (a formula, nothing
 * measured or kept), the same kinds of arrays as a large file's, so that the engine has optimised them
 * before the real jobs come: run cold on a million values, they took 60-70 ms here against about 35 when
 * trained, and the main thread waited for them (1M-run file, 2026-12-02). The thread is idle meanwhile
 * (it has read its half of the table; the main thread reads, then fits).
 */
let trained = false;
function trainAnalysis(): void {
  if (trained) return;
  trained = true;
  const n = 40_000;
  const y = new Float64Array(new SharedArrayBuffer(n * 8));
  const a = new Int32Array(new SharedArrayBuffer(n * 4));
  const b = new Int32Array(new SharedArrayBuffer(n * 4));
  const cells = new Int32Array(new SharedArrayBuffer(n * 4));
  for (let i = 0; i < n; i++) {
    a[i] = i % 4;
    b[i] = (i >> 2) % 3;
    cells[i] = a[i]! * 3 + b[i]!;
    y[i] = ((i * 7919) % 1009) / 100 + a[i]!;
  }
  accumulateGroupings(y, [
    { codes: a, groupCount: 4 },
    { codes: b, groupCount: 3 },
    { codes: a, groupCount: 12, within: { codes: b, levelCount: 3 } },
  ]);
  leveneTests(y, cells, 12);
}

Atomics.store(signal, Signal.Ready, 1);
Atomics.notify(signal, Signal.Ready);
