/**
 * Sphericity of one within-subject term: Mauchly's (1940) test and the Greenhouse–Geisser (1959) and
 * Huynh–Feldt (1976) epsilons, from the error sums-of-squares-and-products matrix E (p × p) of the
 * term's orthonormal contrasts on `df` error degrees of freedom (subjects minus between-subject cells).
 *
 * - Mauchly's W = det(E) / (tr(E)/p)^p. Its p-value uses Anderson's (1958, An Introduction to Multivariate
 *   Statistical Analysis, §10.7) correction: z = -df·ρ·ln W with ρ = 1 - (2p² + p + 2)/(6p·df),
 *   f = p(p+1)/2 - 1, ω₂ = (p+2)(p-1)(p-2)(2p³+6p²+3p+2)/(288 p² df² ρ²) and
 *   P = P(χ²_f > z) + ω₂·(P(χ²_{f+4} > z) - P(χ²_f > z)).
 * - Greenhouse–Geisser: ε̂ = (tr E)² / (p·tr(E²)) (Box 1954; Greenhouse & Geisser 1959).
 * - Huynh–Feldt: ε̃ = ((df + 1)·p·ε̂ - 2) / (p·(df - p·ε̂)), the form with Lecoutre's (1991,
 *   J. Educational Statistics 16) correction of the original numerator N to df + 1; it may exceed 1, and
 *   corrected tests use min(ε̃, 1).
 *
 * Which to read (Girden 1992, ANOVA: Repeated Measures, Sage, p. 21): the Greenhouse–Geisser correction
 * when ε̂ ≤ 0.75, the Huynh–Feldt correction when ε̂ > 0.75, where Greenhouse–Geisser is conservative.
 */

import { chiSquareUpperTail } from "../distributions/chi-square-distribution.js";
import { determinant, type Matrix } from "./contrasts.js";

export interface Sphericity {
  readonly ok: true;
  /** Number of contrasts of the term (its degrees of freedom). */
  readonly p: number;
  /** Mauchly's W and p-value; null for p = 1 (sphericity holds trivially) or a singular E. */
  readonly mauchlyW: number | null;
  readonly chiSquare: number | null;
  readonly chiSquareDf: number | null;
  readonly mauchlyP: number | null;
  readonly greenhouseGeisser: number;
  /** Huynh–Feldt estimate as computed (may exceed 1). */
  readonly huynhFeldt: number;
  /** Which correction Girden (1992) recommends reading for this ε̂. */
  readonly recommended: "greenhouseGeisser" | "huynhFeldt";
}

/** Girden's (1992) threshold: above it read Huynh–Feldt, at or below it Greenhouse–Geisser. */
export const GIRDEN_THRESHOLD = 0.75;

/** Sphericity statistics of a term from its error SSCP matrix `e` on `df` error degrees of freedom. */
export function sphericity(e: Matrix, df: number): Sphericity | { ok: false; reason: string } {
  const p = e.rows;
  if (p < 1 || e.cols !== p) return { ok: false, reason: "the error matrix must be square" };
  if (!(df >= 1)) return { ok: false, reason: "no error degrees of freedom for the sphericity statistics" };
  let trace = 0;
  let traceSq = 0;
  for (let i = 0; i < p; i++) {
    trace += e.data[i * p + i]!;
    for (let j = 0; j < p; j++) traceSq += e.data[i * p + j]! * e.data[j * p + i]!;
  }
  if (!(trace > 0) || !(traceSq > 0)) return { ok: false, reason: "the within-subject differences have no variation" };
  const gg = (trace * trace) / (p * traceSq);
  const hf = ((df + 1) * p * gg - 2) / (p * (df - p * gg));
  const hfValue = Number.isFinite(hf) && hf > 0 ? hf : 1;
  const recommended = gg > GIRDEN_THRESHOLD ? "huynhFeldt" : "greenhouseGeisser";
  if (p === 1) return { ok: true, p, mauchlyW: null, chiSquare: null, chiSquareDf: null, mauchlyP: null, greenhouseGeisser: 1, huynhFeldt: 1, recommended: "huynhFeldt" };
  const det = determinant(e);
  if (!(det > 0) || df <= p - 1) {
    return { ok: true, p, mauchlyW: null, chiSquare: null, chiSquareDf: null, mauchlyP: null, greenhouseGeisser: gg, huynhFeldt: hfValue, recommended };
  }
  const logW = Math.log(det) - p * Math.log(trace / p);
  const rho = 1 - (2 * p * p + p + 2) / (6 * p * df);
  const w2 = ((p + 2) * (p - 1) * (p - 2) * (2 * p ** 3 + 6 * p * p + 3 * p + 2)) / (288 * (df * p * rho) ** 2);
  const z = -df * rho * logW;
  const f = (p * (p + 1)) / 2 - 1;
  const pr1 = chiSquareUpperTail(z, f);
  const pr2 = chiSquareUpperTail(z, f + 4);
  const pv = Math.min(1, Math.max(0, pr1 + w2 * (pr2 - pr1)));
  return {
    ok: true,
    p,
    mauchlyW: Math.exp(logW),
    chiSquare: z,
    chiSquareDf: f,
    mauchlyP: Number.isFinite(pv) ? pv : null,
    greenhouseGeisser: gg,
    huynhFeldt: hfValue,
    recommended,
  };
}
