/**
 * Effects and regression coefficients of a two-level design in coded units (-1 low, +1 high).
 * Method: for an effect whose column x is the product of its factors' coded columns, the effect is
 * mean(y | x = +1) - mean(y | x = -1) = 2·Σ x·y / n and the coefficient of the coded regression model is
 * half the effect (Box, Hunter & Hunter 2005, ch. 5). These are the least-squares estimates only when the
 * columns are balanced and mutually orthogonal, which is checked: otherwise no effect is reported.
 */

import { wordFactors } from "./words.js";

/** The factorial (non-centre) runs: per factor a coded column of -1 and +1, and the responses. */
export interface CodedRuns {
  readonly coded: readonly Int8Array[];
  readonly y: Float64Array;
}

/** One estimated effect. */
export interface TwoLevelEffect {
  /** The effect's word (bit i = factor i). */
  readonly word: number;
  /** mean(y at +) - mean(y at -). */
  readonly effect: number;
  /** Half the effect: the slope per coded unit. */
  readonly coefficient: number;
  /** Σ x·y: the contrast, for sums of squares (SS = contrast² / n). */
  readonly contrast: number;
  readonly ss: number;
}

export type EffectsResult =
  | { readonly ok: true; readonly n: number; readonly mean: number; readonly effects: readonly TwoLevelEffect[] }
  | { readonly ok: false; readonly reason: string };

/** The ±1 column of `word` over the runs. */
export function effectColumn(runs: CodedRuns, word: number): Int8Array {
  const n = runs.y.length;
  const col = new Int8Array(n).fill(1);
  for (const f of wordFactors(word)) {
    const c = runs.coded[f];
    if (!c) return new Int8Array(n);
    for (let r = 0; r < n; r++) col[r] = (col[r]! * c[r]!) as -1 | 1;
  }
  return col;
}

/**
 * Estimates the effects of `words` from the factorial runs. Fails with a reason when a column is not
 * balanced (as many + as - runs), when two requested columns are not orthogonal (the effects would be
 * confounded, e.g. aliased in a fraction or a run is missing), or when a code is not ±1.
 */
export function twoLevelEffects(runs: CodedRuns, words: readonly number[]): EffectsResult {
  const n = runs.y.length;
  if (n < 2) return { ok: false, reason: "at least two factorial runs are needed to estimate an effect" };
  for (const c of runs.coded) {
    if (c.length !== n) return { ok: false, reason: "every factor needs a coded value for every run" };
    for (let r = 0; r < n; r++) if (c[r] !== 1 && c[r] !== -1) return { ok: false, reason: "factorial runs must be at the low or high level of every factor" };
  }
  const columns = words.map((w) => effectColumn(runs, w));
  for (let i = 0; i < columns.length; i++) {
    if (sumOf(columns[i]!) !== 0) return { ok: false, reason: `the runs do not have as many high as low settings for effect ${i + 1}: the factorial is not balanced` };
    for (let j = 0; j < i; j++) {
      if (dot(columns[i]!, columns[j]!) !== 0) return { ok: false, reason: `effects ${j + 1} and ${i + 1} are not orthogonal in these runs (aliased or a run is missing)` };
    }
  }
  let total = 0;
  for (let r = 0; r < n; r++) total += runs.y[r]!;
  const effects = words.map((word, i) => {
    const col = columns[i]!;
    let contrast = 0;
    for (let r = 0; r < n; r++) contrast += col[r]! * runs.y[r]!;
    const effect = (2 * contrast) / n;
    return { word, effect, coefficient: effect / 2, contrast, ss: (contrast * contrast) / n };
  });
  return { ok: true, n, mean: total / n, effects };
}

function sumOf(v: Int8Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]!;
  return s;
}

function dot(a: Int8Array, b: Int8Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}
