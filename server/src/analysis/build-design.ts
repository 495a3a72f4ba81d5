import type { DecimalNumber, FactorDecl, Name, PlanSetting, RunRows, RunsTable, Span, TrialFile } from "../../../grammar/src/ast.js";
import { cellText } from "../../../grammar/src/runs-table.js";
import { type DecimalScan, emptyScan, rangeReason, scanDecimal, scanValue } from "../stats/decimal/parse-decimal.js";
import { type DecimalColumn, type DecimalExtremes, decimalColumn, storeDecimal, storePlainDecimal } from "../stats/decimal/center-decimals.js";
import { type DuplicateRunIds, duplicateRunIds } from "./duplicate-run-ids.js";
import type {
  Design,
  DesignCovariate,
  DesignFactor,
  DesignResponse,
  DesignRuns,
  DesignSettings,
  DesignTerm,
  RunTallies,
  SumsOfSquaresType,
  TermVariable,
} from "./design.js";
import { ValueStatus } from "./design.js";
import { attachRunTexts, responseSpan, runId, runRowSpan } from "./design-runs.js";
import { definingRelation } from "../stats/two-level/aliases.js";
import { wordOf } from "../stats/two-level/words.js";
import { type Diagnostic, DiagnosticSink, diagnostic } from "./diagnostics.js";
import { resolvePairwise } from "./resolve-pairwise.js";
import { PlainColumn, type PlainRunsLayout, type PlainSplit, type PlainTallies, readPlainRuns } from "./read-plain-runs.js";
import type { EngineOptions } from "./engine-options.js";

/** Analysis settings that can come from outside the file: editor settings (defaults) or CLI flags (overrides). */
export interface AnalysisSettings {
  readonly alpha?: number;
  readonly confidence?: number;
  readonly power?: number;
  readonly ssType?: SumsOfSquaresType;
}

/** The defaults used when neither the file nor the caller says otherwise. */
export const DEFAULT_SETTINGS = { alpha: 0.05, confidence: 0.95, power: 0.8, ssType: "III" } as const;

export interface BuiltDesign {
  readonly design: Design;
  readonly diagnostics: readonly Diagnostic[];
}

/**
 * Resolves names and assembles the design of a parsed file, reporting structural problems.
 *
 * Precedence of settings (design brief §3): `overrides` (a CLI flag) beat what the file says, which beats
 * `defaults` (editor settings), which beat `DEFAULT_SETTINGS`.
 */
export function buildDesign(file: TrialFile, defaults: AnalysisSettings = {}, overrides: AnalysisSettings = {}, engine: EngineOptions = {}): BuiltDesign {
  const sink = new DiagnosticSink();
  for (const p of file.problems) sink.add(diagnostic("syntax", p.span, p.message));
  reportUnderflow(file, sink);

  const factors = resolveFactors(file, sink);
  const covariates = resolveCovariates(file, factors, sink);
  const responses = resolveResponses(file, factors, covariates, sink);
  const settings = resolveSettings(file.plan?.settings ?? [], defaults, overrides, sink);
  const runs = readRuns(file, factors, covariates, responses, sink, engine);
  const fractions = resolveFractions(file, factors, sink);
  const { terms, explicit } = resolveTerms(file, factors, covariates, sink, { runs, fractions });
  const centrePoints = (file.plan?.settings ?? []).find((s) => s.kind === "centre-points");

  const cellFactors = factors.flatMap((f, i) => (f.role !== "subject" && f.within === undefined ? [i] : []));
  const hasFraction = (file.plan?.settings ?? []).some((s) => s.kind === "fraction");
  const design: Design = {
    title: file.header.title?.text,
    factors,
    covariates,
    responses,
    terms,
    explicitModel: explicit,
    settings,
    runs,
    cellFactors,
    hasFraction,
    ...(fractions.length > 0 ? { fractions } : {}),
    ...(centrePoints && centrePoints.kind === "centre-points" && centrePoints.value && Number.isSafeInteger(centrePoints.value.value) && centrePoints.value.value >= 0
      ? { centrePoints: centrePoints.value.value }
      : {}),
    // Comparisons feature: `plan pairwise` terms and the spans of plan settings (resolve-pairwise.ts).
    ...resolvePairwise(file, factors, sink),
  };
  if (runs.count > 0) checkCells(design, file, sink);
  if (runs.count > 0) checkSubjectConditions(design, sink);
  return { design, diagnostics: sink.finish() };
}

// ---------------------------------------------------------------------------------------------------------
// Declarations

function resolveFactors(file: TrialFile, sink: DiagnosticSink): DesignFactor[] {
  const firstByName = new Map<string, Span>();
  const decls = file.factors.filter((f): f is FactorDecl & { name: Name } => f.name !== undefined);
  const indexByName = new Map<string, number>();
  for (const decl of decls) {
    const first = firstByName.get(decl.name.text);
    if (first) {
      sink.add(
        diagnostic("duplicate-name", decl.name.span, `'${decl.name.text}' is declared twice: rename one of them.`, [
          { span: first, message: `first declaration of '${decl.name.text}'` },
        ]),
      );
      continue;
    }
    firstByName.set(decl.name.text, decl.name.span);
    indexByName.set(decl.name.text, indexByName.size);
  }

  const result: DesignFactor[] = [];
  const seen = new Set<string>();
  for (const decl of decls) {
    if (seen.has(decl.name.text)) continue;
    seen.add(decl.name.text);
    const levels: { name: string; span: Span; numeric?: number }[] = [];
    const levelSpan = new Map<string, Span>();
    for (const level of decl.levels) {
      const prior = levelSpan.get(level.name.text);
      if (prior) {
        sink.add(
          diagnostic(
            "duplicate-level",
            level.name.span,
            `Level '${level.name.text}' is declared twice in factor '${decl.name.text}': remove the second one.`,
            [{ span: prior, message: "first declaration of this level" }],
          ),
        );
        continue;
      }
      levelSpan.set(level.name.text, level.name.span);
      levels.push(level.number ? { name: level.name.text, span: level.name.span, numeric: level.number.value } : { name: level.name.text, span: level.name.span });
    }
    if (levels.length === 1) {
      sink.add(
        diagnostic("invalid-setting", decl.name.span, `Factor '${decl.name.text}' has one level: a factor needs at least two levels to be compared.`),
      );
    }
    let control: number | undefined;
    if (decl.control) {
      const idx = levels.findIndex((l) => l.name === decl.control!.text);
      if (idx < 0) sink.add(unknownLevel(decl.control.text, decl.control.span, decl.name.text, levels));
      else control = idx;
    }
    let within: number | undefined;
    if (decl.within) {
      const idx = indexByName.get(decl.within.text);
      if (idx === undefined || decl.within.text === decl.name.text) {
        sink.add(diagnostic("unknown-factor", decl.within.span, `'${decl.within.text}' is not a declared factor: 'within' names the factor this one is nested in.`));
      } else within = idx;
    }
    result.push({
      name: decl.name.text,
      span: decl.name.span,
      role: decl.role,
      levels,
      ...(decl.unit ? { unit: decl.unit.text } : {}),
      ...(control !== undefined ? { control } : {}),
      ...(within !== undefined ? { within } : {}),
    });
  }
  return result;
}

function resolveCovariates(file: TrialFile, factors: readonly DesignFactor[], sink: DiagnosticSink): DesignCovariate[] {
  const result: DesignCovariate[] = [];
  for (const decl of file.covariates) {
    if (!decl.name) continue;
    const clash = factors.find((f) => f.name === decl.name!.text) ?? result.find((c) => c.name === decl.name!.text);
    if (clash) {
      sink.add(
        diagnostic("duplicate-name", decl.name.span, `'${decl.name.text}' is already declared: rename the covariate.`, [
          { span: clash.span, message: `first declaration of '${decl.name.text}'` },
        ]),
      );
      continue;
    }
    result.push({ name: decl.name.text, span: decl.name.span, ...(decl.unit ? { unit: decl.unit.text } : {}) });
  }
  return result;
}

function resolveResponses(
  file: TrialFile,
  factors: readonly DesignFactor[],
  covariates: readonly DesignCovariate[],
  sink: DiagnosticSink,
): DesignResponse[] {
  const detect = new Map<string, DecimalNumber>();
  for (const s of file.plan?.settings ?? []) {
    if (s.kind === "detect" && s.response && s.difference) detect.set(s.response.text, s.difference);
  }
  // `plan sigma` is resolved like `detect`: the last setting for a response wins, it must be positive.
  const sigma = new Map<string, DecimalNumber>();
  for (const s of file.plan?.settings ?? []) {
    if (s.kind === "sigma" && s.response && s.value) sigma.set(s.response.text, s.value);
  }
  const result: DesignResponse[] = [];
  for (const decl of file.responses) {
    if (!decl.name) continue;
    const name = decl.name.text;
    const clash = factors.find((f) => f.name === name) ?? covariates.find((c) => c.name === name) ?? result.find((r) => r.name === name);
    if (clash) {
      sink.add(
        diagnostic("duplicate-name", decl.name.span, `'${name}' is already declared: rename the response.`, [
          { span: clash.span, message: `first declaration of '${name}'` },
        ]),
      );
      continue;
    }
    const spec = decl.spec;
    if (spec?.lower && spec.upper && spec.lower.value > spec.upper.value) {
      sink.add(diagnostic("invalid-setting", spec.span, `The lower specification limit ${spec.lower.text} is above the upper ${spec.upper.text}: swap them.`));
    }
    const d = detect.get(name);
    if (d && !(d.value > 0)) {
      sink.add(diagnostic("invalid-setting", d.span, `'detect ${name}' needs a positive difference, not ${d.text}.`));
    }
    const planned = sigma.get(name);
    if (planned && !(planned.value > 0 && Number.isFinite(planned.value))) {
      sink.add(diagnostic("invalid-setting", planned.span, `'sigma ${name}' is the planned error standard deviation and must be positive, not ${planned.text}.`));
    }
    result.push({
      name,
      span: decl.name.span,
      ...(decl.unit ? { unit: decl.unit.text } : {}),
      ...(decl.goal ? { goal: decl.goal.kind } : {}),
      ...(decl.goal?.kind === "target" && decl.goal.target ? { target: decl.goal.target.value } : {}),
      ...(spec?.lower ? { specLower: spec.lower.value } : {}),
      ...(spec?.upper ? { specUpper: spec.upper.value } : {}),
      ...(d && d.value > 0 ? { detect: d.value } : {}),
      ...(planned && planned.value > 0 && Number.isFinite(planned.value) ? { sigma: planned.value } : {}),
    });
  }
  for (const s of file.plan?.settings ?? []) {
    if ((s.kind === "detect" || s.kind === "sigma") && s.response && !result.some((r) => r.name === s.response!.text)) {
      sink.add(diagnostic("unknown-response", s.response.span, `'${s.response.text}' is not a declared response${listOf(result.map((r) => r.name))}.`));
    }
  }
  return result;
}

// ---------------------------------------------------------------------------------------------------------
// Plan settings

function resolveSettings(
  settings: readonly PlanSetting[],
  defaults: AnalysisSettings,
  overrides: AnalysisSettings,
  sink: DiagnosticSink,
): DesignSettings {
  const fromFile = new Set<"alpha" | "confidence" | "power" | "sums-of-squares">();
  let replicates: number | undefined;
  let seed: number | undefined;
  let alpha: number | undefined;
  let confidence: number | undefined;
  let power: number | undefined;
  let ssType: SumsOfSquaresType | undefined;

  const probability = (value: DecimalNumber | undefined, what: string): number | undefined => {
    if (!value) return undefined;
    if (value.value > 0 && value.value < 1) return value.value;
    sink.add(diagnostic("invalid-setting", value.span, `${what} must lie strictly between 0 and 1, not ${value.text}.`));
    return undefined;
  };
  const wholeNumber = (value: DecimalNumber | undefined, what: string, min: number): number | undefined => {
    if (!value) return undefined;
    if (Number.isSafeInteger(value.value) && value.value >= min) return value.value;
    sink.add(diagnostic("invalid-setting", value.span, `${what} must be a whole number of at least ${min}, not ${value.text}.`));
    return undefined;
  };

  for (const s of settings) {
    switch (s.kind) {
      case "replicates":
        replicates = wholeNumber(s.value, "replicates", 1) ?? replicates;
        break;
      case "seed":
        seed = wholeNumber(s.value, "seed", 0) ?? seed;
        break;
      case "centre-points":
        wholeNumber(s.value, "centre-points", 0);
        break;
      case "alpha":
        alpha = probability(s.value, "alpha (the significance level)") ?? alpha;
        if (s.value) fromFile.add("alpha");
        break;
      case "confidence":
        confidence = probability(s.value, "confidence") ?? confidence;
        if (s.value) fromFile.add("confidence");
        break;
      case "power":
        power = probability(s.value, "power (the target probability of detecting the difference)") ?? power;
        if (s.value) fromFile.add("power");
        break;
      case "sums-of-squares":
        if (s.value) {
          if (s.value.text === "I" || s.value.text === "II" || s.value.text === "III") {
            ssType = s.value.text;
            fromFile.add("sums-of-squares");
          } else {
            sink.add(diagnostic("invalid-setting", s.value.span, `sums-of-squares is I, II or III, not '${s.value.text}'.`));
          }
        }
        break;
      default:
        break;
    }
  }
  return {
    ...(replicates !== undefined ? { replicates } : {}),
    ...(seed !== undefined ? { seed } : {}),
    alpha: overrides.alpha ?? alpha ?? defaults.alpha ?? DEFAULT_SETTINGS.alpha,
    confidence: overrides.confidence ?? confidence ?? defaults.confidence ?? DEFAULT_SETTINGS.confidence,
    power: overrides.power ?? power ?? defaults.power ?? DEFAULT_SETTINGS.power,
    ssType: overrides.ssType ?? ssType ?? defaults.ssType ?? DEFAULT_SETTINGS.ssType,
    fromFile,
  };
}

// ---------------------------------------------------------------------------------------------------------
// Model terms

function termName(variables: readonly TermVariable[], factors: readonly DesignFactor[], covariates: readonly DesignCovariate[]): string {
  return variables.map((v) => (v.kind === "factor" ? factors[v.index]!.name : covariates[v.index]!.name)).join(" x ");
}

/** What the default model may depend on besides the declarations (docs/designs.md). */
interface DefaultModelContext {
  readonly runs: DesignRuns;
  readonly fractions: readonly { readonly generated: number; readonly product: readonly number[] }[];
}

/**
 * The default model (design brief §3): fixed factors fully crossed, blocks and covariates additive.
 * Covariates and blocks come first so that sequential (Type I) sums of squares adjust the treatments for
 * them, the usual order for blocked and covariance analyses. Designs beyond complete randomization
 * (docs/designs.md):
 * - random factors and nested factors (`within`) are crossed with the fixed factors like fixed ones; for a
 *   nested factor the crossed terms span the same space as the nested term, so fitted values and residuals
 *   are right, and the mixed-model analysis replaces the table with the nested partition. When no cell of
 *   that crossing holds two runs, the highest-order term is left to be the residual;
 * - a subject factor stays additive unless some fixed factor is constant within every subject (a
 *   between-subject factor, which a subject main effect would alias): then it is left out of the fixed-effects
 *   model and the repeated-measures analysis supplies the strata;
 * - with `plan fraction`, only the first term of each alias set is kept, and terms aliased with the
 *   identity are dropped, so the fit is not rank deficient by construction.
 */
function defaultTerms(factors: readonly DesignFactor[], covariates: readonly DesignCovariate[], context?: DefaultModelContext): DesignTerm[] {
  let terms: DesignTerm[] = [];
  const add = (variables: TermVariable[]) => terms.push({ name: termName(variables, factors, covariates), variables });
  covariates.forEach((_, index) => add([{ kind: "covariate", index }]));
  const subjectBetween = context ? hasBetweenSubjectFactor(factors, context.runs) : false;
  factors.forEach((f, index) => {
    if (f.role === "block" || (f.role === "subject" && !subjectBetween)) add([{ kind: "factor", index }]);
  });
  const crossed = factors.flatMap((f, i) => (f.role === "fixed" || f.role === "random" ? [i] : []));
  const special = crossed.some((i) => factors[i]!.role === "random" || factors[i]!.within !== undefined);
  // All non-empty subsets of the crossed factors, by size, then in declaration order.
  for (let size = 1; size <= crossed.length; size++) {
    for (const subset of combinations(crossed, size)) add(subset.map((index) => ({ kind: "factor", index })));
  }
  if (special && crossed.length > 1 && context && maxRunsPerCell(crossed, factors, context.runs) <= 1) terms.pop();
  if (context && context.fractions.length > 0) terms = keepOnePerAliasSet(terms, factors, context.fractions);
  return terms;
}

/** True when a fixed factor has one level within every subject (it varies between subjects only). */
function hasBetweenSubjectFactor(factors: readonly DesignFactor[], runs: DesignRuns): boolean {
  const subject = factors.findIndex((f) => f.role === "subject");
  if (subject < 0 || runs.count === 0) return false;
  const keyOf = subjectKeys(factors, subject, runs);
  return factors.some((f, i) => {
    if (f.role !== "fixed" || i === subject) return false;
    const seen = new Map<string, number>();
    let varies = false;
    let levels = new Set<number>();
    for (let r = 0; r < runs.count; r++) {
      const level = runs.levels[i]![r]!;
      if (level < 0 || keyOf[r] === "") continue;
      levels.add(level);
      const prior = seen.get(keyOf[r]!);
      if (prior === undefined) seen.set(keyOf[r]!, level);
      else if (prior !== level) varies = true;
    }
    return !varies && levels.size > 1;
  });
}

/** Identity of the subject of each run: its level with the levels of the factors it is nested in ("" if unknown). */
export function subjectKeys(factors: readonly DesignFactor[], subject: number, runs: DesignRuns): string[] {
  const chain: number[] = [];
  let cur: number | undefined = subject;
  while (cur !== undefined && !chain.includes(cur)) {
    chain.push(cur);
    cur = factors[cur]!.within;
  }
  const keys = new Array<string>(runs.count);
  for (let r = 0; r < runs.count; r++) {
    const parts = chain.map((f) => runs.levels[f]![r]!);
    keys[r] = parts.some((l) => l < 0) ? "" : parts.join("/");
  }
  return keys;
}

function maxRunsPerCell(crossed: readonly number[], factors: readonly DesignFactor[], runs: DesignRuns): number {
  const counts = new Map<string, number>();
  let max = 0;
  for (let r = 0; r < runs.count; r++) {
    if (runs.excluded[r]) continue;
    const key = crossed.map((f) => runs.levels[f]![r]!).join(",");
    const c = (counts.get(key) ?? 0) + 1;
    counts.set(key, c);
    max = Math.max(max, c);
  }
  return max;
}

function keepOnePerAliasSet(terms: DesignTerm[], factors: readonly DesignFactor[], fractions: DefaultModelContext["fractions"]): DesignTerm[] {
  const relation = definingRelation(fractions, factors.length);
  if (!relation.ok) return terms;
  const seen = new Set<number>();
  return terms.filter((t) => {
    if (t.variables.some((v) => v.kind !== "factor" || factors[v.index]!.role !== "fixed")) return true;
    const word = wordOf(t.variables.map((v) => v.index));
    let key = word;
    for (const w of relation.words) key = Math.min(key, (word ^ w) >>> 0);
    if (key === 0 || seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

/** `plan fraction NAME = A x B x ...` resolved to factor indices; unknown names are reported. */
function resolveFractions(file: TrialFile, factors: readonly DesignFactor[], sink: DiagnosticSink): { generated: number; product: number[]; span: Span }[] {
  const out: { generated: number; product: number[]; span: Span }[] = [];
  for (const s of file.plan?.settings ?? []) {
    if (s.kind !== "fraction" || !s.generated || !s.generator) continue;
    const names = [s.generated, ...s.generator.names];
    const indices = names.map((n) => factors.findIndex((f) => f.name === n.text));
    let ok = true;
    names.forEach((n, i) => {
      if (indices[i]! < 0) {
        ok = false;
        sink.add(diagnostic("unknown-factor", n.span, `'${n.text}' in the fraction generator is not a declared factor${listOf(factors.map((f) => f.name))}.`));
      }
    });
    if (!ok) continue;
    if (indices.slice(1).includes(indices[0]!)) {
      sink.add(diagnostic("invalid-setting", s.span, `'${s.generated.text}' cannot appear in its own generator.`));
      continue;
    }
    out.push({ generated: indices[0]!, product: indices.slice(1), span: s.span });
  }
  if (out.length > 0) {
    const relation = definingRelation(out, factors.length);
    if (!relation.ok) {
      sink.add(diagnostic("invalid-setting", out[0]!.span, `The fraction generators do not define a regular fraction: ${relation.reason}.`));
      return [];
    }
  }
  return out;
}

function combinations(items: readonly number[], size: number): number[][] {
  if (size === 0) return [[]];
  const out: number[][] = [];
  items.forEach((item, i) => {
    for (const rest of combinations(items.slice(i + 1), size - 1)) out.push([item, ...rest]);
  });
  return out;
}

function resolveTerms(
  file: TrialFile,
  factors: readonly DesignFactor[],
  covariates: readonly DesignCovariate[],
  sink: DiagnosticSink,
  context?: DefaultModelContext,
): { terms: DesignTerm[]; explicit: boolean } {
  const modelSetting = file.plan?.settings.find((s) => s.kind === "model");
  if (!modelSetting || modelSetting.kind !== "model" || modelSetting.terms.length === 0) {
    return { terms: defaultTerms(factors, covariates, context), explicit: false };
  }
  const terms: DesignTerm[] = [];
  const seen = new Set<string>();
  for (const term of modelSetting.terms) {
    const variables: TermVariable[] = [];
    let ok = true;
    for (const name of term.names) {
      const f = factors.findIndex((x) => x.name === name.text);
      const c = covariates.findIndex((x) => x.name === name.text);
      if (f >= 0) variables.push({ kind: "factor", index: f });
      else if (c >= 0) variables.push({ kind: "covariate", index: c });
      else {
        ok = false;
        sink.add(
          diagnostic(
            "unknown-factor",
            name.span,
            `'${name.text}' in the model is not a declared factor or covariate${listOf([...factors.map((x) => x.name), ...covariates.map((x) => x.name)])}.`,
          ),
        );
      }
    }
    if (!ok || variables.length === 0) continue;
    const key = variables.map((v) => `${v.kind}:${v.index}`).sort().join(",");
    if (new Set(variables.map((v) => `${v.kind}:${v.index}`)).size !== variables.length) {
      sink.add(diagnostic("invalid-setting", term.span, "A model term names the same variable twice: write each name once."));
      continue;
    }
    if (seen.has(key)) {
      sink.add(diagnostic("invalid-setting", term.span, "This model term is listed twice: remove one."));
      continue;
    }
    seen.add(key);
    terms.push({ name: termName(variables, factors, covariates), variables });
  }
  return { terms, explicit: true };
}

// ---------------------------------------------------------------------------------------------------------
// Runs

/** What a runs-table column holds, as a small integer so the per-cell dispatch is a switch on a number. */
const enum Role {
  Unknown = 0,
  Id = 1,
  Factor = 2,
  Covariate = 3,
  Response = 4,
}

type ColumnRole =
  | { kind: "id" }
  | { kind: "factor"; index: number }
  | { kind: "covariate"; index: number }
  | { kind: "response"; index: number }
  | { kind: "unknown" };

const ROLE_CODE = { unknown: Role.Unknown, id: Role.Id, factor: Role.Factor, covariate: Role.Covariate, response: Role.Response } as const;

/**
 * The header column of cell `k` of a row. With a '|' the two sides are matched separately, so a missing
 * cell on the left does not shift the responses; without one, cells are matched by position. -1 for a cell
 * beyond the header.
 */
function columnOfCell(k: number, split: boolean, pipe: number, leftCount: number, rightCount: number, columnCount: number): number {
  if (split) return k < pipe ? (k < leftCount ? k : -1) : k - pipe < rightCount ? leftCount + (k - pipe) : -1;
  return k < columnCount ? k : -1;
}

function readRuns(
  file: TrialFile,
  factors: readonly DesignFactor[],
  covariates: readonly DesignCovariate[],
  responses: readonly DesignResponse[],
  sink: DiagnosticSink,
  engine: EngineOptions,
): DesignRuns {
  const table = file.runs;
  const count = table?.rowCount ?? 0;
  const roles = table ? mapColumns(table.columns, table.responseStart, factors, covariates, responses, sink) : [];
  // A plain body (the usual large run sheet) is read in one pass straight into these columns when every
  // row is regular (read-plain-runs.ts); otherwise, or when that reader declines, the general path below.
  if (table?.plainBody) {
    const helper = engine.plainPartHelper;
    const split = helper && table.plainMiddle ? { ...table.plainMiddle, helper } : undefined;
    const plain = readPlainTable(file.source, table, table.plainBody, roles, factors, covariates, responses, sink, split);
    if (plain) return plain;
  }
  const levels = factors.map(() => new Int32Array(count).fill(-1));
  const covariateCells = covariates.map(() => new Int32Array(count).fill(-1));
  const covariateStatus = covariates.map(() => new Uint8Array(count).fill(ValueStatus.Invalid));
  const covariateValues = covariates.map(() => decimalColumn(count));
  const responseCells = responses.map(() => new Int32Array(count).fill(-1));
  const responseStatus = responses.map(() => new Uint8Array(count).fill(ValueStatus.Invalid));
  const responseValues = responses.map(() => decimalColumn(count));
  const excluded = new Uint8Array(count);
  const idCells = new Int32Array(count).fill(-1);
  // Texts and spans are read from the source on demand (design-runs.ts): nothing is allocated per run.
  const runs = attachRunTexts({
    count,
    source: file.source,
    ...(table ? { rows: table.rows } : {}),
    idCells,
    responseCells,
    covariateCells,
    levels,
    covariateStatus,
    responseStatus,
    excluded,
    responseValues,
    covariateValues,
  });
  // No table yet is a normal stage of planning, not a problem worth a diagnostic.
  if (!table) return runs;

  const source = file.source;
  const rows = table.rows;
  const { cellOffset, pipeCell, cellStart, cellEnd } = rows;
  const lookups = factors.map((f) => levelLookup(f.levels.map((l) => l.name)));
  const leftCount = table.responseStart;
  const rightCount = table.columns.length - table.responseStart;
  const columnCount = table.columns.length;
  const headerHasPipe = table.headerHasPipe;
  const roleKind = new Uint8Array(columnCount);
  const roleIndex = new Int32Array(columnCount);
  roles.forEach((role, column) => {
    roleKind[column] = ROLE_CODE[role.kind];
    roleIndex[column] = "index" in role ? role.index : -1;
  });
  const idColumn = roles.findIndex((r) => r.kind === "id");
  const anyExcluded = rows.excluded.size > 0;
  // A million-row table must not allocate per cell: spans and texts are made only where a diagnostic
  // needs them.
  const cellSpan = (cell: number): Span => ({ start: cellStart[cell]!, end: cellEnd[cell]! });

  // Run ids are checked for repeats in one pass before the rows (duplicate-run-ids.ts), so that the
  // diagnostics below still come in row order.
  let duplicates: DuplicateRunIds | undefined;
  if (idColumn === 0) {
    for (let r = 0; r < count; r++) {
      const first = cellOffset[r]!;
      const n = cellOffset[r + 1]! - first;
      const pipe = pipeCell[r]!;
      const split = pipe >= 0 && headerHasPipe;
      const k = split && leftCount === 0 ? pipe : 0;
      if (k < n && columnOfCell(k, split, pipe, leftCount, rightCount, columnCount) === 0) idCells[r] = first + k;
    }
    duplicates = duplicateRunIds(source, rows, idCells);
  }
  let nextDuplicate = 0;

  // The tight path: the cells of every regular row (the header's count of cells, and its split at '|')
  // are read in one pass over the rows, without diagnostics. The loop after it then reads again, row by
  // row and with diagnostics, only the rows that need one (irregular, excluded, pending, a repeated id, an
  // unknown level or a value that is not a usable number), so diagnostics keep their order; when no row
  // needs one, that loop is skipped and most rows of a million are touched once.
  const checkedLevels: Int32Array[] = [];
  const checkedStatus: Uint8Array[] = [];
  // Whether every row is regular and every cell read cleanly: then no row needs the second reading, and
  // the loop over all rows below is skipped (the usual large run sheet).
  let allClean = !anyExcluded && (duplicates === undefined || duplicates.rows.length === 0);
  // The factor and value columns, in header order, as parallel arrays: one pass over the rows reads every
  // column of a regular row (its cell offsets and split read once per row, not once per column).
  const factorColumns: number[] = [];
  const factorOut: Int32Array[] = [];
  const factorLookup: LevelLookup[] = [];
  const valueColumns: number[] = [];
  const valueStatusOut: Uint8Array[] = [];
  const valueCells: Int32Array[] = [];
  const valueStore: DecimalColumn[] = [];
  const valueIsResponse: boolean[] = [];
  for (let column = 0; column < columnCount; column++) {
    const kind = roleKind[column];
    const index = roleIndex[column]!;
    if (kind === Role.Factor) {
      factorColumns.push(column);
      factorOut.push(levels[index]!);
      factorLookup.push(lookups[index]!);
      checkedLevels.push(levels[index]!);
    } else if (kind === Role.Response || kind === Role.Covariate) {
      const response = kind === Role.Response;
      valueColumns.push(column);
      valueStatusOut.push(response ? responseStatus[index]! : covariateStatus[index]!);
      valueCells.push(response ? responseCells[index]! : covariateCells[index]!);
      valueStore.push(response ? responseValues[index]! : covariateValues[index]!);
      valueIsResponse.push(response);
      checkedStatus.push(response ? responseStatus[index]! : covariateStatus[index]!);
    }
  }
  const { cellFlags } = rows;
  const factorCount = factorColumns.length;
  const valueCount = valueColumns.length;
  for (let r = 0; r < count; r++) {
    const first = cellOffset[r]!;
    const pipe = pipeCell[r]!;
    if (cellOffset[r + 1]! - first !== columnCount || (pipe >= 0 && headerHasPipe && pipe !== leftCount)) {
      allClean = false;
      continue;
    }
    for (let q = 0; q < factorCount; q++) {
      const level = findLevel(source, rows, first + factorColumns[q]!, factorLookup[q]!);
      if (level < 0) allClean = false;
      factorOut[q]![r] = level;
    }
    for (let q = 0; q < valueCount; q++) {
      const cell = first + valueColumns[q]!;
      // The usual measured value ("21.74") is decomposed and stored in one pass over its characters;
      // anything else is read in full (readValue).
      let status: ValueStatus = ValueStatus.Measured;
      if (cellFlags[cell] !== 0 || !storePlainDecimal(source, cellStart[cell]!, cellEnd[cell]!, valueStore[q]!, r)) {
        const read = readValue(source, rows, cell, valueStore[q]!, r);
        if (read !== CellValue.Measured) allClean = false;
        status = read === CellValue.Measured ? ValueStatus.Measured : read === CellValue.Pending && valueIsResponse[q]! ? ValueStatus.Pending : ValueStatus.Invalid;
      }
      valueStatusOut[q]![r] = status;
      valueCells[q]![r] = cell;
    }
  }
  // A table whose header has no factor or value column reads no row above: its rows are then checked
  // for regularity below as before.
  if (allClean && checkedLevels.length + checkedStatus.length === 0) allClean = false;
  if (allClean) return runs;

  rows: for (let r = 0; r < count; r++) {
    const mark = anyExcluded ? rows.excluded.get(r) : undefined;
    const first = cellOffset[r]!;
    const n = cellOffset[r + 1]! - first;
    const pipe = pipeCell[r]!;
    if (mark === undefined && n === columnCount && !(pipe >= 0 && headerHasPipe && pipe !== leftCount) && !(duplicates !== undefined && nextDuplicate < duplicates.rows.length && duplicates.rows[nextDuplicate] === r)) {
      let clean = true;
      for (let q = 0; q < checkedLevels.length && clean; q++) clean = checkedLevels[q]![r]! >= 0;
      for (let q = 0; q < checkedStatus.length && clean; q++) clean = checkedStatus[q]![r] === ValueStatus.Measured;
      if (clean) continue rows;
    }
    if (mark) excluded[r] = 1;
    const split = pipe >= 0 && headerHasPipe;
    // The common row has the header's cells on each side: then cell k is column k.
    let direct: boolean;
    if (split) {
      const left = pipe;
      const right = n - pipe;
      direct = left === leftCount && right === rightCount;
      if (!direct) {
        const parts: string[] = [];
        if (left !== leftCount) parts.push(`${left} cell${left === 1 ? "" : "s"} before '|' where the header has ${leftCount}`);
        if (right !== rightCount) parts.push(`${right} after '|' where the header has ${rightCount}`);
        sink.add(diagnostic("column-count", runRowSpan(runs, r), `This row has ${parts.join(" and ")}: add or remove cells so each column has one value (use ? for a value not measured yet).`));
      }
    } else {
      direct = true;
      if (n !== columnCount) {
        sink.add(
          diagnostic("column-count", runRowSpan(runs, r), `This row has ${n} cell${n === 1 ? "" : "s"} where the header has ${columnCount} columns: add or remove cells so each column has one value.`),
        );
      }
    }
    const cells = direct ? Math.min(n, columnCount) : n;

    let pendingInRow = false;
    for (let k = 0; k < cells; k++) {
      const column = direct ? k : columnOfCell(k, split, pipe, leftCount, rightCount, columnCount);
      if (column < 0) continue;
      const cell = first + k;
      switch (roleKind[column]) {
        case Role.Id: {
          if (duplicates !== undefined && nextDuplicate < duplicates.rows.length && duplicates.rows[nextDuplicate] === r) {
            const prior = duplicates.priors[nextDuplicate++]!;
            const id = cellText(source, rows, cell);
            sink.add(
              diagnostic("duplicate-run", cellSpan(cell), `Run id '${id}' is already used by an earlier row: give this run a new id.`, [
                { span: runRowSpan(runs, prior), message: `first run with id '${id}'` },
              ]),
            );
          }
          break;
        }
        case Role.Factor: {
          const index = roleIndex[column]!;
          const idx = findLevel(source, rows, cell, lookups[index]!);
          if (idx < 0) {
            const text = cellText(source, rows, cell);
            const f = factors[index]!;
            const span = cellSpan(cell);
            sink.add(text === "?" ? diagnostic("unknown-level", span, `A factor setting cannot be pending: write the level of '${f.name}' this run uses${listOf(f.levels.map((l) => l.name))}.`) : unknownLevel(text, span, f.name, f.levels));
          } else levels[index]![r] = idx;
          break;
        }
        case Role.Covariate: {
          const index = roleIndex[column]!;
          covariateStatus[index]![r] = valueStatus(source, rows, cell, covariateValues[index]!, r, "covariate", covariates[index]!.name, sink);
          covariateCells[index]![r] = cell;
          break;
        }
        case Role.Response: {
          const index = roleIndex[column]!;
          const status = valueStatus(source, rows, cell, responseValues[index]!, r, "response", responses[index]!.name, sink);
          responseStatus[index]![r] = status;
          responseCells[index]![r] = cell;
          if (status === ValueStatus.Pending) pendingInRow = true;
          break;
        }
        default:
          break;
      }
    }

    if (mark || pendingInRow) reportPendingAndExcluded(r, runs, responses, mark, idColumn >= 0, sink);
  }
  return runs;
}

/**
 * The runs of a plain table read by `readPlainRuns`, in the shape the general path gives the same rows
 * (every row regular and clean: levels known, values measured or pending, ids increasing), with the same
 * notes for pending runs; `undefined` when the reader declined. Cell indices are computed, not read: every row has exactly the header's cells, so cell
 * `k` of row `r` is global cell `r * columns + k` of the table's `RunRows`. Both the index arrays and the
 * `RunRows` are built on first access (getters, computed once).
 */
function readPlainTable(
  source: string,
  table: RunsTable,
  body: Span,
  roles: readonly ColumnRole[],
  factors: readonly DesignFactor[],
  covariates: readonly DesignCovariate[],
  responses: readonly DesignResponse[],
  sink: DiagnosticSink,
  split: PlainSplit | undefined,
): DesignRuns | undefined {
  const count = table.rowCount;
  const layout: PlainRunsLayout = {
    kinds: roles.map((role) =>
      role.kind === "id"
        ? PlainColumn.Id
        : role.kind === "factor"
          ? PlainColumn.Factor
          : role.kind === "response"
            ? PlainColumn.Response
            : role.kind === "covariate"
              ? PlainColumn.Value
              : PlainColumn.Skip,
    ),
    levelNames: roles.map((role) => (role.kind === "factor" ? factors[role.index]!.levels.map((l) => l.name) : [])),
    pipeAt: table.headerHasPipe ? table.responseStart : -1,
  };
  const read = readPlainRuns(source, body.start, body.end, count, layout, split);
  if (!read) return undefined;
  const columns = roles.length;
  const cellsOf = (column: number): Int32Array => {
    const cells = new Int32Array(count);
    for (let r = 0, cell = column; r < count; r++, cell += columns) cells[r] = cell;
    return cells;
  };
  // The header column of each variable, -1 for one without a column.
  const columnOf = (kind: "factor" | "covariate" | "response", n: number) =>
    Array.from({ length: n }, (_, i) => roles.findIndex((role) => role.kind === kind && role.index === i));
  const factorColumns = columnOf("factor", factors.length);
  const levels = factorColumns.map((column) => (column >= 0 ? read.levels[column]! : new Int32Array(count).fill(-1)));
  const values = (valueColumns: readonly number[]) => {
    // ValueStatus.Measured is 0 and Pending 1: the reader's marks of `?` are the statuses.
    const status = valueColumns.map((column) => (column >= 0 ? (read.pending[column] ?? new Uint8Array(count)) : new Uint8Array(count).fill(ValueStatus.Invalid)));
    const stored = valueColumns.map((column) => (column >= 0 ? read.values[column]! : decimalColumn(count)));
    // The cell indices are read only for a cell's text or span (hovers, diagnostics, the JSON residuals):
    // made on first access, they cost a large table nothing otherwise.
    let cells: Int32Array[] | undefined;
    const cellsOfAll = () => (cells ??= valueColumns.map((column) => (column >= 0 ? cellsOf(column) : new Int32Array(count).fill(-1))));
    return { cellsOfAll, status, stored };
  };
  const covariateColumns = columnOf("covariate", covariates.length);
  const responseColumns = columnOf("response", responses.length);
  const covariateValues = values(covariateColumns);
  const responseValues = values(responseColumns);
  // Every variable has its column and no response is pending, so every run has every level and value.
  const complete = read.pendingCells.length === 0 && [...factorColumns, ...covariateColumns, ...responseColumns].every((column) => column >= 0);
  // Every run's levels and covariates are known when each factor and covariate has its column (the reader
  // declines an unknown level and a covariate's `?`): then the reader's counts are the design's.
  const tallies = [...factorColumns, ...covariateColumns].every((column) => column >= 0) ? designTallies(read.tallies, layout, factorColumns, responseColumns) : undefined;
  let idCells: Int32Array | undefined;
  const runs = attachRunTexts({
    count,
    source,
    get rows(): RunRows {
      return table.rows;
    },
    get idCells(): Int32Array {
      return (idCells ??= roles[0]?.kind === "id" ? cellsOf(0) : new Int32Array(count).fill(-1));
    },
    get responseCells(): readonly Int32Array[] {
      return responseValues.cellsOfAll();
    },
    get covariateCells(): readonly Int32Array[] {
      return covariateValues.cellsOfAll();
    },
    levels,
    covariateStatus: covariateValues.status,
    responseStatus: responseValues.status,
    excluded: new Uint8Array(count),
    responseValues: responseValues.stored,
    covariateValues: covariateValues.stored,
    ...(complete ? { complete: true as const } : {}),
    ...(tallies ? { tallies } : {}),
  });
  // As the general path reports them: one note per row with a pending response, from the cells the reader
  // recorded (the table's rows are not built for them).
  const cells = read.pendingCells;
  for (let at = 0; at < cells.length; ) {
    const r = cells[at]!;
    const idStart = cells[at + 4]!;
    const label = idStart >= 0 ? `Run ${source.slice(idStart, cells[at + 5]!)}` : `Run ${r + 1}`;
    const spans = new Map<number, Span>();
    for (; at < cells.length && cells[at] === r; at += 6) spans.set(cells[at + 1]!, { start: cells[at + 2]!, end: cells[at + 3]! });
    const pending = responses.flatMap((response, k) => {
      const span = spans.get(responseColumns[k]!);
      return span ? [{ name: response.name, span }] : [];
    });
    const note = pendingNote(label, pending);
    if (note) sink.add(note);
  }
  return runs;
}

/** The reader's extremes (±Infinity where no value was met) as the design's plain finite numbers. */
function decimalExtremes(lowest: Float64Array, highest: Float64Array, scale: number): DecimalExtremes {
  const present = Uint8Array.from(lowest, (low) => (low === Infinity ? 0 : 1));
  return {
    present,
    lowest: lowest.map((low, k) => (present[k] ? low : 0)),
    highest: highest.map((high, k) => (present[k] ? high : 0)),
    scale: scale === Infinity ? null : scale,
  };
}

/**
 * The reader's counts (per header column) as the design's (per factor, response): cell combinations are
 * renumbered from the header's order of the factor columns to the factors' declared order.
 */
function designTallies(read: PlainTallies, layout: PlainRunsLayout, factorColumns: readonly number[], responseColumns: readonly number[]): RunTallies {
  const levels = factorColumns.map((column) => ({ counts: read.levelCounts[column]!, rankSums: read.rankSums[column]!, firstRuns: read.firstRows[column]! }));
  const responseExtremes = responseColumns.map((column) => (column >= 0 ? decimalExtremes(read.lowest[column]!, read.highest[column]!, read.scales[column]!) : undefined));
  if (read.cellCounts.length === 0) return { levels, responseExtremes };
  // The header's factor columns, most significant first, and each one's place value in the design's order.
  const headerColumns = layout.kinds.flatMap((kind, column) => (kind === PlainColumn.Factor ? [column] : []));
  const radixOf = (column: number) => layout.levelNames[column]!.length;
  const placeOf = new Map<number, number>();
  for (let f = factorColumns.length - 1, place = 1; f >= 0; f--) {
    placeOf.set(factorColumns[f]!, place);
    place *= radixOf(factorColumns[f]!);
  }
  const combinations = factorColumns.reduce((product, column) => product * radixOf(column), 1);
  const counts = new Int32Array(combinations);
  const firstRuns = new Int32Array(combinations).fill(-1);
  for (let h = 0; h < read.cellCounts.length; h++) {
    let rest = h;
    let d = 0;
    for (let q = headerColumns.length - 1; q >= 0; q--) {
      const column = headerColumns[q]!;
      const radix = radixOf(column);
      // A factor column the design does not use (a second column of one factor is skipped) has no place.
      d += (rest % radix) * (placeOf.get(column) ?? 0);
      rest = Math.floor(rest / radix);
    }
    counts[d] += read.cellCounts[h]!;
    if (read.cellFirstRows[h]! >= 0 && (firstRuns[d]! < 0 || read.cellFirstRows[h]! < firstRuns[d]!)) firstRuns[d] = read.cellFirstRows[h]!;
  }
  return { levels, cells: { counts, firstRuns }, responseExtremes };
}

/** Largest number of levels looked up by comparing characters in place (beyond it, a map of names). */
const SCAN_LEVELS = 16;

/** Longest level name found through `LevelLookup.byEnd` (the table has a row per length below it). */
const SHORT_NAME = 16;

/**
 * A factor's level names prepared for lookups of cells in place: by name (quoted cells, many levels), and
 * for short ASCII-ending names by (length, last code unit), which most level sets (a1, a2 ...; low, high)
 * tell apart, so that a cell is compared with one candidate only.
 */
interface LevelLookup {
  readonly names: readonly string[];
  readonly index: ReadonlyMap<string, number>;
  /** Entry length * 128 + last code unit: the only level with that length and ending, -1 for none, -2 for several. */
  readonly byEnd: Int16Array;
}

function levelLookup(names: readonly string[]): LevelLookup {
  const byEnd = new Int16Array(SHORT_NAME * 128).fill(-1);
  names.forEach((name, i) => {
    const length = name.length;
    if (length === 0 || length >= SHORT_NAME) return;
    const last = name.charCodeAt(length - 1);
    if (last >= 128) return;
    const at = length * 128 + last;
    byEnd[at] = byEnd[at] === -1 ? i : -2;
  });
  // A name that is long or ends beyond ASCII is never found through the table: such cells take the loop.
  return { names, index: new Map(names.map((n, i) => [n, i] as const)), byEnd };
}

/**
 * The level index of a factor cell, or -1. An unquoted cell is compared in place with each level name
 * (no substring per cell); a quoted cell, or a factor with many levels, is looked up by its text.
 */
function findLevel(source: string, rows: RunRows, cell: number, lookup: LevelLookup): number {
  const names = lookup.names;
  if (rows.cellFlags[cell] === 0 && names.length <= SCAN_LEVELS) {
    const start = rows.cellStart[cell]!;
    const length = rows.cellEnd[cell]! - start;
    const last = length > 0 ? source.charCodeAt(start + length - 1) : -1;
    if (length > 0 && length < SHORT_NAME && last < 128) {
      // The one level with this length and last code unit, if any, is compared; none means no level
      // matches (every short ASCII-ending name is in the table).
      const hit = lookup.byEnd[length * 128 + last]!;
      if (hit === -1) return -1;
      if (hit >= 0) {
        const name = names[hit]!;
        for (let j = 0; j < length - 1; j++) if (name.charCodeAt(j) !== source.charCodeAt(start + j)) return -1;
        return hit;
      }
    }
    // Compared code unit by code unit (`startsWith` with a position is a runtime call, several times
    // slower per cell on a large source), last unit first: level names often share a prefix ("a1", "a2";
    // "ramp-fast", "ramp-slow") and differ at the end, so most mismatches cost one comparison.
    levels: for (let i = 0; i < names.length; i++) {
      const name = names[i]!;
      if (name.length !== length || (length > 0 && name.charCodeAt(length - 1) !== last)) continue;
      for (let j = 0; j < length - 1; j++) if (name.charCodeAt(j) !== source.charCodeAt(start + j)) continue levels;
      return i;
    }
    return -1;
  }
  return lookup.index.get(cellText(source, rows, cell)) ?? -1;
}

function mapColumns(
  columns: readonly Name[],
  responseStart: number,
  factors: readonly DesignFactor[],
  covariates: readonly DesignCovariate[],
  responses: readonly DesignResponse[],
  sink: DiagnosticSink,
): ColumnRole[] {
  const roles: ColumnRole[] = [];
  const firstSpan = new Map<string, Span>();
  columns.forEach((column, i) => {
    const prior = firstSpan.get(column.text);
    if (prior) {
      sink.add(diagnostic("duplicate-name", column.span, `Column '${column.text}' appears twice in the runs header: remove one.`, [{ span: prior, message: "first column of this name" }]));
      roles.push({ kind: "unknown" });
      return;
    }
    firstSpan.set(column.text, column.span);
    if (i === 0 && column.text === "id" && !column.quoted) {
      roles.push({ kind: "id" });
      return;
    }
    if (i < responseStart) {
      const f = factors.findIndex((x) => x.name === column.text);
      const c = covariates.findIndex((x) => x.name === column.text);
      if (f >= 0) roles.push({ kind: "factor", index: f });
      else if (c >= 0) roles.push({ kind: "covariate", index: c });
      else {
        const isResponse = responses.some((x) => x.name === column.text);
        sink.add(
          diagnostic(
            "unknown-factor",
            column.span,
            isResponse
              ? `'${column.text}' is a response: move it after the '|' in the runs header.`
              : `Column '${column.text}' is not a declared factor or covariate: declare it (factor ${column.text} levels ...) or fix the spelling${listOf([...factors.map((x) => x.name), ...covariates.map((x) => x.name)])}.`,
          ),
        );
        roles.push({ kind: "unknown" });
      }
    } else {
      const r = responses.findIndex((x) => x.name === column.text);
      if (r >= 0) roles.push({ kind: "response", index: r });
      else {
        sink.add(
          diagnostic(
            "unknown-response",
            column.span,
            `Column '${column.text}' after '|' is not a declared response: declare it (response ${column.text} unit ...) or fix the spelling${listOf(responses.map((x) => x.name))}.`,
          ),
        );
        roles.push({ kind: "unknown" });
      }
    }
  });
  const present = new Set(columns.map((c) => c.text));
  const headerSpan = columns.length > 0 ? { start: columns[0]!.span.start, end: columns[columns.length - 1]!.span.end } : undefined;
  if (headerSpan) {
    for (const f of factors) {
      if (!present.has(f.name)) sink.add(diagnostic("missing-column", headerSpan, `Factor '${f.name}' has no column in the runs table: add a '${f.name}' column before the '|'.`));
    }
    for (const c of covariates) {
      if (!present.has(c.name)) sink.add(diagnostic("missing-column", headerSpan, `Covariate '${c.name}' has no column in the runs table: add a '${c.name}' column before the '|'.`));
    }
    for (const r of responses) {
      if (!present.has(r.name)) sink.add(diagnostic("missing-column", headerSpan, `Response '${r.name}' has no column in the runs table: add a '${r.name}' column after the '|'.`));
    }
  }
  return roles;
}

/** Reused by every cell check so validating a million values allocates nothing per value. */
const scratchScan = emptyScan();

/** What a covariate or response cell holds (see `readValue`). */
const enum CellValue {
  Measured = 0,
  /** An unquoted or quoted `?`: pending for a response, not recorded for a covariate. */
  Pending = 1,
  NotANumber = 2,
  /** A number no finite nonzero double can stand for; `scratchScan` holds its scan. */
  OutOfRange = 3,
}

/**
 * Reads one covariate or response cell and, for a usable number, stores its exact decomposition and double
 * at `r` in `values` (so centring never reads the text again). An unquoted cell is scanned in place in the
 * source; a substring is made only for a quoted cell. Reports nothing (see `valueStatus`).
 */
function readValue(source: string, rows: RunRows, cell: number, values: DecimalColumn, r: number): CellValue {
  const quoted = rows.cellFlags[cell] !== 0;
  // The usual measured value ("21.74") is decomposed and stored in one pass over its characters.
  if (!quoted && storePlainDecimal(source, rows.cellStart[cell]!, rows.cellEnd[cell]!, values, r)) return CellValue.Measured;
  const text = quoted ? cellText(source, rows, cell) : source;
  const from = quoted ? 0 : rows.cellStart[cell]!;
  const to = quoted ? text.length : rows.cellEnd[cell]!;
  if (to - from === 1 && text.charCodeAt(from) === 63 /* ? */) return CellValue.Pending;
  const scan = scanDecimal(text, scratchScan, from, to);
  if (typeof scan === "string") return CellValue.NotANumber;
  const value = scanValue(text, scan);
  if (scan.significantCount > 0 && (value === 0 || !Number.isFinite(value))) return CellValue.OutOfRange;
  storeDecimal(values, r, scan);
  return CellValue.Measured;
}

/** Reads one covariate or response cell (`readValue`) and reports a value that cannot be used. */
function valueStatus(source: string, rows: RunRows, cell: number, values: DecimalColumn, r: number, kind: "covariate" | "response", name: string, sink: DiagnosticSink): ValueStatus {
  const read = readValue(source, rows, cell, values, r);
  if (read === CellValue.Measured) return ValueStatus.Measured;
  const span = { start: rows.cellStart[cell]!, end: rows.cellEnd[cell]! };
  const written = cellText(source, rows, cell);
  if (read === CellValue.Pending) {
    if (kind === "covariate") {
      sink.add(diagnostic("not-a-number", span, `The ${kind} '${name}' is not recorded for this run: write the measured value.`));
      return ValueStatus.Invalid;
    }
    return ValueStatus.Pending;
  }
  if (read === CellValue.NotANumber) {
    sink.add(diagnostic("not-a-number", span, `'${written}' is not a number for the ${kind} '${name}': write a decimal number such as 12.5, or ? if it is not measured yet.`));
    return ValueStatus.Invalid;
  }
  const scan = scanDecimal(written, scratchScan) as DecimalScan;
  sink.add(diagnostic("value-out-of-range", span, `The ${kind} '${name}' cannot be represented: ${rangeReason(written, scan, scanValue(written, scan))}. Check the value or change its unit.`));
  return ValueStatus.Invalid;
}

function reportPendingAndExcluded(
  r: number,
  runs: DesignRuns,
  responses: readonly DesignResponse[],
  mark: { span: Span; reason?: { text: string } } | undefined,
  hasIds: boolean,
  sink: DiagnosticSink,
): void {
  const label = hasIds ? `Run ${runId(runs, r)}` : `Run ${r + 1}`;
  if (mark) {
    sink.add(
      diagnostic(
        "excluded-run",
        mark.span,
        mark.reason && mark.reason.text.trim() !== ""
          ? `${label} is excluded from the analysis: ${mark.reason.text}.`
          : `${label} is excluded from the analysis without a reason: write why, e.g. excluded "fixture slipped".`,
      ),
    );
    return;
  }
  const pending = responses.flatMap((response, k) => (runs.responseStatus[k]![r] === ValueStatus.Pending ? [{ name: response.name, span: responseSpan(runs, k, r)! }] : []));
  const note = pendingNote(label, pending);
  if (note) sink.add(note);
}

/**
 * The `pending-run` note of a run whose responses `pending` (in declaration order, with their cells) are
 * not measured yet; undefined when none is. It spans the first to the last of those cells.
 */
function pendingNote(label: string, pending: readonly { readonly name: string; readonly span: Span }[]): Diagnostic | undefined {
  if (pending.length === 0) return undefined;
  const span = { start: pending[0]!.span.start, end: pending[pending.length - 1]!.span.end };
  return diagnostic("pending-run", span, `${label} is pending: ${pending.map((p) => p.name).join(", ")} not measured yet.`);
}

// ---------------------------------------------------------------------------------------------------------
// Cells

/** Largest number of cells enumerated; designs with more level combinations skip cell checks. */
const MAX_CELLS = 1_000_000;

function checkCells(design: Design, file: TrialFile, sink: DiagnosticSink): void {
  const cellFactors = design.cellFactors;
  if (cellFactors.length === 0) return;
  let cellCount = 1;
  for (const f of cellFactors) cellCount *= Math.max(1, design.factors[f]!.levels.length);
  if (cellCount > MAX_CELLS || design.factors.some((f, i) => cellFactors.includes(i) && f.levels.length === 0)) return;

  const { runs } = design;
  // One pass over the runs finds each run's cell (as cellIndexOfRuns, without storing it) and counts the
  // planned runs and every response's measured values per cell. The per-run cells are built only for a
  // missing-replicate finding, which lists the other runs of its cell.
  const planned = new Int32Array(cellCount);
  const firstRun = new Int32Array(cellCount).fill(-1);
  const responseCount = design.responses.length;
  const measuredCounts = new Int32Array(cellCount * responseCount);
  const levelArrays = cellFactors.map((f) => runs.levels[f]!);
  const radices = Int32Array.from(cellFactors, (f) => design.factors[f]!.levels.length);
  const statusArrays = runs.responseStatus;
  const excluded = runs.excluded;
  const tallied = runs.complete ? runs.tallies?.cells : undefined;
  if (tallied) {
    // Counted as the runs were read (every run complete, none excluded): the combinations of every factor's
    // levels, added up over the factors that are not cell factors.
    const allRadices = design.factors.map((f) => f.levels.length);
    const placeOf = allRadices.map((_, f) => allRadices.slice(f + 1).reduce((product, radix) => product * radix, 1));
    for (let d = 0; d < tallied.counts.length; d++) {
      const count = tallied.counts[d]!;
      if (count === 0) continue;
      let c = 0;
      for (let q = 0; q < cellFactors.length; q++) {
        const f = cellFactors[q]!;
        c = c * radices[q]! + (Math.floor(d / placeOf[f]!) % allRadices[f]!);
      }
      planned[c] += count;
      const first = tallied.firstRuns[d]!;
      if (firstRun[c]! < 0 || first < firstRun[c]!) firstRun[c] = first;
    }
    for (let k = 0; k < responseCount; k++) measuredCounts.set(planned, k * cellCount);
  }
  for (let r = 0; r < (tallied ? 0 : runs.count); r++) {
    if (excluded[r]) continue;
    let c = 0;
    for (let q = 0; q < levelArrays.length; q++) {
      const level = levelArrays[q]![r]!;
      if (level < 0) {
        c = -1;
        break;
      }
      c = c * radices[q]! + level;
    }
    if (c < 0) continue;
    planned[c]!++;
    if (firstRun[c]! < 0) firstRun[c] = r;
    for (let k = 0; k < responseCount; k++) if (statusArrays[k]![r] === ValueStatus.Measured) measuredCounts[k * cellCount + c]!++;
  }
  let cellsOfRuns: Int32Array | undefined;

  const replicates = design.settings.replicates;
  const runsKeyword = file.runs!.keywordSpan;
  for (let c = 0; c < cellCount; c++) {
    if (planned[c] === 0) {
      if (design.hasFraction || design.centrePoints !== undefined || isLatinSquare(design)) continue;
      const interaction = cellFactors.length > 1 ? ` The ${cellFactors.map((f) => design.factors[f]!.name).join(" x ")} interaction cannot be fully estimated.` : "";
      sink.add(diagnostic("empty-cell", runsKeyword, `No run has ${describeCell(design, c)}.${interaction} Add runs for this combination (use ? for values not measured yet).`));
    } else if (replicates !== undefined && planned[c]! < replicates) {
      const missing = replicates - planned[c]!;
      const related = [];
      const cellOfRun = (cellsOfRuns ??= cellIndexOfRuns(design));
      for (let r = 0; r < runs.count; r++) {
        if (cellOfRun[r] === c && !runs.excluded[r] && r !== firstRun[c]) related.push({ span: runRowSpan(runs, r), message: `another run of ${describeCell(design, c)}` });
      }
      sink.add(
        diagnostic(
          "missing-replicate",
          runRowSpan(runs, firstRun[c]!),
          `${describeCell(design, c)} has ${planned[c]} of ${replicates} replicates: add ${missing} run${missing === 1 ? "" : "s"} (a quick fix adds pending rows).`,
          related,
        ),
      );
    }
  }

  // Centre points are one cell with several runs by design: that imbalance is planned, not a finding.
  if ((design.centrePoints ?? 0) > 0) return;
  design.responses.forEach((response, k) => {
    const measured = measuredCounts.subarray(k * cellCount, (k + 1) * cellCount);
    let min = Infinity;
    let max = 0;
    for (let c = 0; c < cellCount; c++) {
      if (measured[c]! > 0) {
        min = Math.min(min, measured[c]!);
        max = Math.max(max, measured[c]!);
      }
    }
    if (max > 0 && min !== max) {
      sink.add(
        diagnostic(
          "unbalanced-cells",
          response.span,
          `The cells hold ${min} to ${max} measured values of '${response.name}', so the design is unbalanced: effects are tested with Type ${design.settings.ssType} sums of squares and level means are not all equally precise.`,
        ),
      );
    }
  });
}

/**
 * A Latin square (docs/designs.md): two block factors (rows and columns) and one fixed factor, all with the
 * same number n of levels, and n² runs (Montgomery 2017, §4.2). Its n³ - n² unused level combinations are
 * by design, not empty cells.
 */
export function isLatinSquare(design: Design): boolean {
  const blocks = design.factors.filter((f) => f.role === "block");
  const fixed = design.factors.filter((f) => f.role === "fixed");
  if (blocks.length !== 2 || fixed.length !== 1 || design.factors.length !== 3) return false;
  const n = fixed[0]!.levels.length;
  if (n < 2 || blocks.some((b) => b.levels.length !== n)) return false;
  const [rows, cols] = design.factors.flatMap((f, i) => (f.role === "block" ? [i] : []));
  const treatment = design.factors.findIndex((f) => f.role === "fixed");
  const seenRowCol = new Set<number>();
  const seenRowTrt = new Set<number>();
  const seenColTrt = new Set<number>();
  let count = 0;
  for (let r = 0; r < design.runs.count; r++) {
    if (design.runs.excluded[r]) continue;
    const a = design.runs.levels[rows!]![r]!;
    const b = design.runs.levels[cols!]![r]!;
    const t = design.runs.levels[treatment]![r]!;
    if (a < 0 || b < 0 || t < 0) return false;
    count++;
    for (const [set, key] of [[seenRowCol, a * n + b], [seenRowTrt, a * n + t], [seenColTrt, b * n + t]] as const) {
      if (set.has(key)) return false;
      set.add(key);
    }
  }
  return count === n * n;
}

/**
 * Repeated measures: every subject should have a run in every condition of the within-subject factors
 * (fixed factors that vary within a subject). One diagnostic per subject lists what is missing.
 */
function checkSubjectConditions(design: Design, sink: DiagnosticSink): void {
  const subject = design.factors.findIndex((f) => f.role === "subject");
  if (subject < 0) return;
  const { runs, factors } = design;
  const keys = subjectKeys(factors, subject, runs);
  const within = factors.flatMap((f, i) => {
    if (f.role !== "fixed") return [];
    const first = new Map<string, number>();
    for (let r = 0; r < runs.count; r++) {
      const l = runs.levels[i]![r]!;
      if (l < 0 || keys[r] === "" || runs.excluded[r]) continue;
      const prior = first.get(keys[r]!);
      if (prior === undefined) first.set(keys[r]!, l);
      else if (prior !== l) return [i];
    }
    return [];
  });
  if (within.length === 0) return;
  const conditions = within.reduce((a, f) => a * factors[f]!.levels.length, 1);
  if (conditions > 10_000) return;
  const bySubject = new Map<string, { first: number; seen: Set<number> }>();
  for (let r = 0; r < runs.count; r++) {
    if (keys[r] === "" || runs.excluded[r]) continue;
    let c = 0;
    let ok = true;
    for (const f of within) {
      const l = runs.levels[f]![r]!;
      if (l < 0) ok = false;
      c = c * factors[f]!.levels.length + l;
    }
    if (!ok) continue;
    const entry = bySubject.get(keys[r]!) ?? { first: r, seen: new Set<number>() };
    entry.seen.add(c);
    bySubject.set(keys[r]!, entry);
  }
  for (const { first, seen } of bySubject.values()) {
    if (seen.size === conditions) continue;
    const missing: string[] = [];
    for (let c = 0; c < conditions && missing.length < 6; c++) {
      if (seen.has(c)) continue;
      let rest = c;
      const parts: string[] = [];
      for (let q = within.length - 1; q >= 0; q--) {
        const f = factors[within[q]!]!;
        parts.unshift(`${f.name}=${f.levels[rest % f.levels.length]!.name}`);
        rest = Math.floor(rest / f.levels.length);
      }
      missing.push(parts.join(", "));
    }
    const name = factors[subject]!.levels[runs.levels[subject]![first]!]!.name;
    const more = conditions - seen.size - missing.length;
    sink.add(
      diagnostic(
        "missing-condition",
        runRowSpan(runs, first),
        `Subject '${name}' has no run with ${missing.join("; ")}${more > 0 ? ` and ${more} more` : ""}: every subject needs every condition, or it is left out of the repeated-measures analysis. Add the runs (use ? for values not measured yet).`,
      ),
    );
  }
}

/** The cell (mixed-radix index over `design.cellFactors`) of each run, or -1 where a level is unknown. */
export function cellIndexOfRuns(design: Design): Int32Array {
  const { runs, cellFactors } = design;
  const result = new Int32Array(runs.count);
  // The level arrays and radices held in locals, so the loop reads typed arrays only.
  const levels = cellFactors.map((f) => runs.levels[f]!);
  const radices = Int32Array.from(cellFactors, (f) => design.factors[f]!.levels.length);
  for (let r = 0; r < runs.count; r++) {
    let index = 0;
    for (let q = 0; q < levels.length; q++) {
      const level = levels[q]![r]!;
      if (level < 0) {
        index = -1;
        break;
      }
      index = index * radices[q]! + level;
    }
    result[r] = index;
  }
  return result;
}

/** Words for a cell, e.g. "profile=soak, line=south". */
export function describeCell(design: Design, cell: number): string {
  const parts: string[] = [];
  let rest = cell;
  for (let i = design.cellFactors.length - 1; i >= 0; i--) {
    const f = design.factors[design.cellFactors[i]!]!;
    const n = f.levels.length;
    parts.unshift(`${f.name}=${f.levels[rest % n]!.name}`);
    rest = Math.floor(rest / n);
  }
  return parts.join(", ");
}

function unknownLevel(text: string, span: Span, factor: string, levels: readonly { name: string }[]): Diagnostic {
  return diagnostic("unknown-level", span, `'${text}' is not a level of factor '${factor}': fix the spelling or add it to the factor's levels${listOf(levels.map((l) => l.name))}.`);
}

function listOf(names: readonly string[]): string {
  if (names.length === 0) return "";
  const shown = names.slice(0, 12).join(", ");
  return ` (declared: ${shown}${names.length > 12 ? ", ..." : ""})`;
}

/**
 * Numbers in declarations and plan settings (numeric levels, spec limits, targets, plan values) that are
 * nonzero as written but round to zero as a double (e.g. 1e-400): reported, since they would silently act
 * as 0. (Too large numbers are already reported by the parser; cells are checked in readRuns.)
 */
function reportUnderflow(file: TrialFile, sink: DiagnosticSink): void {
  const numbers: DecimalNumber[] = [];
  for (const f of file.factors) for (const l of f.levels) if (l.number) numbers.push(l.number);
  for (const r of file.responses) {
    if (r.spec?.lower) numbers.push(r.spec.lower);
    if (r.spec?.upper) numbers.push(r.spec.upper);
    if (r.goal?.kind === "target" && r.goal.target) numbers.push(r.goal.target);
  }
  for (const setting of file.plan?.settings ?? []) {
    if ("value" in setting && setting.value && typeof setting.value === "object" && "value" in setting.value && typeof setting.value.value === "number") numbers.push(setting.value as DecimalNumber);
    if (setting.kind === "detect" && setting.difference) numbers.push(setting.difference);
  }
  for (const n of numbers) {
    if (n.value === 0 && /[1-9]/.test(n.text.split(/[eE]/)[0]!)) {
      sink.add(diagnostic("value-out-of-range", n.span, `${n.text} is too small to represent: nonzero as written, it is below the smallest positive double (about 4.9e-324) and would act as 0. Write it in another unit.`));
    }
  }
}
