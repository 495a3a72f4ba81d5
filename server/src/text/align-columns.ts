/**
 * Column alignment for plain-text tables such as the runs table of a `.trial` file.
 *
 * Widths are measured in Unicode code points, not UTF-16 units, so a level such as `"5 °C"` or a
 * name with an astral character lines up in an editor that shows one glyph per code point.
 * Combining marks and East Asian wide characters are not special-cased (a known limitation: they
 * would need grapheme segmentation and a width table, e.g. Unicode Standard Annex #11).
 */

/** Options of `alignColumns`. */
export interface AlignColumnsOptions {
  /** Spaces between two ordinary columns; default 2. */
  readonly gap?: number;
  /**
   * The text of a separator cell; default `|`. A column in which every present cell equals it is a
   * separator column: it is set off by `separatorGap` spaces on each side instead of `gap`.
   */
  readonly separator?: string;
  /** Spaces on each side of a separator column; default 1. */
  readonly separatorGap?: number;
  /** Per column `left` (default) or `right` alignment; ignored for the separator column. */
  readonly align?: readonly ("left" | "right")[];
}

/**
 * Lays out rows of cells as lines with every column padded to its widest cell (in code points).
 * Rows may have different lengths: missing (or empty) cells at the end of a row are simply absent,
 * so no line ends in padding; the last cell of a row is written as is. Cell text is never changed.
 */
export function alignColumns(rows: readonly (readonly string[])[], options: AlignColumnsOptions = {}): string[] {
  const gap = " ".repeat(Math.max(0, Math.floor(options.gap ?? 2)));
  const separatorGap = " ".repeat(Math.max(0, Math.floor(options.separatorGap ?? 1)));
  const separator = options.separator ?? "|";

  let columnCount = 0;
  for (const row of rows) columnCount = Math.max(columnCount, row.length);
  const widths = new Array<number>(columnCount).fill(0);
  const isSeparator = new Array<boolean>(columnCount).fill(true);
  const present = new Array<boolean>(columnCount).fill(false);
  for (const row of rows) {
    for (let c = 0; c < row.length; c++) {
      const cell = row[c] ?? "";
      present[c] = true;
      if (cell !== separator) isSeparator[c] = false;
      const w = codePointLength(cell);
      if (w > (widths[c] ?? 0)) widths[c] = w;
    }
  }
  for (let c = 0; c < columnCount; c++) if (!present[c]) isSeparator[c] = false;

  const lines: string[] = [];
  for (const row of rows) {
    // Empty cells at the end of a row would only add padding: leave them out.
    let end = row.length;
    while (end > 0 && row[end - 1] === "") end--;
    const parts: string[] = [];
    for (let c = 0; c < end; c++) {
      const cell = row[c] ?? "";
      if (c > 0) parts.push(isSeparator[c] || isSeparator[c - 1] ? separatorGap : gap);
      const pad = (widths[c] ?? 0) - codePointLength(cell);
      const last = c === end - 1;
      if (options.align?.[c] === "right" && !isSeparator[c]) {
        parts.push(" ".repeat(pad), cell);
      } else {
        parts.push(cell);
        if (!last) parts.push(" ".repeat(pad));
      }
    }
    lines.push(parts.join(""));
  }
  return lines;
}

/** The number of Unicode code points in `s` (a surrogate pair counts once; a lone surrogate counts once). */
export function codePointLength(s: string): number {
  let count = s.length;
  for (let k = 0; k < s.length - 1; k++) {
    const c = s.charCodeAt(k);
    if (c >= 0xd800 && c <= 0xdbff) {
      const d = s.charCodeAt(k + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        count--;
        k++;
      }
    }
  }
  return count;
}
