/**
 * The one-way ANOVA F test on grouped values, the core of Levene's and the Brown-Forsythe test.
 */

import { fUpperTail } from "../distributions/f-distribution.js";

/** An F test result. */
export interface FTest {
  readonly statistic: number;
  readonly df1: number;
  readonly df2: number;
  readonly p: number;
}

/** One-way ANOVA F of `values` grouped by `codes` (0..count-1); null when undefined (no spread, too few groups or runs). */
export function oneWayF(values: ArrayLike<number>, codes: ArrayLike<number>, count: number): FTest | null {
  const size = new Int32Array(count);
  const sum = new Float64Array(count);
  let total = 0;
  for (let i = 0; i < values.length; i++) {
    const g = codes[i]!;
    size[g]!++;
    sum[g] += values[i]!;
    total += values[i]!;
  }
  // Each group mean is formed once (the same division gives the same value for every observation).
  const mean = new Float64Array(count);
  for (let g = 0; g < count; g++) mean[g] = sum[g]! / size[g]!;
  let within = 0;
  for (let i = 0; i < values.length; i++) within += (values[i]! - mean[codes[i]!]!) ** 2;
  return fTestFromSums(size, sum, total, values.length, within);
}

/**
 * The F test from the group sizes and sums of `used` values, their total (summed in observation order) and
 * the within-group sum of squares: the between-group sum of squares is Σ n_g (mean_g - grand mean)².
 * Null when undefined (fewer than two groups, no residual df, or no spread within the groups).
 */
export function fTestFromSums(size: ArrayLike<number>, sum: ArrayLike<number>, total: number, used: number, within: number): FTest | null {
  let k = 0;
  for (let g = 0; g < size.length; g++) if (size[g]! > 0) k++;
  const grand = total / used;
  let between = 0;
  for (let g = 0; g < size.length; g++) if (size[g]! > 0) between += size[g]! * (sum[g]! / size[g]! - grand) ** 2;
  const df1 = k - 1;
  const df2 = used - k;
  if (df1 < 1 || df2 < 1) return null;
  // No spread within groups (up to rounding, relative to the total): F is undefined, not huge.
  if (!(within > 1e-12 * (within + between))) return null;
  const statistic = between / df1 / (within / df2);
  return { statistic, df1, df2, p: fUpperTail(statistic, df1, df2) };
}
