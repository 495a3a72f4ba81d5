/**
 * Sums of squares of nested least-squares fits.
 *
 * The extra sum of squares of a block of columns B given columns A is RSS(A) - RSS(A + B). With the
 * columns ordered [A, B] in one Householder QR, that difference equals the sum of the squared entries
 * of Q^T y at B's rank positions (Golub & Van Loan 2013, section 5.3: the effects of an ordered QR are
 * the successive reductions of the residual sum of squares). Taking it from the effects avoids the
 * cancellation of subtracting two nearly equal residual sums of squares.
 */

import { selectColumns, type DesignMatrix } from "./design-matrix.js";
import { householderQr, leastSquares } from "./qr.js";

/** The extra sum of squares of `block` after `before`, and the residual of the larger fit. */
export interface BlockSumOfSquares {
  readonly ss: number;
  /** Number of columns of `block` that are not aliased with `before` or each other. */
  readonly df: number;
  readonly residualSs: number;
  readonly residualDf: number;
}

/** Fits y on the columns `before` then `block` (indices into `design`) and returns block's extra SS. */
export function blockSumOfSquares(
  design: DesignMatrix,
  y: Float64Array,
  before: readonly number[],
  block: readonly number[],
): BlockSumOfSquares {
  const columns = [...before, ...block];
  const qr = householderQr(selectColumns(design, columns), design.n, columns.length);
  const fit = leastSquares(qr, y);
  let ss = 0;
  let df = 0;
  for (let c = before.length; c < columns.length; c++) {
    const k = qr.rankOfColumn[c]!;
    if (k < 0) continue;
    ss += fit.effects[k]! * fit.effects[k]!;
    df++;
  }
  return { ss, df, residualSs: fit.residualSs, residualDf: design.n - qr.rank };
}

/**
 * True when the residual sum of squares is zero up to rounding: every residual is within about
 * 1000 machine epsilons of the largest response magnitude (a perfect fit computed in floating point).
 */
export function isZeroResidual(residualSs: number, y: Float64Array): boolean {
  let maxAbs = 0;
  for (let i = 0; i < y.length; i++) maxAbs = Math.max(maxAbs, Math.abs(y[i]!));
  return isZeroResidualOfMagnitude(residualSs, y.length, maxAbs);
}

/** {@link isZeroResidual} for `n` observations whose largest magnitude `maxAbs` the caller has already found. */
export function isZeroResidualOfMagnitude(residualSs: number, n: number, maxAbs: number): boolean {
  const noise = 1000 * Number.EPSILON * maxAbs;
  return residualSs <= n * noise * noise;
}
