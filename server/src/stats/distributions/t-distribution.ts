/**
 * Student's t distribution with ν degrees of freedom: CDF, tails, two-sided p-value and quantile.
 *
 * Method: with x = ν/(ν + t²) and y = t²/(ν + t²) (both formed directly, never as 1 - the other),
 * P(|T| > |t|) = I_x(ν/2, 1/2) (Abramowitz & Stegun 1964, 26.7.1), so each tail is half of that and the
 * opposite side is ½ + ½·I_y(1/2, ν/2); the regularized incomplete beta supplies both tails directly.
 * The quantile solves ln P(T <= t) = ln p by safeguarded Newton steps in u = ln|t| (the tail is close
 * to linear in u), started from the normal quantile, with d ln P / du = -x^{ν/2} y^{1/2} / (B(ν/2, 1/2) P).
 * A quantile above ½ is found as minus the quantile of 1 - p, which is exact for p >= ½.
 *
 * Kernels: every function returns NaN when ν is not > 0 (ν = Infinity gives the normal distribution) or
 * an argument is NaN; callers check before showing a value.
 */

import { betaPowerTerm, incompleteBetaPair } from "../special/incomplete-beta.js";
import { normalCdf, normalQuantile, normalUpperTail } from "./normal-distribution.js";
import { solveIncreasing } from "./monotone-root.js";

/** Returns P(T <= t) for T ~ t(ν). NaN for invalid ν or NaN t. */
export function tCdf(t: number, df: number): number {
  if (!validDf(df) || Number.isNaN(t)) return NaN;
  if (df === Infinity) return normalCdf(t);
  const pair = tailPair(t, df);
  return t < 0 ? 0.5 * pair.lower : 0.5 + 0.5 * pair.upper;
}

/** Returns P(T > t) for T ~ t(ν), computed directly (accurate when tiny). NaN for invalid ν or NaN t. */
export function tUpperTail(t: number, df: number): number {
  return tCdf(-t, df);
}

/**
 * Returns the two-sided p-value P(|T| >= |t|) = I_{ν/(ν+t²)}(ν/2, 1/2) for T ~ t(ν), computed directly.
 * NaN for invalid ν or NaN t.
 */
export function tTwoSidedP(t: number, df: number): number {
  if (!validDf(df) || Number.isNaN(t)) return NaN;
  if (df === Infinity) return Math.min(1, 2 * normalUpperTail(Math.abs(t)));
  return tailPair(t, df).lower;
}

/**
 * Returns the t with P(T <= t) = p for T ~ t(ν), to about 1e-13 relative or better. Returns -Infinity
 * for p = 0, Infinity for p = 1, 0 for p = ½, NaN for p outside [0, 1] or invalid ν.
 */
export function tQuantile(p: number, df: number): number {
  if (!validDf(df) || !(p >= 0 && p <= 1)) return NaN;
  if (df === Infinity) return normalQuantile(p);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  const key = `${p} ${df}`;
  const known = recentQuantiles.get(key);
  if (known !== undefined) return known;
  const q = p > 0.5 ? -lowerQuantile(1 - p, df) : lowerQuantile(p, df);
  if (recentQuantiles.size >= RECENT_QUANTILE_LIMIT) recentQuantiles.clear();
  recentQuantiles.set(key, q);
  return q;
}

// Every re-analysis asks again for the same few quantiles (the confidence level's t at the residual df,
// the outlier bound at alpha/2n): each is a root search of about ten incomplete-beta evaluations (~0.07
// ms), so recent ones are kept. Bounded, and cleared whole when full; a pure function of (p, df).
const RECENT_QUANTILE_LIMIT = 64;
const recentQuantiles = new Map<string, number>();

/** Quantile for 0 < p < ½, as a negative t. */
function lowerQuantile(p: number, df: number): number {
  const logP = Math.log(p);
  const a = df / 2;
  const start = Math.log(Math.max(1e-300, -normalQuantile(p)));
  const u = solveIncreasing(
    (v) => {
      const t = -Math.exp(v);
      const { x, y } = betaArguments(t, df);
      const cdf = 0.5 * incompleteBetaPair(x, y, a, 0.5).lower;
      const power = betaPowerTerm(a, 0.5, x, y);
      return { value: logP - Math.log(cdf), slope: power / cdf };
    },
    start,
    1e-15,
  );
  return -Math.exp(u);
}

function tailPair(t: number, df: number) {
  const { x, y } = betaArguments(t, df);
  return incompleteBetaPair(x, y, df / 2, 0.5);
}

/** x = ν/(ν+t²), y = t²/(ν+t²), each formed directly; t² overflowing is handled. */
function betaArguments(t: number, df: number): { x: number; y: number } {
  const t2 = t * t;
  if (!Number.isFinite(t2)) {
    const at = Math.abs(t);
    return { x: df / at / at, y: 1 };
  }
  const s = df + t2;
  return { x: df / s, y: t2 / s };
}

function validDf(df: number): boolean {
  return df > 0;
}
