/**
 * The server's side of the analysis worker (analysis-worker.ts): one worker thread, started on first use,
 * that analyses versions of large documents in the order they are asked for. If the worker cannot start or
 * stops, every pending request is rejected and the next one starts a new worker; the document store then
 * analyses on the main thread as for a small document.
 */
import { Worker } from "node:worker_threads";
import type { VersionSummary, WorkerJob, WorkerReply } from "./analysis-worker-protocol.js";

export class AnalysisWorker {
  private worker: Worker | undefined;
  private nextId = 1;
  private readonly waiting = new Map<number, { resolve(summary: VersionSummary): void; reject(error: Error): void }>();

  /**
   * `script`: the worker's file (dist/analysis-worker.cjs beside the server bundle, or the compiled module in
   * tests); `onStart` is told each time a worker thread is started.
   */
  constructor(
    private readonly script: string | URL,
    private readonly onStart: () => void = () => undefined,
  ) {}

  /** The summary of one version, computed in the worker. */
  analyze(job: Omit<WorkerJob, "id">): Promise<VersionSummary> {
    return new Promise((resolve, reject) => {
      try {
        const worker = this.started();
        const id = this.nextId++;
        this.waiting.set(id, { resolve, reject });
        worker.postMessage({ ...job, id } satisfies WorkerJob);
      } catch (error) {
        reject(error instanceof Error ? error : new Error(String(error)));
      }
    });
  }

  /** Stops the worker; pending requests are rejected. */
  dispose(): void {
    const worker = this.worker;
    this.fail(new Error("the analysis worker was stopped"));
    void worker?.terminate();
  }

  private started(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(this.script);
    worker.on("message", (reply: WorkerReply) => {
      const waiter = this.waiting.get(reply.id);
      if (!waiter) return;
      this.waiting.delete(reply.id);
      if (reply.ok) waiter.resolve(reply.summary);
      else waiter.reject(new Error(reply.error));
    });
    worker.on("error", (error) => this.fail(error));
    worker.on("exit", (code) => {
      if (this.worker === worker) this.fail(new Error(`the analysis worker stopped (exit code ${code})`));
    });
    // An idle worker does not keep the server process alive.
    worker.unref();
    this.worker = worker;
    this.onStart();
    return worker;
  }

  private fail(error: Error): void {
    this.worker = undefined;
    const waiting = [...this.waiting.values()];
    this.waiting.clear();
    for (const w of waiting) w.reject(error);
  }
}
