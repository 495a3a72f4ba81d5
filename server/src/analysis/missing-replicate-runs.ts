/**
 * Plans the runs that would bring every cell of a design up to the plan's `replicates`: which level
 * combination each new run has and where it goes among the runs not yet made. Existing rows are never
 * reordered: new runs are interleaved at random (seeded, so the plan is reproducible) with the trailing
 * pending rows, or appended after the last row when there are none.
 */
import { type PlanRandom, planRandom } from "../planning/seeded-random.js";
import { cellIndexOfRuns } from "./build-design.js";
import { type Design, ValueStatus } from "./design.js";

/** One run to add: a level index per factor of `design.cellFactors`, and the row it goes before. */
export interface PlannedRun {
  /** Level index per entry of `design.cellFactors`, in that order. */
  readonly levels: readonly number[];
  /** Index of the existing row this run is inserted before; `design.runs.count` means after the last row. */
  readonly beforeRow: number;
}

/** The outcome: the runs to add in file order, or why none can be planned. */
export type MissingRunsPlan =
  | { readonly ok: true; readonly runs: readonly PlannedRun[]; readonly seed: number; readonly seedFromFile: boolean }
  | { readonly ok: false; readonly reason: string };

/** Largest number of runs one plan adds; beyond it the design itself needs rethinking, not a quick fix. */
const MAX_NEW_RUNS = 100_000;

/** Seed used when the plan has none, so the result is still reproducible. */
export const DEFAULT_SEED = 1;

/**
 * The runs missing from every cell that has fewer non-excluded runs than `plan replicates` (empty cells
 * included, except in fractional designs where empty cells are intended). The new runs are shuffled with
 * the Fisher–Yates algorithm (Knuth 1997, TAOCP vol. 2, Algorithm P) driven by the planner's generator
 * (`planRandom` of planning/seeded-random.ts: xoroshiro128+, seeded and jumped the same way) with the
 * plan's `seed`, so a seed means one generator everywhere in Trialbook, then merged at uniformly random positions with the trailing pending rows (rows after the
 * last row with a measured value), keeping the pending rows' own order.
 */
export function planMissingReplicateRuns(design: Design): MissingRunsPlan {
  const replicates = design.settings.replicates;
  if (replicates === undefined) return { ok: false, reason: "the plan does not say how many replicates each cell needs (plan replicates N)" };
  const { runs, cellFactors, factors } = design;
  if (cellFactors.length === 0) return { ok: false, reason: "the design has no factors whose levels form cells" };
  let cellCount = 1;
  for (const f of cellFactors) cellCount *= factors[f]!.levels.length;
  if (cellCount === 0) return { ok: false, reason: "a factor declares no levels" };
  if (cellCount > MAX_NEW_RUNS) return { ok: false, reason: "the design has too many cells to fill by a quick fix" };

  const cellOfRun = cellIndexOfRuns(design);
  const planned = new Int32Array(cellCount);
  for (let r = 0; r < runs.count; r++) if (cellOfRun[r]! >= 0 && !runs.excluded[r]) planned[cellOfRun[r]!]!++;
  const newCells: number[] = [];
  for (let c = 0; c < cellCount; c++) {
    if (planned[c] === 0 && design.hasFraction) continue;
    for (let k = planned[c]!; k < replicates; k++) newCells.push(c);
    if (newCells.length > MAX_NEW_RUNS) return { ok: false, reason: "more runs are missing than a quick fix should add" };
  }
  if (newCells.length === 0) return { ok: false, reason: "every cell already has its replicates" };

  const seedFromFile = design.settings.seed !== undefined;
  const seed = design.settings.seed ?? DEFAULT_SEED;
  // The planner's generator: seeds of any size are folded into its 32-bit word the same way (seedWord).
  const rng = planRandom(seed);
  shuffle(newCells, rng);

  // The pending region: rows after the last row with any measured response value.
  let lastMeasured = -1;
  for (let r = 0; r < runs.count; r++) {
    if (runs.responseStatus.some((status) => status[r] === ValueStatus.Measured)) lastMeasured = r;
  }
  const firstPending = lastMeasured + 1;
  const pendingCount = runs.count - firstPending;
  // A random merge: choose which of the pendingCount + k slots hold new runs, uniformly.
  const slots = new Uint8Array(pendingCount + newCells.length);
  slots.fill(1, 0, newCells.length);
  shuffle(slots, rng);

  const result: PlannedRun[] = [];
  let existing = firstPending;
  let next = 0;
  for (let s = 0; s < slots.length; s++) {
    if (slots[s] === 1) result.push({ levels: decodeCell(design, newCells[next++]!), beforeRow: existing });
    else existing++;
  }
  return { ok: true, runs: result, seed, seedFromFile };
}

/** Level index per cell factor of a mixed-radix cell index (the encoding of `cellIndexOfRuns`). */
function decodeCell(design: Design, cell: number): number[] {
  const out = new Array<number>(design.cellFactors.length);
  let rest = cell;
  for (let i = design.cellFactors.length - 1; i >= 0; i--) {
    const n = design.factors[design.cellFactors[i]!]!.levels.length;
    out[i] = rest % n;
    rest = Math.floor(rest / n);
  }
  return out;
}

function shuffle(items: { length: number; [i: number]: number }, rng: PlanRandom): void {
  for (let i = items.length - 1; i > 0; i--) {
    const j = rng.int(0, i);
    const t = items[i]!;
    items[i] = items[j]!;
    items[j] = t;
  }
}
