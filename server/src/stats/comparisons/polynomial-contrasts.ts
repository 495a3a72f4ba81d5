/**
 * Orthogonal polynomial contrasts (linear, quadratic, ...) of the level means of a factor with equally
 * spaced numeric levels.
 *
 * Coefficients: Gram-Schmidt orthogonalisation of the powers 1, x, x², ... of the level positions, each
 * column normalised to unit length, which is what R's contr.poly computes (via a QR decomposition of the
 * same power matrix; Kennedy & Gentle 1980, Statistical Computing, §8.7). The linear coefficients increase
 * with the level value. The estimate of contrast c is L = Σ c_i ȳ_i with standard error √(MSE Σ c_i²/n_i)
 * and a two-sided t test on the model's residual degrees of freedom (Montgomery 2017, §3.5.4).
 */

import { tQuantile, tTwoSidedP } from "../distributions/t-distribution.js";
import type { GroupSummary } from "./group-summary.js";
import type { PooledVariance } from "./pairwise.js";

/** One polynomial contrast; `degree` 1 is linear, 2 quadratic. Null where undefined. */
export interface PolynomialContrast {
  readonly degree: number;
  readonly coefficients: readonly number[];
  readonly estimate: number;
  readonly standardError: number | null;
  readonly t: number | null;
  readonly df: number;
  readonly p: number | null;
  readonly lower: number | null;
  readonly upper: number | null;
}

/** True when the sorted values are equally spaced (relative tolerance 1e-9 of the range). */
export function equallySpaced(values: readonly number[]): boolean {
  if (values.length < 3) return false;
  const sorted = [...values].sort((a, b) => a - b);
  const step = (sorted[sorted.length - 1]! - sorted[0]!) / (sorted.length - 1);
  if (!(step > 0)) return false;
  return sorted.every((v, i) => Math.abs(v - (sorted[0]! + i * step)) <= 1e-9 * step * (sorted.length - 1));
}

/** The orthonormal polynomial contrast coefficients of degrees 1..maxDegree for levels at `positions`. */
export function polynomialCoefficients(positions: readonly number[], maxDegree: number): number[][] {
  const k = positions.length;
  const centre = positions.reduce((s, x) => s + x, 0) / k;
  const spread = Math.max(...positions.map((x) => Math.abs(x - centre))) || 1;
  const x = positions.map((p) => (p - centre) / spread);
  const basis: number[][] = [Array.from({ length: k }, () => 1 / Math.sqrt(k))];
  for (let d = 1; d <= Math.min(maxDegree, k - 1); d++) {
    let v = x.map((xi) => xi ** d);
    // Two rounds of Gram-Schmidt keep the columns orthogonal to machine precision.
    for (let round = 0; round < 2; round++) {
      for (const b of basis) {
        const dot = v.reduce((s, vi, i) => s + vi * b[i]!, 0);
        v = v.map((vi, i) => vi - dot * b[i]!);
      }
    }
    const norm = Math.sqrt(v.reduce((s, vi) => s + vi * vi, 0));
    basis.push(v.map((vi) => vi / norm));
  }
  return basis.slice(1);
}

/**
 * Linear and quadratic (up to `maxDegree`) contrasts of the group means, groups given in level order with
 * their numeric `positions`.
 */
export function polynomialContrasts(groups: readonly GroupSummary[], positions: readonly number[], pooled: PooledVariance, confidence: number, maxDegree = 2): PolynomialContrast[] {
  const out: PolynomialContrast[] = [];
  const usable = pooled.df >= 1 && pooled.ms > 0 && Number.isFinite(pooled.ms);
  polynomialCoefficients(positions, maxDegree).forEach((c, index) => {
    const estimate = c.reduce((s, ci, i) => s + ci * groups[i]!.mean, 0);
    const se = usable ? Math.sqrt(pooled.ms * c.reduce((s, ci, i) => s + (ci * ci) / groups[i]!.n, 0)) : null;
    const t = se ? estimate / se : null;
    const critical = usable ? tQuantile(1 - (1 - confidence) / 2, pooled.df) : null;
    out.push({
      degree: index + 1,
      coefficients: c,
      estimate,
      standardError: se,
      t,
      df: pooled.df,
      p: t === null ? null : tTwoSidedP(t, pooled.df),
      lower: se && critical ? estimate - critical * se : null,
      upper: se && critical ? estimate + critical * se : null,
    });
  });
  return out;
}
