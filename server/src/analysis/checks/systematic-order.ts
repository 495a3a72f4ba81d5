/**
 * The `systematic-order` check: is the order of the runs (row order of the runs table) tied to the levels
 * of a treatment factor? If the runs of one level come early and another level late, a drift over time
 * (tool wear, warm-up, a new material lot) is confounded with that factor's effect, which only a random
 * run order protects against.
 *
 * Statistic: the Kruskal–Wallis H (Kruskal & Wallis 1952) of the run positions 1..n grouped by level. The
 * positions are ranks without ties, so H / (n - 1) is the squared rank correlation between run order and
 * level (for two levels, exactly the squared point-biserial correlation of rank and level, i.e. Spearman's
 * rho squared). It is corrected for chance as ε² = (H - (k - 1)) / (n - k) — under a random order
 * E[H] = k - 1, and H ≤ n - 1 — so that designs with few runs and many levels do not warn by chance.
 * The statistic does not depend on how the levels are ordered or coded, so clustering in any level order
 * counts, not only sorting in the declared order.
 *
 * Threshold: a warning when the chance-corrected rank correlation sqrt(ε²) is at least 0.7. This is a rule
 * of thumb, not a significance test: 0.7 is where a common rule of thumb starts calling a correlation
 * "high" (Hinkle, Wiersma & Jurs 2003, as tabulated by Mukaka 2012, Malawi Med J 24(3):69–71). A fully
 * sorted order gives values near 1; a random order of 8 or more runs reaches 0.7 by chance in roughly 5% of
 * files or fewer (fewer as runs grow: about 0.5% at 16 runs of a two-level factor).
 *
 * Only fixed factors are checked. Blocking factors (`as block`, `as subject`) are grouped on purpose, and
 * the levels of a random factor (a batch, a lot) are usually made and measured together, so their runs are
 * grouped by nature; the effects of interest are the fixed ones.
 */
import type { TrialFile } from "../../../../grammar/src/ast.js";
import type { Design } from "../design.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";

/** The rule-of-thumb threshold on the chance-corrected rank correlation (see the module comment). */
export const SYSTEMATIC_ORDER_THRESHOLD = 0.7;

/** Fewest runs with a known level for the check to say anything. */
export const SYSTEMATIC_ORDER_MIN_RUNS = 6;

/** How strongly a sequence of levels is clustered in run order. */
export interface OrderClustering {
  /** Runs with a known level. */
  readonly n: number;
  /** Levels present. */
  readonly k: number;
  /** Kruskal–Wallis H of the positions 1..n grouped by level (positions have no ties). */
  readonly h: number;
  /** Chance-corrected rank correlation sqrt(max(0, (H - (k - 1)) / (n - k))), between 0 and 1. */
  readonly correlation: number;
}

/**
 * The clustering of `levels` (a level index per run in run order; negative entries are unknown and
 * skipped), or undefined when fewer than two levels are present or there are no more runs than levels.
 * `levelCount`, when given, bounds the level indices (a factor's declared levels), so that the sizes and
 * rank sums live in typed arrays filled in a single pass over the runs.
 */
export function orderClustering(levels: ArrayLike<number>, levelCount?: number): OrderClustering | undefined {
  let count = levelCount ?? 0;
  if (levelCount === undefined) for (let r = 0; r < levels.length; r++) if (levels[r]! >= count) count = levels[r]! + 1;
  const sizes = new Int32Array(count);
  // Rank sums are whole numbers below 2^53 for any file that fits in memory, so they are exact.
  const rankSums = new Float64Array(count);
  let n = 0;
  for (let r = 0; r < levels.length; r++) {
    const level = levels[r]!;
    if (level < 0) continue;
    if (level >= count || level !== Math.floor(level)) return levelCount === undefined ? undefined : orderClustering(levels);
    n++;
    sizes[level]!++;
    rankSums[level] += n;
  }
  let k = 0;
  for (let level = 0; level < count; level++) if (sizes[level]! > 0) k++;
  if (k < 2 || n <= k) return undefined;
  // The levels in order of their first appearance (as a map of the levels would iterate them); every
  // level usually appears within the first few runs.
  const seen = new Uint8Array(count);
  const order: number[] = [];
  for (let r = 0; order.length < k; r++) {
    const level = levels[r]!;
    if (level < 0 || seen[level]) continue;
    seen[level] = 1;
    order.push(level);
  }
  return clustering(n, order, sizes, rankSums);
}

/**
 * `orderClustering` of a factor whose every run's level is known, from counts made as the runs were
 * read (`DesignRuns.tallies`): runs per level, the sum of their run numbers, each level's first run (-1
 * for a level without runs). The same numbers, bit for bit.
 */
export function orderClusteringOfTally(sizes: Int32Array, rankSums: Float64Array, firstRuns: Int32Array): OrderClustering | undefined {
  let n = 0;
  const order: number[] = [];
  for (let level = 0; level < sizes.length; level++) {
    n += sizes[level]!;
    if (sizes[level]! > 0) order.push(level);
  }
  if (order.length < 2 || n <= order.length) return undefined;
  order.sort((a, b) => firstRuns[a]! - firstRuns[b]!);
  return clustering(n, order, sizes, rankSums);
}

/** H and the corrected correlation of `n` runs; `order`: the levels present, in order of first appearance. */
function clustering(n: number, order: readonly number[], sizes: Int32Array, rankSums: Float64Array): OrderClustering {
  const k = order.length;
  // The sum of R_i^2 / n_i, formed in the levels' order of first appearance.
  let sum = 0;
  for (const level of order) sum += (rankSums[level]! * rankSums[level]!) / sizes[level]!;
  // H = 12 / (n (n + 1)) * sum(R_i^2 / n_i) - 3 (n + 1); clamped at 0 against rounding.
  const h = Math.max(0, (12 / (n * (n + 1))) * sum - 3 * (n + 1));
  const corrected = Math.min(1, Math.max(0, (h - (k - 1)) / (n - k)));
  return { n, k, h, correlation: Math.sqrt(corrected) };
}

/**
 * `systematic-order` warnings for every fixed factor whose levels are clustered in run order, located
 * at the factor's column in the runs header (or at the `runs` keyword), with the factor's declaration as a
 * related location.
 */
export function checkSystematicOrder(file: TrialFile, design: Design): Diagnostic[] {
  const table = file.runs;
  if (!table || design.runs.count < SYSTEMATIC_ORDER_MIN_RUNS) return [];
  const out: Diagnostic[] = [];
  design.factors.forEach((factor, f) => {
    if (factor.role !== "fixed") return;
    // Counted as the runs were read when the reader did (the same numbers; no pass over the runs).
    const tally = design.runs.tallies?.levels[f];
    const c = tally ? orderClusteringOfTally(tally.counts, tally.rankSums, tally.firstRuns) : orderClustering(design.runs.levels[f]!, factor.levels.length);
    if (!c || c.n < SYSTEMATIC_ORDER_MIN_RUNS || c.correlation < SYSTEMATIC_ORDER_THRESHOLD) return;
    const column = table.columns.find((x) => x.text === factor.name);
    out.push(
      diagnostic(
        "systematic-order",
        column?.span ?? table.keywordSpan,
        `The run order follows factor '${factor.name}': its levels are clustered in the sequence of runs (rank correlation ${c.correlation.toFixed(2)}, warning from ${SYSTEMATIC_ORDER_THRESHOLD}). A drift over time would be mixed up with the effect of '${factor.name}': randomize the pending runs (trialbook plan) or, if the runs are made, say why the order is safe.`,
        [{ span: factor.span, message: `factor '${factor.name}'` }],
      ),
    );
  });
  return out;
}
