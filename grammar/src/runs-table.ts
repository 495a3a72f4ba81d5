/**
 * Accessors for the column-wise runs table (`RunRows` in `ast.ts`). Callers read cells through these so
 * that the typed-array layout stays an implementation detail of the grammar package.
 */
import { CellFlag, type RunRows } from "./ast.js";
import { unquote } from "./runs-scanner.js";

/** The text of cell `cellIndex` (a global cell index), unquoted and unescaped when it was quoted. */
export function cellText(source: string, rows: RunRows, cellIndex: number): string {
  const start = rows.cellStart[cellIndex]!;
  const end = rows.cellEnd[cellIndex]!;
  const flags = rows.cellFlags[cellIndex]!;
  if ((flags & CellFlag.Quoted) === 0) return source.slice(start, end);
  return unquote(source.slice(start, end), (flags & CellFlag.Unterminated) === 0);
}

/** How many cells row `r` has (factor, covariate and id cells plus response cells; not the `|`). */
export function rowCellCount(rows: RunRows, r: number): number {
  return rows.cellOffset[r + 1]! - rows.cellOffset[r]!;
}

/** The global cell index of the `k`-th cell (0-based) of row `r`, or -1 when the row has no such cell. */
export function rowCellIndex(rows: RunRows, r: number, k: number): number {
  const first = rows.cellOffset[r]!;
  return k >= 0 && first + k < rows.cellOffset[r + 1]! ? first + k : -1;
}

/**
 * The row whose text `[rowStart, rowEnd]` contains `offset` (the end is included, so a cursor just after
 * the last cell finds its row), or -1. Binary search over `rowStart`: O(log rows).
 */
export function findRowAt(rows: RunRows, offset: number): number {
  let lo = 0;
  let hi = rows.count - 1;
  let found = -1;
  while (lo <= hi) {
    const mid = (lo + hi) >>> 1;
    if (rows.rowStart[mid]! <= offset) {
      found = mid;
      lo = mid + 1;
    } else {
      hi = mid - 1;
    }
  }
  return found >= 0 && offset <= rows.rowEnd[found]! ? found : -1;
}

/** True when cell `cellIndex` is an unquoted `?`: a value not measured yet. A quoted `"?"` is text. */
export function isPendingCell(source: string, rows: RunRows, cellIndex: number): boolean {
  const start = rows.cellStart[cellIndex]!;
  return (
    rows.cellFlags[cellIndex] === CellFlag.None &&
    rows.cellEnd[cellIndex]! - start === 1 &&
    source.charCodeAt(start) === 63 // '?'
  );
}
