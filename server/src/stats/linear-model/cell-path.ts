/**
 * The cell computation path: least squares from cell sufficient statistics, for models whose columns are
 * constant within cells (factor terms only, no covariate in any term), balanced or not, empty cells
 * allowed.
 *
 * Why it is exact: when every row of X in cell c equals the cell's row x_c, the residual sum of squares of
 * any coefficient vector b splits as
 *     sum_i (y_i - x_i b)^2 = sum_c n_c (ybar_c - x_c b)^2 + sum_c W_c,
 * with n_c, ybar_c and W_c the count, mean and within-cell sum of squares of cell c (the decomposition of
 * Searle 1987, Linear Models for Unbalanced Data, section 2.3, which is why cell means and counts are
 * sufficient for the fixed-effects model). So b minimises the weighted cell-level problem with rows
 * sqrt(n_c) x_c and responses sqrt(n_c) ybar_c, whose cross-product matrix X^T X and vector X^T y are the
 * full problem's. Every nested fit differs from the full one only in its columns, so every extra sum of
 * squares (Types I, II, III), the rank, the aliasing decisions (column norms and projections are the
 * same), R up to row signs (hence standard errors), coefficients and adjusted means are the same as the
 * general QR path's; residual sums of squares gain the constant sum_c W_c. The per-observation leverage
 * is x_c^T (X^T X)^{-1} x_c, the weighted cell leverage divided by n_c (Hoaglin & Welsch 1978, "The hat
 * matrix in regression and ANOVA", The American Statistician 32, 17-22).
 *
 * Cost: O(n) passes over the observations plus the QR of an m x p matrix (m non-empty cells) per nested
 * fit, instead of an n x p QR per nested fit: a million runs in a 4 x 3 design cost three linear passes.
 *
 * Accuracy: cell means use a compensated first pass (Neumaier 1974) and a correcting second pass, and
 * W_c the corrected two-pass formula (Chan, Golub & LeVeque 1983), so neither grows its rounding error with
 * the cell size.
 */

import { buildDesignMatrix, NeumaierSum } from "./design-matrix.js";
import type { ModelCore } from "./model-core.js";
import { qrCoreOf } from "./qr-path.js";
import type { LinearModelInput, ModelFactor } from "./types.js";

/** The non-empty cells of the factors a model uses, and each observation's cell. */
export interface CellLayout {
  /** Cell (0..cellCount-1, in order of first appearance) of each observation. */
  readonly cellOfRun: Int32Array;
  /** Number of non-empty cells. */
  readonly cellCount: number;
  /** Per input factor: the factor's level code in each cell (all 0 for a factor no term uses). */
  readonly cellCodes: readonly Int32Array[];
}

/** Largest dense key space (product of level counts) indexed by an array rather than a map. */
const DENSE_KEYS = 1 << 22;

/**
 * Returns the cell layout when the cell path applies: no term has a covariate and there are fewer
 * non-empty cells than observations (otherwise the general path costs the same). Null otherwise.
 */
export function cellLayout(input: LinearModelInput): CellLayout | null {
  return cellLayoutWithStatistics(input)?.layout ?? null;
}

/** A cell layout and the cell statistics of the input's response over it (see `cellLayoutWithStatistics`). */
export interface CellsOfInput {
  readonly layout: CellLayout;
  readonly statistics: CellStatistics;
}

/**
 * `cellLayout` and `cellStatistics` of the input's response together, bit for bit the same: with a dense
 * key space the cell of each observation is found and its first-pass sums accumulated in one pass over the
 * observations (each cell still sums its runs in observation order), instead of one pass per factor, one
 * numbering pass and one summing pass. Null when the cell path does not apply.
 */
export function cellLayoutWithStatistics(input: LinearModelInput): CellsOfInput | null {
  const n = input.y.length;
  if (input.terms.some((t) => t.covariates.length > 0)) return null;
  const used = [...new Set(input.terms.flatMap((t) => t.factors))].sort((a, b) => a - b);
  let keySpace = 1;
  for (const f of used) keySpace *= input.factors[f]!.levelCount;
  if (!Number.isSafeInteger(keySpace)) return null;
  const codes = used.map((f) => input.factors[f]!.codes);
  const radix = used.map((f) => input.factors[f]!.levelCount);
  if (keySpace > DENSE_KEYS) {
    const layout = sparseCellLayout(input, used, codes, radix);
    return layout ? { layout, statistics: cellStatistics(input.y, layout) } : null;
  }
  const y = input.y;
  const cellOfRun = new Int32Array(n);
  const dense = new Int32Array(keySpace).fill(-1);
  // Accumulators for at most min(keySpace, n) cells, numbered in order of first appearance.
  const room = Math.min(keySpace, n);
  const firstRun = new Int32Array(room);
  const counts = new Float64Array(room);
  const sums = new Float64Array(room);
  const compensation = new Float64Array(room);
  let cellCount = 0;
  // Up to two factors read from locals (the common designs); more through the arrays of codes.
  const a = codes.length > 0 ? codes[0]! : null;
  const b = codes.length > 1 ? codes[1]! : null;
  const radixB = codes.length > 1 ? radix[1]! : 1;
  const few = codes.length <= 2;
  if (!few) {
    // Three or more factors: the keys factor by factor over typed arrays held in locals (one tight loop
    // each), into cellOfRun, which the pass below then renumbers in place.
    for (let q = 0; q < codes.length; q++) {
      const factorCodes = codes[q]!;
      const r = radix[q]!;
      for (let i = 0; i < n; i++) cellOfRun[i] = cellOfRun[i]! * r + factorCodes[i]!;
    }
  }
  for (let i = 0; i < n; i++) {
    const key = few ? (a === null ? 0 : a[i]!) * radixB + (b === null ? 0 : b[i]!) : cellOfRun[i]!;
    let c = dense[key]!;
    if (c < 0) {
      if (cellCount + 1 >= n) return null;
      c = cellCount++;
      firstRun[c] = i;
      dense[key] = c;
    }
    cellOfRun[i] = c;
    // First pass of cellStatistics (Neumaier 1974), the same operations in the same order per cell.
    const v = y[i]!;
    const s = sums[c]!;
    const t = s + v;
    compensation[c]! += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    sums[c] = t;
    counts[c]!++;
  }
  const layout = { cellOfRun, cellCount, cellCodes: cellCodesOf(input, used, firstRun, cellCount) };
  const statistics = finishCellStatistics(y, cellOfRun, cellCount, counts.slice(0, cellCount), sums.slice(0, cellCount), compensation.slice(0, cellCount));
  return { layout, statistics };
}

/** `CellsOfInput` found together with the input checks and the response's mean (see `scanCells`). */
export interface ScannedCells extends CellsOfInput {
  /** Whether every response value equals the first. */
  readonly allEqual: boolean;
  /** The response's mean, bit for bit `mean(y)` of design-matrix.ts. */
  readonly mean: number;
}

/**
 * For a model of one or two factors, both used by its terms, and no covariate (the usual designed
 * experiment): checks every response value is finite and every level code in range, finds the cells and
 * their statistics (as `cellLayoutWithStatistics`) and the response's compensated mean (as `mean`), all
 * in the two passes the cell statistics need instead of six. Returns null, having changed nothing, when
 * the model has another shape, a value or code is out of bounds (the caller validates in full), or the
 * cell path does not apply. The caller has checked the lengths, level counts and terms.
 */
export function scanCells(input: LinearModelInput): ScannedCells | null {
  const y = input.y;
  const n = y.length;
  const factorCount = input.factors.length;
  if (n < 2 || input.covariates.length > 0 || factorCount < 1 || factorCount > 2) return null;
  if (input.terms.some((t) => t.covariates.length > 0)) return null;
  const used = new Set(input.terms.flatMap((t) => t.factors));
  if (used.size !== factorCount) return null;
  const a = input.factors[0]!.codes;
  const la = input.factors[0]!.levelCount;
  const b = factorCount > 1 ? input.factors[1]!.codes : a;
  const lb = factorCount > 1 ? input.factors[1]!.levelCount : 1;
  const two = factorCount > 1;
  const keySpace = la * lb;
  if (!(keySpace <= DENSE_KEYS) || a.length !== n || b.length !== n) return null;
  const cellOfRun = new Int32Array(n);
  const dense = new Int32Array(keySpace).fill(-1);
  const room = Math.min(keySpace, n);
  const firstRun = new Int32Array(room);
  const counts = new Float64Array(room);
  const sums = new Float64Array(room);
  const compensation = new Float64Array(room);
  let cellCount = 0;
  const first = y[0]!;
  let equal = true;
  // Neumaier's sum of all values (the first pass of `mean`).
  let total = 0;
  let totalCompensation = 0;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    const ca = a[i]!;
    const cb = two ? b[i]! : 0;
    // v - v is 0 for a finite value and NaN for NaN or an infinity.
    if (v - v !== 0 || ca < 0 || ca >= la || cb < 0 || cb >= lb) return null;
    if (v !== first) equal = false;
    const sum = total + v;
    totalCompensation += Math.abs(total) >= Math.abs(v) ? total - sum + v : v - sum + total;
    total = sum;
    const key = ca * lb + cb;
    let c = dense[key]!;
    if (c < 0) {
      if (cellCount + 1 >= n) return null;
      c = cellCount++;
      firstRun[c] = i;
      dense[key] = c;
    }
    cellOfRun[i] = c;
    // First pass of cellStatistics (Neumaier 1974), the same operations in the same order per cell.
    const s = sums[c]!;
    const t = s + v;
    compensation[c]! += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    sums[c] = t;
    counts[c]!++;
  }
  const roughMean = (total + totalCompensation) / n;
  // Second passes of cellStatistics and of `mean`, together.
  const means = new Float64Array(cellCount);
  for (let c = 0; c < cellCount; c++) means[c] = (sums[c]! + compensation[c]!) / counts[c]!;
  const deviation = new Float64Array(cellCount);
  const squares = new Float64Array(cellCount);
  let correction = 0;
  let correctionCompensation = 0;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    const c = cellOfRun[i]!;
    const d = v - means[c]!;
    deviation[c]! += d;
    squares[c]! += d * d;
    const e = v - roughMean;
    const sum = correction + e;
    correctionCompensation += Math.abs(correction) >= Math.abs(e) ? correction - sum + e : e - sum + correction;
    correction = sum;
  }
  const within = new NeumaierSum();
  const cellCounts = counts.slice(0, cellCount);
  for (let c = 0; c < cellCount; c++) {
    const d = deviation[c]!;
    means[c]! += d / cellCounts[c]!;
    within.add(Math.max(0, squares[c]! - (d * d) / cellCounts[c]!));
  }
  const usedList = two ? [0, 1] : [0];
  const layout = { cellOfRun, cellCount, cellCodes: cellCodesOf(input, usedList, firstRun, cellCount) };
  return {
    layout,
    statistics: { counts: cellCounts, means, withinSs: within.value() },
    allEqual: equal,
    mean: roughMean + (correction + correctionCompensation) / n,
  };
}

/** The layout through a map of keys, for key spaces too large for a dense index. */
function sparseCellLayout(input: LinearModelInput, used: readonly number[], codes: readonly Int32Array[], radix: readonly number[]): CellLayout | null {
  const n = input.y.length;
  const cellOfRun = new Int32Array(n);
  const firstRun: number[] = [];
  const sparse = new Map<number, number>();
  for (let i = 0; i < n; i++) {
    let key = 0;
    for (let q = 0; q < codes.length; q++) key = key * radix[q]! + codes[q]![i]!;
    let cell = sparse.get(key) ?? -1;
    if (cell < 0) {
      cell = firstRun.length;
      firstRun.push(i);
      if (firstRun.length >= n) return null;
      sparse.set(key, cell);
    }
    cellOfRun[i] = cell;
  }
  return { cellOfRun, cellCount: firstRun.length, cellCodes: cellCodesOf(input, used, firstRun, firstRun.length) };
}

function cellCodesOf(input: LinearModelInput, used: readonly number[], firstRun: ArrayLike<number>, cellCount: number): Int32Array[] {
  return input.factors.map((f, k) => {
    const out = new Int32Array(cellCount);
    if (used.includes(k)) for (let c = 0; c < cellCount; c++) out[c] = f.codes[firstRun[c]!]!;
    return out;
  });
}

/** Count, mean and within-cell sum of squares of every cell. */
export interface CellStatistics {
  readonly counts: Float64Array;
  readonly means: Float64Array;
  /** Sum over cells of the within-cell sums of squares. */
  readonly withinSs: number;
}

/** Computes the cell statistics of `y` for `layout` (two passes, see the module comment). */
export function cellStatistics(y: Float64Array, layout: CellLayout): CellStatistics {
  const { cellOfRun, cellCount } = layout;
  const n = y.length;
  const counts = new Float64Array(cellCount);
  const sums = new Float64Array(cellCount);
  const compensation = new Float64Array(cellCount);
  for (let i = 0; i < n; i++) {
    const c = cellOfRun[i]!;
    const v = y[i]!;
    const s = sums[c]!;
    const t = s + v;
    compensation[c]! += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    sums[c] = t;
    counts[c]!++;
  }
  return finishCellStatistics(y, cellOfRun, cellCount, counts, sums, compensation);
}

/** The means from the first pass's compensated sums, then the correcting second pass (module comment). */
function finishCellStatistics(y: Float64Array, cellOfRun: Int32Array, cellCount: number, counts: Float64Array, sums: Float64Array, compensation: Float64Array): CellStatistics {
  const n = y.length;
  const means = new Float64Array(cellCount);
  for (let c = 0; c < cellCount; c++) means[c] = (sums[c]! + compensation[c]!) / counts[c]!;
  const deviation = sums.fill(0);
  const squares = compensation.fill(0);
  for (let i = 0; i < n; i++) {
    const c = cellOfRun[i]!;
    const d = y[i]! - means[c]!;
    deviation[c]! += d;
    squares[c]! += d * d;
  }
  const within = new NeumaierSum();
  for (let c = 0; c < cellCount; c++) {
    const d = deviation[c]!;
    means[c]! += d / counts[c]!;
    within.add(Math.max(0, squares[c]! - (d * d) / counts[c]!));
  }
  return { counts, means, withinSs: within.value() };
}

/**
 * Computes the model core from cell statistics, or returns null when the cell path does not apply (see
 * `cellLayout`); the caller then uses the general QR path. Agrees with `qrModelCore` to rounding.
 */
export function cellModelCore(input: LinearModelInput, cells: CellsOfInput | null = cellLayoutWithStatistics(input)): ModelCore | null {
  if (!cells) return null;
  const { layout } = cells;
  const { y } = input;
  const n = y.length;
  const m = layout.cellCount;
  const { counts, means, withinSs } = cells.statistics;

  // The weighted cell-level problem: rows sqrt(n_c) x_c, responses sqrt(n_c) ybar_c.
  const weights = new Float64Array(m);
  const z = new Float64Array(m);
  for (let c = 0; c < m; c++) {
    weights[c] = Math.sqrt(counts[c]!);
    z[c] = weights[c]! * means[c]!;
  }
  const cellFactors: ModelFactor[] = input.factors.map((f, k) => ({ name: f.name, levelCount: f.levelCount, codes: layout.cellCodes[k]! }));
  const design = buildDesignMatrix({ y: z, factors: cellFactors, covariates: [], terms: input.terms, ssType: input.ssType });
  for (let j = 0; j < design.p; j++) {
    const col = j * m;
    for (let c = 0; c < m; c++) design.x[col + c]! *= weights[c]!;
  }
  const core = qrCoreOf(input, design, z);

  // Back to observations: fitted value of the cell, residual from it, leverage shared by the cell's runs.
  const cellFitted = new Float64Array(m);
  const cellLeverage = new Float64Array(m);
  for (let c = 0; c < m; c++) {
    cellFitted[c] = core.fitted[c]! / weights[c]!;
    cellLeverage[c] = core.leverage[c]! / counts[c]!;
  }
  // The per-observation fitted values, residuals and leverages are the cells' values spread back; they
  // are spread back on first read only, and kept: a consumer that reads none of them (the text report)
  // then costs no per-observation array and no pass.
  const { cellOfRun } = layout;
  let fitted: Float64Array | undefined;
  let residuals: Float64Array | undefined;
  let leverage: Float64Array | undefined;
  return {
    ...core,
    method: "cells",
    residualSs: core.residualSs + withinSs,
    runCells: { y, cellOfRun, fitted: cellFitted, leverage: cellLeverage },
    get fitted(): Float64Array {
      if (fitted === undefined) {
        fitted = new Float64Array(n);
        for (let i = 0; i < n; i++) fitted[i] = cellFitted[cellOfRun[i]!]!;
      }
      return fitted;
    },
    get residuals(): Float64Array {
      if (residuals === undefined) {
        residuals = new Float64Array(n);
        for (let i = 0; i < n; i++) residuals[i] = y[i]! - cellFitted[cellOfRun[i]!]!;
      }
      return residuals;
    },
    get leverage(): Float64Array {
      if (leverage === undefined) {
        leverage = new Float64Array(n);
        for (let i = 0; i < n; i++) leverage[i] = cellLeverage[cellOfRun[i]!]!;
      }
      return leverage;
    },
  };
}
