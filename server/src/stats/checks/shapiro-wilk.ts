/**
 * The Shapiro-Wilk W test of normality for 3 <= n <= 5000, by Royston's (1995) algorithm AS R94
 * ("Remark AS R94: A remark on algorithm AS 181: the W-test for normality", Applied Statistics 44,
 * 547-551): approximate coefficients from normal order-statistic scores with polynomial corrections for the
 * two outermost ones, W as the squared correlation of the sorted data with the coefficients (1 - W formed
 * directly), and the p-value from Royston's normalising transformations (exact for n = 3). This follows
 * the published Fortran step by step, as R's shapiro.test does.
 */

import { normalQuantile, normalUpperTail } from "../distributions/normal-distribution.js";

/** A Shapiro-Wilk result. */
export interface ShapiroWilk {
  readonly w: number;
  readonly p: number;
  readonly n: number;
}

const SMALL = 1e-19;
const G = [-2.273, 0.459];
const C1 = [0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056];
const C2 = [0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
const C3 = [0.544, -0.39978, 0.025054, -6.714e-4];
const C4 = [1.3822, -0.77857, 0.062767, -0.0020322];
const C5 = [-1.5861, -0.31082, -0.083751, 0.0038915];
const C6 = [-0.4803, -0.082676, 0.0030302];

/** Polynomial c[0] + c[1] x + ... (AS R94's `poly`). */
function poly(c: readonly number[], x: number): number {
  let result = 0;
  for (let i = c.length - 1; i >= 0; i--) result = result * x + c[i]!;
  return result;
}

/**
 * Why `n` values cannot be tested, or undefined when they can: a caller whose values are built on demand
 * (a fit's residuals) asks first, so that a million residuals are not made only to be refused.
 */
export function shapiroWilkSizeProblem(n: number): string | undefined {
  if (n < 3) return "the Shapiro-Wilk test needs at least 3 values";
  if (n > 5000) return "the Shapiro-Wilk p-value approximation holds for at most 5000 values";
  return undefined;
}

/**
 * Returns W and its p-value, or `{ ok: false, reason }` for n outside 3..5000 or data without spread.
 */
export function shapiroWilk(values: ArrayLike<number>): ({ ok: true } & ShapiroWilk) | { ok: false; reason: string } {
  const n = values.length;
  const unsized = shapiroWilkSizeProblem(n);
  if (unsized !== undefined) return { ok: false, reason: unsized };
  // A typed-array sort compares numbers natively (no comparator call per comparison).
  const x = Float64Array.from(values).sort();
  const range = x[n - 1]! - x[0]!;
  if (!(range > 0) || range / Math.max(Math.abs(x[0]!), Math.abs(x[n - 1]!)) < 1e-12) return { ok: false, reason: "all values are equal, so normality cannot be assessed" };
  const a = coefficientsFor(n);
  const an = n;
  // W as the squared correlation of the scaled data with the coefficients (antisymmetric in rank).
  const coefficient = (i: number) => {
    const j = n - 1 - i;
    if (i === j) return 0;
    return i < j ? -a[i + 1]! : a[j + 1]!;
  };
  let sa = 0;
  let sx = 0;
  for (let i = 0; i < n; i++) {
    sa += coefficient(i);
    sx += x[i]! / range;
  }
  sa /= n;
  sx /= n;
  let ssa = 0;
  let ssx = 0;
  let sax = 0;
  for (let i = 0; i < n; i++) {
    const asa = coefficient(i) - sa;
    const xsx = x[i]! / range - sx;
    ssa += asa * asa;
    ssx += xsx * xsx;
    sax += asa * xsx;
  }
  const ssassx = Math.sqrt(ssa * ssx);
  // W1 = 1 - W formed directly, to avoid rounding error when W is near 1 (large samples).
  const w1 = ((ssassx - sax) * (ssassx + sax)) / (ssa * ssx);
  const w = 1 - w1;
  if (n === 3) {
    const pi6 = 1.90985931710274;
    const stqr = 1.0471975511966;
    return { ok: true, w, p: Math.max(0, Math.min(1, pi6 * (Math.asin(Math.sqrt(w)) - stqr))), n };
  }
  let y = Math.log(w1);
  const xx = Math.log(an);
  let m: number;
  let s: number;
  if (n <= 11) {
    const gamma = poly(G, an);
    if (y >= gamma) return { ok: true, w, p: SMALL, n };
    y = -Math.log(gamma - y);
    m = poly(C3, an);
    s = Math.exp(poly(C4, an));
  } else {
    m = poly(C5, xx);
    s = Math.exp(poly(C6, xx));
  }
  return { ok: true, w, p: normalUpperTail((y - m) / s), n };
}

/**
 * The coefficients a[1..n/2] (1-based, as in the Fortran) depend on n alone: they are kept for the last
 * few sample sizes, because the language server re-runs the test on every keystroke with the same n and
 * the n/2 normal quantiles cost more than the rest of the test.
 */
const coefficientCache = new Map<number, Float64Array>();
const COEFFICIENT_CACHE_SIZE = 8;

function coefficientsFor(n: number): Float64Array {
  const cached = coefficientCache.get(n);
  if (cached) return cached;
  const a = computeCoefficients(n);
  if (coefficientCache.size >= COEFFICIENT_CACHE_SIZE) coefficientCache.delete(coefficientCache.keys().next().value!);
  coefficientCache.set(n, a);
  return a;
}

/** AS R94's coefficients for sample size n (3 <= n <= 5000). */
function computeCoefficients(n: number): Float64Array {
  const nn2 = n >> 1;
  const a = new Float64Array(nn2 + 1); // 1-based as in the Fortran
  const an = n;
  if (n === 3) a[1] = Math.SQRT1_2;
  else {
    const an25 = an + 0.25;
    let summ2 = 0;
    for (let i = 1; i <= nn2; i++) {
      a[i] = normalQuantile((i - 0.375) / an25);
      summ2 += a[i]! * a[i]!;
    }
    summ2 *= 2;
    const ssumm2 = Math.sqrt(summ2);
    const rsn = 1 / Math.sqrt(an);
    const a1 = poly(C1, rsn) - a[1]! / ssumm2;
    let i1: number;
    let fac: number;
    if (n > 5) {
      i1 = 3;
      const a2 = -a[2]! / ssumm2 + poly(C2, rsn);
      fac = Math.sqrt((summ2 - 2 * a[1]! * a[1]! - 2 * a[2]! * a[2]!) / (1 - 2 * a1 * a1 - 2 * a2 * a2));
      a[2] = a2;
    } else {
      i1 = 2;
      fac = Math.sqrt((summ2 - 2 * a[1]! * a[1]!) / (1 - 2 * a1 * a1));
    }
    a[1] = a1;
    for (let i = i1; i <= nn2; i++) a[i] = -a[i]! / fac;
  }
  return a;
}
