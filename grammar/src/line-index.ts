/**
 * Offset/position conversion for one text. The AST speaks offsets only; the faces (LSP, CLI) convert
 * with a `LineIndex` built once per text.
 */
import { estimateLineFeeds } from "./line-density.js";

/** A 0-based line and UTF-16 character position, as in the Language Server Protocol. */
export interface LinePosition {
  readonly line: number;
  readonly character: number;
}

function grow(data: Int32Array, capacity: number): Int32Array {
  const grown = new Int32Array(capacity);
  grown.set(data);
  return grown;
}

/**
 * The start and end offsets of every line of a text. Line breaks are `\r\n`, `\n` and a lone `\r`, as in
 * the Language Server Protocol, so positions agree with the editor's.
 *
 * The lines are found lazily, from the top, only as far as a question needs: a command that reports two
 * problems near the top of a 22 MB file reads a few lines, not a million. Breaks are found with the
 * engine's `indexOf` search (several times faster than a loop over character codes), and the offsets go
 * into typed arrays sized from an estimate of the line count (`line-density.ts`), so building the whole
 * index costs one `indexOf` call per line and no per-line allocation. Answers do not depend on how much
 * was built before.
 */
export class LineIndex {
  private readonly text: string;
  private readonly length: number;
  /** Offset of the first character of each line found so far; `lineStarts[0]` is 0. */
  private lineStarts: Int32Array;
  /** Offset just past the last character of each line, before its line break (known for finished lines). */
  private lineEnds: Int32Array;
  /** Lines whose start is known: `0 .. found - 1`; all but the last also have their end. */
  private found = 1;
  /** True once the last line break was passed: every line and the last line's end are known. */
  private complete = false;
  /** The next `\r` and `\n` at or after the search position (-1: none left; -2: not searched yet). */
  private nextCr = -2;
  private nextLf = -2;

  /** Prepares the index; lines are found on demand (see the class comment). */
  constructor(text: string) {
    this.text = text;
    this.length = text.length;
    this.lineStarts = new Int32Array(1);
    this.lineEnds = new Int32Array(1);
  }

  /** The number of lines (a text without line breaks has one). */
  get lineCount(): number {
    this.findLines(Infinity, Infinity);
    return this.found;
  }

  /** The 0-based line and character of `offset`; offsets outside the text are clamped to it. */
  positionAt(offset: number): LinePosition {
    const o = Math.max(0, Math.min(Number.isFinite(offset) ? Math.floor(offset) : 0, this.length));
    // The line of `o` is known once a line is known to start after it.
    this.findLines(o, -1);
    let lo = 0;
    let hi = this.found - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >>> 1;
      if (this.lineStarts[mid]! <= o) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo, character: o - this.lineStarts[lo]! };
  }

  /**
   * The offset of a 0-based position. A line past the end gives the text length; a character past the
   * end of its line gives the line's end (before its line break), as the protocol asks.
   */
  offsetAt(position: LinePosition): number {
    const line = Math.floor(position.line);
    if (!(line >= 0)) return 0;
    // The end of `line` is known once the line after it is found (or the text is done).
    this.findLines(-1, line + 1);
    if (line >= this.found) return this.length;
    const character = Math.max(0, Math.floor(position.character) || 0);
    return Math.min(this.lineStarts[line]! + character, this.lineEnds[line]!);
  }

  /**
   * Finds lines until one starts after `offset` and line `line` is known (or the text ends). Works on
   * locals and writes the state back once, so the loop over a million lines stays tight.
   */
  private findLines(offset: number, line: number): void {
    if (this.complete) return;
    let found = this.found;
    let starts = this.lineStarts;
    if (starts[found - 1]! > offset && found - 1 >= line) return;
    const text = this.text;
    let ends = this.lineEnds;
    let capacity = starts.length;
    if (capacity === 1) {
      // First search: size the columns for the whole text from its line density (cheap; see line-density.ts).
      capacity = estimateLineFeeds(text, 0, this.length) + 2;
      starts = grow(starts, capacity);
      ends = grow(ends, capacity);
    }
    let cr = this.nextCr === -2 ? text.indexOf("\r") : this.nextCr;
    let lf = this.nextLf === -2 ? text.indexOf("\n") : this.nextLf;
    let complete = false;
    while (starts[found - 1]! <= offset || found - 1 < line) {
      let at: number;
      let next: number;
      if (lf >= 0 && (cr < 0 || lf < cr)) {
        at = lf;
        next = lf + 1;
        lf = text.indexOf("\n", next);
      } else if (cr >= 0) {
        // `\r\n` is one break; a lone `\r` is one too.
        at = cr;
        next = lf === cr + 1 ? cr + 2 : cr + 1;
        if (lf >= 0 && lf < next) lf = text.indexOf("\n", next);
        cr = text.indexOf("\r", next);
      } else {
        complete = true;
        break;
      }
      if (found === capacity) {
        capacity = capacity + (capacity >> 1) + 16;
        starts = grow(starts, capacity);
        ends = grow(ends, capacity);
      }
      ends[found - 1] = at;
      starts[found] = next;
      found++;
    }
    if (complete) {
      ends[found - 1] = this.length;
      // Trim: the whole index lives as long as its text; keep no large unused tail.
      if (capacity - found > (found >> 3) + 64) {
        starts = starts.slice(0, found);
        ends = ends.slice(0, found);
      }
    }
    this.lineStarts = starts;
    this.lineEnds = ends;
    this.found = found;
    this.complete = complete;
    this.nextCr = cr;
    this.nextLf = lf;
  }
}
