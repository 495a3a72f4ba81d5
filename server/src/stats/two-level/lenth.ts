/**
 * Lenth's (1989) method for unreplicated two-level designs ("Quick and easy analysis of unreplicated
 * factorials", Technometrics 31, 469-473). For m effect estimates c_1..c_m:
 *   s0  = 1.5 · median |c_j|
 *   PSE = 1.5 · median { |c_j| : |c_j| < 2.5 · s0 }       (pseudo standard error)
 *   d   = m / 3                                           (its nominal degrees of freedom)
 *   ME  = t_{1-α/2, d} · PSE                              (margin of error, individual effects)
 *   SME = t_{γ, d} · PSE, γ = (1 + (1-α)^{1/m}) / 2       (simultaneous margin of error)
 * An effect beyond ME is "active" one at a time; beyond SME it is active allowing for all m looks.
 */

import { tQuantile } from "../distributions/t-distribution.js";

export interface LenthResult {
  readonly ok: true;
  readonly m: number;
  readonly s0: number;
  readonly pse: number;
  readonly df: number;
  readonly me: number;
  readonly sme: number;
  /** The t multipliers of ME and SME. */
  readonly tMe: number;
  readonly tSme: number;
}

/** The median of a non-empty list. */
export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 === 1 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}

/**
 * Lenth's PSE, ME and SME of the effects at significance level `alpha` (0.05 in Lenth 1989).
 * Fails with a reason for fewer than two effects, non-finite values or a zero PSE (half or more of the
 * effects exactly zero, so no error scale can be judged).
 */
export function lenth(effects: readonly number[], alpha = 0.05): LenthResult | { ok: false; reason: string } {
  const m = effects.length;
  if (m < 2) return { ok: false, reason: "Lenth's method needs at least two effects" };
  if (!(alpha > 0 && alpha < 1)) return { ok: false, reason: "alpha must lie strictly between 0 and 1" };
  if (effects.some((e) => !Number.isFinite(e))) return { ok: false, reason: "an effect is not a finite number" };
  const abs = effects.map(Math.abs);
  const s0 = 1.5 * median(abs);
  const trimmed = abs.filter((a) => a < 2.5 * s0);
  if (trimmed.length === 0 || s0 === 0) return { ok: false, reason: "half or more of the effects are exactly zero, so the pseudo standard error is zero" };
  const pse = 1.5 * median(trimmed);
  if (!(pse > 0)) return { ok: false, reason: "the pseudo standard error is zero" };
  const df = m / 3;
  const tMe = tQuantile(1 - alpha / 2, df);
  const gamma = (1 + Math.pow(1 - alpha, 1 / m)) / 2;
  const tSme = tQuantile(gamma, df);
  if (!Number.isFinite(tMe) || !Number.isFinite(tSme)) return { ok: false, reason: "the t quantile for the margins of error could not be computed" };
  return { ok: true, m, s0, pse, df, me: tMe * pse, sme: tSme * pse, tMe, tSme };
}
