/** What the CLI's main thread and its helper thread (helper-worker.ts) share and send each other. */
import type { PlainRunsBody } from "../../../grammar/src/plain-runs-body.js";
import type { GroupAccumulatorsJob, VarianceTestsJob } from "../analysis/engine-options.js";
import type { GroupAccumulators } from "../stats/linear-model/group-means.js";
import type { PlainPart, PlainPartJob } from "../analysis/read-plain-runs.js";
import type { LeveneTests } from "../stats/checks/levene.js";

/** Slots of the shared signal array. */
export const enum Signal {
  /** 1 once the worker runs. */
  Ready = 0,
  /** The sequence number of the last job answered. */
  Answered = 1,
  Length = 2,
}

/** Given to the worker when it starts (`workerData`). */
export interface HelperStart {
  /** The file's bytes (all ASCII: byte i is the text's character i). */
  readonly bytes: SharedArrayBuffer;
  /** `Signal` slots, in shared memory. */
  readonly signal: Int32Array;
  /** Jobs come in and answers go out on this port. */
  readonly port: import("node:worker_threads").MessagePort;
}

/**
 * Read a part of a plain runs table (`readPlainPart`), make the quick pass's facts from a line feed on, run
 * the variance tests (`leveneTests`) or the level means' passes (`accumulateGroupings`).
 */
export type HelperJobMessage =
  | { readonly kind: "part"; readonly sequence: number; readonly job: PlainPartJob }
  | { readonly kind: "tail"; readonly sequence: number; readonly at: number }
  | { readonly kind: "variance"; readonly sequence: number; readonly job: VarianceTestsJob }
  | { readonly kind: "groups"; readonly sequence: number; readonly job: GroupAccumulatorsJob };

export interface HelperAnswer {
  readonly sequence: number;
  /** A "part" job's part; absent when it was declined. */
  readonly part?: PlainPart;
  /** A "tail" job's facts; null when the text from there is not plain. */
  readonly facts?: PlainRunsBody | null;
  /** A "variance" job's tests. */
  readonly tests?: LeveneTests;
  /** A "groups" job's accumulators. */
  readonly accumulators?: GroupAccumulators;
  /** Set when the job failed (a bug): the main thread then does the work itself. */
  readonly error?: string;
}
