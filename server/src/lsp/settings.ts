/**
 * Editor settings under `trialbook.*`. They only supply defaults: what the file's `plan` says wins over
 * them (design brief §3). Values of the wrong type or out of range are ignored, never an error.
 */
import type { AnalysisSettings } from "../analysis/build-design.js";
import type { SumsOfSquaresType } from "../analysis/design.js";

/** The settings the server reads, after validation. */
export interface ServerSettings {
  readonly alpha?: number;
  readonly sumsOfSquares?: SumsOfSquaresType;
  readonly confidence?: number;
  readonly powerTarget?: number;
  /** Milliseconds between the last edit and the analysis; 0 analyses on the next turn of the event loop. */
  readonly analysisDelay: number;
}

/** The analysis delay used when the editor does not set `trialbook.analysisDelay`. */
export const DEFAULT_ANALYSIS_DELAY = 150;

/** Settings before the editor has said anything. */
export const DEFAULT_SERVER_SETTINGS: ServerSettings = { analysisDelay: DEFAULT_ANALYSIS_DELAY };

const isProbability = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v) && v > 0 && v < 1;

/**
 * Reads the `trialbook` section as the editor sent it (an object, or anything else) on top of `base`:
 * a key that is missing or invalid keeps the value from `base`.
 */
export function readSettings(raw: unknown, base: ServerSettings = DEFAULT_SERVER_SETTINGS): ServerSettings {
  if (raw === null || typeof raw !== "object") return base;
  const r = raw as Record<string, unknown>;
  const delay = r.analysisDelay;
  const ss = r.sumsOfSquares;
  const alpha = isProbability(r.alpha) ? r.alpha : base.alpha;
  const confidence = isProbability(r.confidence) ? r.confidence : base.confidence;
  const powerTarget = isProbability(r.powerTarget) ? r.powerTarget : base.powerTarget;
  const sumsOfSquares = ss === "I" || ss === "II" || ss === "III" ? ss : base.sumsOfSquares;
  return {
    analysisDelay: typeof delay === "number" && Number.isFinite(delay) && delay >= 0 ? Math.min(delay, 60_000) : base.analysisDelay,
    ...(alpha !== undefined ? { alpha } : {}),
    ...(confidence !== undefined ? { confidence } : {}),
    ...(powerTarget !== undefined ? { powerTarget } : {}),
    ...(sumsOfSquares !== undefined ? { sumsOfSquares } : {}),
  };
}

/** The engine's defaults (`analyzeDocument`'s second argument) from the editor settings. */
export function toAnalysisDefaults(settings: ServerSettings): AnalysisSettings {
  return {
    ...(settings.alpha !== undefined ? { alpha: settings.alpha } : {}),
    ...(settings.confidence !== undefined ? { confidence: settings.confidence } : {}),
    ...(settings.powerTarget !== undefined ? { power: settings.powerTarget } : {}),
    ...(settings.sumsOfSquares !== undefined ? { ssType: settings.sumsOfSquares } : {}),
  };
}
