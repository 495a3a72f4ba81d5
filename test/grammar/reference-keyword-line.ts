/**
 * The former line test of `tokens.ts` (kept as a reference for tests): whether a line starts, after
 * spaces, tabs and byte-order marks, with a top-level keyword as a whole word. It cut the word out of the
 * text and looked it up in a set. (The byte-order mark joined the blanks on 2026-12-02, in the product and
 * here alike: a fuzzed document showed formatting turn a BOM-prefixed `trial` line inside a table into the
 * end of the table.)
 */
import { TOP_LEVEL_KEYWORDS } from "../../grammar/src/tokens.js";

const TOP_LEVEL_SET: ReadonlySet<string> = new Set(TOP_LEVEL_KEYWORDS);
const CH_SPACE = 32;
const CH_TAB = 9;
const CH_BOM = 0xfeff;

function isWordChar(c: number): boolean {
  return (
    (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || (c >= 48 && c <= 57) || c === 95 || c === 45 // a-z A-Z 0-9 _ -
  );
}

/** The former `lineStartsWithTopLevelKeyword`. */
export function lineStartsWithTopLevelKeywordReference(text: string, lineStart: number): boolean {
  let p = lineStart;
  const n = text.length;
  let c = p < n ? text.charCodeAt(p) : -1;
  while (c === CH_SPACE || c === CH_TAB || c === CH_BOM) {
    p++;
    c = p < n ? text.charCodeAt(p) : -1;
  }
  // Every top-level keyword starts with one of these lowercase letters: a cheap filter for data rows.
  if (c !== 116 && c !== 111 && c !== 100 && c !== 99 && c !== 114 && c !== 102 && c !== 112) return false;
  const wordStart = p;
  while (p < n && isWordChar(text.charCodeAt(p))) p++;
  const length = p - wordStart;
  if (length < 4 || length > 10) return false;
  return TOP_LEVEL_SET.has(text.slice(wordStart, p));
}
