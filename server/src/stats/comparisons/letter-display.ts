/**
 * Compact letter display of pairwise comparisons: levels that share a letter are not significantly
 * different. Algorithm: "insert-and-absorb" (Piepho 2004, "An algorithm for a letter-based representation
 * of all-pairwise comparisons", J. Comput. Graph. Statist. 13, 456-466):
 * start with one column holding every level; for each significantly different pair (i, j), split every
 * column holding both into a copy without i and a copy without j; after each split drop columns that are
 * subsets of another column. Columns are then lettered a, b, c, ... in the order of the first level
 * (in the caller's order, e.g. best mean first) that they contain, so the first level always gets 'a'.
 * More than 26 columns continue with 'A'..'Z' and then 'a1', 'b1', ...
 */

/**
 * Returns the letters of each of `count` levels. `order` lists the levels in display order (best first);
 * `differs(i, j)` says whether levels i and j differ significantly.
 */
export function letterDisplay(count: number, order: readonly number[], differs: (i: number, j: number) => boolean): string[] {
  let columns: Set<number>[] = [new Set(order)];
  for (let x = 0; x < order.length; x++) {
    for (let y = x + 1; y < order.length; y++) {
      const i = order[x]!;
      const j = order[y]!;
      if (!differs(i, j)) continue;
      const next: Set<number>[] = [];
      for (const column of columns) {
        if (column.has(i) && column.has(j)) {
          const withoutI = new Set(column);
          withoutI.delete(i);
          const withoutJ = new Set(column);
          withoutJ.delete(j);
          next.push(withoutI, withoutJ);
        } else next.push(column);
      }
      columns = absorb(next);
    }
  }
  const rank = new Map(order.map((level, position) => [level, position] as const));
  const first = (column: Set<number>) => Math.min(...[...column].map((l) => rank.get(l)!));
  columns.sort((p, q) => first(p) - first(q));
  const letters = Array.from({ length: count }, () => "");
  columns.forEach((column, c) => {
    for (const level of column) letters[level] += letterName(c);
  });
  // Within one level's letters the order follows the column order already.
  return letters;
}

/** Removes empty columns, duplicates and columns contained in another one. */
function absorb(columns: Set<number>[]): Set<number>[] {
  const kept: Set<number>[] = [];
  const sorted = columns.filter((c) => c.size > 0).sort((p, q) => q.size - p.size);
  for (const column of sorted) {
    if (kept.some((other) => [...column].every((level) => other.has(level)))) continue;
    kept.push(column);
  }
  return kept;
}

function letterName(index: number): string {
  const alphabet = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ";
  if (index < alphabet.length) return alphabet[index]!;
  return alphabet[index % 26]! + String(Math.floor(index / alphabet.length));
}
