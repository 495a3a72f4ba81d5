/**
 * Fisher-Snedecor F distribution with (d1, d2) degrees of freedom: CDF, upper tail and quantile.
 *
 * Method: with r = d1 f / d2, x = r/(1 + r) and y = 1/(1 + r) (both formed directly),
 * P(F <= f) = I_x(d1/2, d2/2) and P(F > f) = I_y(d2/2, d1/2) (Abramowitz & Stegun 1964, 26.6.2).
 * The upper tail is evaluated with the swapped arguments by the incomplete beta, which returns the
 * tail it computes directly; it is never formed as 1 - cdf, so a p-value of 1e-22 comes out as 1e-22.
 * The quantile solves ln(tail) = ln(target) by safeguarded Newton steps in w = ln f, where both tails are
 * close to linear, with d ln P(F <= f)/dw = x^{d1/2} y^{d2/2} / (B(d1/2, d2/2) P(F <= f)); for p > ½ the
 * upper tail 1 - p (exact for p >= ½) is matched instead.
 *
 * Kernels: every function returns NaN when d1 or d2 is not a positive finite number or an argument is
 * NaN; callers check before showing a value.
 */

import { betaPowerTerm, incompleteBetaPair, type IncompleteBetaPair } from "../special/incomplete-beta.js";
import { solveIncreasing } from "./monotone-root.js";

/** Returns P(F <= f) for F ~ F(d1, d2); 0 for f <= 0. NaN for invalid degrees of freedom or NaN f. */
export function fCdf(f: number, df1: number, df2: number): number {
  return fPair(f, df1, df2).lower;
}

/**
 * Returns P(F > f) for F ~ F(d1, d2), computed directly as I_{d2/(d2+d1 f)}(d2/2, d1/2);
 * 1 for f <= 0. NaN for invalid degrees of freedom or NaN f.
 */
export function fUpperTail(f: number, df1: number, df2: number): number {
  return fPair(f, df1, df2).upper;
}

/**
 * Returns the f with P(F <= f) = p for F ~ F(d1, d2), to about 1e-13 relative. Returns 0 for p = 0,
 * Infinity for p = 1 and NaN for p outside [0, 1] or invalid degrees of freedom.
 */
export function fQuantile(p: number, df1: number, df2: number): number {
  if (!validDf(df1) || !validDf(df2) || !(p >= 0 && p <= 1)) return NaN;
  if (p === 0) return 0;
  if (p === 1) return Infinity;
  const useUpper = p > 0.5;
  const logTarget = Math.log(useUpper ? 1 - p : p);
  const a = df1 / 2;
  const b = df2 / 2;
  const w = solveIncreasing(
    (v) => {
      const { x, y } = betaArguments(Math.exp(v), df1, df2);
      const pair = incompleteBetaPair(x, y, a, b);
      const power = betaPowerTerm(a, b, x, y);
      if (useUpper) return { value: logTarget - Math.log(pair.upper), slope: power / pair.upper };
      return { value: Math.log(pair.lower) - logTarget, slope: power / pair.lower };
    },
    0,
    1e-15,
  );
  return Math.exp(w);
}

function fPair(f: number, df1: number, df2: number): IncompleteBetaPair {
  if (!validDf(df1) || !validDf(df2) || Number.isNaN(f)) return { lower: NaN, upper: NaN };
  if (f <= 0) return { lower: 0, upper: 1 };
  if (f === Infinity) return { lower: 1, upper: 0 };
  const { x, y } = betaArguments(f, df1, df2);
  return incompleteBetaPair(x, y, df1 / 2, df2 / 2);
}

/** x = r/(1+r), y = 1/(1+r) with r = d1 f / d2, formed so that neither is 1 minus the other. */
function betaArguments(f: number, df1: number, df2: number): { x: number; y: number } {
  const r = (df1 / df2) * f;
  if (r === Infinity) return { x: 1, y: 0 };
  return { x: r / (1 + r), y: 1 / (1 + r) };
}

function validDf(df: number): boolean {
  return df > 0 && Number.isFinite(df);
}
