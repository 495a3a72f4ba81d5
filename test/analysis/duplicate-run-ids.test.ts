// Repeated run ids (duplicate-run-ids.ts). The reference is the plain definition, computed with a Map from
// each id's text (unquoted) to the first row that wrote it: a row repeats an id when an earlier row wrote
// the same text. The partitioned table must find exactly those rows, in row order, with the same first rows.

import assert from "node:assert/strict";
import fc from "fast-check";

import type { RunRows } from "../../grammar/src/ast.js";
import { cellText } from "../../grammar/src/runs-table.js";
import { parseTrial } from "../../grammar/src/parse.js";
import { duplicateRunIds } from "../../server/src/analysis/duplicate-run-ids.js";

/** One id cell per row, written unquoted or quoted; -1 in `idCells` for rows left without an id. */
function rowsOf(cells: readonly { text: string; quoted: boolean; missing: boolean }[]): { source: string; rows: RunRows; idCells: Int32Array } {
  let source = "";
  const n = cells.length;
  const cellStart = new Int32Array(n);
  const cellEnd = new Int32Array(n);
  const cellFlags = new Uint8Array(n);
  const idCells = new Int32Array(n);
  cells.forEach((c, i) => {
    const written = c.quoted ? `"${c.text.replace(/(["\\])/g, "\\$1")}"` : c.text;
    cellStart[i] = source.length;
    source += written;
    cellEnd[i] = source.length;
    source += "\n";
    cellFlags[i] = c.quoted ? 1 : 0;
    idCells[i] = c.missing ? -1 : i;
  });
  const offsets = Int32Array.from({ length: n + 1 }, (_, i) => i);
  const rows: RunRows = { count: n, rowStart: cellStart, rowEnd: cellEnd, cellOffset: offsets, pipeCell: new Int32Array(n).fill(-1), cellStart, cellEnd, cellFlags, excluded: new Map() };
  return { source, rows, idCells };
}

function reference(source: string, rows: RunRows, idCells: Int32Array): { rows: number[]; priors: number[] } {
  const first = new Map<string, number>();
  const out = { rows: [] as number[], priors: [] as number[] };
  for (let r = 0; r < idCells.length; r++) {
    if (idCells[r]! < 0) continue;
    const text = cellText(source, rows, idCells[r]!);
    const prior = first.get(text);
    if (prior === undefined) first.set(text, r);
    else {
      out.rows.push(r);
      out.priors.push(prior);
    }
  }
  return out;
}

const cell = fc.record({ text: fc.stringMatching(/^[rs"\\]{1,3}[0-9]{0,2}$/), quoted: fc.boolean(), missing: fc.boolean() }).map((c) => ({
  ...c,
  // Unquoted ids are names: no quote or backslash characters.
  text: c.quoted ? c.text : c.text.replace(/["\\]/g, "r"),
  missing: c.missing && c.text.length === 1,
}));

describe("duplicateRunIds", () => {
  it("finds the repeated ids and their first rows, quoted or not, as a Map of texts does (property test)", () => {
    fc.assert(
      fc.property(fc.array(cell, { maxLength: 60 }), (cells) => {
        const { source, rows, idCells } = rowsOf(cells);
        const found = duplicateRunIds(source, rows, idCells);
        assert.deepEqual({ rows: [...found.rows], priors: [...found.priors] }, reference(source, rows, idCells));
      }),
      { numRuns: 2000 },
    );
  });

  it("works across partitions: 100,000 ids with every 7th repeating an earlier one", () => {
    const cells = Array.from({ length: 100_000 }, (_, i) => ({ text: i % 7 === 6 ? `r${Math.floor(i / 3)}` : `r${i}`, quoted: i % 1000 === 3, missing: false }));
    const { source, rows, idCells } = rowsOf(cells);
    const found = duplicateRunIds(source, rows, idCells);
    const expected = reference(source, rows, idCells);
    assert.ok(expected.rows.length > 5_000);
    assert.deepEqual({ rows: [...found.rows], priors: [...found.priors] }, expected);
  });

  it("agrees with the duplicate-run diagnostics of a parsed file", () => {
    const file = parseTrial(['response y', 'factor a levels a1, a2', 'runs id a | y', '  r1 a1 | 1', '  r2 a2 | 2', '  "r1" a2 | 3', '  r3 a1 | 4', '  r2 a1 | 5', ''].join("\n"));
    const table = file.runs!.rows;
    const idCells = Int32Array.from({ length: table.count }, (_, r) => table.cellOffset[r]!);
    const found = duplicateRunIds(file.source, table, idCells);
    assert.deepEqual([...found.rows], [2, 4]);
    assert.deepEqual([...found.priors], [0, 1]);
  });
});

describe("duplicateRunIds on numbered run sheets", () => {
  it("finds no repeats in increasing numbered ids, and still finds them when the numbering repeats or is padded", () => {
    const check = (texts: string[]) => {
      const { source, rows, idCells } = rowsOf(texts.map((text) => ({ text, quoted: false, missing: false })));
      const found = duplicateRunIds(source, rows, idCells);
      assert.deepEqual({ rows: [...found.rows], priors: [...found.priors] }, reference(source, rows, idCells));
    };
    check(Array.from({ length: 5000 }, (_, i) => `r${i + 1}`));
    check(["T-001", "T-002", "T-010", "U-011"]);
    // Equal numbers written differently (not increasing, so the table decides): r1 and r01 differ.
    check(["r1", "r01", "r2", "r1"]);
    check(["r1", "r2", "r3", "r2", "s3"]);
    check(["9", "10", "10"]);
    check(["r1234567890123456", "r1234567890123457", "r1234567890123456"]);
  });
});
