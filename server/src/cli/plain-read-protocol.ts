/** What the CLI's main thread and its reading thread (plain-read-worker.ts) share and send each other. */
import type { PlainPart, PlainPartJob } from "../analysis/read-plain-runs.js";

/** Slots of the shared signal array. */
export const enum Signal {
  /** 1 once the worker runs. */
  Ready = 0,
  /** The sequence number of the last job answered. */
  Answered = 1,
  Length = 2,
}

/** Given to the worker when it starts (`workerData`). */
export interface PlainReadStart {
  /** The file's bytes (all ASCII: byte i is the text's character i). */
  readonly bytes: SharedArrayBuffer;
  /** `Signal` slots, in shared memory. */
  readonly signal: Int32Array;
  /** Jobs come in and answers go out on this port. */
  readonly port: import("node:worker_threads").MessagePort;
}

export interface PlainReadJobMessage {
  readonly sequence: number;
  readonly job: PlainPartJob;
}

export interface PlainReadAnswer {
  readonly sequence: number;
  /** Undefined when the part was declined; `error` when reading it failed. */
  readonly part?: PlainPart;
  readonly error?: string;
}
