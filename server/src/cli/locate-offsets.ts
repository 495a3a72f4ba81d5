/**
 * Line and column of a few offsets in a large text without indexing every line. The CLI reports a handful
 * of diagnostics, usually near the top of the file; a `LineIndex` of a 22 MB runs table would record a
 * million line starts to place them. Here the offsets are visited in ascending order and the line breaks
 * are counted once, only up to the largest offset. Results equal `LineIndex.positionAt` (grammar/src/
 * line-index.ts): breaks are `\r\n`, `\n` and a lone `\r`, columns count UTF-16 units, offsets are
 * clamped to the text.
 */

import type { LinePosition } from "../../../grammar/src/line-index.js";

/** Offsets up to this far into the text are located by a plain character loop; beyond, by indexOf jumps. */
const LOOP_LIMIT = 1 << 16;

/** The 0-based line and character of every offset in `offsets`, in the same order. */
export function locateOffsets(text: string, offsets: readonly number[]): LinePosition[] {
  const length = text.length;
  const clamped = offsets.map((offset) => Math.max(0, Math.min(Number.isFinite(offset) ? Math.floor(offset) : 0, length)));
  const order = clamped.map((_, i) => i).sort((a, b) => clamped[a]! - clamped[b]!);
  const out: LinePosition[] = new Array(offsets.length);
  let line = 0;
  let lineStart = 0;
  // Next offset whose character has not been examined for a line break.
  let scan = 0;
  // Position of the next `\r` at or after `scan` (-1: none), searched for only when the loop is left.
  let nextCr = -2;
  for (const i of order) {
    const target = clamped[i]!;
    // Count every line that starts at or before `target`: a break ending at or before it.
    while (scan < target) {
      if (target <= LOOP_LIMIT || scan + 64 > target) {
        const c = text.charCodeAt(scan);
        if (c === 10 || (c === 13 && text.charCodeAt(scan + 1) !== 10)) {
          line++;
          lineStart = scan + 1;
        }
        scan++;
        continue;
      }
      // Far targets: jump from one `\n` to the next, stopping at any `\r` on the way.
      if (nextCr !== -1 && nextCr < scan) nextCr = text.indexOf("\r", scan);
      const lf = text.indexOf("\n", scan);
      if (nextCr >= 0 && nextCr < target && (lf < 0 || nextCr < lf)) {
        // A `\r` before the next `\n`: a break unless a `\n` follows (the `\n` then counts the line).
        if (text.charCodeAt(nextCr + 1) !== 10) {
          line++;
          lineStart = nextCr + 1;
        }
        scan = nextCr + 1;
      } else if (lf >= 0 && lf < target) {
        line++;
        lineStart = lf + 1;
        scan = lf + 1;
      } else scan = target;
    }
    out[i] = { line, character: target - lineStart };
  }
  return out;
}
