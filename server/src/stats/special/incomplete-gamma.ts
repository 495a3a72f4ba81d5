/**
 * Regularized incomplete gamma functions P(a, x) and Q(a, x) = 1 - P(a, x), each computed directly.
 *
 * Method (Press, Teukolsky, Vetterling & Flannery, Numerical Recipes, 3rd ed. 2007, §6.2): for x < a + 1
 * the series P(a, x) = e^{-x} x^a / Γ(a + 1) · Σ x^n / ((a + 1)…(a + n)); otherwise the continued fraction
 * for Q(a, x) evaluated by the modified Lentz method (Lentz 1976). The tail each branch yields is accurate
 * to about 1e-14 relative; the other tail is 1 minus it, which is accurate because the branch is chosen so
 * that the computed tail is not close to 1 (except near x ≈ a + 1, where both tails are near ½).
 */

import { logGamma } from "./log-gamma.js";

const EPS = 2.220446049250313e-16;
const TINY = 1e-300;
const MAX_ITERATIONS = 100000;

/** Both tails of the regularized incomplete gamma function at one point. */
export interface IncompleteGammaPair {
  /** P(a, x), the lower tail. */
  readonly lower: number;
  /** Q(a, x) = 1 - P(a, x), computed directly where it is the small one. */
  readonly upper: number;
}

/**
 * Returns P(a, x) and Q(a, x) for a > 0, x >= 0. Both are NaN for invalid arguments.
 */
export function incompleteGammaPair(a: number, x: number): IncompleteGammaPair {
  if (!(a > 0) || !Number.isFinite(a) || !(x >= 0)) return { lower: NaN, upper: NaN };
  if (x === 0) return { lower: 0, upper: 1 };
  if (x === Infinity) return { lower: 1, upper: 0 };
  const logPrefactor = -x + a * Math.log(x) - logGamma(a);
  if (x < a + 1) {
    // Series for P.
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < MAX_ITERATIONS; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * EPS) break;
    }
    const lower = Math.min(1, sum * Math.exp(logPrefactor));
    return { lower, upper: 1 - lower };
  }
  // Continued fraction for Q (Lentz).
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_ITERATIONS; i++) {
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
  const upper = Math.min(1, Math.exp(logPrefactor) * h);
  return { lower: 1 - upper, upper };
}
