/**
 * The CLI's second thread for large files (a worker, helper-worker.ts, on the file's bytes in shared
 * memory): the parser's quick pass over the text's second half (`QuickPassContinuation`), the second half
 * of a large plain runs table into the same shared columns as the main thread's half (`PlainPartHelper`
 * in read-plain-runs.ts), and each response's level means' passes and variance tests (`AnalysisHelper`,
 * early-analysis.ts). The main thread waits for each result synchronously (`Atomics.wait`), so the
 * engine stays a plain synchronous function; a job the thread cannot do is done on the main thread.
 *
 * Why: on a million-run file the reading alone was about 100 of 440 ms (2026-12-02), with a loop over the
 * table's bytes already near what one core does (docs/performance.md); a second core halves that and
 * takes passes of the analysis that do not depend on the fit. Only the CLI uses it: its file is read once
 * and its bytes can be put in shared memory as they are read. The thread starts while the file is read
 * and the parser is built, so its start-up (~20 ms of the other core) is paid before work is asked for.
 */
import { existsSync } from "node:fs";
import { MessageChannel, type MessagePort, receiveMessageOnPort, Worker } from "node:worker_threads";
import type { AnalysisHelper, GroupAccumulatorsJob, VarianceTestsJob } from "../analysis/engine-options.js";
import type { GroupAccumulators } from "../stats/linear-model/group-means.js";
import type { LeveneTests } from "../stats/checks/levene.js";
import { type PlainColumn, type PlainColumns, plainColumns, type PlainPart, type PlainPartHelper, type PlainPartJob } from "../analysis/read-plain-runs.js";
import type { PlainRunsBody, QuickPassContinuation } from "../../../grammar/src/plain-runs-body.js";
import { type HelperAnswer, type HelperJobMessage, type HelperStart, Signal } from "./helper-protocol.js";

/** `Omit` for each member of a union. */
type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;

/** Files from this size on get the thread: below it, a table reads in a few milliseconds. */
export const HELPER_THREAD_FROM_BYTES = 4 * 1024 * 1024;
/** A healthy worker runs within tens of milliseconds; one that has not after this long is not used. */
const READY_TIMEOUT_MS = 5_000;
/** The wait for an answer: generous (a part reads at about 0.1 µs a byte here), then the general path. */
const ANSWER_TIMEOUT_MS = 30_000;

export class HelperThread implements PlainPartHelper, AnalysisHelper {
  private sequence = 0;
  private broken = false;
  /** Answers received while waiting for another job's, kept until their own job is waited for. */
  private readonly early = new Map<number, HelperAnswer>();
  /** Parts asked for, parts the worker read, and its quick passes taken (for `TRIALBOOK_DEBUG_HELPER_THREAD`). */
  asked = 0;
  read = 0;
  tails = 0;
  variance = 0;
  groups = 0;

  private constructor(
    private readonly worker: Worker,
    private readonly port: MessagePort,
    private readonly signal: Int32Array,
  ) {}

  /** Starts the worker `script` on `bytes`; undefined when it cannot be started (then nothing changes but speed). */
  static start(script: string, bytes: SharedArrayBuffer): HelperThread | undefined {
    if (!existsSync(script)) return undefined;
    try {
      const signal = new Int32Array(new SharedArrayBuffer(Signal.Length * 4));
      const { port1, port2 } = new MessageChannel();
      const start: HelperStart = { bytes, signal, port: port2 };
      const worker = new Worker(script, { workerData: start, transferList: [port2] });
      // It must not keep the process alive, and a failure of it only costs speed.
      worker.unref();
      const thread = new HelperThread(worker, port1, signal);
      worker.on("error", () => {
        thread.broken = true;
      });
      return thread;
    } catch {
      return undefined;
    }
  }

  columns(kinds: readonly PlainColumn[], rowCount: number): PlainColumns | undefined {
    return this.broken ? undefined : plainColumns(kinds, rowCount, (size) => new SharedArrayBuffer(size));
  }

  start(job: PlainPartJob): (() => PlainPart | undefined) | undefined {
    if (!this.broken) this.asked++;
    return this.post({ kind: "part", job }, (answer) => answer.part, () => this.read++);
  }

  /**
   * Asks now for the quick pass's facts of the text from the line feed at `at` on (the text, of `length`
   * characters, is the Latin-1 copy of the shared bytes); the parser takes them when its quick pass gets
   * there.
   */
  continuation(at: number, length: number): QuickPassContinuation | undefined {
    const wait = this.post({ kind: "tail", at }, (answer) => (answer.facts === undefined ? undefined : { facts: answer.facts }), () => this.tails++);
    if (!wait) return undefined;
    let taken: { facts: PlainRunsBody | undefined | null } | undefined;
    return {
      at,
      length,
      facts: () => {
        if (!taken) {
          // No answer: not available (null, the parser reads on); an answer of null: not plain (undefined).
          const answer = wait();
          taken = { facts: answer === undefined ? null : (answer.facts ?? undefined) };
        }
        return taken.facts;
      },
    };
  }

  /** Shared memory, for arrays the worker will read. */
  readonly sharedMemory = (bytes: number): SharedArrayBuffer => new SharedArrayBuffer(bytes);

  startGroupAccumulators(job: GroupAccumulatorsJob): (() => GroupAccumulators | undefined) | undefined {
    return this.post({ kind: "groups", job }, (answer) => answer.accumulators, () => this.groups++);
  }

  startVarianceTests(job: VarianceTestsJob): (() => LeveneTests | undefined) | undefined {
    return this.post({ kind: "variance", job }, (answer) => answer.tests, () => this.variance++);
  }

  /** Posts a job; the function returned waits for its answer and takes its result (`counted` when there is one). */
  private post<T>(message: DistributiveOmit<HelperJobMessage, "sequence">, take: (answer: HelperAnswer) => T | undefined, counted: () => void): (() => T | undefined) | undefined {
    if (this.broken) return undefined;
    const sequence = ++this.sequence;
    this.port.postMessage({ ...message, sequence } as HelperJobMessage);
    return () => {
      const answer = this.answer(sequence);
      const result = answer ? take(answer) : undefined;
      if (result !== undefined) counted();
      return result;
    };
  }

  /** Stops the worker (a command calls this when it is done with its files). */
  close(): void {
    void this.worker.terminate();
  }

  /**
   * Waits for the answer to job `sequence`; undefined when a worker never started or never answered
   * (then its part is declined and the whole table takes the general path; its tail is read here) and
   * it is not used again.
   */
  private answer(sequence: number): HelperAnswer | undefined {
    if (Atomics.load(this.signal, Signal.Ready) !== 1) Atomics.wait(this.signal, Signal.Ready, 0, READY_TIMEOUT_MS);
    if (Atomics.load(this.signal, Signal.Ready) !== 1) {
      this.broken = true;
      return undefined;
    }
    const deadline = Date.now() + ANSWER_TIMEOUT_MS;
    for (;;) {
      const received = this.early.get(sequence) ?? (receiveMessageOnPort(this.port)?.message as HelperAnswer | undefined);
      if (received) {
        this.early.delete(sequence);
        if (received.sequence !== sequence) {
          // Another job's answer, kept for when that job is waited for (its results are small; one never
          // waited for, as a response that returns early leaves, goes with the thread).
          this.early.set(received.sequence, received);
          continue;
        }
        if (received.error !== undefined) this.broken = true;
        return received;
      }
      const left = deadline - Date.now();
      if (left <= 0 || this.broken) {
        this.broken = true;
        return undefined;
      }
      // The worker posts its answer before it writes the answer's number here: once the number is there, the
      // answer is on the port; until then, sleep until the number changes.
      const seen = Atomics.load(this.signal, Signal.Answered);
      if (seen < sequence) Atomics.wait(this.signal, Signal.Answered, seen, left);
    }
  }
}

/** With `TRIALBOOK_DEBUG_HELPER_THREAD=1`: says on stderr whether a file's table was read on two threads. */
export function reportHelperThread(env: Readonly<Record<string, string | undefined>>, stderr: (text: string) => void, thread: HelperThread | undefined): void {
  if (env.TRIALBOOK_DEBUG_HELPER_THREAD !== "1") return;
  stderr(`helper thread: ${thread ? `${thread.read} of ${thread.asked} parts read, ${thread.tails} quick pass taken, ${thread.variance} variance tests, ${thread.groups} level means` : "not started"}\n`);
}
