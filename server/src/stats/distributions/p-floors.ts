/**
 * The smallest p-values the comparisons report. Tukey's and Games-Howell's p-values are 1 - CDF of the
 * studentized range (accurate to about 1e-12, see studentized-range.ts), Dunnett's 1 - CDF of its
 * multivariate t (about 1e-9 with the quadrature of dunnett.ts): a smaller difference is not resolved,
 * so the p-value is reported as the floor and shown as "< floor" (docs/json-output-comparisons.md).
 * A module of its own so that the text and report writers need none of the integrals.
 */

export const STUDENTIZED_RANGE_P_FLOOR = 1e-10;
export const DUNNETT_P_FLOOR = 1e-9;

/** The floor of a comparison method's p-values, or undefined for a method whose p-values are not floored. */
export function comparisonPFloor(method: string): number | undefined {
  if (method === "tukey" || method === "games-howell") return STUDENTIZED_RANGE_P_FLOOR;
  if (method === "dunnett") return DUNNETT_P_FLOOR;
  return undefined;
}
