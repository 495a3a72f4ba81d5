/**
 * The runs-table accessors, the line index, and a linearity check of the row scanner (not timed: the
 * benchmark suite times it). Expected values are read off the test text by hand.
 */
import assert from "node:assert/strict";
import {
  CellFlag,
  cellText,
  findRowAt,
  isPendingCell,
  LineIndex,
  parseTrial,
  rowCellCount,
  rowCellIndex,
} from "../../grammar/src/index.js";

describe("runs table accessors", () => {
  const text = 'runs id a | y z\n  r1 "x \\"q\\"" | ? 2.5   # note\n  # comment\n\n  r2 b | "?" 3 excluded "slip"\n';
  const f = parseTrial(text);
  const rows = f.runs!.rows;

  it("counts rows and cells, and finds cells by position", () => {
    assert.deepEqual(f.problems, []);
    assert.equal(rows.count, 2);
    assert.equal(rowCellCount(rows, 0), 4);
    assert.equal(rowCellCount(rows, 1), 4);
    assert.equal(rowCellIndex(rows, 1, 0), 4);
    assert.equal(rowCellIndex(rows, 1, 4), -1);
    assert.equal(rowCellIndex(rows, 0, -1), -1);
    assert.deepEqual(Array.from(rows.pipeCell), [2, 2]);
  });

  it("unquotes cells and tells pending '?' from a quoted \"?\"", () => {
    assert.equal(cellText(text, rows, 1), 'x "q"');
    assert.equal(rows.cellFlags[1], CellFlag.Quoted);
    assert.equal(isPendingCell(text, rows, 2), true);
    assert.equal(cellText(text, rows, 6), "?");
    assert.equal(isPendingCell(text, rows, 6), false);
    assert.equal(isPendingCell(text, rows, 3), false);
  });

  it("row spans end at the last cell or the excluded mark, before a comment", () => {
    assert.equal(text.slice(rows.rowStart[0]!, rows.rowEnd[0]!), 'r1 "x \\"q\\"" | ? 2.5');
    assert.equal(text.slice(rows.rowStart[1]!, rows.rowEnd[1]!), 'r2 b | "?" 3 excluded "slip"');
    assert.equal(rows.excluded.get(1)?.reason?.text, "slip");
    assert.equal(rows.excluded.has(0), false);
  });

  it("findRowAt: binary search, end inclusive, -1 between rows", () => {
    assert.equal(findRowAt(rows, rows.rowStart[0]!), 0);
    assert.equal(findRowAt(rows, rows.rowEnd[0]!), 0);
    assert.equal(findRowAt(rows, rows.rowEnd[0]! + 2), -1);
    assert.equal(findRowAt(rows, text.indexOf("slip")), 1);
    assert.equal(findRowAt(rows, 0), -1);
    assert.equal(findRowAt(rows, text.length + 5), -1);
  });

  it("a generated 100,000-row table: every row read, cells in typed arrays of exact length", () => {
    const lines = ["runs id temp line | strength"];
    for (let i = 0; i < 100_000; i++) lines.push(`  r${i} ${150 + (i % 3) * 25} ${i % 2 ? "north" : "south"} | ${(20 + (i % 7) * 0.1).toFixed(1)}`);
    const big = lines.join("\n") + "\n";
    const parsed = parseTrial(big);
    assert.deepEqual(parsed.problems, []);
    const r = parsed.runs!.rows;
    assert.equal(r.count, 100_000);
    assert.equal(r.cellStart.length, 400_000);
    assert.equal(r.cellOffset.length, 100_001);
    assert.ok(r.cellStart instanceof Int32Array);
    assert.equal(cellText(big, r, rowCellIndex(r, 99_999, 0)), "r99999");
    assert.equal(cellText(big, r, rowCellIndex(r, 99_999, 3)), (20 + (99_999 % 7) * 0.1).toFixed(1));
    assert.equal(findRowAt(r, big.indexOf("r54321 ")), 54_321);
  });

  it("the scanner is linear: 4x the rows costs well under 16x the time", () => {
    // A quadratic scanner would take 16x; allow generous noise for a shared CI machine.
    const make = (n: number): string => {
      const out = ["runs id a | y"];
      for (let i = 0; i < n; i++) out.push(`  r${i} a${i % 5} | ${i % 9}.5`);
      return out.join("\n");
    };
    const small = make(25_000);
    const large = make(100_000);
    parseTrial(small);
    const time = (t: string): number => {
      const start = process.hrtime.bigint();
      parseTrial(t);
      return Number(process.hrtime.bigint() - start);
    };
    const ts = Math.min(time(small), time(small), time(small));
    const tl = Math.min(time(large), time(large));
    assert.ok(tl < ts * 12, `100k rows took ${tl} ns, 25k rows ${ts} ns`);
  });
});

describe("LineIndex", () => {
  it("converts offsets and positions with LF, CRLF and lone CR line breaks", () => {
    const text = "ab\ncd\r\nef\rg";
    const index = new LineIndex(text);
    assert.equal(index.lineCount, 4);
    assert.deepEqual(index.positionAt(0), { line: 0, character: 0 });
    assert.deepEqual(index.positionAt(2), { line: 0, character: 2 });
    assert.deepEqual(index.positionAt(3), { line: 1, character: 0 });
    assert.deepEqual(index.positionAt(7), { line: 2, character: 0 });
    assert.deepEqual(index.positionAt(10), { line: 3, character: 0 });
    assert.deepEqual(index.positionAt(11), { line: 3, character: 1 });
    assert.deepEqual(index.positionAt(99), { line: 3, character: 1 });
    assert.deepEqual(index.positionAt(-4), { line: 0, character: 0 });
    for (let o = 0; o <= text.length; o++) {
      const pos = index.positionAt(o);
      const back = index.offsetAt(pos);
      // Offsets inside a CRLF pair map to the line end, which is the only lossy case.
      assert.equal(back, o === 6 ? 5 : o);
    }
    assert.equal(index.offsetAt({ line: 1, character: 50 }), 5);
    assert.equal(index.offsetAt({ line: 9, character: 0 }), text.length);
    assert.equal(index.offsetAt({ line: -1, character: 0 }), 0);
  });

  it("counts characters in UTF-16 units", () => {
    const text = "°C 😀x\ny";
    const index = new LineIndex(text);
    assert.deepEqual(index.positionAt(text.indexOf("x")), { line: 0, character: 5 });
  });
});
