/**
 * Small text helpers for writing run sheets into a `.trial` file: how a cell is written, the file's line
 * ends, line boundaries, natural ordering of run ids and the ids of new runs.
 */
import { ALL_KEYWORDS } from "../../../grammar/src/tokens.js";

const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_-]*$/;
const NUMBER = /^-?\d+(\.\d+)?([eE][+-]?\d+)?$/;
const KEYWORDS: ReadonlySet<string> = new Set(ALL_KEYWORDS);

/**
 * A runs-table cell for `text`: bare when it is an identifier that is not a keyword, or a number; otherwise
 * quoted with `\"` and `\\` escaped. Keywords are quoted because a bare `excluded` starts an exclusion mark
 * and a bare top-level keyword at the start of a line would end the table.
 */
export function cellSource(text: string): string {
  if ((IDENTIFIER.test(text) && !KEYWORDS.has(text)) || NUMBER.test(text)) return text;
  return `"${text.replace(/[\\"]/g, (c) => `\\${c}`)}"`;
}

/** The document's line end: `\r\n` when its first line break is one, else `\n`. */
export function lineEnding(text: string): string {
  const n = text.indexOf("\n");
  return n > 0 && text.charCodeAt(n - 1) === 13 ? "\r\n" : "\n";
}

/** Offset of the first character of the line holding `offset`. */
export function lineStartAt(text: string, offset: number): number {
  return text.lastIndexOf("\n", offset - 1) + 1;
}

/** Offset of the end of the line holding `offset`, before its `\n` or `\r\n` (or the end of the text). */
export function lineEndAt(text: string, offset: number): number {
  const n = text.indexOf("\n", offset);
  if (n < 0) return text.length;
  return n > 0 && text.charCodeAt(n - 1) === 13 ? n - 1 : n;
}

/** Offset of the start of the line after the one holding `offset` (the text's length on the last line). */
export function nextLineStart(text: string, offset: number): number {
  const n = text.indexOf("\n", offset);
  return n < 0 ? text.length : n + 1;
}

/**
 * Compares run ids so that digit runs compare by value ("r9" before "r10"), other characters by UTF-16
 * code unit: the same order on every machine (no locale).
 */
export function compareNatural(a: string, b: string): number {
  const pa = a.match(/\d+|\D+/g) ?? [];
  const pb = b.match(/\d+|\D+/g) ?? [];
  for (let k = 0; k < Math.min(pa.length, pb.length); k++) {
    const x = pa[k]!;
    const y = pb[k]!;
    const dx = /^\d/.test(x);
    const dy = /^\d/.test(y);
    if (dx && dy) {
      const nx = x.replace(/^0+(?=\d)/, "");
      const ny = y.replace(/^0+(?=\d)/, "");
      if (nx.length !== ny.length) return nx.length - ny.length;
      if (nx !== ny) return nx < ny ? -1 : 1;
      if (x.length !== y.length) return x.length - y.length;
    } else if (x !== y) {
      return x < y ? -1 : 1;
    }
  }
  if (pa.length !== pb.length) return pa.length - pb.length;
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * `count` new run ids that continue the file's numbering: the most common prefix among ids of the form
 * PREFIX + digits ("r" when there are none), numbered on from the largest number with that prefix, zero
 * padded like the widest such id (a fresh numbering "r01", "r02" ... is padded to the digits the count
 * needs, at least two), skipping any id already in use.
 */
export function newRunIds(existing: readonly string[], count: number): string[] {
  const used = new Set(existing);
  // The numbers as BigInt: an id may carry more digits than a double holds exactly (or at all: a number of
  // 400 nines is Infinity as a double, and the next id would have read "rInfinity").
  const byPrefix = new Map<string, { n: number; max: bigint; width: number }>();
  for (const id of existing) {
    const m = /^(.*?)(\d+)$/.exec(id);
    if (!m) continue;
    const entry = byPrefix.get(m[1]!) ?? { n: 0, max: 0n, width: 0 };
    entry.n++;
    const number = BigInt(m[2]!);
    if (number > entry.max) entry.max = number;
    entry.width = Math.max(entry.width, m[2]!.length);
    byPrefix.set(m[1]!, entry);
  }
  let prefix = "r";
  let best = { n: 0, max: 0n, width: 0 };
  for (const [p, e] of byPrefix) if (e.n > best.n || (e.n === best.n && p < prefix)) [prefix, best] = [p, e];
  // A fresh numbering is as wide as the largest id needs; an existing one keeps its own padding.
  const width = best.n > 0 ? best.width : Math.max(2, String(count).length);
  const out: string[] = [];
  let next = best.max + 1n;
  while (out.length < count) {
    const id = prefix + String(next++).padStart(width, "0");
    if (!used.has(id)) out.push(id);
  }
  return out;
}
