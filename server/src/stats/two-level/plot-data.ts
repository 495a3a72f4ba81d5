/**
 * Data for the usual plots of two-level effects: normal and half-normal probability plots (Daniel 1959,
 * "Use of half-normal plots in interpreting factorial two-level experiments", Technometrics 1) and a
 * Pareto chart of standardized effects. Plotting positions p_i = (i - 0.5)/m for the i-th smallest of m
 * values; the normal score is Φ⁻¹(p_i), the half-normal score Φ⁻¹(0.5 + 0.5·p_i).
 */

import { normalQuantile } from "../distributions/normal-distribution.js";

/** One point of a probability plot. */
export interface PlotPoint {
  readonly index: number;
  readonly value: number;
  readonly score: number;
}

/** Points of a normal plot: the effects in increasing order against normal scores. */
export function normalPlotPoints(effects: readonly number[]): PlotPoint[] {
  const m = effects.length;
  return effects
    .map((value, index) => ({ index, value }))
    .sort((a, b) => a.value - b.value || a.index - b.index)
    .map((e, i) => ({ ...e, score: normalQuantile((i + 0.5) / m) }));
}

/** Points of a half-normal plot: absolute effects in increasing order against half-normal scores. */
export function halfNormalPlotPoints(effects: readonly number[]): PlotPoint[] {
  const m = effects.length;
  return effects
    .map((e, index) => ({ index, value: Math.abs(e) }))
    .sort((a, b) => a.value - b.value || a.index - b.index)
    .map((e, i) => ({ ...e, score: normalQuantile(0.5 + (0.5 * (i + 0.5)) / m) }));
}

/** One bar of a Pareto chart: |effect| / scale, largest first. */
export interface ParetoBar {
  readonly index: number;
  readonly standardized: number;
}

/**
 * Bars of a Pareto chart of standardized effects: |effect| divided by `scale` (Lenth's PSE for an
 * unreplicated design, the standard error of an effect otherwise), sorted from largest to smallest.
 * Returns [] when the scale is not a positive finite number.
 */
export function paretoBars(effects: readonly number[], scale: number): ParetoBar[] {
  if (!(scale > 0) || !Number.isFinite(scale)) return [];
  return effects
    .map((e, index) => ({ index, standardized: Math.abs(e) / scale }))
    .sort((a, b) => b.standardized - a.standardized || a.index - b.index);
}
