/**
 * Sums of squares of a balanced, complete, crossed factorial design from cell sums, in O(n + cells).
 *
 * When every cell of the crossed factors holds the same number of runs and the model is hierarchical
 * (every sub-term of a term is also a term) with no covariates, the effect spaces are orthogonal, so
 * Type I, II and III sums of squares coincide. Each term's effect is its marginal mean minus the
 * effects of all its proper sub-terms, and SS_T = (n / cells_T) * sum of squared effects (Yates 1937,
 * The Design and Analysis of Factorial Experiments; Scheffe 1959, The Analysis of Variance, section 4.1).
 * Every observation's leverage is rank / n by the symmetry of the balanced design. Responses are
 * taken about their mean before summing so that effects are differences of small numbers.
 */

import { mean, NeumaierSum } from "./design-matrix.js";
import type { CoreAdjustedMeans, ModelCore } from "./model-core.js";
import type { LinearModelInput } from "./types.js";

/** The crossed structure of an eligible design: which factors, their level counts and each run's cell. */
export interface BalancedLayout {
  /** Input factor indices involved in the model, in increasing order. */
  readonly factors: readonly number[];
  readonly levels: readonly number[];
  /** Cell index of each run (mixed radix, first involved factor fastest). */
  readonly cellOfRun: Int32Array;
  readonly cellCount: number;
  readonly perCell: number;
  /** Bit mask over `factors` for each term, in term order. */
  readonly termMasks: readonly number[];
}

/**
 * Returns the layout when the fast path is valid: no covariate in any term, at least one term, every
 * involved factor with at least two levels, a hierarchical model, and every cell of the involved
 * factors holding the same number (at least one) of runs. Returns null otherwise.
 */
export function balancedLayout(input: LinearModelInput): BalancedLayout | null {
  const n = input.y.length;
  const eligible = balancedEligibility(input);
  if (!eligible) return null;
  const { factors, levels, cellCount, termMasks } = eligible;
  // Counted first without storing each run's cell: most unbalanced designs are rejected here, before a
  // per-run array is allocated. Mixed radix, the first involved factor fastest.
  const codes = factors.map((f) => input.factors[f]!.codes);
  const strides = stridesOf(levels);
  const counts = new Int32Array(cellCount);
  for (let i = 0; i < n; i++) {
    let cell = 0;
    for (let q = 0; q < codes.length; q++) cell += codes[q]![i]! * strides[q]!;
    counts[cell]!++;
  }
  const perCell = counts[0]!;
  if (perCell < 1) return null;
  for (let c = 1; c < cellCount; c++) if (counts[c] !== perCell) return null;
  const cellOfRun = new Int32Array(n);
  for (let q = 0; q < codes.length; q++) {
    const factorCodes = codes[q]!;
    const step = strides[q]!;
    for (let i = 0; i < n; i++) cellOfRun[i]! += factorCodes[i]! * step;
  }
  return { factors, levels, cellOfRun, cellCount, perCell, termMasks };
}

/**
 * As {@link balancedLayout}, decided from the non-empty cells the cell path has already found (`cellOfRun`
 * numbering cells in any order, `cellCodes` each cell's level code per input factor, `counts` its runs):
 * the balance test then costs no pass over the observations, and an unbalanced design (the usual case at
 * scale) allocates nothing. The same layout as `balancedLayout`, cell for cell. `cellOfRun` may be
 * overwritten (with the mixed-radix cells) when the design is balanced.
 */
export function balancedLayoutFromCells(
  input: LinearModelInput,
  cells: { readonly cellOfRun: Int32Array; readonly cellCount: number; readonly cellCodes: readonly Int32Array[] },
  counts: Float64Array,
): BalancedLayout | null {
  const eligible = balancedEligibility(input);
  if (!eligible) return null;
  const { factors, levels, cellCount, termMasks } = eligible;
  // Every crossed cell non-empty and all holding the same number of runs.
  if (cells.cellCount !== cellCount) return null;
  const perCell = counts[0]!;
  if (!(perCell >= 1)) return null;
  for (let c = 1; c < cellCount; c++) if (counts[c] !== perCell) return null;
  const strides = stridesOf(levels);
  const mixed = new Int32Array(cellCount);
  for (let c = 0; c < cellCount; c++) {
    let cell = 0;
    for (let q = 0; q < factors.length; q++) cell += cells.cellCodes[factors[q]!]![c]! * strides[q]!;
    mixed[c] = cell;
  }
  const cellOfRun = cells.cellOfRun;
  for (let i = 0; i < cellOfRun.length; i++) cellOfRun[i] = mixed[cellOfRun[i]!]!;
  return { factors, levels, cellOfRun, cellCount, perCell, termMasks };
}

/** The structural conditions of `balancedLayout` (everything but the counts), or null. */
function balancedEligibility(input: LinearModelInput): { factors: number[]; levels: number[]; cellCount: number; termMasks: number[] } | null {
  const n = input.y.length;
  if (input.terms.length === 0 || input.terms.some((t) => t.covariates.length > 0 || t.factors.length === 0)) return null;
  const factors = [...new Set(input.terms.flatMap((t) => t.factors))].sort((a, b) => a - b);
  if (factors.length > 24) return null;
  const levels = factors.map((f) => input.factors[f]!.levelCount);
  if (levels.some((l) => l < 2)) return null;
  let cellCount = 1;
  for (const l of levels) {
    cellCount *= l;
    if (cellCount > n) return null;
  }
  const termMasks = input.terms.map((t) => t.factors.reduce((m, f) => m | (1 << factors.indexOf(f)), 0));
  const maskSet = new Set(termMasks);
  for (const mask of termMasks) {
    for (let sub = (mask - 1) & mask; sub > 0; sub = (sub - 1) & mask) if (!maskSet.has(sub)) return null;
  }
  return { factors, levels, cellCount, termMasks };
}

function stridesOf(levels: readonly number[]): Int32Array {
  const strides = new Int32Array(levels.length);
  let stride = 1;
  for (let q = 0; q < levels.length; q++) {
    strides[q] = stride;
    stride *= levels[q]!;
  }
  return strides;
}

/** Computes the model core of an eligible design (see `balancedLayout`) from cell sums. */
export function balancedModelCore(input: LinearModelInput, layout: BalancedLayout): ModelCore {
  const { y } = input;
  const n = y.length;
  const { levels, cellOfRun, cellCount, perCell, termMasks } = layout;
  const grand = mean(y);
  // Cell sums with Neumaier's compensated summation (Neumaier 1974): with thousands of runs per cell
  // plain summation would cost one to two of the ~15 digits the NIST StRD sets can reach.
  const cellMeans = new Float64Array(cellCount);
  const cellCompensation = new Float64Array(cellCount);
  for (let i = 0; i < n; i++) {
    const c = cellOfRun[i]!;
    const v = y[i]! - grand;
    const s = cellMeans[c]!;
    const t = s + v;
    cellCompensation[c]! += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    cellMeans[c] = t;
  }
  for (let c = 0; c < cellCount; c++) cellMeans[c] = (cellMeans[c]! + cellCompensation[c]!) / perCell;

  // Projection of a cell index onto the factors of `mask` (mixed radix over those factors only).
  const project = (cell: number, mask: number): number => {
    let index = 0;
    let stride = 1;
    for (let q = 0; q < levels.length; q++) {
      const code = cell % levels[q]!;
      cell = (cell - code) / levels[q]!;
      if (mask & (1 << q)) {
        index += code * stride;
        stride *= levels[q]!;
      }
    }
    return index;
  };
  const sizeOf = (mask: number): number => levels.reduce((s, l, q) => (mask & (1 << q) ? s * l : s), 1);

  // Effects by increasing term size: marginal mean minus the effects of all proper sub-terms.
  const effects = new Map<number, Float64Array>();
  let overall = 0;
  for (let c = 0; c < cellCount; c++) overall += cellMeans[c]!;
  overall /= cellCount;
  const order = termMasks.map((m, t) => ({ m, t })).sort((a, b) => popcount(a.m) - popcount(b.m));
  for (const { m } of order) {
    const size = sizeOf(m);
    const effect = new Float64Array(size);
    for (let c = 0; c < cellCount; c++) effect[project(c, m)]! += cellMeans[c]!;
    const share = size / cellCount;
    // Marginal index t of mask m corresponds to a representative cell; subtract sub-term effects.
    const representative = new Int32Array(size).fill(-1);
    for (let c = 0; c < cellCount; c++) {
      const t = project(c, m);
      if (representative[t]! < 0) representative[t] = c;
    }
    for (let t = 0; t < size; t++) {
      let v = effect[t]! * share - overall;
      const c = representative[t]!;
      for (let sub = (m - 1) & m; sub > 0; sub = (sub - 1) & m) v -= effects.get(sub)![project(c, sub)]!;
      effect[t] = v;
    }
    effects.set(m, effect);
  }

  const termSs: number[] = [];
  const termDf: number[] = [];
  let modelSs = 0;
  let rank = 1;
  termMasks.forEach((m) => {
    const effect = effects.get(m)!;
    let ss = 0;
    for (let t = 0; t < effect.length; t++) ss += effect[t]! * effect[t]!;
    ss *= n / effect.length;
    let df = 1;
    for (let q = 0; q < levels.length; q++) if (m & (1 << q)) df *= levels[q]! - 1;
    termSs.push(ss);
    termDf.push(df);
    modelSs += ss;
    rank += df;
  });

  const cellFitted = new Float64Array(cellCount);
  for (let c = 0; c < cellCount; c++) {
    let v = overall;
    for (const m of termMasks) v += effects.get(m)![project(c, m)]!;
    cellFitted[c] = v;
  }
  const fitted = new Float64Array(n);
  const residuals = new Float64Array(n);
  const residualSum = new NeumaierSum();
  for (let i = 0; i < n; i++) {
    const d = cellFitted[cellOfRun[i]!]!;
    const r = y[i]! - grand - d;
    fitted[i] = grand + d;
    residuals[i] = r;
    residualSum.add(r * r);
  }
  const residualSs = residualSum.value();
  const leverage = new Float64Array(n).fill(rank / n);

  const adjustedMeans: CoreAdjustedMeans[] = [];
  input.terms.forEach((term, t) => {
    if (term.factors.length !== 1) return;
    const effect = effects.get(termMasks[t]!)!;
    const factor = input.factors[term.factors[0]!]!;
    const perLevel = n / factor.levelCount;
    adjustedMeans.push({
      factor: factor.name,
      means: Array.from(effect, (e, level) => ({ level, mean: grand + overall + e, seFactor: 1 / Math.sqrt(perLevel) })),
    });
  });

  return {
    method: "balanced",
    rank,
    termSs,
    termDf,
    residualSs,
    modelSs,
    fitted,
    residuals,
    leverage,
    slopes: [],
    adjustedMeans,
    slopeHomogeneity: [],
    aliased: [],
    notes: [],
  };
}

function popcount(m: number): number {
  let c = 0;
  for (; m; m &= m - 1) c++;
  return c;
}
