/**
 * Parts of a large file's analysis started on the engine's other thread (`EngineOptions.analysisHelper`)
 * as soon as a response's values are centred and its levels compacted, so that they run there while this
 * thread goes on: the level means' two passes (`accumulateGroupings`, needed after the fit) and the
 * variance tests (needed by the model checks, after the means and the comparisons). Each is the same
 * function on the same arrays (shared memory) as this thread would run, so the results are the same.
 *
 * Why started here: the variance tests started from the model checks were posted 0.4 ms before they were
 * needed and waited for (40 ms of cold code on the other thread; 1M-run file, 2026-12-02); started after
 * the centring, the fit, the means and the comparisons run meanwhile.
 */
import type { LeveneTests } from "../stats/checks/levene.js";
import type { GroupAccumulators, Grouping } from "../stats/linear-model/group-means.js";
import type { Design, DesignTerm } from "./design.js";
import type { EngineOptions } from "./engine-options.js";

/** From this many runs on, work goes to another thread when the engine has one. */
export const ELSEWHERE_FROM = 100_000;

function shared(array: ArrayBufferView): boolean {
  return array.buffer instanceof SharedArrayBuffer;
}

/**
 * Starts `accumulateGroupings(y, groupings)` on the other thread when the engine has one, `y` is large and
 * every array is in shared memory; returns the function that waits for the result (undefined: compute it here).
 */
export function startGroupAccumulators(engine: EngineOptions, y: Float64Array, groupings: readonly Grouping[]): (() => GroupAccumulators | undefined) | undefined {
  const helper = engine.analysisHelper;
  if (!helper || y.length < ELSEWHERE_FROM || !shared(y)) return undefined;
  if (groupings.some((g) => !shared(g.codes) || (g.within !== undefined && !shared(g.within.codes)))) return undefined;
  // Only the fields of a grouping (the caller's carry labels too).
  return helper.startGroupAccumulators({ y, groupings: groupings.map(({ codes, groupCount, within }) => (within ? { codes, groupCount, within } : { codes, groupCount })) });
}

interface Started {
  /** The factors crossed, as `groupsOf` keys them ("0,2"). */
  readonly key: string;
  readonly codes: Int32Array;
  readonly count: number;
  readonly wait: () => LeveneTests | undefined;
}

/** Tests started, by the centred values they are of. */
const started = new WeakMap<Float64Array, Started>();

/** Fixed factors appearing in any of `terms`, in factor order: the cells of the variance tests. */
export function fixedFactorsIn(design: Design, terms: readonly DesignTerm[]): number[] {
  const seen = new Set<number>();
  for (const term of terms) for (const v of term.variables) if (v.kind === "factor" && design.factors[v.index]!.role === "fixed") seen.add(v.index);
  return [...seen].sort((a, b) => a - b);
}

/**
 * The group of each observation when crossing factors with these compact codes and numbers of levels
 * (mixed radix, the first factor most significant), in `memory` when given; a single factor's codes as they are.
 */
export function crossedCodes(parts: readonly Int32Array[], sizes: readonly number[], memory?: (bytes: number) => ArrayBufferLike): Int32Array {
  if (parts.length === 1) return parts[0]!;
  const first = parts[0]!;
  const codes = memory ? new Int32Array(memory(first.length * 4)) : new Int32Array(first.length);
  codes.set(first);
  // One factor at a time over all observations (no closure per observation).
  for (let j = 1; j < parts.length; j++) {
    const size = sizes[j]!;
    const own = parts[j]!;
    for (let i = 0; i < codes.length; i++) codes[i] = codes[i]! * size + own[i]!;
  }
  return codes;
}

/**
 * Starts the tests of the cells crossing `cells` (compact codes and numbers of levels of the fixed factors
 * in the model, in factor order) over the centred values `y`, when the engine has another thread, `y` is
 * large and in its shared memory, and so are the codes.
 */
export function startVarianceTests(engine: EngineOptions, y: Float64Array, factors: readonly number[], cells: readonly { readonly codes: Int32Array; readonly levels: readonly number[] }[]): void {
  const helper = engine.analysisHelper;
  if (!helper || cells.length === 0 || y.length < ELSEWHERE_FROM || !shared(y)) return;
  const sizes = cells.map((c) => c.levels.length);
  const codes = crossedCodes(cells.map((c) => c.codes), sizes, engine.sharedMemory);
  if (!shared(codes)) return;
  const count = sizes.reduce((a, b) => a * b, 1);
  // Without the groups' sizes and sums: the other thread counts them in the pass leveneTests then makes,
  // the same numbers as the means' summaries hold (plain sums in observation order).
  const wait = helper.startVarianceTests({ y, codes, count });
  if (wait) started.set(y, { key: factors.join(","), codes, count, wait });
}

/**
 * The crossed codes of `factors` made for tests started for `y`, for the model checks' groups of the
 * same factors to use (the same function of the same codes: `crossedCodes`); undefined when none.
 */
export function startedCrossedCodes(y: Float64Array, factors: readonly number[]): Int32Array | undefined {
  const job = started.get(y);
  return job && job.key === factors.join(",") ? job.codes : undefined;
}

/**
 * The tests started for `y`, waited for, when they were started for exactly these groups (`codes` equal
 * value for value, the same `count`); undefined otherwise (the caller computes them).
 */
export function takeVarianceTests(y: Float64Array, codes: Int32Array, count: number): LeveneTests | undefined {
  const job = started.get(y);
  if (!job) return undefined;
  started.delete(y);
  // Waited for in any case: the other thread reads these arrays until it answers.
  const tests = job.wait();
  if (job.count !== count || job.codes.length !== codes.length) return undefined;
  if (job.codes !== codes) for (let i = 0; i < codes.length; i++) if (job.codes[i] !== codes[i]) return undefined;
  return tests;
}
