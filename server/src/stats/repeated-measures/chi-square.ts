/**
 * Upper tail of the chi-square distribution, P(X > x) for X ~ χ²(ν) = Q(ν/2, x/2), the regularized upper
 * incomplete gamma function. Method: for x < a + 1 the series of P(a, x) (Abramowitz & Stegun 1964,
 * 6.5.29) and Q = 1 - P (Q is then not small, so nothing is lost); otherwise Legendre's continued fraction
 * for Q (A&S 6.5.31) evaluated by the modified Lentz algorithm (Press et al. 1992, Numerical Recipes,
 * §6.2), which gives a tiny tail directly. Kept here, beside its only user (Mauchly's test).
 */

import { logGamma } from "../special/log-gamma.js";

const EPS = 1e-16;
const TINY = 1e-300;
const MAX_ITER = 10_000;

/** Returns Q(a, x) = Γ(a, x)/Γ(a) for a > 0, x >= 0; NaN for invalid arguments. */
export function regularizedGammaUpper(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0) || !Number.isFinite(a)) return NaN;
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  const logPrefix = a * Math.log(x) - x - logGamma(a);
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < MAX_ITER; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPS) break;
    }
    return Math.max(0, 1 - sum * Math.exp(logPrefix));
  }
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_ITER; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return Math.exp(logPrefix) * h;
}

/** Returns P(X > x) for X ~ χ²(df); 1 for x <= 0; NaN for df not > 0 or NaN x. */
export function chiSquareUpperTail(x: number, df: number): number {
  if (!(df > 0) || Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  return regularizedGammaUpper(df / 2, x / 2);
}
