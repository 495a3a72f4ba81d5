/**
 * Tests of equal means that do not assume equal variances.
 *
 * - Welch's (1951) ANOVA: weights w_i = n_i / s_i², W = Σ w_i, weighted mean m = Σ w_i ȳ_i / W,
 *   Λ = Σ (1 - w_i/W)²/(n_i - 1) / (k² - 1), F = [Σ w_i (ȳ_i - m)² / (k - 1)] / [1 + 2(k - 2)Λ]
 *   on k - 1 and 1/(3Λ) df. Equals R's oneway.test(var.equal = FALSE).
 * - Welch's (1947) t test for two groups with the Welch-Satterthwaite df. Equals R's t.test(var.equal = FALSE).
 */

import { fUpperTail } from "../distributions/f-distribution.js";
import { tTwoSidedP } from "../distributions/t-distribution.js";
import type { GroupSummary } from "../comparisons/group-summary.js";
import type { FTest } from "../checks/one-way-f.js";

/** Welch's ANOVA on group summaries; null when a group has fewer than 2 runs or no spread, or k < 2. */
export function welchAnova(groups: readonly GroupSummary[]): FTest | null {
  const used = groups.filter((g) => g.n > 0);
  const k = used.length;
  if (k < 2 || used.some((g) => g.n < 2 || !(g.variance! > 0))) return null;
  const w = used.map((g) => g.n / g.variance!);
  const total = w.reduce((s, x) => s + x, 0);
  const m = used.reduce((s, g, i) => s + w[i]! * g.mean, 0) / total;
  const a = used.reduce((s, g, i) => s + w[i]! * (g.mean - m) ** 2, 0) / (k - 1);
  const lambda = used.reduce((s, g, i) => s + (1 - w[i]! / total) ** 2 / (g.n - 1), 0) / (k * k - 1);
  const b = 1 + 2 * (k - 2) * lambda;
  const statistic = a / b;
  const df2 = 1 / (3 * lambda);
  return { statistic, df1: k - 1, df2, p: fUpperTail(statistic, k - 1, df2) };
}

/** A t test result; `diff` is mean a - mean b. */
export interface WelchT {
  readonly statistic: number;
  readonly df: number;
  readonly p: number;
  readonly diff: number;
}

/** Welch's two-sample t test of group a against group b; null when a group has fewer than 2 runs or both have no spread. */
export function welchT(a: GroupSummary, b: GroupSummary): WelchT | null {
  if (a.n < 2 || b.n < 2 || a.variance === null || b.variance === null) return null;
  const va = a.variance / a.n;
  const vb = b.variance / b.n;
  if (!(va + vb > 0)) return null;
  const diff = a.mean - b.mean;
  const statistic = diff / Math.sqrt(va + vb);
  const df = ((va + vb) * (va + vb)) / ((va * va) / (a.n - 1) + (vb * vb) / (b.n - 1));
  return { statistic, df, p: tTwoSidedP(statistic, df), diff };
}
