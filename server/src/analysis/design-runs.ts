/**
 * Reading one run's texts and spans from a `DesignRuns` on demand.
 *
 * Why: a design keeps its runs as typed arrays of cell indices into the parsed runs table, not as a
 * string and a span object per run and column. At a million runs those objects were the largest part of
 * the memory and most of the garbage-collection time, while only a few are ever read (a hover, an outlier
 * diagnostic, the residual rows of the JSON output). These accessors read the text from the source when
 * asked; the array-valued contract keys (`ids`, `rowSpans`, `responseTexts`, ...) are built from them on
 * first access only (see `attachRunTexts`).
 */
import type { Span } from "../../../grammar/src/ast.js";
import { cellText } from "../../../grammar/src/runs-table.js";
import { type DesignRuns, ValueStatus } from "./design.js";

/** The id written in run `r`'s row, or its 1-based row number when the row has none. */
export function runId(runs: DesignRuns, r: number): string {
  const cell = runs.idCells[r]!;
  return cell >= 0 && runs.rows ? cellText(runs.source, runs.rows, cell) : String(r + 1);
}

/** The span of run `r`'s row in the document. */
export function runRowSpan(runs: DesignRuns, r: number): Span {
  return { start: runs.rows!.rowStart[r]!, end: runs.rows!.rowEnd[r]! };
}

/** The text of response `k` in run `r` as written, "" unless it is a measured value. */
export function responseText(runs: DesignRuns, k: number, r: number): string {
  if (runs.responseStatus[k]![r] !== ValueStatus.Measured) return "";
  return cellText(runs.source, runs.rows!, runs.responseCells[k]![r]!);
}

/** The span of response `k`'s value cell in run `r`, or undefined when the row has no such cell. */
export function responseSpan(runs: DesignRuns, k: number, r: number): Span | undefined {
  const cell = runs.responseCells[k]![r]!;
  return cell >= 0 ? { start: runs.rows!.cellStart[cell]!, end: runs.rows!.cellEnd[cell]! } : undefined;
}

/** The text of covariate `c` in run `r` as written, "" unless it is a measured value. */
export function covariateText(runs: DesignRuns, c: number, r: number): string {
  if (runs.covariateStatus[c]![r] !== ValueStatus.Measured) return "";
  return cellText(runs.source, runs.rows!, runs.covariateCells[c]![r]!);
}

/** The fields of `DesignRuns` that are stored; the per-run string and span arrays are derived from them. */
export type StoredRuns = Omit<DesignRuns, "ids" | "rowSpans" | "covariateTexts" | "responseTexts" | "responseSpans">;

/**
 * Completes stored runs into the `DesignRuns` contract: `ids`, `rowSpans`, `covariateTexts`,
 * `responseTexts` and `responseSpans` become enumerable getters that build their array once, on first
 * access, with the accessors above (so a consumer that reads them sees the same values as before, and
 * one that does not pays nothing).
 */
export function attachRunTexts(stored: StoredRuns): DesignRuns {
  // Property descriptors are copied, not values: a `rows` getter (a plain table's rows, built on first
  // access) stays a getter.
  const runs = Object.defineProperties({}, Object.getOwnPropertyDescriptors(stored)) as DesignRuns;
  const lazy = <T>(key: string, build: () => T) => {
    let value: T | undefined;
    Object.defineProperty(runs, key, {
      enumerable: true,
      configurable: false,
      get: () => (value ??= build()),
    });
  };
  const each = <T>(f: (r: number) => T): T[] => {
    const out = new Array<T>(runs.count);
    for (let r = 0; r < runs.count; r++) out[r] = f(r);
    return out;
  };
  lazy("ids", () => each((r) => runId(runs, r)));
  lazy("rowSpans", () => each((r) => runRowSpan(runs, r)));
  lazy("covariateTexts", () => runs.covariateCells.map((_, c) => each((r) => covariateText(runs, c, r))));
  lazy("responseTexts", () => runs.responseCells.map((_, k) => each((r) => responseText(runs, k, r))));
  lazy("responseSpans", () => runs.responseCells.map((_, k) => each((r) => responseSpan(runs, k, r))));
  return runs;
}
