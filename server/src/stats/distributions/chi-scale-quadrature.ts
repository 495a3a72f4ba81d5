/**
 * Quadrature nodes shared by the distributions that integrate over the scale of an independent variance
 * estimate (Dunnett's many-to-one distribution, the studentized range): Gauss-Legendre rules on panels,
 * and the nodes of S = √(χ²_ν/ν) with its density folded into the weights.
 *
 * The chi-scale rule works in u = ln s, where the density of S is exp(logConst + ν u - ν e^{2u}/2) with
 * its mode at u = 0 and a standard deviation near 1/√(2ν): panels start at two standard deviations and
 * double away from the mode until the log-density has fallen by 40 (a relative weight of 4e-18), with
 * extra bounds where the integrand rises. The accuracy of each user is stated and tested with that user.
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

/** Where the density of ln S matters, and that density. */
interface ChiScale {
  readonly df: number;
  /** ln S where the log-density has fallen by 40 below its mode (at 0), below and above. */
  readonly uLow: number;
  readonly uHigh: number;
  /** About the standard deviation of ln S, 1/√(2ν). */
  readonly sigma: number;
  /** The log of the density of ln S at u (the density of S at e^u times e^u). */
  readonly logDensity: (u: number) => number;
}

function chiScale(df: number): ChiScale {
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

/** Panel bounds in u from `uLow` to `uHigh`: two standard deviations either side of the mode, each next one twice as wide. */
function chiScalePanels(scale: ChiScale): number[] {
  const { uLow, uHigh, sigma } = scale;
  const bounds: number[] = [0];
  for (let w = 2 * sigma, u = 0; u < uHigh; w *= 2) bounds.push((u = Math.min(uHigh, u + w)));
  const left: number[] = [];
  for (let w = 2 * sigma, u = 0; u > uLow; w *= 2) left.push((u = Math.max(uLow, u - w)));
  return [...left.reverse(), ...bounds];
}

/**
 * Values of t at which a rule for ∫ g_ν(s) F(c s) ds puts panel bounds (at s = t/c) when F rises from
 * near 0 to 1 as its argument goes from about 0.5 to 16, as the range of normals and Dunnett's inner
 * probability do: about one doubling per panel, so each panel is smooth enough for its 12 points even
 * where the chi density is wide (small ν) and the rise sits far out in its tail (large c).
 */
const STEP_POINTS = [0.5, 1, 2, 4, 8, 16];

// The chi scale of the last df asked for: a quantile's iterations change c, not ν.
let lastScale: ChiScale | undefined;

/**
 * Nodes and weights for ∫ g_ν(s) F(c s) ds with F rising over c s in [0.5, 16] (see `STEP_POINTS`):
 * panels of two standard deviations of ln S at the mode, doubling outwards, plus bounds at the step
 * points. For two means of the studentized range (F exact) this is within 5e-13 of a 400-panel 16-point
 * rule over the whole range for ν 1 to 1e5 and c 0.3 to 40. The weights are divided by their sum: they
 * integrate the density to 1 only up to the rounding of its normalising constant, a difference of two
 * large logarithms at large ν (5e-11 relative at ν = 1e5).
 */
export function chiScaleNodesForStep(df: number, c: number): Nodes {
  if (lastScale?.df !== df) lastScale = chiScale(df);
  const scale = lastScale;
  const bounds = chiScalePanels(scale);
  for (const t of STEP_POINTS) {
    const u = Math.log(t / c);
    if (u > scale.uLow && u < scale.uHigh) bounds.push(u);
  }
  bounds.sort((a, b) => a - b);
  const rule = chiScaleNodesOn(scale, bounds);
  let total = 0;
  for (let j = 0; j < rule.weights.length; j++) total += rule.weights[j]!;
  for (let j = 0; j < rule.weights.length; j++) rule.weights[j] = rule.weights[j]! / total;
  return rule;
}

/** Nodes in s (= e^u) and weights with the density of S folded in, on the given increasing panel bounds in u. */
function chiScaleNodesOn(scale: ChiScale, bounds: readonly number[]): Nodes {
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
