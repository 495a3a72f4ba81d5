/**
 * Entry point of the fixed-effects linear model: validates the input, picks the computation path
 * (balanced cell sums when valid; else, for factor-only models, QR on the weighted cell-level design from
 * cell counts, means and within-cell sums of squares; general Householder QR otherwise) and assembles the ANOVA table,
 * residual diagnostics, effect sizes and covariance-analysis quantities.
 *
 * Degenerate situations and what is returned:
 * - no observations: failure `no-data`; one observation: failure `single-observation`;
 *   every response equal: failure `zero-variance` (there is no variation to analyse);
 *   malformed input: failure `invalid-input`.
 * - no residual degrees of freedom (e.g. one run per cell of a full model): a result, not a failure.
 *   The table keeps every term's SS and df; the residual MS, every F and p, the residual SD and the
 *   standardized and studentized residuals are null; note `no-error-df`.
 * - residual sum of squares zero up to rounding (a perfect fit): a result with F and p null and note
 *   `zero-residual-variance`.
 * - aliased columns (empty cells, collinear covariates): a result; each affected term is listed in
 *   `aliased` and tested on its estimable df; note `aliased-term`.
 * p-values are upper tails of the F distribution computed directly, never as 1 - CDF.
 */

import { fUpperTail } from "../distributions/f-distribution.js";
import { balancedLayout, balancedLayoutFromCells, balancedModelCore } from "./balanced-fast-path.js";
import { caseStatisticValues, nullWhereNaN } from "./case-statistics.js";
import { cellLayoutWithStatistics, cellModelCore, scanCells } from "./cell-path.js";
import { mean } from "./design-matrix.js";
import { termEffectSize } from "./effect-sizes.js";
import { termSource, type ModelCore } from "./model-core.js";
import { isZeroResidualOfMagnitude } from "./nested-fits.js";
import { qrModelCore } from "./qr-path.js";
import type { AnovaTermRow, LinearModelInput, LinearModelResult, ModelFailure, ModelNote } from "./types.js";
import { validateModelInput, validateModelTerms } from "./validate-input.js";

/** Fits the model of `input` and returns its ANOVA table and diagnostics, or a failure with a reason. Never throws on bad input. */
export function fitLinearModel(input: LinearModelInput): LinearModelResult | ModelFailure {
  // The usual designed experiment (one or two factors, no covariate): the checks, the cells, their
  // statistics and the response's mean come out of two passes over the observations (scanCells).
  const scanned = wellShaped(input) ? scanCells(input) : null;
  if (scanned) {
    if (scanned.allEqual) {
      return { ok: false, code: "zero-variance", reason: `All ${input.y.length} observations have the same value; there is no variation to analyse.` };
    }
    const balanced = balancedLayoutFromCells(input, scanned.layout, scanned.statistics.counts);
    const core = balanced ? balancedModelCore(input, balanced) : cellModelCore(input, scanned);
    if (core) return assembleResult(input, core, scanned.mean);
  }
  // One fused pass answers "well formed?" and "all equal?" for the usual input; only input it flags is
  // validated again value by value, for the same first problem and sentence as before.
  const scan = quickScan(input);
  if (!scan.clean) {
    const invalid = validateModelInput(input);
    if (invalid) return invalid;
  }
  const { y } = input;
  const n = y.length;
  if (n === 0) return { ok: false, code: "no-data", reason: "There are no observations to analyse." };
  if (n === 1) {
    return { ok: false, code: "single-observation", reason: "There is a single observation; an analysis of variance needs at least two." };
  }
  if (scan.clean ? scan.allEqual : allEqual(y)) {
    return { ok: false, code: "zero-variance", reason: `All ${n} observations have the same value; there is no variation to analyse.` };
  }
  // The cells (and their statistics) are found first when the cell path applies: the balance test then
  // reads their counts instead of passing over the observations again.
  const cells = cellLayoutWithStatistics(input);
  const layout = cells ? balancedLayoutFromCells(input, cells.layout, cells.statistics.counts) : balancedLayout(input);
  const core = layout ? balancedModelCore(input, layout) : (cellModelCore(input, cells) ?? qrModelCore(input));
  return assembleResult(input, core);
}

/** Turns a computation path's core into the public result (F, p, effect sizes, scaled standard errors). */
export function assembleResult(input: LinearModelInput, core: ModelCore, centreOfY?: number): LinearModelResult {
  const { y } = input;
  const n = y.length;
  const notes: ModelNote[] = [...core.notes];
  const residualDf = n - core.rank;
  const residualSs = core.residualSs;
  const residualMs = residualDf > 0 ? residualSs / residualDf : null;
  // The centre, total sum of squares and largest magnitude of y (for the zero-residual test) in the
  // same two passes of a compensated mean and one pass of squares as `mean` and `isZeroResidual`.
  const centre = centreOfY ?? mean(y);
  let totalSs = 0;
  let maxAbs = 0;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    totalSs += (v - centre) ** 2;
    maxAbs = Math.max(maxAbs, Math.abs(v));
  }
  const zeroResidual = isZeroResidualOfMagnitude(residualSs, n, maxAbs);
  const testable = residualMs !== null && !zeroResidual;
  if (residualDf <= 0) {
    notes.push({
      code: "no-error-df",
      message: "The model uses every degree of freedom (e.g. one run per cell of a full model): there is no residual to test against, so F and p are not available.",
    });
  } else if (zeroResidual) {
    notes.push({
      code: "zero-residual-variance",
      message: "The model fits every observation exactly (zero residual variance), so F and p are not available.",
    });
  }
  const fTest = (ss: number, df: number, errorSs: number, errorDf: number, usable: boolean) => {
    const ms = df > 0 ? ss / df : null;
    const f = usable && ms !== null && errorDf > 0 ? finiteOrNull(ms / (errorSs / errorDf)) : null;
    const p = f !== null ? finiteOrNull(Math.min(1, Math.max(0, fUpperTail(f, df, errorDf)))) : null;
    return { ms: finiteOrNull(ms), f, p };
  };

  const anova: AnovaTermRow[] = input.terms.map((term, t) => {
    const ss = core.termSs[t]!;
    const df = core.termDf[t]!;
    return { source: termSource(input, term), df, ss, ...fTest(ss, df, residualSs, residualDf, testable) };
  });

  const explainedPlusResidual = core.modelSs + residualSs;
  const rSquared = explainedPlusResidual > 0 ? finiteOrNull(core.modelSs / explainedPlusResidual) : null;
  const residualSd = residualMs !== null ? Math.sqrt(residualMs) : null;
  // The per-observation residual scales are computed on first read only, and kept: a million of them are
  // two passes and two million boxed numbers that most consumers (the text report, check) never read.
  let cases: ReturnType<typeof caseStatisticValues> | undefined;
  const caseValues = () => (cases ??= caseStatisticValues(core.residuals, core.leverage, residualSs, residualDf, testable));
  let standardized: (number | null)[] | undefined;
  let studentized: (number | null)[] | undefined;

  return {
    ok: true,
    ssType: input.ssType,
    method: core.method,
    n,
    rank: core.rank,
    anova,
    residual: { source: "Residual", df: residualDf, ss: residualSs, ms: residualMs },
    total: { source: "Total", df: n - 1, ss: totalSs },
    rSquared,
    residualSd,
    caseStatisticsDefined: testable,
    // A getter, so that a core computing its fitted values on first read (the cell path) keeps doing so.
    get fitted(): Float64Array {
      return core.fitted;
    },
    // Getters as well: the cell path spreads its residuals and leverages back on first read only.
    get residuals(): Float64Array {
      return core.residuals;
    },
    get leverage(): Float64Array {
      return core.leverage;
    },
    ...(core.runCells ? { runCells: core.runCells } : {}),
    get standardized(): (number | null)[] {
      return (standardized ??= nullWhereNaN(caseValues().standardized));
    },
    get studentized(): (number | null)[] {
      return (studentized ??= nullWhereNaN(caseValues().studentized));
    },
    effectSizes: anova.map((row) => termEffectSize(row.source, row.ss, row.df, totalSs, residualSs, residualMs)),
    slopes: core.slopes.map((s) => ({
      covariate: s.covariate,
      estimate: s.estimate,
      standardError: residualSd !== null ? finiteOrNull(s.seFactor * residualSd) : null,
    })),
    adjustedMeans: core.adjustedMeans.map((a) => ({
      factor: a.factor,
      means: a.means.map((m) => ({
        level: m.level,
        mean: m.mean,
        standardError: m.seFactor !== null && residualSd !== null ? finiteOrNull(m.seFactor * residualSd) : null,
      })),
    })),
    slopeHomogeneity: core.slopeHomogeneity.map((h) => {
      const { f, p } = fTest(h.ss, h.df1, h.residualSs, h.df2, !h.zeroResidual && h.df2 > 0);
      return { factor: h.factor, covariate: h.covariate, df1: h.df1, df2: h.df2, ss: h.ss, f, p };
    }),
    aliased: core.aliased,
    notes,
  };
}

/**
 * The checks of `validateModelInput` that read no observation, for `scanCells`, which checks the values
 * and codes as it reads them: level counts, lengths and the terms.
 */
function wellShaped(input: LinearModelInput): boolean {
  const n = input.y.length;
  if (n < 2 || input.covariates.length > 0 || input.factors.length < 1 || input.factors.length > 2) return false;
  for (const f of input.factors) if (!Number.isInteger(f.levelCount) || f.levelCount < 1 || f.codes.length !== n) return false;
  return validateModelTerms(input) === null;
}

/**
 * One pass over the observations and the factor codes: `clean` when every response value is finite and
 * every code within its factor's levels (and the lengths and level counts agree), and whether all values
 * equal the first. Input that is not clean goes through `validateModelInput` for its sentence.
 */
function quickScan(input: LinearModelInput): { clean: boolean; allEqual: boolean } {
  const { y } = input;
  const n = y.length;
  const dirty = { clean: false, allEqual: false };
  for (const f of input.factors) if (!Number.isInteger(f.levelCount) || f.levelCount < 1 || f.codes.length !== n) return dirty;
  for (const c of input.covariates) if (c.values.length !== n) return dirty;
  if (input.factors.length > 2 || input.covariates.length > 0) return { clean: false, allEqual: false };
  const a = input.factors.length > 0 ? input.factors[0]!.codes : null;
  const b = input.factors.length > 1 ? input.factors[1]!.codes : null;
  const la = a === null ? 1 : input.factors[0]!.levelCount;
  const lb = b === null ? 1 : input.factors[1]!.levelCount;
  const first = n > 0 ? y[0]! : 0;
  let equal = true;
  for (let i = 0; i < n; i++) {
    const v = y[i]!;
    // v - v is 0 for a finite value and NaN for NaN or an infinity.
    if (v - v !== 0) return dirty;
    if (v !== first) equal = false;
    if (a !== null) {
      const ca = a[i]!;
      if (ca < 0 || ca >= la) return dirty;
    }
    if (b !== null) {
      const cb = b[i]!;
      if (cb < 0 || cb >= lb) return dirty;
    }
  }
  // The terms (a handful) are checked by the full validation, which then reads no observation again.
  return validateModelTerms(input) === null ? { clean: true, allEqual: equal } : dirty;
}

/** Whether every value equals the first (a plain loop: no callback per observation). */
function allEqual(y: Float64Array): boolean {
  const first = y[0];
  for (let i = 1; i < y.length; i++) if (y[i] !== first) return false;
  return true;
}

function finiteOrNull(v: number | null): number | null {
  return v !== null && Number.isFinite(v) ? v : null;
}
