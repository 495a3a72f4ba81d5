/**
 * `locateOffsets` (server/src/cli/locate-offsets.ts) against the editor's reference, `LineIndex.positionAt`
 * (grammar/src/line-index.ts, the Language Server Protocol's rules: `\r\n`, `\n` and a lone `\r` break
 * lines), on random texts with every kind of break, offsets in any order, out of range and not whole, and
 * texts longer than the character loop's limit so that the jumps between breaks are exercised.
 */

import assert from "node:assert/strict";
import fc from "fast-check";
import { LineIndex } from "../../grammar/src/line-index.js";
import { locateOffsets } from "../../server/src/cli/locate-offsets.js";

const PIECES = ["a", "bc", "\n", "\r", "\r\n", "\n\r", "é", "  r1 a1 b2 | 3.5"];

function textOf(choices: readonly number[]): string {
  return choices.map((c) => PIECES[c % PIECES.length]).join("");
}

function expected(text: string, offsets: readonly number[]) {
  const index = new LineIndex(text);
  return offsets.map((o) => index.positionAt(o));
}

describe("locateOffsets", () => {
  it("equals LineIndex.positionAt on random short texts with CR, LF and CRLF", () => {
    fc.assert(
      fc.property(fc.array(fc.nat(), { maxLength: 200 }), fc.array(fc.oneof(fc.integer({ min: -5, max: 3000 }), fc.double({ min: -2, max: 3000 }), fc.constant(Number.NaN)), { maxLength: 20 }), (choices, offsets) => {
        const text = textOf(choices);
        assert.deepEqual(locateOffsets(text, offsets), expected(text, offsets));
      }),
      { numRuns: 500 },
    );
  });

  it("equals LineIndex.positionAt on long texts (jumps between breaks), with and without lone CRs", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2 ** 31 - 1 }), fc.constantFrom(0, 1, 2), fc.array(fc.nat(), { minLength: 1, maxLength: 12 }), (seed, kind, picks) => {
        let s = seed;
        const next = () => ((s = (s * 48271) % 2147483647), s);
        const parts: string[] = [];
        let length = 0;
        while (length < 200_000) {
          const r = next() % 100;
          // kind 0: LF only; 1: CRLF; 2: mixed, rare lone CRs.
          const piece = r < 85 ? "  r1 a1 b2 | 3.5" : kind === 0 ? "\n" : kind === 1 ? "\r\n" : r < 95 ? "\n" : r < 98 ? "\r\n" : "\r";
          parts.push(piece);
          length += piece.length;
        }
        const text = parts.join("");
        const offsets = picks.map((p) => p % (text.length + 10));
        offsets.push(text.length, text.length - 1, 70_000);
        assert.deepEqual(locateOffsets(text, offsets), expected(text, offsets));
      }),
      { numRuns: 40 },
    );
  });

  it("places an offset on the LF of a CRLF on the line the CR ends, and one after a final CR on a new line", () => {
    const text = "ab\r\ncd\rx\r";
    // a0 b1 \r2 \n3 c4 d5 \r6 x7 \r8, length 9; offset 10 is clamped to 9.
    assert.deepEqual(locateOffsets(text, [3, 4, 7, 8, 9, 10]), [
      { line: 0, character: 3 },
      { line: 1, character: 0 },
      { line: 2, character: 0 },
      { line: 2, character: 1 },
      { line: 3, character: 0 },
      { line: 3, character: 0 },
    ]);
    assert.deepEqual(locateOffsets(text, [3, 4, 7, 8, 9, 10]), expected(text, [3, 4, 7, 8, 9, 10]));
  });
});
