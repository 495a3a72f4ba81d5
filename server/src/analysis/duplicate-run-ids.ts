/**
 * Finding repeated run ids in a runs table, for the `duplicate-run` diagnostic.
 *
 * Why this layout: at a million rows a single hash table of row numbers is several megabytes, so nearly
 * every insertion is a cache miss, and each probe that compares ids touches the cell arrays and the source
 * at random places too. Here the ids are hashed once, in row order (reading the source sequentially); the
 * rows are then partitioned by the top bits of their hash with a stable counting sort (radix partitioning,
 * as in the partitioned hash join of Shatdal, Kant & Naughton 1994, "Cache conscious algorithms for
 * relational query processing", VLDB), and each partition is checked with a small open-addressing table
 * (Knuth 1998, TAOCP vol. 3, section 6.4, linear probing) that stays in cache. The full 32-bit hash is kept
 * beside each row, so ids are compared character by character only when their hashes are equal.
 * A small table is a single partition: no fixed cost beyond a few small arrays.
 */
import type { RunRows } from "../../../grammar/src/ast.js";
import { cellText } from "../../../grammar/src/runs-table.js";

/** Repeated ids, in increasing row order: `rows[i]` repeats the id first written in row `priors[i]`. */
export interface DuplicateRunIds {
  readonly rows: Int32Array;
  readonly priors: Int32Array;
}

/** Rows per partition aimed at: a partition's table (2 x 4 bytes per row, twice oversized) fits in L2. */
const PARTITION_ROWS = 2048;

/**
 * Finds every row whose id (global cell index `idCells[r]`, -1 for a row without one) equals an earlier
 * row's, with the first row that used it. Quoted ids are compared by their unquoted text, unquoted ones in
 * place in the source. Allocates O(rows) typed arrays and nothing per row.
 */
export function duplicateRunIds(source: string, rows: RunRows, idCells: Int32Array): DuplicateRunIds {
  const count = idCells.length;
  if (increasingNumberedIds(source, rows, idCells)) return { rows: new Int32Array(0), priors: new Int32Array(0) };
  const hashes = new Int32Array(count);
  let withId = 0;
  for (let r = 0; r < count; r++) {
    const cell = idCells[r]!;
    if (cell < 0) continue;
    hashes[r] = idHash(source, rows, cell);
    withId++;
  }
  let bits = 0;
  while (bits < 16 && withId >>> bits > PARTITION_ROWS) bits++;
  const partitions = 1 << bits;
  const shift = 32 - bits;
  const partitionOf = (h: number) => (bits === 0 ? 0 : h >>> shift);

  // Stable counting sort of the rows (and their hashes) by partition: rows stay in increasing order within
  // a partition, so the first row inserted with an id is the first row that used it.
  const starts = new Int32Array(partitions + 1);
  for (let r = 0; r < count; r++) if (idCells[r]! >= 0) starts[partitionOf(hashes[r]!) + 1]!++;
  for (let p = 0; p < partitions; p++) starts[p + 1]! += starts[p]!;
  const next = starts.slice(0, partitions);
  const order = new Int32Array(withId);
  const orderHash = new Int32Array(withId);
  for (let r = 0; r < count; r++) {
    if (idCells[r]! < 0) continue;
    const h = hashes[r]!;
    const at = next[partitionOf(h)]!++;
    order[at] = r;
    orderHash[at] = h;
  }

  const duplicates: number[] = [];
  let table = new Int32Array(16);
  for (let p = 0; p < partitions; p++) {
    const from = starts[p]!;
    const to = starts[p + 1]!;
    let size = 16;
    while (size < (to - from) * 2) size *= 2;
    if (table.length < size) table = new Int32Array(size);
    else table.fill(0, 0, size);
    const mask = size - 1;
    for (let i = from; i < to; i++) {
      const h = orderHash[i]!;
      let slot = h & mask;
      for (;;) {
        const stored = table[slot]!;
        if (stored === 0) {
          table[slot] = i + 1;
          break;
        }
        if (orderHash[stored - 1] === h && sameId(source, rows, idCells[order[stored - 1]!]!, idCells[order[i]!]!)) {
          duplicates.push(order[i]!, order[stored - 1]!);
          break;
        }
        slot = (slot + 1) & mask;
      }
    }
  }

  const found = duplicates.length / 2;
  const byRow = new Int32Array(found);
  for (let d = 0; d < found; d++) byRow[d] = d;
  byRow.sort((a, b) => duplicates[2 * a]! - duplicates[2 * b]!);
  const result = { rows: new Int32Array(found), priors: new Int32Array(found) };
  for (let d = 0; d < found; d++) {
    result.rows[d] = duplicates[2 * byRow[d]!]!;
    result.priors[d] = duplicates[2 * byRow[d]! + 1]!;
  }
  return result;
}

/**
 * True when every id is unquoted and ends in a number (its trailing digits, at most 15) that grows from
 * row to row, as in a run sheet numbered r1, r2, ... or T-001, T-002, ...: then no two ids are equal, since
 * equal ids have the same trailing digits and so the same number. One pass over the ids' last characters
 * and no table: the usual run sheet costs nothing more.
 */
function increasingNumberedIds(source: string, rows: RunRows, idCells: Int32Array): boolean {
  let previous = -1;
  // The cell arrays in locals, so the loop reads typed arrays only.
  const { cellFlags, cellStart, cellEnd } = rows;
  for (let r = 0; r < idCells.length; r++) {
    const cell = idCells[r]!;
    if (cell < 0) continue;
    if (cellFlags[cell] !== 0) return false;
    const start = cellStart[cell]!;
    let i = cellEnd[cell]!;
    let value = 0;
    let place = 1;
    let digits = 0;
    while (i > start) {
      const code = source.charCodeAt(i - 1);
      if (code < 48 || code > 57) break;
      if (++digits > 15) return false;
      value += (code - 48) * place;
      place *= 10;
      i--;
    }
    if (digits === 0 || value <= previous) return false;
    previous = value;
  }
  return true;
}

/**
 * FNV-1a over the id's UTF-16 code units (Fowler, Noll & Vo), then MurmurHash3's 32-bit finalizer
 * (Appleby 2011): ids such as r1..r1000000 differ in few bits, and without the final mixing their hashes
 * cluster, in the top bits that pick a partition as in the low bits that pick a slot.
 */
function idHash(source: string, rows: RunRows, cell: number): number {
  const quoted = rows.cellFlags[cell] !== 0;
  const text = quoted ? cellText(source, rows, cell) : source;
  const start = quoted ? 0 : rows.cellStart[cell]!;
  const end = quoted ? text.length : rows.cellEnd[cell]!;
  let h = 0x811c9dc5;
  for (let i = start; i < end; i++) h = Math.imul(h ^ text.charCodeAt(i), 0x01000193);
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h;
}

/** Whether two id cells hold the same id (unquoted text compared in place, quoted text unquoted first). */
function sameId(source: string, rows: RunRows, a: number, b: number): boolean {
  if (rows.cellFlags[a] === 0 && rows.cellFlags[b] === 0) {
    const aStart = rows.cellStart[a]!;
    const bStart = rows.cellStart[b]!;
    const length = rows.cellEnd[a]! - aStart;
    if (rows.cellEnd[b]! - bStart !== length) return false;
    for (let i = 0; i < length; i++) if (source.charCodeAt(aStart + i) !== source.charCodeAt(bStart + i)) return false;
    return true;
  }
  return cellText(source, rows, a) === cellText(source, rows, b);
}
