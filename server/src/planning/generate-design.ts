/**
 * Which runs a design needs, before any ordering: the treatment combinations from the declared factors and
 * levels (full factorial, or a two-level fraction from `plan fraction` generators), repeated `replicates`
 * times in every block, plus `plan centre-points`; or a Latin square when the file declares two blocking
 * factors and one treatment factor of the same size.
 *
 * Rules (also in docs and the report of `trialbook plan --dry-run`):
 * - Factors `as block` and `as subject` are blocking factors: every combination of their levels is a block,
 *   and each block receives the full set of treatment runs (a randomized complete block design; a subject
 *   receives every treatment, as in a repeated-measures design). All other factors are treatment factors
 *   and are crossed (a nested factor's levels are crossed with its parent's, which lists the same runs).
 * - Exactly two blocking factors and one treatment factor, all with t levels, no fraction and no centre
 *   points: a t × t Latin square (Fisher & Yates 1938) with the first blocking factor as rows and the second
 *   as columns, one square per replicate, each randomized independently.
 * - `plan replicates` absent means 1 (said in the summary). Centre points are added per block.
 */
import type { Span, TrialFile } from "../../../grammar/src/ast.js";
import type { Design, DesignFactor } from "../analysis/design.js";
import { randomLatinSquare } from "./latin-square.js";
import type { PlanRandom } from "./seeded-random.js";
import { type Generator, definingRelation } from "./two-level-fraction.js";

/** A reason the design cannot be generated, at the place in the file to fix. */
export interface PlanProblem {
  readonly message: string;
  readonly span?: Span;
}

/** One run the design needs: a level index per factor of `design.factors`, and its block. */
export interface DesignRun {
  /** Level index per design factor (same order as `design.factors`). */
  readonly levels: readonly number[];
  /** Index of the run's block in standard order (0 when the design has no blocks). */
  readonly block: number;
  /** True for a centre-point run. */
  readonly centre: boolean;
}

/** The kind of design generated; the summary names it. */
export type DesignKind = "completely-randomized" | "randomized-blocks" | "latin-square";

/** A generated design: the runs it needs, unordered (standard order), and what it is. */
export interface GeneratedDesign {
  readonly kind: DesignKind;
  readonly runs: readonly DesignRun[];
  /** Indices into `design.factors` of the blocking factors (block and subject roles). */
  readonly blockFactors: readonly number[];
  /** Indices into `design.factors` of the treatment factors, generated ones included. */
  readonly treatmentFactors: readonly number[];
  readonly blockCount: number;
  readonly replicates: number;
  readonly replicatesFromFile: boolean;
  readonly centrePoints: number;
  /** The fraction's generators as written with factor names, e.g. "coolant = speed x feed x depth". */
  readonly generators: readonly string[];
  /** Words of the defining relation with factor names joined by " x ", shortest first. */
  readonly definingWords: readonly string[];
  /** Length of the shortest defining word; undefined for a full factorial. */
  readonly resolution?: number;
}

/** Largest number of runs the planner writes; a larger design needs rethinking before a run sheet. */
export const MAX_PLANNED_RUNS = 100_000;

/**
 * Generates the runs `design` needs. `random` is used only by the Latin square (to randomize the square);
 * the order of the runs is decided later by the run sheet. Never throws.
 */
export function generateDesign(file: TrialFile, design: Design, random: PlanRandom): { ok: true; design: GeneratedDesign } | { ok: false; problems: PlanProblem[] } {
  const problems: PlanProblem[] = [];
  const factors = design.factors;
  if (factors.length === 0) return { ok: false, problems: [{ message: "The file declares no factors: declare at least one (factor NAME levels A, B)." }] };
  for (const f of factors) {
    if (f.levels.length < 2) problems.push({ message: `Factor '${f.name}' needs at least two levels before runs can be planned.`, span: f.span });
  }
  const settings = file.plan?.settings ?? [];
  let centrePoints = 0;
  for (const s of settings) {
    if (s.kind === "centre-points" && s.value) {
      if (Number.isSafeInteger(s.value.value) && s.value.value >= 0) centrePoints = s.value.value;
      else problems.push({ message: `centre-points must be a whole number of at least 0, not ${s.value.text}.`, span: s.value.span });
    }
  }
  const replicatesFromFile = design.settings.replicates !== undefined;
  const replicates = design.settings.replicates ?? 1;

  const blockFactors = factors.flatMap((f, i) => (f.role === "block" || f.role === "subject" ? [i] : []));
  const nameIndex = new Map(factors.map((f, i) => [f.name, i] as const));

  // Fractions: resolve names and check the two-level rule.
  const generators: Generator[] = [];
  const generatorTexts: string[] = [];
  const generatedSet = new Set<number>();
  for (const s of settings) {
    if (s.kind !== "fraction") continue;
    if (!s.generated || !s.generator || s.generator.names.length === 0) {
      problems.push({ message: "A fraction needs a generator such as 'fraction D = A x B x C'.", span: s.span });
      continue;
    }
    const generated = nameIndex.get(s.generated.text);
    if (generated === undefined) {
      problems.push({ message: `'${s.generated.text}' in the fraction is not a declared factor.`, span: s.generated.span });
      continue;
    }
    const from: number[] = [];
    for (const n of s.generator.names) {
      const idx = nameIndex.get(n.text);
      if (idx === undefined) problems.push({ message: `'${n.text}' in the fraction's generator is not a declared factor.`, span: n.span });
      else if (idx === generated) problems.push({ message: `'${n.text}' cannot generate itself: a generator names other factors.`, span: n.span });
      else if (from.includes(idx)) problems.push({ message: `'${n.text}' appears twice in the generator: write each factor once.`, span: n.span });
      else from.push(idx);
    }
    if (generatedSet.has(generated)) {
      problems.push({ message: `'${s.generated.text}' is generated twice: keep one fraction line per generated factor.`, span: s.generated.span });
      continue;
    }
    generatedSet.add(generated);
    generators.push({ generated, from });
    generatorTexts.push(`${factors[generated]!.name} = ${from.map((i) => factors[i]!.name).join(" x ")}`);
  }
  for (const g of generators) {
    for (const f of [g.generated, ...g.from]) {
      if (generatedSet.has(f) && f !== g.generated) problems.push({ message: `Factor '${factors[f]!.name}' is generated, so it cannot appear in another generator: write generators with base factors only.`, span: factors[f]!.span });
      if (blockFactors.includes(f)) problems.push({ message: `Factor '${factors[f]!.name}' is a blocking factor and cannot be part of a fraction's generator.`, span: factors[f]!.span });
    }
  }
  const treatmentFactors = factors.flatMap((f, i) => (f.role === "block" || f.role === "subject" ? [] : [i]));
  if (treatmentFactors.length === 0) problems.push({ message: "Every factor is a blocking factor: declare at least one treatment factor (without 'as block')." });

  // Levels each treatment factor takes in the factorial part, and its centre level.
  const factorialLevels = new Map<number, number[]>();
  const centreLevel = new Map<number, number>();
  for (const i of treatmentFactors) {
    const f = factors[i]!;
    if (centrePoints > 0) {
      const centre = centreOf(f);
      if (typeof centre === "string") {
        problems.push({ message: `centre-points needs a centre level for '${f.name}': ${centre}`, span: f.span });
        continue;
      }
      factorialLevels.set(i, [centre.low, centre.high]);
      centreLevel.set(i, centre.middle);
    } else {
      factorialLevels.set(i, twoLevelOrder(f) ?? f.levels.map((_, k) => k));
    }
  }
  const twoLevel = new Set([...generatedSet, ...generators.flatMap((g) => g.from)]);
  for (const i of twoLevel) {
    if (!treatmentFactors.includes(i)) continue;
    if ((factorialLevels.get(i)?.length ?? 0) !== 2) problems.push({ message: `Factor '${factors[i]!.name}' is in a two-level fraction but has ${factors[i]!.levels.length} levels: declare two levels (or three equally spaced numbers with centre-points).`, span: factors[i]!.span });
  }
  if (problems.length > 0) return { ok: false, problems };

  const blockLevels = blockFactors.map((i) => factors[i]!.levels.length);
  const blockCount = blockLevels.reduce((p, n) => p * n, 1);
  const words = definingRelation(generators);
  const definingWords = words.map((w) => w.map((i) => factors[i]!.name).join(" x "));
  const res = words.length > 0 ? words[0]!.length : undefined;

  // Latin square: two blocking factors and one treatment factor, all of size t.
  const t = factors[treatmentFactors[0]!]!.levels.length;
  if (
    blockFactors.length === 2 &&
    treatmentFactors.length === 1 &&
    generators.length === 0 &&
    centrePoints === 0 &&
    blockLevels[0] === t &&
    blockLevels[1] === t
  ) {
    const runs: DesignRun[] = [];
    const [rowFactor, columnFactor] = blockFactors as [number, number];
    const treatment = treatmentFactors[0]!;
    for (let q = 0; q < replicates; q++) {
      const square = randomLatinSquare(t, random);
      for (let r = 0; r < t; r++) {
        for (let c = 0; c < t; c++) {
          const levels = new Array<number>(factors.length).fill(0);
          levels[rowFactor] = r;
          levels[columnFactor] = c;
          levels[treatment] = square[r]![c]!;
          // Blocks of a Latin square are its rows: runs are randomized within a row (see run-sheet.ts).
          runs.push({ levels, block: r, centre: false });
        }
      }
    }
    if (runs.length > MAX_PLANNED_RUNS) return tooMany(runs.length);
    return { ok: true, design: { kind: "latin-square", runs, blockFactors, treatmentFactors, blockCount: t, replicates, replicatesFromFile, centrePoints: 0, generators: [], definingWords: [] } };
  }

  // Treatment combinations: crossed levels of the base factors (generated factors follow their generator).
  const baseFactors = treatmentFactors.filter((i) => !generatedSet.has(i));
  let combos = 1;
  for (const i of baseFactors) combos *= factorialLevels.get(i)!.length;
  const total = (combos * replicates + centrePoints) * blockCount;
  if (total > MAX_PLANNED_RUNS) return tooMany(total);

  // Sign coding for the fraction: level list [low, high] maps -1 to index 0 and +1 to index 1.
  const signIndex = new Map<number, number>();
  const signFactors = [...twoLevel].sort((a, b) => a - b);
  signFactors.forEach((f, k) => signIndex.set(f, k));
  const signGenerators = generators.map((g) => ({ generated: signIndex.get(g.generated)!, from: g.from.map((f) => signIndex.get(f)!) }));

  const treatments: number[][] = [];
  const counter = new Array<number>(baseFactors.length).fill(0);
  for (let c = 0; c < combos; c++) {
    const levels = new Array<number>(factors.length).fill(0);
    const signs = new Array<number>(signFactors.length).fill(0);
    baseFactors.forEach((f, k) => {
      const list = factorialLevels.get(f)!;
      levels[f] = list[counter[k]!]!;
      if (signIndex.has(f)) signs[signIndex.get(f)!] = counter[k] === 0 ? -1 : 1;
    });
    for (const g of signGenerators) {
      const sign = g.from.reduce((p, k) => p * signs[k]!, 1);
      signs[g.generated] = sign;
      const f = signFactors[g.generated]!;
      levels[f] = factorialLevels.get(f)![sign < 0 ? 0 : 1]!;
    }
    treatments.push(levels);
    // Standard (Yates) order: the first base factor changes fastest.
    for (let k = 0; k < counter.length; k++) {
      counter[k]!++;
      if (counter[k]! < factorialLevels.get(baseFactors[k]!)!.length) break;
      counter[k] = 0;
    }
  }
  const centreRun = new Array<number>(factors.length).fill(0);
  for (const [f, level] of centreLevel) centreRun[f] = level;

  const runs: DesignRun[] = [];
  for (let b = 0; b < blockCount; b++) {
    const blockLevelsOf = decodeBlock(b, blockLevels);
    const withBlock = (levels: readonly number[]): number[] => {
      const out = levels.slice();
      blockFactors.forEach((f, k) => (out[f] = blockLevelsOf[k]!));
      return out;
    };
    for (let rep = 0; rep < replicates; rep++) for (const levels of treatments) runs.push({ levels: withBlock(levels), block: b, centre: false });
    for (let k = 0; k < centrePoints; k++) runs.push({ levels: withBlock(centreRun), block: b, centre: true });
  }
  return {
    ok: true,
    design: {
      kind: blockFactors.length > 0 ? "randomized-blocks" : "completely-randomized",
      runs,
      blockFactors,
      treatmentFactors,
      blockCount,
      replicates,
      replicatesFromFile,
      centrePoints,
      generators: generatorTexts,
      definingWords,
      ...(res !== undefined ? { resolution: res } : {}),
    },
  };
}

/** Level index per blocking factor of block `b` in standard order (the last blocking factor changes fastest). */
export function decodeBlock(b: number, blockLevels: readonly number[]): number[] {
  const out = new Array<number>(blockLevels.length).fill(0);
  let rest = b;
  for (let k = blockLevels.length - 1; k >= 0; k--) {
    out[k] = rest % blockLevels[k]!;
    rest = Math.floor(rest / blockLevels[k]!);
  }
  return out;
}

/** The index of a run's block in standard order, from its level per factor; -1 when a level is unknown. */
export function blockIndexOf(levels: readonly number[], blockFactors: readonly number[], factors: readonly DesignFactor[]): number {
  let index = 0;
  for (const f of blockFactors) {
    const level = levels[f]!;
    if (level < 0) return -1;
    index = index * factors[f]!.levels.length + level;
  }
  return index;
}

/**
 * For a two-level numeric factor, its levels ordered low then high (so -1 is the lower setting); undefined
 * otherwise (categorical levels keep their declared order: the first declared level is -1).
 */
function twoLevelOrder(f: DesignFactor): number[] | undefined {
  if (f.levels.length !== 2 || f.levels.some((l) => l.numeric === undefined)) return undefined;
  return f.levels[0]!.numeric! <= f.levels[1]!.numeric! ? [0, 1] : [1, 0];
}

/** Low, middle and high level indices of a factor declared with three equally spaced numbers, or why not. */
function centreOf(f: DesignFactor): { low: number; middle: number; high: number } | string {
  if (f.levels.length !== 3 || f.levels.some((l) => l.numeric === undefined)) {
    return `declare three equally spaced numeric levels (low, centre, high), e.g. 'levels 150, 175, 200'.`;
  }
  const order = [0, 1, 2].sort((a, b) => f.levels[a]!.numeric! - f.levels[b]!.numeric!);
  const [low, middle, high] = order.map((k) => f.levels[k]!.numeric!) as [number, number, number];
  const tolerance = 1e-9 * Math.max(Math.abs(low), Math.abs(high), 1);
  if (Math.abs(middle - (low + high) / 2) > tolerance) return `its middle level ${middle} is not halfway between ${low} and ${high}.`;
  return { low: order[0]!, middle: order[1]!, high: order[2]! };
}

function tooMany(n: number): { ok: false; problems: PlanProblem[] } {
  return { ok: false, problems: [{ message: `The design needs ${n} runs, more than the ${MAX_PLANNED_RUNS} a run sheet is written for: reduce levels or replicates, or use a fraction.` }] };
}
