/**
 * Words of a two-level design: a set of factors written as a bit mask (bit i is factor i), so that the
 * product of two effect columns of ±1 values is the symmetric difference of their words (A·A = I), i.e.
 * the bitwise exclusive or (Box & Hunter 1961, "The 2^(k-p) fractional factorial designs", part I).
 * Masks use at most 30 bits so every operation stays within 32-bit integers.
 */

/** Most factors a word can hold. */
export const MAX_WORD_FACTORS = 30;

/** The product of two words: factors appearing in exactly one of them. */
export function multiplyWords(a: number, b: number): number {
  return (a ^ b) >>> 0;
}

/** Number of factors in a word (its length, the "order" of the effect it names). */
export function wordLength(word: number): number {
  let w = word >>> 0;
  let count = 0;
  while (w !== 0) {
    w &= w - 1;
    count++;
  }
  return count;
}

/** The factor indices of a word in increasing order. */
export function wordFactors(word: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < MAX_WORD_FACTORS; i++) if ((word >>> i) & 1) out.push(i);
  return out;
}

/** The word of a list of factor indices (a repeated factor cancels, as A·A = I). */
export function wordOf(factors: readonly number[]): number {
  let w = 0;
  for (const f of factors) w = multiplyWords(w, 1 << f);
  return w >>> 0;
}

/** Words ordered for display: shorter first, then by their factors in declaration order. */
export function compareWords(a: number, b: number): number {
  const la = wordLength(a);
  const lb = wordLength(b);
  if (la !== lb) return la - lb;
  const fa = wordFactors(a);
  const fb = wordFactors(b);
  for (let i = 0; i < fa.length; i++) if (fa[i] !== fb[i]) return fa[i]! - fb[i]!;
  return 0;
}

/** A word written with factor names joined by " x " (the ANOVA source convention); "I" for the identity. */
export function wordName(word: number, names: readonly string[]): string {
  if (word === 0) return "I";
  return wordFactors(word)
    .map((i) => names[i] ?? `factor ${i + 1}`)
    .join(" x ");
}
