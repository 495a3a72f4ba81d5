/**
 * A cheap estimate of how many line feeds a range of text holds, used to size typed arrays once (the
 * runs-table columns, the line index) instead of growing them by doubling or counting in a full pass.
 */

const WINDOW = 4096;

/** The number of `\n` in `text[from, to)`, found with the engine's fast `indexOf` search. */
export function countLineFeeds(text: string, from: number, to: number): number {
  let count = 0;
  for (let i = text.indexOf("\n", from); i >= 0 && i < to; i = text.indexOf("\n", i + 1)) count++;
  return count;
}

/**
 * An estimate of the line feeds in `text[start, end)`: exact for a range of up to three windows of 4096
 * characters; otherwise the density in three windows (at the start, middle and end of the range), taking
 * the median, extrapolated to the range plus a sixteenth. Run ids grow longer down a table, so the first
 * window is the densest and alone would over-estimate a million-run file by a third; the median of three
 * lands within a few percent on any table whose rows have similar lengths. A wrong estimate only costs
 * the caller a regrowth (too low) or a copy when trimming (too high).
 */
export function estimateLineFeeds(text: string, start: number, end: number): number {
  const length = end - start;
  if (length <= 3 * WINDOW) return countLineFeeds(text, start, end);
  const a = countLineFeeds(text, start, start + WINDOW);
  const b = countLineFeeds(text, start + ((length - WINDOW) >> 1), start + ((length + WINDOW) >> 1));
  const c = countLineFeeds(text, end - WINDOW, end);
  const median = Math.max(Math.min(a, b), Math.min(Math.max(a, b), c));
  return Math.ceil((median / WINDOW) * length * 1.0625) + 16;
}
