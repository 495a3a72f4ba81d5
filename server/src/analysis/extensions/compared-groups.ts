import type { ResponseContext } from "../analyze-response.js";
import { type GroupSummary, summarizeGroupings } from "../../stats/comparisons/group-summary.js";
import { crossedCodes, fixedFactorsIn, startedCrossedCodes } from "../early-analysis.js";

/** The groups of one compared term: a factor's levels or an interaction's cells, with labels and summaries. */
export interface ComparedGroups {
  readonly term: string;
  /** Factor indices in the design, one for a main effect. */
  readonly factors: readonly number[];
  readonly labels: readonly string[];
  /** Per observation of the fit: its group. */
  readonly codes: Int32Array;
  /** Summaries of the centred values (add `context.offset` to a mean for the response scale). */
  readonly summaries: readonly GroupSummary[];
  /** Per group, the plain sum of its centred values in observation order (for the Levene test). */
  readonly sums: Float64Array;
  /** Declared level index per group for a single factor (to find the control and numeric values). */
  readonly declared: readonly number[];
}

/** Fixed factors whose main effect is in the fitted model, in declaration order. */
export function fixedMainEffects(context: ResponseContext): number[] {
  const out: number[] = [];
  for (const term of context.modelTerms) {
    if (term.variables.length !== 1 || term.variables[0]!.kind !== "factor") continue;
    const f = term.variables[0]!.index;
    if (context.design.factors[f]!.role === "fixed" && context.design.factors[f]!.within === undefined) out.push(f);
  }
  return out.sort((a, b) => a - b);
}

/** Fixed factors appearing in any fitted term. */
export function fixedFactorsInModel(context: ResponseContext): number[] {
  return fixedFactorsIn(context.design, context.modelTerms);
}

/**
 * Groups already formed per fit, keyed by the fit's response values (every extension of one response sees
 * the same array) and the factor list: the comparisons and the model checks ask for the same groups, and
 * each forming is two passes over every run.
 */
const formed = new WeakMap<Float64Array, Map<string, ComparedGroups | undefined>>();

/** The groups formed by crossing `factors` over the fit's observations (undefined when a factor has no codes). */
export function groupsOf(context: ResponseContext, factors: readonly number[]): ComparedGroups | undefined {
  const key = factors.join(",");
  const cache = formed.get(context.y);
  if (cache?.has(key)) return cache.get(key);
  prepareGroups(context, [factors]);
  return formed.get(context.y)!.get(key);
}

/**
 * The factor lists the extensions compare: every fixed main effect of the model (comparisons, power,
 * alternatives) and the cells of all fixed factors in the model (variance checks).
 */
export function commonGroupings(context: ResponseContext): number[][] {
  const lists = fixedMainEffects(context).map((f) => [f]);
  const cells = fixedFactorsInModel(context);
  if (cells.length > 1) lists.push(cells);
  return lists;
}

/**
 * Forms the groups of every factor list in `lists` not formed yet for this fit, summarising them together
 * (summarizeGroupings: up to three groupings share each pass over the runs), so that later `groupsOf`
 * calls find them.
 */
export function prepareGroups(context: ResponseContext, lists: readonly (readonly number[])[]): void {
  let cache = formed.get(context.y);
  if (!cache) formed.set(context.y, (cache = new Map()));
  const pending: { key: string; shape: Omit<ComparedGroups, "summaries" | "sums"> }[] = [];
  for (const factors of lists) {
    const key = factors.join(",");
    if (cache.has(key) || pending.some((p) => p.key === key)) continue;
    const shape = groupShape(context, factors);
    if (shape) pending.push({ key, shape });
    else cache.set(key, undefined);
  }
  // Groups whose summaries the level means already formed (same observations and groups) are not read again.
  const toSummarise: typeof pending = [];
  for (const p of pending) {
    const known = context.knownGroups?.get(p.key);
    if (known && known.summaries.length === p.shape.labels.length) cache.set(p.key, { ...p.shape, ...known });
    else toSummarise.push(p);
  }
  if (toSummarise.length === 0) return;
  const summarised = summarizeGroupings(
    context.y,
    toSummarise.map((p) => p.shape.codes),
    toSummarise.map((p) => p.shape.labels.length),
  );
  toSummarise.forEach((p, j) => cache.set(p.key, { ...p.shape, ...summarised[j]! }));
}

/** Labels and codes of the groups crossing `factors` (undefined when a factor has no codes). */
function groupShape(context: ResponseContext, factors: readonly number[]): Omit<ComparedGroups, "summaries" | "sums"> | undefined {
  const parts = factors.map((f) => context.levelsOf(f));
  if (parts.some((p) => p === undefined)) return undefined;
  const sizes = parts.map((p) => p!.levels.length);
  const count = sizes.reduce((a, b) => a * b, 1);
  // A single factor's groups are its compact codes (shared, never written); a crossing's codes were made
  // already when the variance tests of these cells were started on another thread.
  const codes = startedCrossedCodes(context.y, factors) ?? crossedCodes(parts.map((p) => p!.codes), sizes);
  const labels: string[] = [];
  const declared: number[] = [];
  for (let c = 0; c < count; c++) {
    let rest = c;
    const names: string[] = new Array(factors.length);
    for (let j = factors.length - 1; j >= 0; j--) {
      const level = parts[j]!.levels[rest % sizes[j]!]!;
      names[j] = context.design.factors[factors[j]!]!.levels[level]!.name;
      if (factors.length === 1) declared.push(level);
      rest = Math.floor(rest / sizes[j]!);
    }
    labels.push(names.join(" x "));
  }
  const term = factors.map((f) => context.design.factors[f]!.name).join(" x ");
  return { term, factors, labels, codes, declared };
}
