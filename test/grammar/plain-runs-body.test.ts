/**
 * The quick pass over a runs-table body (`plain-runs-body.ts`): wherever it calls a body plain, the full
 * row scanner (`scanRunsTable`, itself checked against the former two-pass path in runs-one-pass.test.ts)
 * must find the same end, the same rows and no problem inside a row; and the bodies a run sheet is made
 * of must be called plain, or the large-file path would never be taken.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { parseTrial } from "../../grammar/src/parse.js";
import { type PlainRunsBody, scanPlainRunsBody, withQuickPassContinuation } from "../../grammar/src/plain-runs-body.js";
import { scanRunsTable } from "../../grammar/src/runs-scanner.js";
import { TOP_LEVEL_KEYWORDS } from "../../grammar/src/top-level-keywords.js";

/** Checks the quick pass against the scanner on `text` from `start`; returns whether it was plain. */
function agreesWithScanner(text: string, start: number, limit?: number): boolean {
  const plain = scanPlainRunsBody(text, start, limit);
  const scan = scanRunsTable(text, start, limit);
  if (plain === undefined) return false;
  assert.equal(plain.end, scan.end, "end of the body");
  assert.equal(plain.rowCount, scan.rows.count, "rows");
  assert.equal(plain.rowsWithPipe, scan.rowsWithPipe, "rows with '|'");
  assert.equal(plain.lastRowEnd, scan.rows.count > 0 ? scan.rows.rowEnd[scan.rows.count - 1] : -1, "end of the last row");
  assert.deepEqual(scan.rowProblems, [], "a plain body has no problem inside a row");
  return true;
}

const HEADER = "runs id a b | y";

const cell = fc.oneof(
  { weight: 10, arbitrary: fc.constantFrom("r1", "a2", "x", "17.5", "-3e2", "?", "elephant", "e1234567", "é") },
  { weight: 2, arbitrary: fc.constantFrom(...TOP_LEVEL_KEYWORDS, "runs-2", "plans", "Factor") },
  { weight: 1, arbitrary: fc.constantFrom('"q"', 'x"y', "excluded", 'excluded "why"') },
  { weight: 3, arbitrary: fc.constantFrom("|", "#", "# note | x", "# \r note", '# "q" note', "# excluded", 'x#"') },
);
const gap = fc.constantFrom(" ", "  ", "\t", " \uFEFF");
const line = fc
  .tuple(fc.constantFrom("", "  ", "\t", "\uFEFF"), fc.array(fc.tuple(cell, gap), { maxLength: 6 }))
  .map(([lead, cells]) => lead + cells.map(([c, g]) => c + g).join(""));
const lineBreak = fc.constantFrom("\n", "\n", "\r\n", "\r", "\n\n");
/** Random runs bodies: plain-looking rows with keywords, quotes, comments and odd line breaks mixed in. */
const randomBody = fc.tuple(fc.constantFrom("\n", "\r\n", "\r"), fc.array(fc.tuple(line, lineBreak), { maxLength: 12 }), fc.constantFrom("", "\n", "  "));

describe("plain runs bodies (the quick pass)", () => {
  it("calls the usual run sheets plain: LF or CRLF, blank lines, comments, tabs, a '|', quote or 'excluded' in a comment", () => {
    const bodies = [
      "\n  r1 a1 b1 | 20.5\n  r2 a2 b2 | 21\n",
      "\r\n  r1 a1 b1 | 20.5\r\n\r\n  r2 a2 b2 | 21\r\n",
      "\n# shift 2 | night\n  r1\ta1\tb1\t|\t20.5   # re-measured\n\n  r2 a2 b2 | 21",
      "\n  r1 a1 b1 | 20.5\nconclusion \"done\"\n",
      "\n  r1 a1 b1 | 20.5\n  \uFEFFfactor c levels c1, c2\n",
      '\n# exported by "logger v2"; excluded runs were removed | none\n  r1 a1 b1 | 20.5 # "re-measured"\n',
      "\n",
      "\n\n\n",
    ];
    for (const body of bodies) assert.equal(agreesWithScanner(HEADER + body, HEADER.length), true, JSON.stringify(body));
    const f = parseTrial(`${HEADER}\n  r1 a1 b1 | 20.5\n  r2 a2 b2 | 21 # note\n`);
    assert.deepEqual(f.runs!.plainBody, { start: HEADER.length, end: f.source.length });
    assert.equal(f.runs!.rowCount, 2);
    assert.deepEqual(f.runs!.span, { start: 0, end: f.source.indexOf(" # note") });
  });

  it("declines bodies with quotes or 'excluded' in a row, a second '|' or a lone CR, and the parser reads them in full", () => {
    const bodies = [
      '\n  r1 "a 1" b1 | 20.5\n',
      '\n  r1 a1 b1 | 20.5 excluded "probe slipped"\n',
      "\n  r1 a1 b1 | 20.5 | 3\n",
      "\n  r1 a1 b1 | 20.5\r  r2 a2 b2 | 21\n",
      '\n  r1 a1 b1 | 20.5 excluded # "why" in a comment\n',
      "\n  r1 a1 b1 | 20.5\n  r2 notexcluded b2 | 21\n",
    ];
    for (const body of bodies) {
      assert.equal(scanPlainRunsBody(HEADER + body, HEADER.length), undefined, JSON.stringify(body));
      assert.equal(parseTrial(HEADER + body).runs!.plainBody, undefined);
    }
    // Plain, but its rows disagree with the header about '|': read in full for the problems' places.
    const f = parseTrial("runs id a b | y\n  r1 a1 b1 20.5\n");
    assert.equal(f.runs!.plainBody, undefined);
    assert.equal(f.problems.length, 1);
  });

  it("builds the rows of a plain body only when asked, the same rows the scanner reads", () => {
    const text = `${HEADER}\n  r1 a1 b1 | 20.5\n  r2 a2 b2 | 21\n`;
    const f = parseTrial(text);
    const scan = scanRunsTable(text, HEADER.length);
    assert.ok(f.runs!.plainBody);
    assert.deepEqual(Array.from(f.runs!.rows.cellStart), Array.from(scan.rows.cellStart));
    assert.equal(f.runs!.rows, f.runs!.rows, "built once");
  });

  it("takes another thread's facts from a line feed on (a continuation) with the same result as reading on", () => {
    const checked = { joined: 0, declined: 0 };
    fc.assert(
      fc.property(randomBody, ([first, lines, tail]) => {
        const text = `${HEADER}${first}${lines.map(([l, b]) => l + b).join("")}${tail}`;
        const alone = scanPlainRunsBody(text, HEADER.length);
        for (let at = text.indexOf("\n", HEADER.length + 1); at >= 0; at = text.indexOf("\n", at + 1)) {
          let asked = 0;
          const facts = () => {
            asked++;
            return scanPlainRunsBody(text.slice(at), 0, undefined, 0);
          };
          const joined = withQuickPassContinuation({ at, length: text.length, facts }, () => scanPlainRunsBody(text, HEADER.length));
          const strip = (p: PlainRunsBody | undefined) => p && { end: p.end, rowCount: p.rowCount, rowsWithPipe: p.rowsWithPipe, lastRowEnd: p.lastRowEnd };
          assert.deepEqual(strip(joined), strip(alone), `continuation at ${at}`);
          if (asked === 0) continue;
          if (joined === undefined) checked.declined++;
          else {
            checked.joined++;
            // The middle row: the one this thread found before the line feed, else the first row after it.
            const rows = scanRunsTable(text, HEADER.length).rows;
            if (alone!.middleRow >= 0 && alone!.middleOffset <= at) {
              assert.deepEqual([joined.middleRow, joined.middleOffset], [alone!.middleRow, alone!.middleOffset]);
            } else if (joined.middleRow >= 0) {
              assert.ok(rows.rowStart[joined.middleRow]! > at && (joined.middleRow === 0 || rows.rowStart[joined.middleRow - 1]! < at));
              assert.equal(text.lastIndexOf("\n", rows.rowStart[joined.middleRow]! - 1) + 1, joined.middleOffset);
            }
          }
          // Facts that are not available (the thread failed): read on here, the same result as alone.
          const unavailable = withQuickPassContinuation({ at, length: text.length, facts: () => null }, () => scanPlainRunsBody(text, HEADER.length));
          assert.deepEqual(unavailable, alone);
        }
      }),
      { numRuns: 400, seed: 20261205 },
    );
    assert.ok(checked.joined > 100 && checked.declined > 20, JSON.stringify(checked));
    // Outside `withQuickPassContinuation`, nothing is continued.
    const text = `${HEADER}\n  r1 a1 b1 | 1\n  r2 a2 b2 | 2\n`;
    assert.deepEqual(scanPlainRunsBody(text, HEADER.length), withQuickPassContinuation(undefined, () => scanPlainRunsBody(text, HEADER.length)));
  });

  it("agrees with the scanner on random bodies, and finds most plain-looking ones plain", () => {
    let plain = 0;
    let runs = 0;
    fc.assert(
      fc.property(randomBody, fc.double({ min: 0, max: 1, noNaN: true }), ([first, lines, tail], cut) => {
        const text = `${HEADER}${first}${lines.map(([l, b]) => l + b).join("")}${tail}`;
        runs++;
        if (agreesWithScanner(text, HEADER.length)) plain++;
        agreesWithScanner(text, HEADER.length, HEADER.length + Math.floor((text.length - HEADER.length) * cut));
      }),
      { numRuns: 1500, seed: 20261203 },
    );
    // The generator is built so that plain and declined bodies both occur often.
    assert.ok(plain > runs / 10 && plain < runs, `${plain} of ${runs} plain`);
  });
});
