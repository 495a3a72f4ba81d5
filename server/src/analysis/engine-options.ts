/**
 * How the engine may do its work, as opposed to what it computes: results never depend on these (tests
 * compare both ways). The CLI passes them; the editor's server uses the defaults.
 */
import type { QuickPassContinuation } from "../../../grammar/src/plain-runs-body.js";
import type { LeveneTests } from "../stats/checks/levene.js";
import type { PlainPartHelper } from "./read-plain-runs.js";

export interface EngineOptions {
  /** Reads the second half of a large plain runs table on another thread (the CLI's worker). */
  readonly plainPartHelper?: PlainPartHelper;
  /** The parser's quick pass over the text's second half, made on another thread (the CLI's worker). */
  readonly quickPassContinuation?: QuickPassContinuation;
  /** Memory another thread can read (a SharedArrayBuffer), for the arrays `varianceTests` is given. */
  readonly sharedMemory?: (bytes: number) => ArrayBufferLike;
  /** Runs `leveneTests` on another thread while this one goes on (the CLI's worker). */
  readonly varianceTests?: VarianceTestsHelper;
}

/** The arguments of `leveneTests` (levene.ts) without totals; `y` and `codes` in `sharedMemory`. */
export interface VarianceTestsJob {
  readonly y: Float64Array;
  readonly codes: Int32Array;
  readonly count: number;
}

export interface VarianceTestsHelper {
  /**
   * Starts `leveneTests` of `job` on the other thread; returns the function that waits for its result
   * (undefined when the other thread failed), or undefined when it cannot start.
   */
  startVarianceTests(job: VarianceTestsJob): (() => LeveneTests | undefined) | undefined;
}
