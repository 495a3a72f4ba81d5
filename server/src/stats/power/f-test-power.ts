/**
 * Power of the F test of a fixed main effect, and the replicates needed to reach a target power.
 *
 * Convention for `difference` D (the `plan detect <response> D` setting): two level means of the tested
 * factor lie D apart and all other level means sit at the grand mean, the least favourable configuration
 * for a given range (Montgomery 2017, Design and Analysis of Experiments, 9th ed., §3.7.1). Then
 * Σ (μ_i - μ̄)² = D²/2 and, with r_L runs at each level, the noncentrality is λ = r_L D² / (2σ²).
 * The power is P(F' > F_{1-α; k-1, ν}) for the noncentral F(k - 1, ν, λ) (noncentral-f.ts), ν the residual
 * df of the full design. This equals R's power.anova.test(groups = k, n = r_L, between.var = D²/(2(k - 1)),
 * within.var = σ²) for a one-way layout.
 */

import { fQuantile } from "../distributions/f-distribution.js";
import { noncentralFUpperTail } from "../distributions/noncentral-f.js";

/**
 * The planned design, as far as the power of one main effect is concerned.
 * `runsPerReplicate` is the number of runs in one replicate (the number of cells of the crossed design);
 * `modelDf` is the degrees of freedom of all model terms (the intercept excluded), so that the residual df
 * of r replicates is r · runsPerReplicate - 1 - modelDf.
 */
export interface MainEffectPowerLayout {
  /** Levels of the tested factor, k >= 2. */
  readonly levels: number;
  readonly runsPerReplicate: number;
  readonly modelDf: number;
  /** D: the difference between two level means worth detecting, > 0, on the response scale. */
  readonly difference: number;
  /** σ: the error standard deviation (planned value or the observed residual SD), > 0. */
  readonly sigma: number;
  /** Significance level of the F test, 0 < α < 1. */
  readonly alpha: number;
}

/** The power of one design size, with the quantities it was computed from. */
export interface PowerValue {
  readonly power: number;
  readonly replicates: number;
  readonly df1: number;
  readonly df2: number;
  readonly noncentrality: number;
}

export type PowerOutcome = ({ readonly ok: true } & PowerValue) | { readonly ok: false; readonly reason: string };

/** Power of the test with `noncentrality` λ at level α on (df1, df2) degrees of freedom; NaN when undefined. */
export function fTestPower(df1: number, df2: number, noncentrality: number, alpha: number): number {
  const critical = fQuantile(1 - alpha, df1, df2);
  return noncentralFUpperTail(critical, df1, df2, noncentrality);
}

function layoutProblem(layout: MainEffectPowerLayout): string | null {
  if (!(layout.levels >= 2) || !Number.isInteger(layout.levels)) return "the factor needs at least two levels";
  if (!(layout.runsPerReplicate >= layout.levels) || layout.runsPerReplicate % layout.levels !== 0) return "one replicate must hold the same number of runs at every level of the factor";
  if (!(layout.modelDf >= layout.levels - 1)) return "the model must contain the factor's main effect";
  if (!(layout.difference > 0) || !Number.isFinite(layout.difference)) return "the difference to detect must be a positive number";
  if (!(layout.sigma > 0) || !Number.isFinite(layout.sigma)) return "the error standard deviation must be a positive number";
  if (!(layout.alpha > 0 && layout.alpha < 1)) return "alpha must lie between 0 and 1";
  return null;
}

/** Power of the main-effect F test with `replicates` replicates of the design. */
export function mainEffectPower(layout: MainEffectPowerLayout, replicates: number): PowerOutcome {
  const problem = layoutProblem(layout);
  if (problem) return { ok: false, reason: problem };
  if (!(replicates >= 1) || !Number.isInteger(replicates)) return { ok: false, reason: "replicates must be a whole number of at least 1" };
  const df1 = layout.levels - 1;
  const df2 = replicates * layout.runsPerReplicate - 1 - layout.modelDf;
  if (df2 < 1) return { ok: false, reason: `${replicates} replicate${replicates === 1 ? "" : "s"} leave no residual degrees of freedom for the F test` };
  const perLevel = (replicates * layout.runsPerReplicate) / layout.levels;
  const ratio = layout.difference / layout.sigma;
  const noncentrality = (perLevel * ratio * ratio) / 2;
  const power = fTestPower(df1, df2, noncentrality, layout.alpha);
  if (!Number.isFinite(power)) return { ok: false, reason: "the power could not be computed for these values" };
  return { ok: true, power, replicates, df1, df2, noncentrality };
}

/**
 * The smallest number of replicates (1..maxReplicates) whose power reaches `target`, with that power.
 * Power grows with the replicates, so the first one that reaches the target is the answer.
 */
export function replicatesNeeded(layout: MainEffectPowerLayout, target: number, maxReplicates = 1000): PowerOutcome {
  const problem = layoutProblem(layout);
  if (problem) return { ok: false, reason: problem };
  if (!(target > 0 && target < 1)) return { ok: false, reason: "the target power must lie between 0 and 1" };
  // Exponential search, then bisection: the power is increasing in the replicates.
  let low = 0;
  let high = 1;
  let found: PowerOutcome | null = null;
  while (high <= maxReplicates) {
    const value = mainEffectPower(layout, high);
    if (value.ok && value.power >= target) {
      found = value;
      break;
    }
    low = high;
    high *= 2;
  }
  if (!found) {
    const last = mainEffectPower(layout, maxReplicates);
    if (last.ok && last.power >= target) found = last;
    else return { ok: false, reason: `even ${maxReplicates} replicates do not reach a power of ${target}` };
    high = maxReplicates;
  }
  while (high - low > 1) {
    const mid = Math.floor((low + high) / 2);
    const value = mainEffectPower(layout, mid);
    if (value.ok && value.power >= target) {
      high = mid;
      found = value;
    } else low = mid;
  }
  return found;
}
