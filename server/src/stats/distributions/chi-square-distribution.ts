/**
 * Chi-square distribution with ν degrees of freedom: P(X² > x) = Q(ν/2, x/2) (Abramowitz & Stegun 1964,
 * 26.4.19), the upper tail computed directly through the regularized incomplete gamma function.
 */

import { incompleteGammaPair } from "../special/incomplete-gamma.js";

/** Returns P(X² > x) for X² ~ χ²(ν); 1 for x <= 0. NaN for ν <= 0 or NaN x. */
export function chiSquareUpperTail(x: number, df: number): number {
  if (!(df > 0) || Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  return incompleteGammaPair(df / 2, x / 2).upper;
}

/** Returns P(X² <= x) for X² ~ χ²(ν); 0 for x <= 0. NaN for ν <= 0 or NaN x. */
export function chiSquareCdf(x: number, df: number): number {
  if (!(df > 0) || Number.isNaN(x)) return NaN;
  if (x <= 0) return 0;
  return incompleteGammaPair(df / 2, x / 2).lower;
}
