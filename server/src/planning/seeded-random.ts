/**
 * The one source of randomness for planning: a seeded xoroshiro128+ generator (Blackman & Vigna 2018,
 * "Scrambled linear pseudorandom number generators", parameters a = 24, b = 16, c = 37) from pure-rand 6,
 * advanced once by its jump function (see `planRandom`), with integers drawn by pure-rand's `unsafeUniformIntDistribution` (rejection sampling, so every value of
 * a range is equally likely) and permutations by the Fisher–Yates shuffle (Knuth 1997, TAOCP vol. 2,
 * §3.4.2, Algorithm P).
 *
 * Pinned on purpose: the run sheet written into a file must come out the same on every machine and in
 * every version of Trialbook, because `plan seed N` is all the file records. Changing the generator, its
 * seeding, the distribution or the order in which the planner draws numbers changes every run sheet ever
 * planned; test/planning/seeded-random.test.ts and the fixed-order tests fail when that happens, and such a
 * change needs a new seed scheme rather than an edit here.
 */
import { unsafeUniformIntDistribution, xoroshiro128plus, type RandomGenerator } from "pure-rand";

/** A mutable seeded generator; each draw advances it. */
export interface PlanRandom {
  /** A uniformly distributed integer in `[from, to]` (both included; `from <= to`). */
  readonly int: (from: number, to: number) => number;
}

/** The largest seed the planner takes as is; larger whole numbers are folded into 32 bits (see `seedWord`). */
export const MAX_PLAIN_SEED = 0xffff_ffff;

/**
 * The 32-bit word pure-rand's `xoroshiro128plus(seed)` is seeded with. Seeds up to 2^32 - 1 map to
 * themselves (as a signed 32-bit integer); a larger seed is folded by XOR of its high and low 32-bit halves,
 * so two seeds can then share a sequence (documented; generated seeds stay below 2^31).
 */
export function seedWord(seed: number): number {
  const whole = Math.floor(Math.abs(seed));
  const low = whole % 0x1_0000_0000;
  const high = Math.floor(whole / 0x1_0000_0000);
  return (low ^ high) | 0;
}

/**
 * A generator for `seed` (a whole number; see `seedWord` for seeds of 2^32 and above). pure-rand seeds the
 * 128-bit state directly from the 32-bit word, so the first outputs of xoroshiro128+ are simple functions
 * of the seed (the very first is the low word of s0 + s1, i.e. the complement of the seed, for every seed);
 * so the state is first advanced by the generator's jump function (2^64 steps, Blackman & Vigna 2018),
 * which mixes every bit of the seed into the state.
 */
export function planRandom(seed: number): PlanRandom {
  const rng: RandomGenerator = xoroshiro128plus(seedWord(seed)).jump!();
  return { int: (from, to) => unsafeUniformIntDistribution(from, to, rng) };
}

/** Shuffles `items` in place by Fisher–Yates, drawing `j` in `[0, i]` for `i` from the last index down. */
export function shuffleInPlace<T>(items: T[], random: PlanRandom): T[] {
  for (let i = items.length - 1; i > 0; i--) {
    const j = random.int(0, i);
    const t = items[i]!;
    items[i] = items[j]!;
    items[j] = t;
  }
  return items;
}

/** A uniformly random permutation of `0 .. n-1` (Fisher–Yates on the identity). */
export function randomPermutation(n: number, random: PlanRandom): number[] {
  return shuffleInPlace(
    Array.from({ length: n }, (_, i) => i),
    random,
  );
}
