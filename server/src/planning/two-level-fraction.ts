/**
 * Two-level fractional factorial designs from generators (Box & Hunter 1961; Box, Hunter & Hunter 2005,
 * ch. 6): the base factors run through a full 2^k factorial in -1/+1 coding and each generated factor is
 * set to the product of its generator's columns, e.g. `fraction D = A x B x C` sets D = ABC.
 *
 * Each generator gives a word of the defining relation (I = ABCD for D = ABC); the full defining relation
 * is every product of a non-empty subset of the generator words (letters that appear twice cancel). The
 * resolution is the length of the shortest word (Box & Hunter 1961): resolution III aliases main effects
 * with two-factor interactions, IV aliases two-factor interactions with each other, V and above keep both
 * clear of each other.
 */

/** A generator: the generated factor and the factors whose product sets it, all as indices. */
export interface Generator {
  readonly generated: number;
  readonly from: readonly number[];
}

/** A word of the defining relation: sorted factor indices (the letters of the word). */
export type Word = readonly number[];

/** The product of two words: the letters in exactly one of them (x·x = I for -1/+1 columns). */
export function multiplyWords(a: Word, b: Word): number[] {
  const set = new Set(a);
  for (const x of b) {
    if (set.has(x)) set.delete(x);
    else set.add(x);
  }
  return [...set].sort((x, y) => x - y);
}

/**
 * The defining relation of the fraction: all 2^p - 1 products of the p generator words, shortest first and
 * then in lexicographic order of their letters. Empty words (from generators that repeat each other)
 * are left out; `resolution` reports such a degenerate fraction.
 */
export function definingRelation(generators: readonly Generator[]): number[][] {
  const basic = generators.map((g) => multiplyWords([g.generated], g.from));
  const words = new Map<string, number[]>();
  for (let mask = 1; mask < 1 << basic.length; mask++) {
    let word: number[] = [];
    for (let k = 0; k < basic.length; k++) if (mask & (1 << k)) word = multiplyWords(word, basic[k]!);
    if (word.length > 0) words.set(word.join(","), word);
  }
  return [...words.values()].sort((a, b) => a.length - b.length || compareWords(a, b));
}

/** The resolution: the length of the shortest word of the defining relation; undefined for a full factorial. */
export function resolution(generators: readonly Generator[]): number | undefined {
  const words = definingRelation(generators);
  return words.length === 0 ? undefined : words[0]!.length;
}

/**
 * The effects aliased with `effect` (a word) in the fraction: `effect` times each word of the defining
 * relation, e.g. for I = ABCD the alias of AB is CD.
 */
export function aliasesOf(effect: Word, generators: readonly Generator[]): number[][] {
  return definingRelation(generators).map((w) => multiplyWords(effect, w));
}

/**
 * The runs of the fraction as -1/+1 signs per factor (`factorCount` columns), base factors in standard
 * (Yates) order: the first base factor alternates fastest. Factors that are neither base nor generated
 * (none, when called by the planner) stay 0.
 */
export function fractionSigns(factorCount: number, generators: readonly Generator[]): number[][] {
  const generated = new Set(generators.map((g) => g.generated));
  const base: number[] = [];
  for (let f = 0; f < factorCount; f++) if (!generated.has(f)) base.push(f);
  const runs: number[][] = [];
  for (let r = 0; r < 1 << base.length; r++) {
    const signs = new Array<number>(factorCount).fill(0);
    base.forEach((f, k) => (signs[f] = r & (1 << k) ? 1 : -1));
    for (const g of generators) signs[g.generated] = g.from.reduce((p, f) => p * signs[f]!, 1);
    runs.push(signs);
  }
  return runs;
}

function compareWords(a: Word, b: Word): number {
  for (let k = 0; k < Math.min(a.length, b.length); k++) if (a[k] !== b[k]) return a[k]! - b[k]!;
  return a.length - b.length;
}
