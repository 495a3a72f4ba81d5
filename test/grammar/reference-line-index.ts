/**
 * The former `LineIndex` of `grammar/src/line-index.ts` (kept verbatim as a reference for tests): it built
 * the whole index eagerly, pushing every line into plain arrays. Tests compare the lazy typed-array index
 * with it on random texts.
 */
import type { LinePosition } from "../../grammar/src/line-index.js";

/** The former eager line index. */
export class ReferenceLineIndex {
  /** Offset of the first character of each line; `lineStarts[0]` is 0. */
  private readonly lineStarts: Int32Array;
  /** Offset just past the last character of each line, before its line break. */
  private readonly lineEnds: Int32Array;
  private readonly length: number;

  /** Builds the index in one pass over `text`. */
  constructor(text: string) {
    const starts: number[] = [0];
    const ends: number[] = [];
    const n = text.length;
    if (text.indexOf("\r") < 0) {
      // Only `\n` breaks (the usual case): the engine's indexOf search is several times faster than a
      // character loop, which matters for the editor at every edit of a large file.
      for (let i = text.indexOf("\n"); i >= 0; i = text.indexOf("\n", i + 1)) {
        ends.push(i);
        starts.push(i + 1);
      }
    } else for (let i = 0; i < n; i++) {
      const c = text.charCodeAt(i);
      if (c === 13 || c === 10) {
        ends.push(i);
        if (c === 13 && i + 1 < n && text.charCodeAt(i + 1) === 10) i++;
        starts.push(i + 1);
      }
    }
    ends.push(n);
    this.lineStarts = Int32Array.from(starts);
    this.lineEnds = Int32Array.from(ends);
    this.length = n;
  }

  /** The number of lines (a text without line breaks has one). */
  get lineCount(): number {
    return this.lineStarts.length;
  }

  /** The 0-based line and character of `offset`; offsets outside the text are clamped to it. */
  positionAt(offset: number): LinePosition {
    const o = Math.max(0, Math.min(Number.isFinite(offset) ? Math.floor(offset) : 0, this.length));
    let lo = 0;
    let hi = this.lineStarts.length - 1;
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
    if (line >= this.lineStarts.length) return this.length;
    const character = Math.max(0, Math.floor(position.character) || 0);
    return Math.min(this.lineStarts[line]! + character, this.lineEnds[line]!);
  }
}
