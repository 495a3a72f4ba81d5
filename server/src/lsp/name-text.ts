/**
 * How a name is written back into a `.trial` file: as an identifier when it is one (and not a keyword),
 * as a number where numbers are allowed (levels), otherwise in double quotes with `\"` and `\\` escaped.
 */
import { ALL_KEYWORDS } from "../../../grammar/src/tokens.js";

const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_-]*$/;
const NUMBER = /^-?\d+(\.\d+)?([eE][+-]?\d+)?$/;
const KEYWORDS: ReadonlySet<string> = new Set(ALL_KEYWORDS);

/** The source text for `name`; `allowNumber` is true for levels, which may be written as numbers. */
export function nameToSource(name: string, allowNumber: boolean): string {
  if (IDENTIFIER.test(name) && !KEYWORDS.has(name)) return name;
  if (allowNumber && NUMBER.test(name)) return name;
  return `"${name.replace(/[\\"]/g, (c) => `\\${c}`)}"`;
}

/** Why `name` cannot be a name at all (empty, or spanning lines), or undefined when it can. */
export function invalidNameReason(name: string): string | undefined {
  if (name.trim() === "") return "A name cannot be empty.";
  if (/[\r\n]/.test(name)) return "A name must fit on one line.";
  if (name !== name.trim()) return "A name cannot start or end with spaces.";
  return undefined;
}
