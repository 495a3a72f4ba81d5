/**
 * The one-pass runs-table reading: the lexer's `RunsBody` matcher runs the row scanner, which finds where
 * the table ends itself, and the AST builder takes the scanned rows from the token. Checked two ways:
 * against expectations read off each test text by hand (where the table ends, rows, cells, problems and
 * their spans), and against the former two-pass path kept verbatim in `reference-runs-scanner.ts` (the
 * old matcher's end plus the old scanner), on fixed boundary cases and on random tables (fast-check).
 * The lazy line index and the keyword line test are compared with their former versions the same way.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { CellFlag, type RunRows, type SyntaxProblem, type TrialFile } from "../../grammar/src/ast.js";
import { LineIndex } from "../../grammar/src/line-index.js";
import { parseTrial } from "../../grammar/src/parse.js";
import { cellText } from "../../grammar/src/runs-table.js";
import { runsBodyProblems, scanRunsTable } from "../../grammar/src/runs-scanner.js";
import { isTopLevelKeywordAt, lineStartsWithTopLevelKeyword, TOP_LEVEL_KEYWORDS } from "../../grammar/src/top-level-keywords.js";
import { lineStartsWithTopLevelKeywordReference } from "./reference-keyword-line.js";
import { ReferenceLineIndex } from "./reference-line-index.js";
import { referenceRunsBodyEnd, referenceScanRunsBody } from "./reference-runs-scanner.js";

/** Rows as plain arrays, for deep comparison. */
function plainRows(rows: RunRows): Record<string, unknown> {
  return {
    count: rows.count,
    rowStart: Array.from(rows.rowStart),
    rowEnd: Array.from(rows.rowEnd),
    cellOffset: Array.from(rows.cellOffset),
    pipeCell: Array.from(rows.pipeCell),
    cellStart: Array.from(rows.cellStart),
    cellEnd: Array.from(rows.cellEnd),
    cellFlags: Array.from(rows.cellFlags),
    excluded: [...rows.excluded.entries()],
  };
}

/** The cell texts of every row, unquoted. */
function cellTexts(source: string, rows: RunRows): string[][] {
  const out: string[][] = [];
  for (let r = 0; r < rows.count; r++) {
    const row: string[] = [];
    for (let i = rows.cellOffset[r]!; i < rows.cellOffset[r + 1]!; i++) row.push(cellText(source, rows, i));
    out.push(row);
  }
  return out;
}

/** The body of the first runs table as the former path read it: old matcher end, then old scanner. */
function referenceBody(source: string, headerHasPipe: boolean) {
  const start = firstBreakAfter(source, source.indexOf("runs"));
  const end = referenceRunsBodyEnd(source, start);
  return { start, end, ...referenceScanRunsBody(source, start, end, headerHasPipe) };
}

function firstBreakAfter(source: string, from: number): number {
  for (let i = from; i < source.length; i++) {
    const c = source.charCodeAt(i);
    if (c === 10 || c === 13) return i;
  }
  return source.length;
}

/** The problems of `f` that lie inside `[start, end)` (the table body). */
function problemsIn(f: TrialFile, start: number, end: number): SyntaxProblem[] {
  return f.problems.filter((p) => p.span.start >= start && p.span.start < end);
}

/** Problems ordered as `parseTrial` lists them: by start, then end, then as found (a stable sort). */
function byPosition(problems: readonly SyntaxProblem[]): SyntaxProblem[] {
  return problems
    .map((p, i) => ({ p, i }))
    .sort((x, y) => x.p.span.start - y.p.span.start || x.p.span.end - y.p.span.end || x.i - y.i)
    .map((x) => x.p);
}

/** Parses `text` and checks that its runs table agrees with the former two-pass path. */
function parseAndCompare(text: string): TrialFile {
  const f = parseTrial(text);
  assert.ok(f.runs, "a runs table");
  const ref = referenceBody(text, f.runs.headerHasPipe);
  assert.deepEqual(plainRows(f.runs.rows), plainRows(ref.rows));
  assert.deepEqual(problemsIn(f, ref.start, ref.end), byPosition(ref.problems));
  return f;
}

describe("runs table read in one pass", () => {
  it("ends the table at a keyword line after CRLF, and reads that line as the next declaration", () => {
    const text = 'runs id a | y\r\n  r1 x | 1\r\n  r2 z | 2\r\nconclusion "done"\r\n';
    const f = parseAndCompare(text);
    assert.deepEqual(f.problems, []);
    assert.equal(f.runs!.rows.count, 2);
    assert.deepEqual(cellTexts(text, f.runs!.rows), [
      ["r1", "x", "1"],
      ["r2", "z", "2"],
    ]);
    // The table's span ends after the last cell of the last row ("2" at offset 37).
    assert.equal(text.slice(36, 37), "2");
    assert.equal(f.runs!.span.end, 37);
    assert.equal(f.conclusion?.body?.text, "done");
  });

  it("ends the table at an indented keyword line, not at a keyword after a lone CR, a comment or a quote", () => {
    const text =
      'runs id a | y\n  r1 x | 1\r factor q | 3\n  # factor b levels 1, 2\n  "runs" w | 4\n   \tfactor b levels b1, b2\n';
    const f = parseAndCompare(text);
    // Rows: `r1 x | 1`, then `factor q | 3` (after a lone CR: no table end there), then the quoted "runs".
    assert.deepEqual(cellTexts(text, f.runs!.rows), [
      ["r1", "x", "1"],
      ["factor", "q", "3"],
      ["runs", "w", "4"],
    ]);
    assert.equal(f.runs!.rows.cellFlags[6], CellFlag.Quoted);
    assert.equal(f.factors.length, 1);
    assert.equal(f.factors[0]!.name?.text, "b");
    assert.deepEqual(f.problems, []);
  });

  it("ends the table at a keyword line that starts with a byte-order mark, a blank like space and tab", () => {
    // Found by the formatting fuzzer: the line was read as a row, and formatting, which drops a row's
    // leading blanks, turned it into the end of the table (its later rows then no longer parsed as runs).
    const text = 'runs id a | y\n  r1 x | 1\n\ufefffactor b levels b1, b2\n';
    const f = parseAndCompare(text);
    assert.deepEqual(cellTexts(text, f.runs!.rows), [["r1", "x", "1"]]);
    assert.equal(f.factors[0]!.name?.text, "b");
  });

  it("takes a keyword only as a whole word: 'runs-2' and 'factors' are cells, 'plan:' ends the table", () => {
    const text = "runs id a | y\n  runs-2 x | 1\nfactors y | 2\nplan: x\n";
    const f = parseAndCompare(text);
    assert.deepEqual(cellTexts(text, f.runs!.rows), [
      ["runs-2", "x", "1"],
      ["factors", "y", "2"],
    ]);
    // `plan` starts a plan block; the ':' after it is the parser's problem, outside the table.
    const bodyEnd = text.indexOf("plan:");
    assert.ok(f.problems.length > 0);
    for (const p of f.problems) assert.ok(p.span.start >= bodyEnd, `problem inside the table: ${p.message}`);
  });

  it("reads a table after a byte-order mark; a mark at a line start is a blank, before a row or a table end", () => {
    // Until 2026-12-02 a keyword after a mark did not end the table (the mark was a blank for the row only):
    // formatting, which drops a row's leading blanks, then turned such a row into a table end.
    const text = "\uFEFFruns id a | y\n  r1 x | 1\n\uFEFFr2 b | 2\n\uFEFFfactor b | 2\n";
    const f = parseAndCompare(text);
    assert.deepEqual(cellTexts(text, f.runs!.rows), [
      ["r1", "x", "1"],
      ["r2", "b", "2"],
    ]);
    // The second row starts after the mark (offset 26 is the mark, 27 the "r").
    assert.equal(text.charCodeAt(26), 0xfeff);
    assert.equal(f.runs!.rows.rowStart[1], 27);
    assert.equal(f.factors[0]!.name?.text, "b");
  });

  it("keeps an excluded last row without a final line break", () => {
    const text = 'runs id a | y\n  r1 x | 1\n  r2 x | 2 excluded "clogged nozzle"';
    const f = parseAndCompare(text);
    assert.deepEqual(f.problems, []);
    const rows = f.runs!.rows;
    assert.equal(rows.count, 2);
    assert.deepEqual([...rows.excluded.keys()], [1]);
    const mark = rows.excluded.get(1)!;
    assert.equal(mark.reason?.text, "clogged nozzle");
    assert.equal(mark.span.start, text.indexOf("excluded"));
    assert.equal(mark.span.end, text.length);
    assert.equal(rows.rowEnd[1], text.length);
  });

  it("reports an unterminated quote on the last row once, with no missing-'|' problem", () => {
    const text = 'runs id a | y\n  r1 x | 1\n  r2 "open | 2';
    const f = parseAndCompare(text);
    const start = text.indexOf('"open');
    assert.deepEqual(f.problems, [
      { code: "syntax", message: "unterminated quoted cell: add the closing '\"'", span: { start, end: text.length } },
    ]);
    assert.equal(f.runs!.rows.cellFlags[4], CellFlag.Quoted | CellFlag.Unterminated);
    assert.equal(f.runs!.rows.pipeCell[1], -1);
  });

  it("reports a stray quote, a second '|' and missing '|' with their spans", () => {
    const text = 'runs id a | y\n  r1 x"q 1\n  r2 y | 2 | 3\n  r3 z 4\n';
    const f = parseAndCompare(text);
    const r1 = text.indexOf("r1");
    const r3 = text.indexOf("r3");
    assert.deepEqual(
      f.problems.map((p) => [p.message.slice(0, 24), p.span.start, p.span.end]),
      [
        ["missing '|' between fact", r1, r1 + "r1 x\"q 1".length],
        ["stray '\"' in cell 'x\"q':", text.indexOf('"q'), text.indexOf('"q') + 1],
        ["a second '|' in this row", text.lastIndexOf("| 3"), text.lastIndexOf("| 3") + 1],
        ["missing '|' between fact", r3, r3 + "r3 z 4".length],
      ],
    );
  });

  it("reports rows with '|' under a header without one", () => {
    const text = "runs id a y\n  r1 x | 1\n  r2 z 2\n";
    const f = parseAndCompare(text);
    const r1 = text.indexOf("r1");
    assert.deepEqual(f.problems, [
      {
        code: "syntax",
        message: "this row has '|' but the runs header has none: add '|' before the response names in the header",
        span: { start: r1, end: r1 + "r1 x | 1".length },
      },
    ]);
  });

  it("gives an empty table for a header at the end of the text", () => {
    const f = parseTrial("runs id a | y");
    assert.equal(f.runs!.rows.count, 0);
    assert.equal(f.runs!.rows.cellOffset.length, 1);
    const g = parseTrial("runs id a | y\n");
    assert.equal(g.runs!.rows.count, 0);
  });

  it("grows its columns past low estimates on a large table", () => {
    // Long comment lines where the row estimate samples the body (start, middle, end), short rows of
    // ten cells elsewhere (more than the four cells a row the columns start with).
    const comment = `  # ${"c".repeat(8192)}\n`;
    const rows = (from: number) =>
      Array.from({ length: 3000 }, (_, i) => `r${from + i} a b c d e f g | 1 2\n`).join("");
    const text = `runs id p q r s t u v w | y z\n${comment}${rows(0)}${comment}${rows(3000)}${comment}`;
    const f = parseAndCompare(text);
    assert.deepEqual(f.problems, []);
    assert.equal(f.runs!.rows.count, 6000);
    assert.equal(f.runs!.rows.cellStart.length, 60000);
    assert.equal(cellText(text, f.runs!.rows, 59990), "r5999");
  });

  it("agrees with the former matcher and scanner on random tables", () => {
    const cell = fc.oneof(
      { weight: 6, arbitrary: fc.constantFrom("r1", "a2", "x", "17.5", "-3e2", "?", "b_c", "excluded", "é", "日本") },
      { weight: 2, arbitrary: fc.constantFrom(...TOP_LEVEL_KEYWORDS, "runs-2", "plans", "date:", "Factor") },
      { weight: 2, arbitrary: fc.constantFrom('"q"', '"a b"', '"x\\"y"', '"open', '"a"b', 'x"y', '""', '"\\\\"') },
      { weight: 2, arbitrary: fc.constantFrom("|", "#", "# note", 'excluded "why"', "excluded", '"why" excluded') },
    );
    const gap = fc.constantFrom(" ", "  ", "\t", " \uFEFF", "");
    const line = fc
      .tuple(fc.constantFrom("", "  ", "\t", " \t"), fc.array(fc.tuple(cell, gap), { maxLength: 6 }))
      .map(([lead, cells]) => lead + cells.map(([c, g]) => c + (g === "" ? " " : g)).join(""));
    const lineBreak = fc.constantFrom("\n", "\r\n", "\r", "\n\n");
    const table = fc.tuple(
      fc.boolean(),
      fc.array(fc.tuple(line, lineBreak), { maxLength: 12 }),
      fc.constantFrom("", "\n", "\r\n", "  "),
    );
    fc.assert(
      fc.property(table, ([headerPipe, lines, tail]) => {
        const header = headerPipe ? "runs id a | y" : "runs id a y";
        const text = `${header}\n${lines.map(([l, b]) => l + b).join("")}${tail}`;
        const start = header.length;
        const scan = scanRunsTable(text, start);
        assert.equal(scan.end, referenceRunsBodyEnd(text, start));
        for (const hasPipe of [true, false]) {
          const ref = referenceScanRunsBody(text, start, scan.end, hasPipe);
          assert.deepEqual(plainRows(scan.rows), plainRows(ref.rows));
          assert.deepEqual(runsBodyProblems(scan, hasPipe), ref.problems);
        }
        // And through the whole parser: the table the AST holds is the former path's.
        parseAndCompare(text);
      }),
      { numRuns: 400, seed: 20261202 },
    );
  });
});

describe("ordinary rows and the general row reader", () => {
  // The scanner reads an ordinary row (bare cells, blanks, one '|', a comment) with a small fast reader
  // and hands any other row back to the general reader from its start. These tables mix both kinds in
  // long runs, so the fast reader has been optimised by the engine when the other kinds arrive, and
  // compare every row, cell, flag and problem with the former scanner (`reference-runs-scanner.ts`).

  /** Scans the table of `text` and checks it against the former path, with and without a header '|'. */
  function compareScan(text: string, start: number, limit?: number): void {
    const scan = scanRunsTable(text, start, limit);
    const referenceEnd = Math.min(referenceRunsBodyEnd(text, start), limit ?? text.length);
    assert.equal(scan.end, referenceEnd);
    for (const hasPipe of [true, false]) {
      const ref = referenceScanRunsBody(text, start, scan.end, hasPipe);
      assert.deepEqual(plainRows(scan.rows), plainRows(ref.rows));
      assert.deepEqual(runsBodyProblems(scan, hasPipe), ref.problems);
    }
  }

  it("reads eight-character cells starting with 'e', quotes, a second '|' and comments after many plain rows", () => {
    const plain = (from: number, n: number) =>
      Array.from({ length: n }, (_, i) => `  r${from + i} a${i % 4} b${i % 3} | ${(20 + (i % 7) / 4).toFixed(2)}\n`).join("");
    const unusual = [
      "  elephant a1 b2 | 1.5\n", // eight characters starting with 'e', not 'excluded'
      "  e1234567 a1 b2 | 1.5\n",
      "  excludes a1 b2 | 1.5\n",
      '  r9 a1 b2 | 1.5 excluded "rain"\n',
      "  r9 a1 b2 | 1.5 excluded\n",
      '  r9 a1 b2 | excluded "rain" 7\n',
      '  r9 "a 1" b2 | 1.5\n',
      '  r9 a1 b"2 | 1.5\n',
      "  r9 a1 | b2 | 1.5\n",
      "  r9 a1 b2 | 1.5 # a note\n",
      "  r9 a1 b2 1.5\n",
      '  "open a1\n',
      "  |\n",
      "  r9\ta1\uFEFFb2|1.5#x\r\n",
      "  r9 a1 b2 | 1.5",
    ];
    for (const row of unusual) {
      const text = `runs id a b | y\n${plain(0, 3000)}${row}${row.endsWith("\n") ? plain(3000, 50) : ""}`;
      compareScan(text, "runs id a b | y".length);
    }
  });

  it("grows the cell columns inside a row the fast reader gives up", () => {
    // Two cells a row in the first rows (the columns start at four a row), then rows of forty cells:
    // the cell column fills in the middle of a row.
    const few = Array.from({ length: 2000 }, (_, i) => `r${i} 1\n`).join("");
    const many = Array.from({ length: 300 }, (_, i) => `r${i} ${"x ".repeat(38)}| 2\n`).join("");
    compareScan(`runs id a | y\n${few}${many}${few}`, "runs id a | y".length);
  });

  it("reads rows that straddle the scanner's 32,768-character chunks at every position, and non-ASCII chunks", () => {
    // The fast reader works on the text as bytes, 32,768 characters at a time; a row running past the
    // end of a chunk is read from the string. Shifting the table by 0..39 characters puts every part of
    // a row (a cell, a blank, '|', a comment, CR before LF) at the end of a chunk.
    const rows = Array.from({ length: 2600 }, (_, i) =>
      i % 5 === 0 ? `  r${i}\ta1 b2|3.5 # n\r\n` : i % 7 === 0 ? `r${i} "q ${i}" b1 | 2\n` : `  r${i} a${i % 4} b${i % 3} | ${i}.25\n`,
    ).join("");
    for (let shift = 0; shift < 40; shift++) {
      const text = `runs id a b | y\n${"#".repeat(shift)}\n${rows}`;
      compareScan(text, "runs id a b | y".length);
    }
    // A non-ASCII character in one chunk: that chunk is read from the string, the next ones as bytes.
    const accented = rows.replace("r1201 ", "r1201\u00E9 ").replace("r2401 ", "r2401\u65E5 ");
    compareScan(`runs id a b | y\n${accented}`, "runs id a b | y".length);
    // The table ends exactly at a chunk end, and one character after.
    const exact = `runs id a b | y\n${rows}`.slice(0, "runs id a b | y".length + 3 * 32768);
    compareScan(exact, "runs id a b | y".length);
    compareScan(exact, "runs id a b | y".length, "runs id a b | y".length + 32768 + 1);
  });

  it("agrees with the former scanner on random long tables cut at any point", () => {
    const cell = fc.oneof(
      { weight: 12, arbitrary: fc.constantFrom("r1", "a2", "17.5", "?", "elephant", "e1234567", "excludes") },
      { weight: 1, arbitrary: fc.constantFrom('"q"', 'x"y', "|", "# note", 'excluded "why"', "excluded", '"a"b') },
    );
    const line = fc.array(cell, { minLength: 1, maxLength: 6 }).map((cells) => "  " + cells.join(" "));
    const table = fc.tuple(fc.array(line, { minLength: 1, maxLength: 40 }), fc.nat({ max: 400 }), fc.double({ min: 0, max: 1, noNaN: true }));
    fc.assert(
      fc.property(table, ([lines, plainCount, cut]) => {
        const plain = Array.from({ length: plainCount }, (_, i) => `  r${i} a1 b2 | 3.25\n`).join("");
        const text = `runs id a b | y\n${plain}${lines.join("\n")}\n${plain}`;
        const start = "runs id a b | y".length;
        compareScan(text, start);
        compareScan(text, start, start + Math.floor((text.length - start) * cut));
      }),
      { numRuns: 200, seed: 20261202 },
    );
  });
});

describe("keyword line test", () => {
  it("agrees with the former test on every keyword, its prefixes and extensions, and random lines", () => {
    const words: string[] = [];
    for (const k of TOP_LEVEL_KEYWORDS) {
      words.push(k, k.slice(0, -1), `${k}s`, `${k}-x`, `${k}_`, `${k}:`, `${k}"`, `${k}#`, k.toUpperCase(), `x${k}`);
    }
    for (const w of words) {
      for (const lead of ["", "  ", "\t", "\uFEFF", "\n"]) {
        for (const tail of ["", " ", "\n", "\r\n"]) {
          const text = lead + w + tail;
          assert.equal(lineStartsWithTopLevelKeyword(text, 0), lineStartsWithTopLevelKeywordReference(text, 0), JSON.stringify(text));
        }
      }
    }
    assert.equal(isTopLevelKeywordAt("  runs id", 2), true);
    assert.equal(isTopLevelKeywordAt("  r1 a", 2), false);
    assert.equal(isTopLevelKeywordAt("runs", 0), true);
    assert.equal(isTopLevelKeywordAt("r", 0), false);
    fc.assert(
      fc.property(fc.stringOf(fc.constantFrom("r", "u", "n", "s", "p", "l", "a", " ", "\t", "-", "1", "\n", "é")), (text) => {
        for (let i = 0; i <= text.length; i++) {
          assert.equal(lineStartsWithTopLevelKeyword(text, i), lineStartsWithTopLevelKeywordReference(text, i));
        }
      }),
      { numRuns: 300, seed: 7 },
    );
  });
});

describe("lazy line index", () => {
  it("answers like the former eager index, whatever the order of the questions", () => {
    const text = fc.stringOf(fc.constantFrom("a", "b", " ", "\n", "\r", "\r\n", "é", "😀"), { maxLength: 80 });
    const query = fc.oneof(
      fc.record({ kind: fc.constant("position" as const), value: fc.integer({ min: -3, max: 90 }) }),
      fc.record({
        kind: fc.constant("offset" as const),
        value: fc.integer({ min: -2, max: 30 }),
        character: fc.integer({ min: -1, max: 12 }),
      }),
      fc.record({ kind: fc.constant("count" as const), value: fc.constant(0) }),
    );
    fc.assert(
      fc.property(text, fc.array(query, { maxLength: 12 }), (t, queries) => {
        const lazy = new LineIndex(t);
        const eager = new ReferenceLineIndex(t);
        for (const q of queries) {
          if (q.kind === "position") assert.deepEqual(lazy.positionAt(q.value), eager.positionAt(q.value));
          else if (q.kind === "offset") {
            const position = { line: q.value, character: q.character };
            assert.equal(lazy.offsetAt(position), eager.offsetAt(position));
          } else assert.equal(lazy.lineCount, eager.lineCount);
        }
        assert.equal(lazy.lineCount, eager.lineCount);
        for (let o = 0; o <= t.length; o++) assert.deepEqual(lazy.positionAt(o), eager.positionAt(o));
      }),
      { numRuns: 500, seed: 11 },
    );
  });

  it("finds the lines of a large text, growing past a low estimate", () => {
    // Long lines where the estimate samples the text (its start, middle and end windows of 4096
    // characters; the middle falls in the y line) and 20,000 short lines elsewhere: estimated far too low.
    const text = `${"x".repeat(8192)}\n${"ab\n".repeat(10000)}${"y".repeat(8192)}\n${"ab\n".repeat(10000)}${"z".repeat(8192)}`;
    const index = new LineIndex(text);
    assert.equal(index.lineCount, 20003);
    assert.deepEqual(index.positionAt(text.length), { line: 20002, character: 8192 });
    assert.deepEqual(index.positionAt(8193 + 3 * 500 + 1), { line: 501, character: 1 });
    assert.equal(index.offsetAt({ line: 1, character: 9 }), 8195);
    const eager = new ReferenceLineIndex(text);
    for (let o = 0; o <= text.length; o += 97) assert.deepEqual(index.positionAt(o), eager.positionAt(o));
  });
});
