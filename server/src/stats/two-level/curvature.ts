/**
 * Centre points of a two-level design: pure error and the single-degree-of-freedom curvature test
 * (Montgomery 2017, Design and Analysis of Experiments, 9th ed., §6.8). With n_F factorial runs of mean
 * ȳ_F and n_C centre runs of mean ȳ_C, SS_curvature = n_F·n_C·(ȳ_F - ȳ_C)² / (n_F + n_C) on 1 df, tested
 * against the pure-error mean square: the pooled within-group variation of runs made at identical settings.
 */

import { fUpperTail } from "../distributions/f-distribution.js";

/** Pure error: the within-group sum of squares of runs grouped by identical settings. */
export interface PureError {
  readonly ss: number;
  readonly df: number;
}

/**
 * Pure error from groups of runs at identical settings (`group[i]` is the group of run i; groups of one
 * run contribute nothing). Uses the two-pass within-group deviations for accuracy.
 */
export function pureError(y: Float64Array, group: Int32Array): PureError {
  const sums = new Map<number, { n: number; sum: number }>();
  for (let i = 0; i < y.length; i++) {
    const g = sums.get(group[i]!) ?? { n: 0, sum: 0 };
    g.n++;
    g.sum += y[i]!;
    sums.set(group[i]!, g);
  }
  let ss = 0;
  for (let i = 0; i < y.length; i++) {
    const g = sums.get(group[i]!)!;
    const d = y[i]! - g.sum / g.n;
    ss += d * d;
  }
  let df = 0;
  for (const g of sums.values()) df += g.n - 1;
  return { ss, df };
}

export interface CurvatureTest {
  readonly ok: true;
  readonly factorialMean: number;
  readonly centreMean: number;
  readonly ss: number;
  readonly df: 1;
  /** Null without pure-error degrees of freedom or with zero pure error. */
  readonly f: number | null;
  readonly p: number | null;
}

/** The curvature test from factorial and centre responses, against the given pure error. */
export function curvatureTest(factorial: readonly number[], centre: readonly number[], error: PureError): CurvatureTest | { ok: false; reason: string } {
  const nF = factorial.length;
  const nC = centre.length;
  if (nF === 0 || nC === 0) return { ok: false, reason: "the curvature test needs factorial runs and centre runs" };
  const mF = factorial.reduce((a, b) => a + b, 0) / nF;
  const mC = centre.reduce((a, b) => a + b, 0) / nC;
  const ss = (nF * nC * (mF - mC) ** 2) / (nF + nC);
  const msE = error.df > 0 ? error.ss / error.df : 0;
  const f = error.df > 0 && msE > 0 ? ss / msE : null;
  const p = f === null ? null : fUpperTail(f, 1, error.df);
  return { ok: true, factorialMean: mF, centreMean: mC, ss, df: 1, f, p: p === null || Number.isNaN(p) ? null : p };
}
