/**
 * The two-sided many-to-one (Dunnett) distribution: P(max_i |T_i| <= c) for T_i = Z_i / S, where the Z_i
 * are standard normals with correlations ρ_ij = λ_i λ_j and νS² ~ χ²(ν) independently.
 *
 * Comparing m treatments with a control by t statistics (x̄_i - x̄_0)/(s √(1/n_i + 1/n_0)) gives exactly
 * this "product" correlation with λ_i = √(n_i / (n_i + n_0)) (Dunnett 1955, "A multiple comparison
 * procedure for comparing several treatments with a control", JASA 50, 1096-1121). Writing
 * Z_i = λ_i z + √(1 - λ_i²) e_i with independent standard normals z, e_i reduces the m-dimensional
 * integral to two one-dimensional ones (Dunnett 1955, §3; Dunnett 1989, Applied Statistics AS 251):
 *   P(c) = ∫_0^∞ g_ν(s) ∫ φ(z) Π_i [Φ((cs - λ_i z)/√(1-λ_i²)) - Φ((-cs - λ_i z)/√(1-λ_i²))] dz ds,
 * with g_ν the density of S = √(χ²_ν/ν). Both integrals are evaluated by 12-point Gauss-Legendre rules
 * on panels: z on [0, 8.5] (the integrand is even in z) in 6 equal panels (the normal mass beyond 8.5 is
 * 1e-17); s through u = ln s, where the weight is proportional to exp(ν u - ν e^{2u}/2), on the chi-scale
 * panels of `chiScaleNodesForStep` (two standard deviations of ln S at the mode, doubling outwards, with
 * bounds where the inner probability rises in c s). Accuracy: for one treatment the distribution is that
 * of |T_ν|, and the rule agrees with 2 P(T_ν <= c) - 1 to 3e-13 for ν 1 to 1000, c 0.5 to 40 and any λ
 * (tested; the earlier panels, growing by 2.5 without those bounds, were off by up to 1.3e-7 at ν = 1,
 * c = 40); within mvtnorm::pmvt's own error (about 1e-7 with abseps = 1e-9) of R for several treatments
 * (test/stats/fixtures/r/comparisons). The inner probability is tabulated per set of λs for
 * interpolation (`step-table.ts`), so a CDF costs about 0.1 ms once the few intervals it needs are
 * filled (72 x m normal CDF pairs per table node) and a quantile, about ten CDFs, some 2 ms: the direct
 * double integral took 5-20 ms per CDF. Unequal group sizes are handled exactly, since the correlation
 * stays of product form.
 */

import { normalCdf, normalDensity, normalQuantile } from "./normal-distribution.js";
import { interpolateStep, stepTable, type StepTable, type ValueAndSlope } from "./step-table.js";
import { chiScaleNodesForStep, panelNodes } from "./chi-scale-quadrature.js";
import { tQuantile } from "./t-distribution.js";

// The z integrand is even in z (replace z by -z and use Φ(-x) = 1 - Φ(x)), so only z >= 0 is integrated, twice.
const Z_NODES = panelNodes(0, 8.5, 6);
const Z_WEIGHTED_DENSITY = Z_NODES.nodes.map((z, k) => Z_NODES.weights[k]! * normalDensity(z));

/** Returns P(max |T_i| <= c) for the product-correlation structure `lambdas` (0 <= λ_i < 1) and ν df. NaN when undefined. */
export function dunnettTwoSidedCdf(c: number, lambdas: readonly number[], df: number): number {
  if (!(df > 0) || lambdas.length === 0 || lambdas.some((l) => !(l >= 0 && l < 1)) || Number.isNaN(c)) return NaN;
  if (c <= 0) return 0;
  const table = tableOf(lambdas);
  const inner: ValueAndSlope = { value: 0, slope: 0 };
  if (df === Infinity || df > 1e7) {
    interpolateStep(table, c, inner);
    return Math.min(1, inner.value);
  }
  const nodes = chiScaleNodesForStep(df, c);
  let total = 0;
  for (let k = 0; k < nodes.nodes.length; k++) {
    interpolateStep(table, c * nodes.nodes[k]!, inner);
    total += nodes.weights[k]! * inner.value;
  }
  return Math.min(1, Math.max(0, total));
}

/**
 * The inner probability P(max |Z_i| <= t) of the λs as a function of t = c s: the z integral above, from
 * one pass over the z nodes. Its slope is not needed (the quantile uses regula falsi).
 */
function innerProbability(t: number, lambdas: readonly number[], scales: readonly number[], out: ValueAndSlope): void {
  let total = 0;
  for (let k = 0; k < Z_NODES.nodes.length; k++) {
    const z = Z_NODES.nodes[k]!;
    let product = Z_WEIGHTED_DENSITY[k]!;
    for (let i = 0; i < lambdas.length && product > 0; i++) {
      const l = lambdas[i]!;
      const s = scales[i]!;
      product *= normalCdf((t - l * z) / s) - normalCdf((-t - l * z) / s);
    }
    total += product;
  }
  out.value = 2 * total;
  out.slope = 0;
}

// The inner probability of each set of λs, tabulated for interpolation (step-table.ts) on [0, t1) where
// 1 - P(max |Z_i| <= t1) <= m · 2(1 - Φ(t1)) < 1e-18: the outer integral asks for it at some hundred
// values of c s per CDF and the quantile for about ten CDFs, all with the family's λs, and each direct
// value costs 72 x m normal CDF pairs.
// Width 0.5: the product of m differences is sharper than the range of normals (at width 1 the
// interpolation was 4e-12 off the integral for 5 treatments and 4e-10 for 20; at 0.5, 1.3e-14 for 20).
const INNER_TABLE_WIDTH = 0.5;
const TABLES = new Map<string, StepTable>();
const TABLES_LIMIT = 64;

function tableOf(lambdas: readonly number[]): StepTable {
  const key = lambdas.join(",");
  let table = TABLES.get(key);
  if (!table) {
    const scales = lambdas.map((l) => Math.sqrt(1 - l * l));
    const top = -normalQuantile(1e-18 / (2 * lambdas.length));
    table = stepTable(top, INNER_TABLE_WIDTH, (t, out) => innerProbability(t, lambdas, scales, out));
    if (TABLES.size >= TABLES_LIMIT) TABLES.clear();
    TABLES.set(key, table);
  }
  return table;
}

/**
 * Returns the two-sided critical value c with P(max |T_i| <= c) = confidence, to about 1e-7 absolute, by
 * the Illinois variant of regula falsi between the unadjusted and the Bonferroni t quantiles (which bracket
 * it). NaN when undefined.
 */
export function dunnettTwoSidedQuantile(confidence: number, lambdas: readonly number[], df: number): number {
  if (!(confidence > 0 && confidence < 1) || !(df > 0) || lambdas.length === 0) return NaN;
  // Memoised: an editor re-analyses the same design on every keystroke.
  const key = `${confidence}|${df}|${lambdas.join(",")}`;
  const cached = QUANTILE_CACHE.get(key);
  if (cached !== undefined) return cached;
  const value = solveQuantile(confidence, lambdas, df);
  if (QUANTILE_CACHE.size >= 500) QUANTILE_CACHE.clear();
  QUANTILE_CACHE.set(key, value);
  return value;
}

const QUANTILE_CACHE = new Map<string, number>();

function solveQuantile(confidence: number, lambdas: readonly number[], df: number): number {
  const alpha = 1 - confidence;
  let a = tQuantile(1 - alpha / 2, df);
  let b = tQuantile(1 - alpha / (2 * lambdas.length), df) * 1.0000001 + 1e-9;
  let fa = dunnettTwoSidedCdf(a, lambdas, df) - confidence;
  let fb = dunnettTwoSidedCdf(b, lambdas, df) - confidence;
  if (!Number.isFinite(fa) || !Number.isFinite(fb)) return NaN;
  if (fa >= 0) return a;
  if (fb <= 0) return b;
  let side = 0;
  for (let iteration = 0; iteration < 100; iteration++) {
    const c = (a * fb - b * fa) / (fb - fa);
    const fc = dunnettTwoSidedCdf(c, lambdas, df) - confidence;
    if (Math.abs(fc) < 1e-12 || Math.abs(b - a) < 1e-9) return c;
    if (fc * fb > 0) {
      b = c;
      fb = fc;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = c;
      fa = fc;
      if (side === 1) fb /= 2;
      side = 1;
    }
  }
  return (a + b) / 2;
}
