/**
 * Effect sizes of the terms of a fixed-effects ANOVA (Olejnik & Algina 2003, "Generalized eta and omega
 * squared statistics", Psychological Methods 8(4), 434-447, Table 1 for designs whose factors are all
 * manipulated):
 *   eta^2          = SS_effect / SS_total
 *   partial eta^2  = SS_effect / (SS_effect + SS_error)
 *   omega^2        = (SS_effect - df_effect MS_error) / (SS_total + MS_error)
 * Omega squared may be negative when the effect is smaller than chance; it is reported as computed.
 */

import type { TermEffectSize } from "./types.js";

/** Effect sizes of one term; a value whose denominator is zero or whose MS_error is undefined is null. */
export function termEffectSize(
  source: string,
  termSs: number,
  termDf: number,
  totalSs: number,
  residualSs: number,
  residualMs: number | null,
): TermEffectSize {
  const etaSquared = totalSs > 0 ? termSs / totalSs : null;
  const partialDenominator = termSs + residualSs;
  const partialEtaSquared = partialDenominator > 0 ? termSs / partialDenominator : null;
  const omegaDenominator = residualMs === null ? 0 : totalSs + residualMs;
  const omegaSquared =
    residualMs !== null && omegaDenominator > 0 ? (termSs - termDf * residualMs) / omegaDenominator : null;
  return { source, etaSquared, partialEtaSquared, omegaSquared };
}
