/**
 * How the engine may do its work, as opposed to what it computes: results never depend on these (tests
 * compare both ways). The CLI passes them; the editor's server uses the defaults.
 */
import type { QuickPassContinuation } from "../../../grammar/src/plain-runs-body.js";
import type { PlainPartHelper } from "./read-plain-runs.js";

export interface EngineOptions {
  /** Reads the second half of a large plain runs table on another thread (the CLI's worker). */
  readonly plainPartHelper?: PlainPartHelper;
  /** The parser's quick pass over the text's second half, made on another thread (the CLI's worker). */
  readonly quickPassContinuation?: QuickPassContinuation;
}
