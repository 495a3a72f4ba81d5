/**
 * The server's side of the analysis worker (analysis-worker.ts): one worker thread, started on first use,
 * that analyses one version at a time. Versions asked for meanwhile wait here, and a newer version of the
 * same document replaces a waiting older one (whose request is rejected with `SupersededError`): typing in
 * a very large file never queues up analyses of versions already gone. If the worker cannot start or
 * stops, every pending request is rejected and the next one starts a new worker; the document store then
 * analyses on the main thread as for a small document.
 */
import { Worker } from "node:worker_threads";
import type { VersionSummary, WorkerJob, WorkerReply } from "./analysis-worker-protocol.js";

/** The request was for a version that a newer one of the same document replaced before it started. */
export class SupersededError extends Error {
  constructor(uri: string, version: number) {
    super(`version ${version} of ${uri} was replaced by a newer one before its analysis started`);
    this.name = "SupersededError";
  }
}

interface Pending {
  readonly job: WorkerJob;
  resolve(summary: VersionSummary): void;
  reject(error: Error): void;
}

export class AnalysisWorker {
  private worker: Worker | undefined;
  private nextId = 1;
  /** The job the worker is analysing, if any. */
  private running: Pending | undefined;
  /** Jobs not yet sent, in the order asked, at most one per document. */
  private queued: Pending[] = [];
  /** Workers that stopped in a row without answering; after two, no more are started (a broken install). */
  private failuresInARow = 0;
  private broken: Error | undefined;

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
    if (this.broken) return Promise.reject(this.broken);
    return new Promise((resolve, reject) => {
      const older = this.queued.find((p) => p.job.uri === job.uri);
      if (older) {
        this.queued = this.queued.filter((p) => p !== older);
        older.reject(new SupersededError(older.job.uri, older.job.version));
      }
      this.queued.push({ job: { ...job, id: this.nextId++ }, resolve, reject });
      this.sendNext();
    });
  }

  /** Stops the worker; pending requests are rejected. */
  dispose(): void {
    const worker = this.worker;
    this.worker = undefined;
    this.fail(new Error("the analysis worker was stopped"));
    void worker?.terminate();
  }

  /** Sends the oldest waiting job when the worker is free. */
  private sendNext(): void {
    if (this.running || this.queued.length === 0) return;
    const next = this.queued.shift()!;
    try {
      const worker = this.started();
      this.running = next;
      worker.postMessage(next.job);
    } catch (error) {
      next.reject(error instanceof Error ? error : new Error(String(error)));
      this.sendNext();
    }
  }

  private started(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(this.script);
    worker.on("message", (reply: WorkerReply) => {
      const done = this.running;
      if (!done || done.job.id !== reply.id) return;
      this.running = undefined;
      this.failuresInARow = 0;
      if (reply.ok) done.resolve(reply.summary);
      else done.reject(new Error(reply.error));
      this.sendNext();
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
    if (this.worker && ++this.failuresInARow >= 2) this.broken = error;
    this.worker = undefined;
    const pending = [...(this.running ? [this.running] : []), ...this.queued];
    this.running = undefined;
    this.queued = [];
    for (const p of pending) p.reject(error);
  }
}
