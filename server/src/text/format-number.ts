/**
 * Number formatting for people: shared by the CLI, the editor and reports. Never prints NaN or Infinity:
 * a missing value is shown as an em dash.
 */

/** Shown where a value is null or not finite. */
export const MISSING = "—";

/** A statistic with `digits` significant digits, without exponent for ordinary magnitudes. */
export function formatNumber(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return MISSING;
  if (value === 0) return "0";
  const magnitude = Math.abs(value);
  if (magnitude >= 1e-4 && magnitude < 1e9) {
    const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
    return stripZeros(value.toFixed(Math.min(decimals, 12)));
  }
  return value.toExponential(digits - 1).replace(/\.?0+e/, "e");
}

/** A sum of squares or mean square: fixed significant digits, keeping trailing zeros out. */
export function formatStatistic(value: number | null | undefined): string {
  return formatNumber(value, 5);
}

/** A p-value: four decimals down to 0.001, then two significant digits in exponent form (2.8e-22). */
export function formatP(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return MISSING;
  if (p >= 0.001) return p.toFixed(4);
  if (p === 0) return "< 1e-300";
  return p.toExponential(1);
}

/**
 * A p-value that a method reports at `floor` when it is smaller (a comparison computed as 1 - CDF, see
 * `comparisonPFloor`): the floor itself is shown as "< 1e-10", not as a value; others as `formatP`.
 */
export function formatPAtFloor(p: number | null | undefined, floor: number | undefined): string {
  return floor !== undefined && p === floor ? `< ${floor.toExponential(0)}` : formatP(p);
}

/** "p = 0.0007", or "p < 1e-300" when the upper tail underflows a double. */
export function pClause(p: number | null | undefined): string {
  return p === 0 ? "p < 1e-300" : `p = ${formatP(p)}`;
}

/** An F statistic: two decimals for ordinary values. */
export function formatF(f: number | null | undefined): string {
  if (f === null || f === undefined || !Number.isFinite(f)) return MISSING;
  if (Math.abs(f) >= 1e6) return f.toExponential(2);
  return f.toFixed(2);
}

function stripZeros(text: string): string {
  return text.includes(".") ? text.replace(/\.?0+$/, "") : text;
}
