/**
 * Tests of `alignColumns`. The runs tables of samples/*.trial were laid out by R's `formatC`
 * (samples/draw-sample-data.R, R 4.2.2), an independent implementation: re-aligning their cells
 * must give back the same lines.
 */
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { alignColumns, codePointLength } from "../../server/src/text/align-columns.js";

describe("alignColumns", () => {
  it("pads columns to the widest cell with two spaces between and one on each side of the separator", () => {
    const lines = alignColumns([
      ["runs", "id", "profile", "|", "strength"],
      ["", "r01", "ramp-fast", "|", "21.4"],
      ["", "r02", "step", "|", "9.9"],
    ]);
    assert.deepEqual(lines, [
      "runs  id   profile   | strength",
      "      r01  ramp-fast | 21.4",
      "      r02  step      | 9.9",
    ]);
  });

  it("reproduces the runs tables of the samples laid out by R formatC", () => {
    for (const name of ["one-way", "two-factor", "blocked"]) {
      const text = readFileSync(path.resolve("samples", `${name}.trial`), "utf8");
      const lines = text.split("\n");
      const start = lines.findIndex((l) => l.startsWith("runs "));
      const end = lines.indexOf("", start);
      const table = lines.slice(start, end);
      // These tables have no trailing marks or comments and no escaped quotes, so a quoted run or
      // a run of non-spaces is one cell.
      const split = (l: string): string[] => l.match(/"[^"]*"|[^ ]+/g) ?? [];
      const cells = table.map((l, k) => (k === 0 ? split(l) : ["", ...split(l)]));
      assert.deepEqual(alignColumns(cells), table, name);
    }
  });

  it("measures width in code points, not UTF-16 units", () => {
    const lines = alignColumns([
      ["a", "|", "b"],
      ["\u{1D4B3}\u{1D4B3}", "|", "1"], // two astral characters: 4 UTF-16 units, 2 code points
      ["°C", "|", "2"],
    ]);
    assert.deepEqual(lines, ["a  | b", "\u{1D4B3}\u{1D4B3} | 1", "°C | 2"]);
    assert.equal(codePointLength("\u{1D4B3}x"), 2);
    assert.equal(codePointLength("\uD800"), 1);
  });

  it("never leaves trailing padding, including for short rows and empty trailing cells", () => {
    const lines = alignColumns([["long-cell", "x"], ["a"], ["b", ""], []]);
    assert.deepEqual(lines, ["long-cell  x", "a", "b", ""]);
  });

  it("treats a column as a separator only when every present cell is the separator", () => {
    const lines = alignColumns([
      ["x", "|", "y"],
      ["1", "2", "3"],
    ]);
    assert.deepEqual(lines, ["x  |  y", "1  2  3"]);
  });

  it("honours gap, separatorGap and right alignment", () => {
    const lines = alignColumns(
      [
        ["n", "#", "value"],
        ["1", "#", "2.5"],
        ["10", "#", "-12.25"],
      ],
      { gap: 1, separator: "#", separatorGap: 2, align: ["right", "left", "right"] },
    );
    assert.deepEqual(lines, [" n  #   value", " 1  #     2.5", "10  #  -12.25"]);
  });
});
