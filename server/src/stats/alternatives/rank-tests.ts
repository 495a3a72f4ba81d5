/**
 * Rank tests of equal location.
 *
 * - Kruskal & Wallis (1952): H = 12/(N(N+1)) Σ R_i²/n_i - 3(N+1) with mid-ranks for ties, divided by the
 *   tie correction 1 - Σ(t³ - t)/(N³ - N), referred to χ²(k - 1). Equals R's kruskal.test.
 * - Friedman (1937) for a randomized complete block design (one run per treatment and block): ranks within
 *   blocks, statistic 12 Σ (R_j - b(k+1)/2)² / (b k (k+1) - Σ(t³ - t)/(k - 1)) with the within-block tie
 *   correction, referred to χ²(k - 1). Equals R's friedman.test.
 */

import { chiSquareUpperTail } from "../distributions/chi-square-distribution.js";
import type { ChiSquareTest } from "../checks/bartlett.js";

/** Mid-ranks (1-based) of `values`, and Σ(t³ - t) over tie groups. */
export function midRanks(values: readonly number[]): { ranks: number[]; tieSum: number } {
  const order = values.map((_, i) => i).sort((a, b) => values[a]! - values[b]!);
  const ranks = new Array<number>(values.length);
  let tieSum = 0;
  for (let start = 0; start < order.length; ) {
    let end = start + 1;
    while (end < order.length && values[order[end]!] === values[order[start]!]) end++;
    const t = end - start;
    for (let i = start; i < end; i++) ranks[order[i]!] = (start + 1 + end) / 2;
    tieSum += t * t * t - t;
    start = end;
  }
  return { ranks, tieSum };
}

/** Kruskal-Wallis test; null with fewer than 2 non-empty groups or all values tied. */
export function kruskalWallis(y: ArrayLike<number>, codes: ArrayLike<number>, count: number): ChiSquareTest | null {
  const values = Array.from(y);
  const n = values.length;
  const { ranks, tieSum } = midRanks(values);
  const rankSum = new Float64Array(count);
  const size = new Float64Array(count);
  for (let i = 0; i < n; i++) {
    rankSum[codes[i]!] += ranks[i]!;
    size[codes[i]!]!++;
  }
  const k = size.filter((s) => s > 0).length;
  const correction = 1 - tieSum / (n * n * n - n);
  if (k < 2 || !(correction > 0)) return null;
  let h = 0;
  for (let g = 0; g < count; g++) if (size[g]! > 0) h += (rankSum[g]! * rankSum[g]!) / size[g]!;
  h = ((12 / (n * (n + 1))) * h - 3 * (n + 1)) / correction;
  return { statistic: h, df: k - 1, p: chiSquareUpperTail(h, k - 1) };
}

/**
 * Friedman test; `table[b][j]` is the value of treatment j in block b (complete: every block has every
 * treatment once). Null with fewer than 2 treatments or blocks, or all values tied within every block.
 */
export function friedman(table: readonly (readonly number[])[]): ChiSquareTest | null {
  const b = table.length;
  const k = table[0]?.length ?? 0;
  if (b < 2 || k < 2) return null;
  const rankSums = new Float64Array(k);
  let tieSum = 0;
  for (const row of table) {
    const { ranks, tieSum: t } = midRanks(row as number[]);
    ranks.forEach((r, j) => (rankSums[j] += r));
    tieSum += t;
  }
  const expected = (b * (k + 1)) / 2;
  const numerator = 12 * rankSums.reduce((s, r) => s + (r - expected) ** 2, 0);
  const denominator = b * k * (k + 1) - tieSum / (k - 1);
  if (!(denominator > 0)) return null;
  const statistic = numerator / denominator;
  return { statistic, df: k - 1, p: chiSquareUpperTail(statistic, k - 1) };
}
