/**
 * How the engine may do its work, as opposed to what it computes: results never depend on these (tests
 * compare both ways). The CLI passes them; the editor's server uses the defaults.
 */
import type { QuickPassContinuation } from "../../../grammar/src/plain-runs-body.js";
import type { LeveneTests } from "../stats/checks/levene.js";
import type { GroupAccumulators, Grouping } from "../stats/linear-model/group-means.js";
import type { PlainPartHelper } from "./read-plain-runs.js";

export interface EngineOptions {
  /** Reads the second half of a large plain runs table on another thread (the CLI's worker). */
  readonly plainPartHelper?: PlainPartHelper;
  /** The parser's quick pass over the text's second half, made on another thread (the CLI's worker). */
  readonly quickPassContinuation?: QuickPassContinuation;
  /** Memory another thread can read (a SharedArrayBuffer), for the arrays `analysisHelper` is given. */
  readonly sharedMemory?: (bytes: number) => ArrayBufferLike;
  /** Runs parts of a large file's analysis on another thread while this one goes on (the CLI's worker). */
  readonly analysisHelper?: AnalysisHelper;
}

/** The arguments of `leveneTests` (levene.ts) without totals; `y` and `codes` in `sharedMemory`. */
export interface VarianceTestsJob {
  readonly y: Float64Array;
  readonly codes: Int32Array;
  readonly count: number;
}

/** The arguments of `accumulateGroupings` (group-means.ts); every array in `sharedMemory`. */
export interface GroupAccumulatorsJob {
  readonly y: Float64Array;
  readonly groupings: readonly Grouping[];
}

/**
 * Each method starts a computation on the other thread and returns the function that waits for its
 * result (undefined when the other thread failed), or undefined when it cannot start.
 */
export interface AnalysisHelper {
  /** `leveneTests` of the job. */
  startVarianceTests(job: VarianceTestsJob): (() => LeveneTests | undefined) | undefined;
  /** `accumulateGroupings` of the job. */
  startGroupAccumulators(job: GroupAccumulatorsJob): (() => GroupAccumulators | undefined) | undefined;
}
