/**
 * Latin squares for designs with two blocking factors and one treatment factor of the same size t.
 *
 * Construction: the cyclic square L[i][j] = (i + j) mod t, which is Latin for every t ≥ 1 (each row and each
 * column is a cyclic shift of 0 .. t-1). Randomization as Fisher & Yates (1938) prescribe for the standard
 * square: independent random permutations of the rows, of the columns and of the symbols. Every such
 * permutation keeps the square Latin. Note: for t ≥ 4 this does not draw uniformly from all Latin squares
 * of order t (only from those isotopic to the cyclic one); it randomizes the assignment of treatments to
 * rows and columns, which is what protects the comparison (Cochran & Cox 1957, §4.2).
 */
import { type PlanRandom, randomPermutation } from "./seeded-random.js";

/** A t × t array of symbols 0 .. t-1: `square[row][column]`. */
export type LatinSquare = readonly (readonly number[])[];

/** The cyclic Latin square of order `t`: `(row + column) mod t`. */
export function cyclicLatinSquare(t: number): number[][] {
  return Array.from({ length: t }, (_, i) => Array.from({ length: t }, (_, j) => (i + j) % t));
}

/**
 * A randomized Latin square of order `t`: the cyclic square with its rows, columns and symbols each permuted
 * at random (drawn in that order from `random`, which pins the result for a seed).
 */
export function randomLatinSquare(t: number, random: PlanRandom): number[][] {
  const base = cyclicLatinSquare(t);
  const rows = randomPermutation(t, random);
  const columns = randomPermutation(t, random);
  const symbols = randomPermutation(t, random);
  return rows.map((r) => columns.map((c) => symbols[base[r]![c]!]!));
}

/** True when every symbol 0 .. t-1 appears exactly once in every row and every column of `square`. */
export function isLatinSquare(square: LatinSquare): boolean {
  const t = square.length;
  for (let i = 0; i < t; i++) {
    if (square[i]!.length !== t) return false;
    const inRow = new Set<number>();
    const inColumn = new Set<number>();
    for (let j = 0; j < t; j++) {
      inRow.add(square[i]![j]!);
      inColumn.add(square[j]![i]!);
    }
    if (inRow.size !== t || inColumn.size !== t) return false;
    for (const s of inRow) if (!(s >= 0 && s < t && Number.isInteger(s))) return false;
    for (const s of inColumn) if (!(s >= 0 && s < t && Number.isInteger(s))) return false;
  }
  return true;
}
