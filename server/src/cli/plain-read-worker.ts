/**
 * The CLI's reading thread (bundled to dist/plain-read-worker.cjs): reads the later half of a large plain
 * runs table (`readPlainPart`) from the file's bytes in shared memory while the main thread reads the
 * first half into the same shared columns (plain-read-thread.ts). It holds no state between jobs.
 */
import { workerData } from "node:worker_threads";
import { readPlainPart } from "../analysis/read-plain-runs.js";
import { byteChunks } from "./byte-chunks.js";
import { type PlainReadAnswer, type PlainReadJobMessage, type PlainReadStart, Signal } from "./plain-read-protocol.js";

const { bytes, signal, port } = workerData as PlainReadStart;
// The main thread's text is the Latin-1 copy of these bytes, all ASCII: the same characters at the same offsets.
const load = byteChunks(new Uint8Array(bytes));

port.on("message", ({ sequence, job }: PlainReadJobMessage) => {
  let answer: PlainReadAnswer;
  try {
    const part = readPlainPart(load, job);
    answer = part ? { sequence, part } : { sequence };
  } catch (error) {
    answer = { sequence, error: error instanceof Error ? error.message : String(error) };
  }
  port.postMessage(answer);
  // After the answer is on the port: the main thread wakes up and takes it synchronously.
  Atomics.store(signal, Signal.Answered, sequence);
  Atomics.notify(signal, Signal.Answered);
});
Atomics.store(signal, Signal.Ready, 1);
Atomics.notify(signal, Signal.Ready);
