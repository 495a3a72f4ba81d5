/**
 * The studentized range distribution of the range of k independent standard normal means divided by an
 * independent estimate of their standard deviation with ν degrees of freedom (Tukey's q).
 *
 * Method: the range of k standard normals has the distribution (Hartley 1942; as used by Copenhaver &
 * Holland 1988, "Computation of the distribution of the maximum studentized range statistic with
 * application to multiple significance testing of simple effects", J. Statist. Comput. Simul. 30, 1-15)
 *   W(w) = P(range <= w) = k ∫ φ(z) [Φ(z) - Φ(z - w)]^(k-1) dz,
 * and the studentized range averages it over the scale S = √(χ²_ν/ν):
 *   P(Q <= q) = ∫ g_ν(s) W(q s) ds.
 * Both are 12-point Gauss-Legendre rules on panels. z: 16 equal panels of [-8.5, 8.5] (the normal mass
 * outside is 2e-17), skipping the panels where a bound of the integrand is below 1e-20; the difference
 * Φ(z) - Φ(z - w) is taken between upper tails for z > 0, where both lower tails are near 1. For k = 2
 * the closed form W(w) = 2Φ(w/√2) - 1 is used. s: panels in ln s that follow the chi density, with extra
 * bounds where W(q s) rises (`chiScaleNodesForStep` in chi-scale-quadrature.ts), so small ν with large q
 * is resolved as well as the usual case; where q s is so large that 1 - W(q s) < 1e-18, W is 1 without
 * integrating. ν = ∞ (or above 1e7, a point mass to double precision) is W itself. W and its derivative
 * for k >= 3 come from an interpolation table filled from the integrals (`step-table.ts`); the
 * derivative is W'(w) = k(k-1) ∫ φ(z) φ(z - w) [Φ(z) - Φ(z - w)]^(k-2) dz, from the same pass. The
 * quantile is found by safeguarded Newton steps in ln q (`monotone-root.ts`), starting from the
 * Bonferroni bound √2·t(1 - (1-p)/(k(k-1)), ν).
 *
 * Why our own rather than jstat's `tukey.cdf`/`tukey.inv` (a port of R's ptukey/qtukey, used before):
 * those return nothing below 2 df, and against R's QUADPACK integration of the definition R 4.2.2's
 * ptukey is off by up to 6e-4 at 2 df and 2e-5 at 5 df and its qtukey by up to 17% at 2 df
 * (test/stats/fixtures/r/studentized-range); jstat also took about 1 ms per CDF and 10 ms per quantile
 * even when warm (a secant iteration whose error function allocates an array per call), with one
 * quantile per Games-Howell pair. Accuracy, tested against those integrals: the CDF and the upper tail
 * within 1e-12 absolute (k 2-20, ν 1 to ∞), quantiles within 5e-11 relative (1e-13 from 2 df on); also
 * against the exact two-mean identity P(Q <= q; 2, ν) = 2·P(T_ν <= q/√2) - 1. The upper tail is
 * 1 - CDF, so p-values below 1e-10 are not resolved: they are floored there.
 */

import { chiScaleNodesForStep, panelNodes } from "./chi-scale-quadrature.js";
import { solveIncreasing } from "./monotone-root.js";
import { interpolateStep, stepTable, type StepTable, type ValueAndSlope } from "./step-table.js";
import { normalDensity, normalQuantile, normalUpperTail } from "./normal-distribution.js";
import { tQuantile } from "./t-distribution.js";
import { STUDENTIZED_RANGE_P_FLOOR } from "./p-floors.js";

/** The smallest upper-tail probability reported (the CDF is accurate to about 1e-12 absolute). */
export { STUDENTIZED_RANGE_P_FLOOR };

/**
 * The most means the distribution is computed for. Its accuracy is tested against R's integrals up to 20
 * means; while it was written, the interpolation was also compared with the direct integral up to 40
 * means (within 5e-14), and the inner rule with a four times finer one up to 200 (within 6e-12). Beyond
 * some hundreds the inner rule would need more nodes. Comparisons of more levels are skipped with a
 * diagnostic (`comparisonProblem`).
 */
export const STUDENTIZED_RANGE_MAX_MEANS = 100;
/** Above this many df the chi scale is a point mass to double precision (as in dunnett.ts). */
const POINT_MASS_DF = 1e7;
/** An outer weight below which the node is left out (its contribution is at most the weight). */
const NEGLIGIBLE_WEIGHT = 1e-17;
/** A bound on a panel's part of the inner integral below which the panel is skipped. */
const NEGLIGIBLE = 1e-20;

// The inner integral's fixed z panels (12-point rules, laid out panel by panel), with φ(z)·weight, Φ(z)
// and 1 - Φ(z) at each node computed once.
const Z_PANELS = 16;
const Z_LOW = -8.5;
const Z_WIDTH = 17 / Z_PANELS;
const Z = panelNodes(Z_LOW, Z_LOW + Z_PANELS * Z_WIDTH, Z_PANELS);
const POINTS = Z.nodes.length / Z_PANELS;
const Z_NODES = Z.nodes;
const Z_WEIGHTED_DENSITY = Z.nodes.map((z, i) => Z.weights[i]! * normalDensity(z));
const Z_LOWER = Z.nodes.map((z) => normalUpperTail(-z));
const Z_UPPER = Z.nodes.map((z) => normalUpperTail(z));

/** x^n for a whole n >= 0, by repeated squaring (Math.pow is several times slower and no more accurate here). */
function wholePower(x: number, n: number): number {
  let result = 1;
  let base = x;
  for (let e = n; e > 0; e >>= 1) {
    if (e & 1) result *= base;
    base *= base;
  }
  return result;
}

/**
 * The first z panel that can matter for k means: left of it, k φ(z) Φ(z)^(k-1) (a bound of the integrand,
 * increasing there) times the panel width stays below `NEGLIGIBLE`.
 */
function firstPanel(k: number): number {
  let p = 0;
  while (p < Z_PANELS - 1) {
    const right = Z_LOW + Z_WIDTH * (p + 1);
    if (k * normalDensity(right) * wholePower(normalUpperTail(-right), k - 1) * Z_WIDTH >= NEGLIGIBLE) break;
    p++;
  }
  return p;
}
const FIRST_PANEL = new Map<number, number>();

/** The CDF and density of the range of k standard normals at w > 0 (k >= 3), from one pass over the z nodes. */
function rangeOfNormals(w: number, k: number, out: ValueAndSlope): void {
  let first = FIRST_PANEL.get(k);
  if (first === undefined) FIRST_PANEL.set(k, (first = firstPanel(k)));
  let cdf = 0;
  let density = 0;
  for (let p = first; p < Z_PANELS; p++) {
    // Right of w the integrand is at most k φ(z) (1 - Φ(z - w))^(k-1), decreasing: stop at the first
    // panel whose left end bounds it below `NEGLIGIBLE`.
    const left = Z_LOW + Z_WIDTH * p;
    if (left > w && k * normalDensity(left) * wholePower(normalUpperTail(left - w), k - 1) * Z_WIDTH < NEGLIGIBLE) break;
    for (let at = p * POINTS, end = at + POINTS; at < end; at++) {
      const z = Z_NODES[at]!;
      const shifted = z - w;
      // Φ(z) - Φ(z - w), as a difference of upper tails when z > 0 (both lower tails near 1 there).
      const inside = z > 0 ? normalUpperTail(shifted) - Z_UPPER[at]! : Z_LOWER[at]! - normalUpperTail(-shifted);
      if (!(inside > 0)) continue;
      const power = wholePower(inside, k - 2);
      cdf += Z_WEIGHTED_DENSITY[at]! * power * inside;
      density += Z_WEIGHTED_DENSITY[at]! * power * normalDensity(shifted);
    }
  }
  out.value = k * cdf;
  out.slope = k * (k - 1) * density;
}

/** W(w) and W'(w) for k means at w > 0: closed form for two means, else the interpolation table of k. */
function range(w: number, k: number, out: ValueAndSlope): void {
  if (k === 2) {
    // The range of two standard normals is √2 |Z|.
    out.value = 1 - 2 * normalUpperTail(w / Math.SQRT2);
    out.slope = Math.SQRT2 * normalDensity(w / Math.SQRT2);
    return;
  }
  interpolateStep(tableOf(k), w, out);
}

// W and W' of each k, tabulated on [0, certainRange(k)) for interpolation (step-table.ts): the outer
// integral asks for W at some hundred values of q s per CDF, a quantile or a family of pairs at many more
// with the same k, and each direct value costs some 150 normal tail evaluations.
// Width 1: within 5e-14 of the integral for k up to 40 (at 0.5 the first use of a k would cost twice as much).
const RANGE_TABLE_WIDTH = 1;
const TABLES = new Map<number, StepTable>();
const TABLES_LIMIT = 64;

function tableOf(k: number): StepTable {
  let table = TABLES.get(k);
  if (!table) {
    table = stepTable(certainRange(k), RANGE_TABLE_WIDTH, (w, out) => rangeOfNormals(w, k, out));
    if (TABLES.size >= TABLES_LIMIT) TABLES.clear();
    TABLES.set(k, table);
  }
  return table;
}

/**
 * The q s beyond which 1 - W(q s) < 1e-18 for k means: the range exceeds w only if some pair differs by
 * more than w, so 1 - W(w) <= k(k-1)/2 · 2(1 - Φ(w/√2)).
 */
function certainRange(k: number): number {
  return -Math.SQRT2 * normalQuantile(1e-18 / (k * (k - 1)));
}

/** P(Q <= q) and its derivative in q, for q > 0. */
function cdfAndDensity(q: number, k: number, df: number, out: ValueAndSlope): void {
  if (df === Infinity || df > POINT_MASS_DF) {
    range(q, k, out);
    return;
  }
  const { nodes, weights } = chiScaleNodesForStep(df, q);
  const certain = certainRange(k);
  const inner: ValueAndSlope = { value: 0, slope: 0 };
  let cdf = 0;
  let density = 0;
  for (let j = 0; j < nodes.length; j++) {
    const s = nodes[j]!;
    const weight = weights[j]!;
    // Far in the density's tails a node's whole contribution is below 1e-17: its W is not asked for, so
    // the interpolation table is filled only where the density is.
    if (weight < NEGLIGIBLE_WEIGHT) continue;
    if (q * s >= certain) {
      cdf += weight;
      continue;
    }
    range(q * s, k, inner);
    cdf += weight * inner.value;
    density += weight * s * inner.slope;
  }
  out.value = cdf;
  out.slope = density;
}

function usable(k: number, df: number): boolean {
  return Number.isInteger(k) && k >= 2 && k <= STUDENTIZED_RANGE_MAX_MEANS && df >= 1;
}

/** Returns P(Q <= q) for the studentized range of `k` means with `df` error degrees of freedom (df >= 1). NaN when undefined. */
export function studentizedRangeCdf(q: number, k: number, df: number): number {
  if (!usable(k, df) || Number.isNaN(q)) return NaN;
  if (q <= 0) return 0;
  if (q === Infinity) return 1;
  const out: ValueAndSlope = { value: 0, slope: 0 };
  cdfAndDensity(q, k, df, out);
  return Number.isFinite(out.value) ? Math.min(1, Math.max(0, out.value)) : NaN;
}

/**
 * Returns P(Q > q), floored at `STUDENTIZED_RANGE_P_FLOOR` because it is computed as 1 - CDF; such a
 * p-value means "< 1e-10". NaN when undefined.
 */
export function studentizedRangeUpperTail(q: number, k: number, df: number): number {
  const cdf = studentizedRangeCdf(q, k, df);
  if (Number.isNaN(cdf)) return NaN;
  return Math.max(STUDENTIZED_RANGE_P_FLOOR, 1 - cdf);
}

// Analyses ask for the same few quantiles on every edit (the confidence level, the design's df).
const QUANTILE_CACHE = new Map<string, number>();
const QUANTILE_CACHE_LIMIT = 2000;

/** Returns the q with P(Q <= q) = p, for 0 < p < 1 (to 5e-11 relative, tested). NaN when undefined. Memoised. */
export function studentizedRangeQuantile(p: number, k: number, df: number): number {
  if (!usable(k, df) || !(p > 0 && p < 1)) return NaN;
  const key = `${p}|${k}|${df}`;
  const cached = QUANTILE_CACHE.get(key);
  if (cached !== undefined) return cached;
  const q = solveQuantile(p, k, df);
  if (QUANTILE_CACHE.size >= QUANTILE_CACHE_LIMIT) QUANTILE_CACHE.clear();
  QUANTILE_CACHE.set(key, q);
  return q;
}

function solveQuantile(p: number, k: number, df: number): number {
  const out: ValueAndSlope = { value: 0, slope: 0 };
  const start = Math.SQRT2 * tQuantile(1 - (1 - p) / (k * (k - 1)), df);
  const u = solveIncreasing(
    (v) => {
      const q = Math.exp(v);
      cdfAndDensity(q, k, df, out);
      return { value: out.value - p, slope: Math.max(q * out.slope, 1e-300) };
    },
    Math.log(start > 0 && Number.isFinite(start) ? start : 3.5),
    1e-13,
  );
  const q = Math.exp(u);
  return Number.isFinite(q) && q > 0 ? q : NaN;
}
