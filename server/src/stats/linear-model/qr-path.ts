/**
 * The general computation path: one Householder QR of the full design for the fit, the residuals,
 * leverages and aliasing, then one QR per term for Type II and Type III sums of squares.
 *
 * Definitions (all as extra sums of squares of nested fits, see `nested-fits.ts`):
 * - Type I: each term after the terms before it in model order (sequential).
 * - Type II: each term after every other term that does not contain it (Langsrud 2003, "ANOVA for
 *   unbalanced data: Use Type II instead of Type III sums of squares", Statistics and Computing 13,
 *   163-167; Fox 2016, Applied Regression Analysis and Generalized Linear Models, 3rd ed., section 8.2.4).
 * - Type III: each term after all other terms, under sum-to-zero coding (Searle 1987, ch. 4).
 * Columns found aliased in the full fit are left out of every nested fit, so each term's df is its
 * estimable df and the reduced design has full column rank.
 */

import { adjustedMeans, covariateSlopes, slopeHomogeneityTests } from "./ancova.js";
import { buildDesignMatrix, nominalDf, type DesignMatrix } from "./design-matrix.js";
import { termContains, termSource, type ModelCore } from "./model-core.js";
import { blockSumOfSquares } from "./nested-fits.js";
import { hatDiagonal, householderQr, leastSquares } from "./qr.js";
import type { AliasedTerm, LinearModelInput, ModelNote } from "./types.js";

/** Computes the model core by QR least squares; valid for any design, balanced or not. */
export function qrModelCore(input: LinearModelInput): ModelCore {
  return qrCoreOf(input, buildDesignMatrix(input), input.y);
}

/**
 * The QR computation on a given design matrix and response vector: `input` supplies only the terms,
 * factor names and level counts and the SS type. `qrModelCore` passes the full design and `input.y`; the
 * cell path (`cell-path.ts`) passes the weighted cell-level design and weighted cell means, which have
 * the same cross-products and therefore the same fit. Per-row arrays of the result follow `design`'s rows.
 */
export function qrCoreOf(input: LinearModelInput, design: DesignMatrix, y: Float64Array): ModelCore {
  const n = design.n;
  const qr = householderQr(design.x, n, design.p);
  const fit = leastSquares(qr, y);
  const notes: ModelNote[] = [];

  // Estimable columns of each term, in the full fit's model order.
  const termBlocks = design.termColumns.map(({ start, count }) => {
    const cols: number[] = [];
    for (let j = start; j < start + count; j++) if (qr.rankOfColumn[j]! >= 0) cols.push(j);
    return cols;
  });
  const aliased: AliasedTerm[] = [];
  input.terms.forEach((term, t) => {
    const nominal = nominalDf(input, term);
    const estimable = termBlocks[t]!.length;
    if (estimable < nominal) {
      const source = termSource(input, term);
      aliased.push({ source, nominalDf: nominal, estimableDf: estimable });
      notes.push({
        code: "aliased-term",
        message:
          estimable === 0
            ? `Term "${source}" cannot be estimated from these data (its columns depend on earlier terms, e.g. through empty cells); it is reported with 0 df.`
            : `Term "${source}" has ${estimable} estimable degrees of freedom of ${nominal} (e.g. empty cells); it is tested on ${estimable} df.`,
      });
    }
  });
  if (aliased.length > 0 && input.ssType === "III") {
    notes.push({
      code: "type-iii-aliasing",
      message:
        "With aliased terms, Type III sums of squares test hypotheses that depend on which columns were dropped; Type I or II sums of squares are easier to interpret here.",
    });
  }

  // Rank position 0 is the intercept (column 0, never aliased when n >= 1).
  let modelSs = 0;
  for (let k = 1; k < qr.rank; k++) modelSs += fit.effects[k]! * fit.effects[k]!;

  const termSs: number[] = [];
  const termDf: number[] = [];
  if (input.ssType === "I") {
    for (const block of termBlocks) {
      let ss = 0;
      for (const j of block) {
        const e = fit.effects[qr.rankOfColumn[j]!]!;
        ss += e * e;
      }
      termSs.push(ss);
      termDf.push(block.length);
    }
  } else {
    input.terms.forEach((term, t) => {
      const before: number[] = [0];
      input.terms.forEach((other, u) => {
        if (u === t) return;
        if (input.ssType === "II" && termContains(other, term)) return;
        before.push(...termBlocks[u]!);
      });
      const block = termBlocks[t]!;
      if (block.length === 0) {
        termSs.push(0);
        termDf.push(0);
        return;
      }
      const r = blockSumOfSquares(design, y, before, block);
      termSs.push(r.ss);
      termDf.push(r.df);
    });
  }

  return {
    method: "qr",
    rank: qr.rank,
    termSs,
    termDf,
    residualSs: fit.residualSs,
    modelSs,
    fitted: fit.fitted,
    residuals: fit.residuals,
    leverage: hatDiagonal(qr),
    slopes: covariateSlopes(input, design, qr, fit.coefficients),
    adjustedMeans: adjustedMeans(input, design, qr, fit.coefficients),
    slopeHomogeneity: slopeHomogeneityTests(input),
    aliased,
    notes,
  };
}
