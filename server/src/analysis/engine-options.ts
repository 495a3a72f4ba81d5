/**
 * How the engine may do its work, as opposed to what it computes: results never depend on these (tests
 * compare both ways). The CLI passes them; the editor's server uses the defaults.
 */
import type { PlainPartHelper } from "./read-plain-runs.js";

export interface EngineOptions {
  /** Reads the second half of a large plain runs table on another thread (the CLI's worker). */
  readonly plainPartHelper?: PlainPartHelper;
}
