/**
 * Reading the runs of a plain runs-table body (see `grammar/src/plain-runs-body.ts`) in one pass over its
 * text, straight into the design's columns: level indices, exact decimals, run-id order.
 *
 * Why: the general path reads a table twice, once into the parser's cell columns (`RunRows`, ~48 bytes a
 * row) and once from them into the design, and checks the ids in a third pass. On a million-run machine
 * log those passes and the fresh memory of the cell columns were most of `trialbook analyze`. A plain body
 * whose every row is regular (the header's cells, its `|` where the header has it, known levels, plain
 * decimals, numbered ids that increase) is read here once, with nothing stored per cell but the values;
 * the parser builds the cell columns only if something later asks for a cell's span or text.
 *
 * The result must be exactly what the general path (`readRuns` in `build-design.ts`) makes of the same
 * rows, and is tested against it. A response's `?` (pending) is read too; the caller reports the rows
 * that hold one. Anything this reader does not handle makes it return `undefined` without side effects,
 * and the general path reads the table with its diagnostics: an irregular row, an unknown level, a
 * covariate's `?`, a value that is not a plain decimal (an exponent, more than 15 digits from the first
 * nonzero one), ids that do not increase (a randomised sheet: the general path looks for repeats), a
 * line longer than `LONGEST_ROW`, a character beyond ASCII.
 *
 * A large table may be read in two parts: the rows from a split row on by another thread
 * (`PlainPartHelper`, the CLI's helper thread) into the same columns; the parts' results are combined as
 * one pass would have made them. As it reads, each part counts what the checks and the centring would
 * count afterwards (`PlainTallies`), so that they need no pass over the runs of their own.
 */
import { encodeAsciiChunk } from "../../../grammar/src/ascii-chunk.js";
import type { DecimalColumn } from "../stats/decimal/center-decimals.js";
import { Char } from "../../../grammar/src/char-codes.js";

/** What each header column holds, for the reader. */
export const enum PlainColumn {
  /** Not read (an undeclared column: the general path's diagnostics are made from the header alone). */
  Skip = 0,
  Id = 1,
  Factor = 2,
  /** A covariate: a plain decimal. */
  Value = 3,
  /** A response: a plain decimal, or `?` for a value not measured yet. */
  Response = 4,
}

export interface PlainRunsLayout {
  /** Per header column: what it holds. */
  readonly kinds: readonly PlainColumn[];
  /** Per header column that is a factor: its level names in order (others: empty). */
  readonly levelNames: readonly (readonly string[])[];
  /** Cells before the `|` when the header has one; -1 when it has none (then rows have none either). */
  readonly pipeAt: number;
}

export interface PlainRuns {
  /** Per header column: its factor's level index per run (an empty array for other columns). */
  readonly levels: readonly Int32Array[];
  /** Per header column: its values per run (empty for columns that are not values). */
  readonly values: readonly DecimalColumn[];
  /** Per header column: 1 where a response is pending (`?`); undefined for a column without any. */
  readonly pending: readonly (Uint8Array | undefined)[];
  /**
   * Each pending cell (a response's `?`), in text order, as six numbers: row, header column, the cell's start and end
   * offsets, and its row's id cell's start and end (-1 without an id column); so that the notes for
   * pending rows need no `RunRows`.
   */
  readonly pendingCells: readonly number[];
  /** What the reader counted (`PlainTallies`). */
  readonly tallies: PlainTallies;
}


function isValue(kind: PlainColumn): boolean {
  return kind === PlainColumn.Value || kind === PlainColumn.Response;
}

/** Characters encoded at a time. */
const CHUNK = 65536;
/** A longer row (or comment line) is not read here: rows of a run sheet are far shorter. */
const LONGEST_ROW = 4096;

/**
 * Bytes that end a cell: blanks, line breaks, `|`, `#` (a quote is never in a plain body). A character
 * beyond ASCII never reaches the reader (its chunk is declined).
 */
const ENDS_CELL: Uint8Array = (() => {
  const table = new Uint8Array(256);
  for (const c of [Char.Space, Char.Tab, Char.LF, Char.CR, Char.Pipe, Char.Hash]) table[c] = 1;
  return table;
})();

/**
 * Fills `into[0, to - from)` with the characters at offsets `[from, to)` as bytes and returns true when
 * every one is ASCII (then byte `i` is the character at `from + i`); false otherwise.
 */
export type AsciiChunkLoader = (from: number, to: number, into: Uint8Array) => boolean;

/** The loader of a string: `encodeInto` a chunk at a time. */
function stringChunks(source: string): AsciiChunkLoader {
  return (from, to, into) => encodeAsciiChunk(source, from, to, into);
}

/**
 * The text as ASCII bytes, a chunk at a time: `bytes[i - base]` is the character at offset `i` for
 * `base <= i < limit`, and `bytes[limit - base]` is a line feed put there as a sentinel, so that the
 * loops below stop at the chunk's end without testing for it. `load` returns false for a chunk that is
 * not all ASCII.
 */
class AsciiWindow {
  base = 0;
  limit = 0;
  readonly bytes = new Uint8Array(CHUNK + 1);

  constructor(
    private readonly loader: AsciiChunkLoader,
    private readonly end: number,
  ) {}

  load(p: number): boolean {
    const limit = Math.min(this.end, p + CHUNK);
    const ascii = this.loader(p, limit, this.bytes);
    this.base = p;
    this.limit = limit;
    this.bytes[limit - p] = Char.LF;
    return ascii;
  }
}

/**
 * A factor's level names as byte strings, for lookups of ASCII cells: by (length, last byte) to the only
 * candidate where one exists, else by comparing with each name (the lookup of `findLevel` in
 * build-design.ts, over bytes instead of the source string). A name with a character beyond ASCII can
 * never equal an ASCII cell and is left out.
 */
interface ByteLevels {
  readonly names: readonly Uint8Array[];
  readonly indices: readonly number[];
  /** length * 128 + last byte, for lengths below 64: the only name with that key, -1 none, -2 several. */
  readonly byEnd: Int16Array;
}

const KEYED_LENGTH = 64;

function byteLevels(names: readonly string[]): ByteLevels {
  const bytes: Uint8Array[] = [];
  const indices: number[] = [];
  const byEnd = new Int16Array(KEYED_LENGTH * 128).fill(-1);
  let long = false;
  names.forEach((name, index) => {
    if (!/^[\x00-\x7f]+$/.test(name)) return;
    const at = bytes.length;
    bytes.push(Uint8Array.from(name, (ch) => ch.charCodeAt(0)));
    indices.push(index);
    if (name.length >= KEYED_LENGTH) long = true;
    else {
      const key = name.length * 128 + name.charCodeAt(name.length - 1);
      byEnd[key] = byEnd[key] === -1 ? at : -2;
    }
  });
  // With a name too long for the table, every cell compares with each name instead.
  if (long) byEnd.fill(-2);
  return { names: bytes, indices, byEnd };
}

/** The lookup of a column that is not a factor's (never asked). */
const NO_LEVELS = byteLevels([]);

/** The level index of the cell `bytes[s, e)`, or -1. */
function levelOf(levels: ByteLevels, bytes: Uint8Array, s: number, e: number): number {
  const length = e - s;
  const last = bytes[e - 1]!;
  let hit = length < KEYED_LENGTH ? levels.byEnd[length * 128 + last]! : -2;
  if (hit === -1) return -1;
  if (hit >= 0) {
    const name = levels.names[hit]!;
    for (let j = 0; j < length - 1; j++) if (name[j] !== bytes[s + j]) return -1;
    return levels.indices[hit]!;
  }
  names: for (hit = 0; hit < levels.names.length; hit++) {
    const name = levels.names[hit]!;
    if (name.length !== length || name[length - 1] !== last) continue;
    for (let j = 0; j < length - 1; j++) if (name[j] !== bytes[s + j]) continue names;
    return levels.indices[hit]!;
  }
  return -1;
}

/** The columns a reader fills, each for every row of the table (empty for a column of another kind). */
export interface PlainColumns {
  readonly rowCount: number;
  /** Per header column that is a factor: its level index per run. */
  readonly levels: readonly Int32Array[];
  /** Per header column that is a value: its decimals' mantissas and exponents (`DecimalColumn`). */
  readonly mantissas: readonly Float64Array[];
  readonly exponents: readonly Int8Array[];
}

/**
 * Columns for `rowCount` rows of a table with columns of `kinds`, in memory from `allocate` (another
 * thread's reader needs shared memory).
 */
export function plainColumns(kinds: readonly PlainColumn[], rowCount: number, allocate: (bytes: number) => ArrayBufferLike = (bytes) => new ArrayBuffer(bytes)): PlainColumns {
  return {
    rowCount,
    levels: kinds.map((kind) => new Int32Array(allocate(kind === PlainColumn.Factor ? rowCount * 4 : 0))),
    mantissas: kinds.map((kind) => new Float64Array(allocate(isValue(kind) ? rowCount * 8 : 0))),
    exponents: kinds.map((kind) => new Int8Array(allocate(isValue(kind) ? rowCount : 0))),
  };
}

/** What reading a part of a body found besides the values it wrote into the columns. */
export interface PlainPart {
  /** Per header column: 1 at each row of the part whose response is pending (`?`); undefined without any. */
  readonly pending: readonly (Uint8Array | undefined)[];
  /** The part's pending cells, as `PlainRuns.pendingCells`. */
  readonly pendingCells: readonly number[];
  /** The trailing numbers of the part's first and last ids; -1 without an id column. */
  readonly firstId: number;
  readonly lastId: number;
  /** What the part counted of its rows. */
  readonly tallies: PlainTallies;
}

/**
 * What the reader counts as it reads, so that the checks and the centring that follow need no pass over
 * the runs of their own: exact integers (and stored decimals), equal to counting afterwards (tested).
 * Arrays are per header column, empty for columns of another kind.
 */
export interface PlainTallies {
  /** Per factor column: runs per level, the sum of their run numbers (row + 1), each level's first row (-1 none). */
  readonly levelCounts: readonly Int32Array[];
  readonly rankSums: readonly Float64Array[];
  readonly firstRows: readonly Int32Array[];
  /**
   * Runs per combination of the factor columns' levels (the first factor column most significant) and
   * each combination's first row; empty when there are more than `MAX_TALLIED_CELLS` combinations.
   */
  readonly cellCounts: Int32Array;
  readonly cellFirstRows: Int32Array;
  /**
   * Per value column, over its measured values: the smallest and largest stored mantissa per stored
   * exponent (`DecimalExtremes`, 45 entries from exponent -22 on), and the smallest exponent of a
   * nonzero value (Infinity: none).
   */
  readonly lowest: readonly Float64Array[];
  readonly highest: readonly Float64Array[];
  readonly scales: Float64Array;
}

/** Combinations of levels counted at most (beyond, the cell checks count them in a pass of their own). */
const MAX_TALLIED_CELLS = 1 << 16;

/** Reading rows `[firstRow, endRow)` of a table from the text `[from, to)` into `columns`. */
export interface PlainPartJob {
  readonly from: number;
  readonly to: number;
  readonly firstRow: number;
  readonly endRow: number;
  readonly layout: PlainRunsLayout;
  readonly columns: PlainColumns;
}

/**
 * Another thread that can read a later part of a large plain body while this one reads the first (the
 * CLI's worker, `server/src/cli/helper-worker.ts`). Its text must be the same characters at the same
 * offsets.
 */
export interface PlainPartHelper {
  /** Columns the helper can write into (shared memory), or undefined when it cannot help. */
  columns(kinds: readonly PlainColumn[], rowCount: number): PlainColumns | undefined;
  /**
   * Starts reading `job` on the other thread; returns the function that waits for it and gives its part,
   * or undefined when that part was declined or the helper failed. Undefined when it cannot start.
   */
  start(job: PlainPartJob): (() => PlainPart | undefined) | undefined;
}

/** Where a body may be split: a row's index and its line's start (`RunsTable.plainMiddle`). */
export interface PlainSplit {
  readonly row: number;
  readonly offset: number;
  readonly helper: PlainPartHelper;
}

/**
 * The columns being filled and the reader's state: one object of one shape, so that `readRow` is a small
 * function called once per row, which the engine optimises as an ordinary function after a few hundred
 * rows (one large loop is optimised on the stack while it runs, and was several times slower here).
 */
class PlainReader {
  readonly columnCount: number;
  readonly kindOf: Int8Array;
  readonly pipeAt: number;
  readonly lookups: readonly ByteLevels[];
  readonly levels: readonly Int32Array[];
  readonly mantissas: readonly Float64Array[];
  readonly exponents: readonly Int8Array[];
  /** Made when a column's first `?` is read, for every row of the table. */
  readonly pending: (Uint8Array | undefined)[];
  readonly pendingCells: number[] = [];
  /** Rows of the whole table (the length of the columns). */
  readonly rowCount: number;
  /** The offset of `bytes[0]` in the source (the chunk's start). */
  base = 0;
  row: number;
  previousId = -1;
  readonly tallies: PlainTallies;
  /** Per column: its factor's number of levels (the radix of its digit in a combination), 0 for others. */
  readonly radices: Int32Array;
  readonly tallyCells: boolean;

  constructor(layout: PlainRunsLayout, columns: PlainColumns, firstRow: number) {
    const kinds = layout.kinds;
    this.radices = Int32Array.from(kinds, (kind, column) => (kind === PlainColumn.Factor ? layout.levelNames[column]!.length : 0));
    const combinations = Array.from(this.radices).reduce((product, radix) => (radix > 0 ? product * radix : product), 1);
    this.tallyCells = combinations <= MAX_TALLIED_CELLS;
    const perLevel = <T>(make: (length: number) => T) => kinds.map((kind, column) => make(kind === PlainColumn.Factor ? layout.levelNames[column]!.length : 0));
    const perValue = (fill: number) => kinds.map((kind) => new Float64Array(isValue(kind) ? 45 : 0).fill(fill));
    this.tallies = {
      levelCounts: perLevel((n) => new Int32Array(n)),
      rankSums: perLevel((n) => new Float64Array(n)),
      firstRows: perLevel((n) => new Int32Array(n).fill(-1)),
      cellCounts: new Int32Array(this.tallyCells ? combinations : 0),
      cellFirstRows: new Int32Array(this.tallyCells ? combinations : 0).fill(-1),
      lowest: perValue(Infinity),
      highest: perValue(-Infinity),
      scales: new Float64Array(kinds.length).fill(Infinity),
    };
    this.columnCount = kinds.length;
    this.kindOf = Int8Array.from(kinds);
    this.pipeAt = layout.pipeAt;
    this.lookups = layout.levelNames.map((names, column) => (kinds[column] === PlainColumn.Factor ? byteLevels(names) : NO_LEVELS));
    this.levels = columns.levels;
    this.mantissas = columns.mantissas;
    this.exponents = columns.exponents;
    this.pending = kinds.map(() => undefined);
    this.rowCount = columns.rowCount;
    this.row = firstRow;
  }
}

/**
 * Reads the row starting at `bytes[i]` (a character that is not a blank, line break or `#`) into row
 * `reader.row`, and returns the index of the line break or sentinel that ends it; -1 to decline.
 *
 * Each cell is read by the parser of its column as its characters are met (a level compared with the
 * names, a decimal accumulated, an id's trailing number), so every character is looked at once.
 */
function readRow(reader: PlainReader, bytes: Uint8Array, i: number): number {
  const endsCell = ENDS_CELL;
  const columnCount = reader.columnCount;
  const pipeAt = reader.pipeAt;
  const row = reader.row;
  const tallies = reader.tallies;
  let column = 0;
  let pipeSeen = false;
  let idStart = -1;
  let idEnd = -1;
  let cell = 0;
  for (;;) {
    let c = bytes[i]!;
    if (c === Char.Space || c === Char.Tab) {
      i++;
      continue;
    }
    if (c === Char.LF || c === Char.CR) break;
    if (c === Char.Hash) {
      while ((c = bytes[i]!) !== Char.LF && c !== Char.CR) i++;
      break;
    }
    if (c === Char.Pipe) {
      if (column !== pipeAt || pipeSeen) return -1;
      pipeSeen = true;
      i++;
      continue;
    }
    if (column >= columnCount || (pipeAt >= 0 && pipeSeen !== column >= pipeAt)) return -1;
    const what = reader.kindOf[column];
    if (what === PlainColumn.Response && c === Char.Question && endsCell[bytes[i + 1]!] !== 0) {
      // `?`: a response not measured yet (the general path's `readValue`).
      (reader.pending[column] ??= new Uint8Array(reader.rowCount))[row] = 1;
      const base = reader.base;
      const hasId = idStart >= 0;
      reader.pendingCells.push(row, column, base + i, base + i + 1, hasId ? base + idStart : -1, hasId ? base + idEnd : -1);
      i++;
    } else if (what === PlainColumn.Value || what === PlainColumn.Response) {
      // A plain decimal, stored as `storePlainDecimal` (center-decimals.ts) stores it: an optional sign,
      // digits with at most one point. Every digit is accumulated (leading zeros add nothing, trailing
      // ones are divided out below), which is exact while the integer stays below 10^15; a longer one is
      // declined (the general path reads it), so at most 15 significant digits are kept, as there.
      let negative = false;
      if (c === Char.Plus || c === Char.Minus) {
        negative = c === Char.Minus;
        c = bytes[++i]!;
      }
      let mantissa = 0;
      let digits = 0;
      let pointAt = -1;
      for (;;) {
        const digit = c - 48;
        if (digit >= 0 && digit <= 9) {
          mantissa = mantissa * 10 + digit;
          digits++;
        } else if (c === Char.Point && pointAt < 0) pointAt = digits;
        else break;
        c = bytes[++i]!;
      }
      if (endsCell[c] === 0 || digits === 0 || mantissa >= 1e15) return -1;
      let exponent = pointAt < 0 ? 0 : pointAt - digits;
      if (mantissa === 0) exponent = 0;
      else {
        while (mantissa % 10 === 0) {
          mantissa /= 10;
          exponent++;
        }
      }
      if (exponent > 22 || exponent < -22) return -1;
      const stored = negative ? -mantissa : mantissa;
      reader.mantissas[column]![row] = stored;
      reader.exponents[column]![row] = exponent;
      // The centring's extremes, in row order as its own pass would meet them (the first zero's sign kept).
      const lowest = tallies.lowest[column]!;
      const highest = tallies.highest[column]!;
      if (stored < lowest[exponent + 22]!) lowest[exponent + 22] = stored;
      if (stored > highest[exponent + 22]!) highest[exponent + 22] = stored;
      if (stored !== 0 && exponent < tallies.scales[column]!) tallies.scales[column] = exponent;
    } else if (what === PlainColumn.Factor) {
      const s = i;
      while (endsCell[bytes[i]!] === 0) i++;
      const level = levelOf(reader.lookups[column]!, bytes, s, i);
      if (level < 0) return -1;
      reader.levels[column]![row] = level;
      tallies.levelCounts[column]![level]!++;
      tallies.rankSums[column]![level] += row + 1;
      const firstRows = tallies.firstRows[column]!;
      if (firstRows[level]! < 0) firstRows[level] = row;
      cell = cell * reader.radices[column]! + level;
    } else if (what === PlainColumn.Id) {
      // The number in the id's trailing digits (at most 15): the test of `increasingNumberedIds`
      // (duplicate-run-ids.ts), which proves ids distinct when these grow from row to row.
      let value = 0;
      let digits = 0;
      idStart = i;
      while (endsCell[(c = bytes[i]!)] === 0) {
        const digit = c - 48;
        if (digit >= 0 && digit <= 9) {
          value = value * 10 + digit;
          digits++;
        } else {
          value = 0;
          digits = 0;
        }
        i++;
      }
      if (digits === 0 || digits > 15 || value <= reader.previousId) return -1;
      reader.previousId = value;
      idEnd = i;
    } else {
      while (endsCell[bytes[i]!] === 0) i++;
    }
    column++;
  }
  if (column !== columnCount || (pipeAt >= 0 && !pipeSeen)) return -1;
  if (reader.tallyCells) {
    tallies.cellCounts[cell]!++;
    if (tallies.cellFirstRows[cell]! < 0) tallies.cellFirstRows[cell] = row;
  }
  return i;
}

/**
 * Reads rows `[firstRow, endRow)` from the plain text `[from, to)` (a row starts at or after `from`) into
 * `columns`, or returns `undefined` when any row is outside what this reader handles (see the module
 * comment) or the rows are not exactly that many. The cell parsers do not test for the chunk's end: a row
 * is started only with `LONGEST_ROW` characters left in the chunk, and a row that reaches the sentinel
 * anyway is too long and declined.
 */
export function readPlainPart(load: AsciiChunkLoader, job: PlainPartJob): PlainPart | undefined {
  const { from, to, firstRow, endRow } = job;
  if (job.layout.kinds.length === 0) return undefined;
  const reader = new PlainReader(job.layout, job.columns, firstRow);
  const window = new AsciiWindow(load, to);
  const bytes = window.bytes;
  let firstId = -1;
  let p = from;
  if (p < to && !window.load(p)) return undefined;
  while (p < to) {
    // A row must fit in the window: move it on when less than the longest row read here is left.
    if (window.limit < to && window.limit - p < LONGEST_ROW && !window.load(p)) return undefined;
    const base = window.base;
    const last = window.limit - base;
    const cut = window.limit < to;
    let i = p - base;
    // Line breaks and blanks before a row (the sentinel stops this at the chunk's end).
    let c = bytes[i]!;
    while ((c === Char.LF || c === Char.CR || c === Char.Space || c === Char.Tab) && i < last) c = bytes[++i]!;
    if (i >= last) {
      if (!cut) break;
      p = window.limit;
      if (!window.load(p)) return undefined;
      continue;
    }
    if (c === Char.Hash) {
      while ((c = bytes[i]!) !== Char.LF && c !== Char.CR) i++;
    } else {
      if (reader.row === endRow) return undefined;
      reader.base = base;
      i = readRow(reader, bytes, i);
      if (i < 0) return undefined;
      if (reader.row === firstRow) firstId = reader.previousId;
      reader.row++;
    }
    if (i >= last && cut) return undefined; // a line longer than LONGEST_ROW
    p = i + base;
  }
  if (reader.row !== endRow) return undefined;
  return { pending: reader.pending, pendingCells: reader.pendingCells, firstId, lastId: reader.previousId, tallies: reader.tallies };
}

/**
 * Reads the `rowCount` rows of the plain body `source[start, end)` with `layout`, or returns `undefined`
 * when any row is outside what this reader handles. With `split`, the rows from `split.row` on are read
 * by its helper on another thread meanwhile; the result is the same (tested), and any failure of the
 * helper's part makes the whole read decline, as a declined row does.
 */
export function readPlainRuns(source: string, start: number, end: number, rowCount: number, layout: PlainRunsLayout, split?: PlainSplit): PlainRuns | undefined {
  if (layout.kinds.length === 0) return undefined;
  const load = stringChunks(source);
  const helped = split !== undefined && split.row > 0 && split.row < rowCount ? split : undefined;
  const shared = helped?.helper.columns(layout.kinds, rowCount);
  const columns = shared ?? plainColumns(layout.kinds, rowCount);
  const wait = helped && shared ? helped.helper.start({ from: helped.offset, to: end, firstRow: helped.row, endRow: rowCount, layout, columns }) : undefined;
  let parts: (PlainPart | undefined)[];
  if (wait && helped) {
    const first = readPlainPart(load, { from: start, to: helped.offset, firstRow: 0, endRow: helped.row, layout, columns });
    // Always waited for, also after a decline: the helper writes into these columns until it is done.
    const second = wait();
    parts = [first, second];
    // Ids must increase across the split too (each part checked its own).
    if (first && second && second.firstId >= 0 && second.firstId <= first.lastId) return undefined;
  } else {
    parts = [readPlainPart(load, { from: start, to: end, firstRow: 0, endRow: rowCount, layout, columns })];
  }
  if (parts.some((part) => part === undefined)) return undefined;
  const done = parts as PlainPart[];
  const pending = layout.kinds.map((_, column) => {
    const marks = done.map((part) => part.pending[column]).filter((m): m is Uint8Array => m !== undefined);
    if (marks.length <= 1) return marks[0];
    // Each part marked only its own rows, in an array for every row: combined by "or".
    const all = marks[0]!;
    for (const more of marks.slice(1)) for (let r = 0; r < rowCount; r++) all[r] |= more[r]!;
    return all;
  });
  const pendingCells = done.length === 1 ? done[0]!.pendingCells : done.flatMap((part) => part.pendingCells);
  const values = columns.mantissas.map((mantissa, column) => ({ mantissa, exponent: columns.exponents[column]! }));
  const tallies = done.map((part) => part.tallies).reduce(mergeTallies);
  return { levels: columns.levels, values, pending, pendingCells, tallies };
}

/**
 * The tallies of two parts, `first` read before `second` in row order, as one pass over both would make
 * them: counts and run-number sums (whole numbers) add, first rows come from the first part that has one,
 * and an extreme of the second part replaces one of the first only when strictly beyond it (as the pass
 * would keep the value it met first, which matters for the sign of a zero).
 */
function mergeTallies(first: PlainTallies, second: PlainTallies): PlainTallies {
  const add = <T extends Int32Array | Float64Array>(a: T, b: T) => a.map((x, i) => x + b[i]!) as T;
  const firstOf = (a: Int32Array, b: Int32Array) => a.map((x, i) => (x >= 0 ? x : b[i]!));
  return {
    levelCounts: first.levelCounts.map((a, column) => add(a, second.levelCounts[column]!)),
    rankSums: first.rankSums.map((a, column) => add(a, second.rankSums[column]!)),
    firstRows: first.firstRows.map((a, column) => firstOf(a, second.firstRows[column]!)),
    cellCounts: add(first.cellCounts, second.cellCounts),
    cellFirstRows: firstOf(first.cellFirstRows, second.cellFirstRows),
    lowest: first.lowest.map((a, column) => a.map((x, i) => (second.lowest[column]![i]! < x ? second.lowest[column]![i]! : x))),
    highest: first.highest.map((a, column) => a.map((x, i) => (second.highest[column]![i]! > x ? second.highest[column]![i]! : x))),
    scales: first.scales.map((x, i) => Math.min(x, second.scales[i]!)),
  };
}
