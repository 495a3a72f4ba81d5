import type { RunsTable } from "../../../grammar/src/ast.js";
import { cellText, isPendingCell } from "../../../grammar/src/runs-table.js";

/** One cell of a run row, matched to its header column. */
export interface RowCell {
  /** Index into `RunsTable.columns`. */
  readonly column: number;
  /** The value as written, unquoted (a pending value is `?`). */
  readonly text: string;
  readonly pending: boolean;
}

/**
 * The cells of row `r` matched to header columns, by the rule the design builder uses: with a `|` in both
 * the header and the row, the two sides are matched separately (a missing cell on the left does not shift
 * the responses); otherwise by position. Cells with no column are left out; `extra` counts them.
 */
export function runRowCells(source: string, table: RunsTable, r: number): { cells: RowCell[]; extra: number } {
  const rows = table.rows;
  const first = rows.cellOffset[r]!;
  const n = rows.cellOffset[r + 1]! - first;
  const pipe = rows.pipeCell[r]!;
  const leftCount = table.responseStart;
  const rightCount = table.columns.length - table.responseStart;
  const cells: RowCell[] = [];
  let extra = 0;
  const push = (k: number, column: number) => {
    const cell = first + k;
    cells.push({ column, text: cellText(source, rows, cell), pending: isPendingCell(source, rows, cell) });
  };
  if (pipe >= 0 && table.headerHasPipe) {
    for (let k = 0; k < pipe; k++) {
      if (k < leftCount) push(k, k);
      else extra++;
    }
    for (let k = pipe; k < n; k++) {
      if (k - pipe < rightCount) push(k, leftCount + (k - pipe));
      else extra++;
    }
  } else {
    for (let k = 0; k < n; k++) {
      if (k < table.columns.length) push(k, k);
      else extra++;
    }
  }
  return { cells, extra };
}
