import type { Span } from "../../../grammar/src/ast.js";
import { centerDecimalColumn, decimalValue } from "../stats/decimal/center-decimals.js";
import { fitLinearModel } from "../stats/linear-model/fit-linear-model.js";
import type { SummarizedGroups } from "../stats/comparisons/group-summary.js";
import { type GroupAccumulators, type Grouping, groupStatisticsOfGroupings } from "../stats/linear-model/group-means.js";
import type { LinearModelInput, LinearModelResult, ModelFactor, ModelTerm } from "../stats/linear-model/types.js";
import { type Design, type DesignRuns, type DesignTerm, ValueStatus } from "./design.js";
import { covariateText, responseSpan, responseText, runId } from "./design-runs.js";
import { type Diagnostic, diagnostic } from "./diagnostics.js";
import type { EngineOptions } from "./engine-options.js";
import { fixedFactorsIn, startGroupAccumulators, startVarianceTests } from "./early-analysis.js";
import type { AdjustedLevelMean, AnovaRow, LevelMean, ResponseAnalysis, RunResidual } from "./results.js";

/** Where analysis diagnostics about a term or response point: the model term if written, else the response. */
export interface AnalysisAnchors {
  readonly response: Span;
  readonly terms: ReadonlyMap<string, Span>;
}

/**
 * Everything an analysis extension (comparisons, model checks, power, special designs) needs about one
 * response's fit, so that it does not repeat the selection, centring and fitting.
 */
export interface ResponseContext {
  readonly design: Design;
  readonly responseIndex: number;
  readonly anchors: AnalysisAnchors;
  /** Run (row) indices of the observations in the fit, in run order (made from `rows` on first read). */
  readonly runs: readonly number[];
  /** The same run indices as a typed array (no plain array of a million numbers is made to read it). */
  readonly rows: Int32Array;
  /** Centred response values of those runs (add `offset` for the response scale). */
  readonly y: Float64Array;
  readonly offset: number;
  /** Compact level codes (per observation) and the declared level index of each code, for a factor index. */
  readonly levelsOf: (factor: number) => { readonly codes: Int32Array; readonly levels: readonly number[] } | undefined;
  /**
   * Group summaries the level means already formed from `y` in the same two passes, by factor list ("2" for
   * factor 2's levels, "0,2" for the cells of factors 0 and 2; the group of a cell is level of 0 x levels of
   * 2 + level of 2). The comparisons take theirs from here when present (the same numbers, bit for bit).
   */
  readonly knownGroups?: ReadonlyMap<string, SummarizedGroups>;
  /** The exact input the linear model was fitted on. */
  readonly input: LinearModelInput;
  /** The design terms in the fit (terms that could not be estimated are left out). */
  readonly modelTerms: readonly DesignTerm[];
  readonly fit: LinearModelResult;
  /** The core result built so far. */
  readonly result: ResponseAnalysis;
}

/**
 * Analyses one response: selects its measured, non-excluded runs, centres the values by an exact decimal
 * offset, fits the design's linear model and converts the fit into the plain result of the JSON contract.
 * Degenerate situations become diagnostics; the result then carries `null`s or empty tables.
 */
export function analyzeResponse(design: Design, responseIndex: number, anchors: AnalysisAnchors, engine: EngineOptions = {}): { result: ResponseAnalysis; diagnostics: Diagnostic[]; context?: ResponseContext } {
  const response = design.responses[responseIndex]!;
  const diagnostics: Diagnostic[] = [];
  const { runs, settings } = design;

  // Factors and covariates the model uses; a run is usable when all of them are known for it.
  const usedFactors = uniqueIndices(design.terms, "factor");
  const usedCovariates = uniqueIndices(design.terms, "covariate");
  const meanFactors = design.factors.flatMap((f, i) => (f.role === "fixed" || f.role === "block" ? [i] : []));
  const allFactors = [...new Set([...usedFactors, ...meanFactors])];
  const status = runs.responseStatus[responseIndex]!;
  // Plain loops over typed arrays (no closure per run): this runs once per response over every run. One
  // pass writes the usable rows, and each factor's level per selected run (the codes compacted below),
  // into typed arrays with room for every run; the arrays used are views of their first `used` entries (no
  // copy; the room of left-out runs, usually few, is the price). The plain array of the context's `runs`
  // is made on first read only.
  const count = runs.count;
  const excluded = runs.excluded;
  const memory = engine.sharedMemory ?? ((bytes: number) => new ArrayBuffer(bytes));
  const factorLevels = allFactors.map((f) => runs.levels[f]!);
  const covariateKnown = usedCovariates.map((c) => runs.covariateStatus[c]!);
  // Runs left out are marked variable by variable (one tight loop per array), so the pass below tests one
  // byte per run, whatever the number of factors and covariates.
  // A design known to be complete (runs.complete) has none to leave out.
  const left = new Uint8Array(runs.complete ? 0 : count);
  let leftOut = 0;
  if (!runs.complete) {
    for (let r = 0; r < count; r++) left[r] = excluded[r]! | (status[r] !== ValueStatus.Measured ? 1 : 0);
    for (const levels of factorLevels) for (let r = 0; r < count; r++) if (levels[r]! < 0) left[r] = 1;
    for (const known of covariateKnown) for (let r = 0; r < count; r++) if (known[r] !== ValueStatus.Measured) left[r] = 1;
    for (let r = 0; r < count; r++) leftOut += left[r]!;
  }
  let selected: Int32Array;
  let declaredCodes: Int32Array[];
  // When every run is used (the usual large sheet), the codes are the design's level arrays themselves,
  // shared and never written (compactCodes copies before renumbering), and no run is copied.
  const shared = leftOut === 0;
  if (shared) {
    selected = new Int32Array(count);
    for (let r = 0; r < count; r++) selected[r] = r;
    declaredCodes = factorLevels.slice();
  } else {
    const roomForRows = new Int32Array(count);
    // In the engine's shared memory when it has some: the level means may be made on another thread.
    const roomForCodes = allFactors.map(() => new Int32Array(memory(count * 4)));
    let used = 0;
    if (allFactors.length === 2) {
      // The common two-factor design with its arrays in locals.
      const la = factorLevels[0]!;
      const lb = factorLevels[1]!;
      const ca = roomForCodes[0]!;
      const cb = roomForCodes[1]!;
      for (let r = 0; r < count; r++) {
        if (left[r] !== 0) continue;
        ca[used] = la[r]!;
        cb[used] = lb[r]!;
        roomForRows[used++] = r;
      }
    } else {
      for (let r = 0; r < count; r++) if (left[r] === 0) roomForRows[used++] = r;
      factorLevels.forEach((levels, q) => {
        const codes = roomForCodes[q]!;
        for (let i = 0; i < used; i++) codes[i] = levels[roomForRows[i]!]!;
      });
    }
    selected = roomForRows.subarray(0, used);
    declaredCodes = roomForCodes.map((codes) => codes.subarray(0, used));
  }
  const used = selected.length;

  const empty: ResponseAnalysis = {
    name: response.name,
    n: selected.length,
    ssType: settings.ssType,
    anova: [],
    rSquared: null,
    residualSd: null,
    means: [],
    effectSizes: [],
    residuals: [],
    slopes: [],
    adjustedMeans: [],
    slopeHomogeneity: [],
    alpha: settings.alpha,
    confidence: settings.confidence,
  };
  if (selected.length === 0) {
    diagnostics.push(diagnostic("no-data", anchors.response, `'${response.name}' has no measured runs yet: nothing to analyse until values replace the ? marks.`));
    return { result: empty, diagnostics };
  }

  // Centred from the values checked when the design was built; a text is read only where exact
  // arithmetic in doubles does not suffice (see centerDecimalColumn). With the reader's tallies, the runs
  // selected are exactly those where this response is measured, over which the reader found the extremes.
  const extremes = runs.tallies?.responseExtremes[responseIndex];
  const centred = centerDecimalColumn(runs.responseValues[responseIndex]!, selected, (r) => responseText(runs, responseIndex, r), extremes, engine.sharedMemory);
  if (!centred.ok) {
    const r = selected[centred.index]!;
    diagnostics.push(diagnostic("value-out-of-range", responseSpan(runs, responseIndex, r) ?? anchors.response, `This value of '${response.name}' cannot be analysed: ${centred.reason}`));
    return { result: empty, diagnostics };
  }
  const offset = centred.offset;
  // Squares of the centred values must stay finite for the sums of squares: beyond about 1e150 apart they
  // overflow a double, so such data get a diagnostic instead of an Infinity in the table.
  const tooWide = centred.largestMagnitude <= SQUARE_LIMIT ? -1 : largestMagnitudeIndex(centred.values);
  if (tooWide >= 0) {
    const r = selected[tooWide]!;
    diagnostics.push(diagnostic("value-out-of-range", responseSpan(runs, responseIndex, r) ?? anchors.response, `The values of '${response.name}' lie too far apart (beyond about 1e150) for their squares to be computed: check this value or change the response's unit.`));
    return { result: empty, diagnostics };
  }

  // Level codes are compacted to the levels that occur among the selected runs, so that a declared but
  // unused level does not show up as an aliased column.
  const compact = new Map<number, { codes: Int32Array; levels: number[] }>();
  allFactors.forEach((f, q) => compact.set(f, compactCodes(declaredCodes[q]!, design.factors[f]!.levels.length, shared, memory)));

  // Terms involving a factor seen at a single level cannot be estimated: drop them and say so.
  const terms: DesignTerm[] = [];
  for (const term of design.terms) {
    const flat = term.variables.find((v) => v.kind === "factor" && compact.get(v.index)!.levels.length < 2);
    if (flat) {
      const f = design.factors[flat.index]!;
      diagnostics.push(
        diagnostic("aliased-term", anchors.terms.get(term.name) ?? anchors.response, `'${term.name}' is left out of the analysis of '${response.name}': its measured runs all have ${f.name}=${f.levels[compact.get(flat.index)!.levels[0]!]?.name ?? "?"}. Run other levels of '${f.name}' to estimate it.`),
      );
    } else terms.push(term);
  }

  // For a large file, the level means' passes and the variance tests over the cells of the fixed factors in
  // the model start on the engine's other thread now, and run there while the model is fitted here
  // (early-analysis.ts).
  const groupings = meanGroupings(design, meanFactors, compact);
  const accumulating = startGroupAccumulators(engine, centred.values, groupings);
  const fixedInModel = fixedFactorsIn(design, terms);
  startVarianceTests(engine, centred.values, fixedInModel, fixedInModel.map((f) => compact.get(f)!));

  const factorSlot = new Map(usedFactors.map((f, i) => [f, i] as const));
  const covariateSlot = new Map(usedCovariates.map((c, i) => [c, i] as const));
  const modelFactors: ModelFactor[] = usedFactors.map((f) => ({ name: design.factors[f]!.name, levelCount: compact.get(f)!.levels.length, codes: compact.get(f)!.codes }));
  const modelTerms: ModelTerm[] = terms.map((t) => ({
    factors: t.variables.flatMap((v) => (v.kind === "factor" ? [factorSlot.get(v.index)!] : [])),
    covariates: t.variables.flatMap((v) => (v.kind === "covariate" ? [covariateSlot.get(v.index)!] : [])),
  }));
  // Covariate values are the doubles stored when the design was built (the same correctly rounded
  // conversion of the text as Number(text)).
  const covariates: { name: string; values: Float64Array }[] = [];
  for (const c of usedCovariates) {
    const stored = runs.covariateValues[c]!;
    const textOf = (r: number) => covariateText(runs, c, r);
    const values = new Float64Array(used);
    for (let i = 0; i < used; i++) values[i] = decimalValue(stored, selected[i]!, textOf);
    const wide = largestMagnitudeIndex(values);
    if (wide >= 0) {
      diagnostics.push(diagnostic("value-out-of-range", anchors.response, `Covariate '${design.covariates[c]!.name}' has a value beyond about 1e150 (run ${selected[wide]! + 1}), whose square cannot be computed: change the covariate's unit.`));
      return { result: empty, diagnostics };
    }
    covariates.push({ name: design.covariates[c]!.name, values });
  }

  const fit = fitLinearModel({ y: centred.values, factors: modelFactors, covariates, terms: modelTerms, ssType: settings.ssType });
  if (!fit.ok) {
    diagnostics.push(diagnostic(fit.code === "zero-variance" ? "zero-variance" : fit.code === "single-observation" ? "single-observation" : "no-data", anchors.response, `'${response.name}' cannot be analysed. ${fit.reason}`));
    return { result: { ...empty, means: rawMeans(groupings, centred.values, offset, null, settings.confidence, accumulating?.()).means }, diagnostics };
  }

  for (const a of fit.aliased) {
    diagnostics.push(
      diagnostic(
        "aliased-term",
        anchors.terms.get(a.source) ?? anchors.response,
        a.estimableDf === 0
          ? `'${a.source}' cannot be estimated for '${response.name}' with the runs available (no degrees of freedom left after the other terms): add runs for the missing combinations or remove the term from the model.`
          : `'${a.source}' is only partly estimable for '${response.name}' (${a.estimableDf} of ${a.nominalDf} degrees of freedom), usually because of empty cells: its test uses the estimable part only.`,
      ),
    );
  }
  for (const note of fit.notes) {
    if (note.code === "no-error-df") diagnostics.push(diagnostic("no-error-df", anchors.response, `'${response.name}': ${note.message}`));
    else if (note.code === "zero-variance") diagnostics.push(diagnostic("zero-variance", anchors.response, `'${response.name}': ${note.message}`));
  }

  const anova: AnovaRow[] = [
    ...fit.anova.map((row) => ({ source: row.source, df: row.df, ss: row.ss, ms: row.ms, f: row.f, p: row.p })),
    { source: "Residual", df: fit.residual.df, ss: fit.residual.ss, ms: fit.residual.ms },
    { source: "Total", df: fit.total.df, ss: fit.total.ss },
  ];
  const pooled = { ms: fit.residual.ms, df: fit.residual.df };
  const { means, groups: knownGroups } = rawMeans(groupings, centred.values, offset, pooled, settings.confidence, accumulating?.());
  for (const m of means) {
    if (m.n !== 1 || m.term.includes(" x ")) continue;
    const factor = design.factors.find((f) => f.name === m.term);
    const level = factor?.levels.find((l) => l.name === m.level);
    diagnostics.push(
      diagnostic(
        "single-observation",
        level?.span ?? anchors.response,
        `Level '${m.level}' of '${m.term}' has a single measured run of '${response.name}': its spread is unknown and its mean rests on one value. Add replicates to judge it.`,
      ),
    );
  }

  // One object per run is the JSON contract, but a million of them cost hundreds of megabytes and most
  // callers (the text report, check, diagnostics) never read them: they are built on first access and
  // kept. The getter is enumerable, so JSON.stringify and object spread see a plain array.
  let residuals: RunResidual[] | undefined;
  const result: ResponseAnalysis = {
      ...empty,
      anova,
      rSquared: fit.rSquared,
      residualSd: fit.residualSd,
      means,
      effectSizes: fit.effectSizes.map((e) => ({ term: e.source, etaSquared: e.etaSquared, partialEtaSquared: e.partialEtaSquared, omegaSquared: e.omegaSquared })),
      get residuals(): readonly RunResidual[] {
        residuals ??= runResiduals(selected, runs, fit, offset);
        return residuals;
      },
      slopes: fit.slopes.map((s) => ({ covariate: s.covariate, slope: s.estimate, standardError: s.standardError })),
      adjustedMeans: adjustedMeans(design, fit, usedFactors, compact, offset),
      slopeHomogeneity: fit.slopeHomogeneity.map((s) => ({ term: s.factor, covariate: s.covariate, df1: s.df1, df2: s.df2, f: s.f, p: s.p })),
  };
  let runList: number[] | undefined;
  const context: ResponseContext = {
    design,
    responseIndex,
    anchors,
    get runs(): readonly number[] {
      runList ??= Array.from(selected);
      return runList;
    },
    rows: selected,
    y: centred.values,
    offset,
    levelsOf: (factor) => compact.get(factor),
    knownGroups,
    input: { y: centred.values, factors: modelFactors, covariates, terms: modelTerms, ssType: settings.ssType },
    modelTerms: terms,
    fit,
    result,
  };
  return { result, diagnostics, context };
}

/** The per-run residual rows of the JSON contract, in run order. */
function runResiduals(selected: Int32Array, runs: DesignRuns, fit: LinearModelResult, offset: number): RunResidual[] {
  const out = new Array<RunResidual>(selected.length);
  for (let i = 0; i < selected.length; i++) {
    const r = selected[i]!;
    out[i] = {
      run: runId(runs, r),
      row: r,
      fitted: fit.fitted[i]! + offset,
      residual: fit.residuals[i]!,
      leverage: fit.leverage[i]!,
      standardized: fit.standardized[i] ?? null,
      studentized: fit.studentized[i] ?? null,
    };
  }
  return out;
}

/**
 * `{ ...base, ...add }` that keeps accessor properties as accessors, so that merging an extension's keys
 * into a result does not build its lazily computed `residuals`. Keys keep their order, as with spread.
 */
export function extendResult(base: ResponseAnalysis, add: Partial<ResponseAnalysis>): ResponseAnalysis {
  // Data properties are assigned and only accessors defined: building the object with one
  // `Object.defineProperties` call made V8 keep it in dictionary mode, about 0.2 ms per response on every
  // keystroke (measured with six extensions), and every later read of it slower.
  const out: Record<string, unknown> = {};
  copyProperties(out, base);
  copyProperties(out, add);
  return out as unknown as ResponseAnalysis;
}

/**
 * The context an extension sees: `context` with `result` replaced. Accessors stay accessors (a spread would
 * call the `runs` getter and build a plain array of every run for each extension).
 */
export function withResult(context: ResponseContext, result: ResponseAnalysis): ResponseContext {
  const out: Record<string, unknown> = {};
  copyProperties(out, context);
  out.result = result;
  return out as unknown as ResponseContext;
}

function copyProperties(out: Record<string, unknown>, from: object): void {
  for (const key of Object.keys(from)) {
    const descriptor = Object.getOwnPropertyDescriptor(from, key)!;
    if (descriptor.get !== undefined || descriptor.set !== undefined) {
      Object.defineProperty(out, key, { enumerable: true, configurable: true, get: descriptor.get, set: descriptor.set });
    } else out[key] = descriptor.value;
  }
}

/**
 * A factor's level codes for the selected runs (`codes`, the declared levels, renumbered in place, or
 * into a copy when they are `shared` with the design),
 * compacted to the levels that occur among them (in declared order), and the declared level of each code.
 * One pass marks the levels present; a second pass renumbers only when some declared level is absent.
 */
function compactCodes(codes: Int32Array, levelCount: number, shared: boolean, memory: (bytes: number) => ArrayBufferLike): { codes: Int32Array; levels: number[] } {
  const n = codes.length;
  const seen = new Uint8Array(levelCount);
  let distinct = 0;
  for (let i = 0; i < n && distinct < levelCount; i++) {
    const level = codes[i]!;
    if (seen[level] === 0) {
      seen[level] = 1;
      distinct++;
    }
  }
  const levels: number[] = [];
  const map = new Int32Array(levelCount);
  for (let l = 0; l < levelCount; l++) if (seen[l] === 1) map[l] = levels.push(l) - 1;
  if (levels.length === levelCount) return { codes, levels };
  const out = shared ? new Int32Array(memory(n * 4)) : codes;
  for (let i = 0; i < n; i++) out[i] = map[codes[i]!]!;
  return { codes: out, levels };
}

function uniqueIndices(terms: readonly DesignTerm[], kind: "factor" | "covariate"): number[] {
  const seen = new Set<number>();
  for (const t of terms) for (const v of t.variables) if (v.kind === kind) seen.add(v.index);
  return [...seen].sort((a, b) => a - b);
}

/** A grouping of the level means, with the names it is shown and handed on under. */
interface MeanGrouping extends Grouping {
  /** The grouping's factor list as the comparisons name it ("0", "0,2"). */
  readonly key: string;
  readonly term: string;
  readonly labels: readonly string[];
}

/**
 * The groupings of the level means: each fixed or block factor's levels, then the cells of each pair of
 * fixed factors (their codes formed as the observations are read, no third array of codes).
 */
function meanGroupings(design: Design, meanFactors: readonly number[], compact: ReadonlyMap<number, { codes: Int32Array; levels: number[] }>): MeanGrouping[] {
  const groupings: MeanGrouping[] = [];
  for (const f of meanFactors) {
    const c = compact.get(f)!;
    const labels = c.levels.map((l) => design.factors[f]!.levels[l]!.name);
    groupings.push({ key: String(f), term: design.factors[f]!.name, labels, codes: c.codes, groupCount: labels.length });
  }
  const fixed = meanFactors.filter((f) => design.factors[f]!.role === "fixed");
  for (let i = 0; i < fixed.length; i++) {
    for (let j = i + 1; j < fixed.length; j++) {
      const a = compact.get(fixed[i]!)!;
      const b = compact.get(fixed[j]!)!;
      const labels: string[] = [];
      for (const la of a.levels) for (const lb of b.levels) labels.push(`${design.factors[fixed[i]!]!.levels[la]!.name} x ${design.factors[fixed[j]!]!.levels[lb]!.name}`);
      // Cell codes a * |b| + b are formed as the observations are read (no third array of codes).
      groupings.push({
        key: `${fixed[i]!},${fixed[j]!}`,
        term: `${design.factors[fixed[i]!]!.name} x ${design.factors[fixed[j]!]!.name}`,
        labels,
        codes: a.codes,
        groupCount: labels.length,
        within: { codes: b.codes, levelCount: b.levels.length },
      });
    }
  }
  return groupings;
}

/**
 * Raw level means for every fixed and block factor, and cell means for every pair of fixed factors
 * (`meanGroupings`), with intervals from the model's pooled residual mean square.
 */
function rawMeans(
  groupings: readonly MeanGrouping[],
  y: Float64Array,
  offset: number,
  pooled: { ms: number | null; df: number } | null,
  confidence: number,
  accumulated?: GroupAccumulators,
): { means: LevelMean[]; groups: Map<string, SummarizedGroups> } {
  const error = pooled ?? { ms: null, df: 0 };
  // Every grouping is summarised in one fused pair of passes over y (groupStatisticsOfGroupings,
  // bit-identical to one groupMeans per grouping; `accumulated` when the passes were made on another
  // thread), then emitted in this order. The same passes give the comparisons' group summaries, handed on
  // under `key` (ResponseContext.knownGroups).
  const { means: summaries, summarized } = groupStatisticsOfGroupings(y, groupings, error, confidence, accumulated);
  const groups = new Map(groupings.map((g, q) => [g.key, summarized[q]!] as const));
  const out: LevelMean[] = [];
  groupings.forEach(({ term, labels }, q) => {
    for (const g of summaries[q]!) {
      if (g.n === 0 || g.mean === null) continue;
      out.push({
        term,
        level: labels[g.group]!,
        n: g.n,
        mean: g.mean + offset,
        sd: g.sd,
        lower: g.lower === null ? null : g.lower + offset,
        upper: g.upper === null ? null : g.upper + offset,
      });
    }
  });
  return { means: out, groups };
}

function adjustedMeans(
  design: Design,
  fit: LinearModelResult,
  usedFactors: readonly number[],
  compact: ReadonlyMap<number, { codes: Int32Array; levels: number[] }>,
  offset: number,
): AdjustedLevelMean[] {
  const out: AdjustedLevelMean[] = [];
  for (const group of fit.adjustedMeans) {
    const f = usedFactors.find((i) => design.factors[i]!.name === group.factor);
    if (f === undefined) continue;
    const levels = compact.get(f)!.levels;
    for (const m of group.means) {
      out.push({ term: group.factor, level: design.factors[f]!.levels[levels[m.level]!]!.name, mean: m.mean === null ? null : m.mean + offset, standardError: m.standardError });
    }
  }
  return out;
}

/** Magnitude beyond which a value's square (and sums of squares) would overflow a double. */
const SQUARE_LIMIT = 1e150;

/** Index of the first value whose magnitude is beyond SQUARE_LIMIT, or -1. */
function largestMagnitudeIndex(values: Float64Array): number {
  for (let i = 0; i < values.length; i++) if (!(Math.abs(values[i]!) <= SQUARE_LIMIT)) return i;
  return -1;
}
