/**
 * Exact order statistics without sorting: Floyd & Rivest's (1975) SELECT (Communications of the ACM 18(3),
 * 165-172, Algorithm 489), a refinement of Hoare's (1961) FIND. It places the k-th smallest value at index
 * k of a typed array in expected linear time, recursing on a small sample to pick a pivot close to the
 * target rank so that one partition usually suffices. Values equal to the pivot stop both scans and are
 * swapped, so ties (decimal data have many) split evenly instead of degrading to quadratic time.
 *
 * The Brown-Forsythe test needs the median of every group of up to a million values; sorting each group
 * costs O(n log n) comparisons through a generic comparator, selection about 1.5 n.
 */

/** Floyd-Rivest's sampling pays off only on ranges longer than this (the published constant). */
const SAMPLE_FROM = 600;

/**
 * Rearranges `a[left..right]` (inclusive) so that `a[k]` holds the value a sort would put there, every
 * value before it is not greater and every value after it is not smaller. `a` must hold no NaN (the
 * comparisons would not order it): callers check.
 */
export function selectInPlace(a: Float64Array, k: number, left: number, right: number): void {
  while (right > left) {
    if (right - left > SAMPLE_FROM) {
      // Recurse on a sample around the expected position of the k-th value (Floyd & Rivest 1975).
      const n = right - left + 1;
      const m = k - left + 1;
      const z = Math.log(n);
      const s = 0.5 * Math.exp((2 * z) / 3);
      const sd = 0.5 * Math.sqrt((z * s * (n - s)) / n) * (m - n / 2 < 0 ? -1 : 1);
      const newLeft = Math.max(left, Math.floor(k - (m * s) / n + sd));
      const newRight = Math.min(right, Math.floor(k + ((n - m) * s) / n + sd));
      selectInPlace(a, k, newLeft, newRight);
    }
    const t = a[k]!;
    let i = left;
    let j = right;
    swap(a, left, k);
    if (a[right]! > t) swap(a, left, right);
    while (i < j) {
      swap(a, i, j);
      i++;
      j--;
      while (a[i]! < t) i++;
      while (a[j]! > t) j--;
    }
    if (a[left] === t) swap(a, left, j);
    else {
      j++;
      swap(a, j, right);
    }
    if (j <= k) left = j + 1;
    if (k <= j) right = j - 1;
  }
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i]!;
  a[i] = a[j]!;
  a[j] = t;
}

/**
 * The median of `a[from..to)` (to > from), exactly as a sort would give it: the middle value, or the mean
 * of the two middle values (lower + upper) / 2 for an even count. Reorders that range of `a`; `a` must hold
 * no NaN.
 */
export function medianInPlace(a: Float64Array, from: number, to: number): number {
  const m = to - from;
  const h = from + (m >> 1);
  selectInPlace(a, h, from, to - 1);
  const upper = a[h]!;
  if (m % 2) return upper;
  // Every value before h is not greater than a[h]: the lower middle value is their maximum.
  let lower = a[from]!;
  for (let i = from + 1; i < h; i++) if (a[i]! > lower) lower = a[i]!;
  return (lower + upper) / 2;
}
