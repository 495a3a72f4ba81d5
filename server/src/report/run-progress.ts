import { type Design, ValueStatus } from "../analysis/design.js";

/** How far the runs of a design have got: what the status bar and the report's summary show. */
export interface RunProgress {
  /** Rows of the runs table: every planned run. */
  readonly planned: number;
  /** Runs with no pending (`?`) response value left, excluded runs included (they were made). */
  readonly done: number;
  /** Runs with at least one pending value. */
  readonly pending: number;
  /** Runs marked `excluded`. */
  readonly excluded: number;
  /** Per response: measured, non-excluded runs. */
  readonly measured: readonly { readonly response: string; readonly runs: number }[];
}

/** Counts planned, done, pending and excluded runs of a design. Pure. */
export function runProgress(design: Design): RunProgress {
  const { runs } = design;
  let done = 0;
  let excluded = 0;
  for (let r = 0; r < runs.count; r++) {
    if (runs.excluded[r]) excluded++;
    if (!runs.responseStatus.some((status) => status[r] === ValueStatus.Pending)) done++;
  }
  const measured = design.responses.map((response, k) => {
    const status = runs.responseStatus[k];
    let count = 0;
    for (let r = 0; r < runs.count; r++) if (status && status[r] === ValueStatus.Measured && !runs.excluded[r]) count++;
    return { response: response.name, runs: count };
  });
  return { planned: runs.count, done, pending: runs.count - done, excluded, measured };
}
