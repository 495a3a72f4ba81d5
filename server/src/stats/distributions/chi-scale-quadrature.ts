/**
 * Quadrature nodes shared by the distributions that integrate over the scale of an independent variance
 * estimate (Dunnett's many-to-one distribution, the studentized range): Gauss-Legendre rules on panels,
 * and the nodes of S = √(χ²_ν/ν) with its density folded into the weights.
 *
 * The chi-scale rule works in u = ln s, where the density of S is exp(logConst + ν u - ν e^{2u}/2) with
 * its mode at u = 0 and a standard deviation near 1/√(2ν): panels start at two standard deviations and
 * grow by 2.5 each away from the mode until the log-density has fallen by 40 (a relative weight of 4e-18).
 * The accuracy of each user is stated and tested with that user.
 */

import { gaussLegendre } from "./gauss-legendre.js";
import { logGamma } from "../special/log-gamma.js";

/** Quadrature nodes and weights on the real line (the weights include any density). */
export interface Nodes {
  readonly nodes: Float64Array;
  readonly weights: Float64Array;
}

const RULE = gaussLegendre(12);

/** 12-point Gauss-Legendre nodes on `panels` equal panels of [lo, hi]. */
export function panelNodes(lo: number, hi: number, panels: number): Nodes {
  const bounds = Array.from({ length: panels + 1 }, (_, i) => lo + ((hi - lo) * i) / panels);
  return nodesOnBounds(bounds, (x) => x, () => 1);
}

/**
 * Quadrature nodes (values of s) and weights (density g_ν(s) ds included) for S = √(χ²_ν/ν). Panels
 * start at `first` standard deviations of ln S and each is `growth` times the one before.
 */
export function chiScaleNodes(df: number, first = 2, growth = 2.5): Nodes {
  const scale = chiScale(df);
  return chiScaleNodesOn(scale, chiScalePanels(scale, first, growth));
}

/** Where the density of ln S matters, and that density: what a caller needs to place its own panels. */
export interface ChiScale {
  readonly df: number;
  /** ln S where the log-density has fallen by 40 below its mode (at 0), below and above. */
  readonly uLow: number;
  readonly uHigh: number;
  /** About the standard deviation of ln S, 1/√(2ν). */
  readonly sigma: number;
  /** The log of the density of ln S at u (the density of S at e^u times e^u). */
  readonly logDensity: (u: number) => number;
}

export function chiScale(df: number): ChiScale {
  // In u = ln s the density is exp(logConst + ν u - ν e^{2u}/2), with its mode at u = 0.
  const logConst = (df / 2) * Math.log(df / 2) + Math.log(2) - logGamma(df / 2);
  const drop = (u: number) => df * u - (df * Math.expm1(2 * u)) / 2; // log-density relative to the mode, <= 0
  const solve = (lo: number, hi: number) => {
    for (let i = 0; i < 200; i++) {
      const mid = (lo + hi) / 2;
      if (drop(mid) > -40) {
        if (lo < 0) hi = mid;
        else lo = mid;
      } else if (lo < 0) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  };
  return { df, uLow: solve(-1e4, 0), uHigh: solve(0, 50), sigma: 1 / Math.sqrt(2 * df), logDensity: (u) => logConst + drop(u) - df / 2 };
}

/** Panel bounds in u from `uLow` to `uHigh`: `first` standard deviations either side of the mode, each next one `growth` times wider. */
export function chiScalePanels(scale: ChiScale, first: number, growth: number): number[] {
  const { uLow, uHigh, sigma } = scale;
  const bounds: number[] = [0];
  for (let w = first * sigma, u = 0; u < uHigh; w *= growth) bounds.push((u = Math.min(uHigh, u + w)));
  const left: number[] = [];
  for (let w = first * sigma, u = 0; u > uLow; w *= growth) left.push((u = Math.max(uLow, u - w)));
  return [...left.reverse(), ...bounds];
}

/** Nodes in s (= e^u) and weights with the density of S folded in, on the given increasing panel bounds in u. */
export function chiScaleNodesOn(scale: ChiScale, bounds: readonly number[]): Nodes {
  return nodesOnBounds(bounds, (u) => Math.exp(u), (u) => Math.exp(scale.logDensity(u)));
}

function nodesOnBounds(bounds: readonly number[], map: (x: number) => number, density: (x: number) => number): Nodes {
  const n = RULE.nodes.length;
  const nodes = new Float64Array((bounds.length - 1) * n);
  const weights = new Float64Array((bounds.length - 1) * n);
  for (let p = 0; p + 1 < bounds.length; p++) {
    const half = (bounds[p + 1]! - bounds[p]!) / 2;
    const mid = (bounds[p + 1]! + bounds[p]!) / 2;
    for (let i = 0; i < n; i++) {
      const x = mid + half * RULE.nodes[i]!;
      nodes[p * n + i] = map(x);
      weights[p * n + i] = half * RULE.weights[i]! * density(x);
    }
  }
  return { nodes, weights };
}
