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
  const n = new Float64Array(count);
  const sum = new Float64Array(count);
  let total = 0;
  let used = 0;
  for (let i = 0; i < values.length; i++) {
    n[codes[i]!]!++;
    sum[codes[i]!] += values[i]!;
    total += values[i]!;
    used++;
  }
  const k = n.filter((x) => x > 0).length;
  const grand = total / used;
  let between = 0;
  for (let g = 0; g < count; g++) if (n[g]! > 0) between += n[g]! * (sum[g]! / n[g]! - grand) ** 2;
  let within = 0;
  for (let i = 0; i < values.length; i++) within += (values[i]! - sum[codes[i]!]! / n[codes[i]!]!) ** 2;
  const df1 = k - 1;
  const df2 = used - k;
  if (df1 < 1 || df2 < 1) return null;
  // No spread within groups (up to rounding, relative to the total): F is undefined, not huge.
  if (!(within > 1e-12 * (within + between))) return null;
  const statistic = between / df1 / (within / df2);
  return { statistic, df1, df2, p: fUpperTail(statistic, df1, df2) };
}
