/**
 * The top-level keywords of the `.trial` language and the test for a line that starts with one.
 *
 * Kept apart from `tokens.ts` so that the runs-table scanner (which `tokens.ts` runs from inside the
 * lexer) can use the line test without an import cycle. `tokens.ts` re-exports everything here.
 */
import { Char } from "./char-codes.js";

/** Top-level keywords: they start a declaration and are reserved everywhere (quote a name equal to one). */
export const TOP_LEVEL_KEYWORDS = [
  "trial",
  "owner",
  "date",
  "conjecture",
  "conclusion",
  "response",
  "factor",
  "covariate",
  "plan",
  "runs",
] as const;

const TOP_LEVEL_SET: ReadonlySet<string> = new Set(TOP_LEVEL_KEYWORDS);

/** True when `word` is a top-level keyword (`trial`, `factor`, `runs`, ...). */
export function isTopLevelKeyword(word: string): boolean {
  return TOP_LEVEL_SET.has(word);
}


/**
 * The top-level keywords grouped by first character (ASCII code), so the line test compares a word with
 * at most three candidates and never cuts a substring: it runs once per line of a runs table, a million
 * times on a large file, and most lines start with a run id, not a keyword.
 */
const BY_FIRST_CHAR: (readonly string[] | undefined)[] = (() => {
  // Filled to 128 entries, so a look-up never reads past the array's end (a slow path in the engine).
  const table: (string[] | undefined)[] = new Array<string[] | undefined>(128).fill(undefined);
  for (const word of TOP_LEVEL_KEYWORDS) (table[word.charCodeAt(0)] ??= []).push(word);
  return table;
})();

/**
 * One byte per pair of ASCII characters, set where a top-level keyword starts with that pair: the first
 * check of a line, which a run id (`r1`, `s17`...) fails at its second character with one table load.
 */
const FIRST_PAIRS: Uint8Array = (() => {
  const table = new Uint8Array(128 * 128);
  for (const word of TOP_LEVEL_KEYWORDS) table[(word.charCodeAt(0) << 7) | word.charCodeAt(1)] = 1;
  return table;
})();

/** Letters, digits, `_` and `-`: the characters of a word for the keyword test. */
function isWordChar(c: number): boolean {
  return (
    (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || (c >= 48 && c <= 57) || c === 95 || c === 45 // a-z A-Z 0-9 _ -
  );
}

/**
 * True when the word at `p` (a letter, digit, `_` or `-` run starting at `p`) is a top-level keyword.
 * Compares in place with the at most three keywords that share its first character, so a line that
 * starts with a run id costs a table load and a failed comparison, and no substring is cut.
 */
export function isTopLevelKeywordAt(text: string, p: number): boolean {
  const c = text.charCodeAt(p);
  const d = text.charCodeAt(p + 1);
  // Both characters ASCII and a pair some keyword starts with (past the end, charCodeAt gives NaN, which
  // the bit operations read as 0: no keyword has that character).
  if (!((c | d) < 128) || FIRST_PAIRS[(c << 7) | d] === 0) return false;
  const candidates = BY_FIRST_CHAR[c];
  if (candidates === undefined) return false;
  for (let i = 0; i < candidates.length; i++) {
    // Character by character (the first is known to match): cheaper than a `startsWith` call here, and
    // a data row's id fails at its second character. Past the end of `text`, charCodeAt gives NaN,
    // which matches nothing and is no word character.
    const word = candidates[i]!;
    const length = word.length;
    let j = 1;
    while (j < length && text.charCodeAt(p + j) === word.charCodeAt(j)) j++;
    if (j === length && !isWordChar(text.charCodeAt(p + length))) return true;
  }
  return false;
}

/**
 * If the line starting at `lineStart` begins (after spaces, tabs and byte-order marks, the blanks of the
 * lexer) with a top-level keyword as a whole word, returns true. Used to find where a runs table or an
 * unterminated text block ends.
 */
export function lineStartsWithTopLevelKeyword(text: string, lineStart: number): boolean {
  let p = lineStart;
  const n = text.length;
  let c = p < n ? text.charCodeAt(p) : -1;
  while (c === Char.Space || c === Char.Tab || c === Char.BOM) {
    p++;
    c = p < n ? text.charCodeAt(p) : -1;
  }
  return p < n && isTopLevelKeywordAt(text, p);
}
