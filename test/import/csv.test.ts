/**
 * Tests of the CSV reader. The reference is RFC 4180 (Shafranovich, 2005), section 2: its rules
 * 1-7 and the example records given there are checked one by one, then our documented extensions
 * (BOM, LF and lone CR line breaks, blank lines) and the problems with their 1-based lines.
 */
import assert from "node:assert/strict";
import { readCsv } from "../../server/src/import/csv.js";

describe("readCsv", () => {
  it("reads records separated by CRLF (RFC 4180 rule 1: aaa,bbb,ccc CRLF zzz,yyy,xxx CRLF)", () => {
    const t = readCsv("aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n");
    assert.deepEqual(t.header, ["aaa", "bbb", "ccc"]);
    assert.equal(t.headerLine, 1);
    assert.deepEqual(t.rows, [{ line: 2, fields: ["zzz", "yyy", "xxx"] }]);
    assert.deepEqual(t.problems, []);
  });

  it("accepts a last record without a line break (rule 2)", () => {
    const t = readCsv("a,b\r\n1,2");
    assert.deepEqual(t.rows, [{ line: 2, fields: ["1", "2"] }]);
  });

  it("keeps spaces as part of a field (rule 4) and empty fields, also a trailing one", () => {
    const t = readCsv("a,b,c\n x , ,\n");
    assert.deepEqual(t.rows, [{ line: 2, fields: [" x ", " ", ""] }]);
    assert.deepEqual(t.problems, []);
  });

  it('reads quoted fields (rule 5: "aaa","bbb","ccc")', () => {
    const t = readCsv('h1,h2,h3\n"aaa","bbb","ccc"\n');
    assert.deepEqual(t.rows[0]?.fields, ["aaa", "bbb", "ccc"]);
  });

  it("keeps commas and line breaks inside quotes, reporting the record at its first line (rule 6)", () => {
    const t = readCsv('h1,h2,h3\n"aaa","b\r\nbb","c,cc"\nx,y,z\n');
    assert.deepEqual(t.rows, [
      { line: 2, fields: ["aaa", "b\r\nbb", "c,cc"] },
      { line: 4, fields: ["x", "y", "z"] },
    ]);
    assert.deepEqual(t.problems, []);
  });

  it('turns a doubled quote into one (rule 7: "aaa","b""bb","ccc")', () => {
    const t = readCsv('h1,h2,h3\n"aaa","b""bb","ccc"\n');
    assert.deepEqual(t.rows[0]?.fields, ["aaa", 'b"bb', "ccc"]);
    assert.deepEqual(readCsv('h\n""""\n').rows[0]?.fields, ['"']);
    assert.deepEqual(readCsv('h\n""\n').rows[0]?.fields, [""]);
  });

  it("skips a byte-order mark at the start", () => {
    const t = readCsv("\uFEFFlevel,y\nnorth,1.5\n");
    assert.deepEqual(t.header, ["level", "y"]);
    assert.deepEqual(t.rows[0]?.fields, ["north", "1.5"]);
  });

  it("accepts LF and lone CR line breaks and counts lines across a mix", () => {
    const t = readCsv("a,b\n1,2\r3,4\r\n5,6\n");
    assert.deepEqual(
      t.rows.map((r) => [r.line, ...r.fields]),
      [
        [2, "1", "2"],
        [3, "3", "4"],
        [4, "5", "6"],
      ],
    );
  });

  it("skips blank lines (empty or spaces/tabs only) before the header and between rows, keeping line numbers", () => {
    const t = readCsv("\r\n  \na,b\r\n\r\n1,2\r\n \t\r\n3,4\r\n\r\n");
    assert.equal(t.headerLine, 3);
    assert.deepEqual(
      t.rows.map((r) => r.line),
      [5, 7],
    );
    assert.deepEqual(t.problems, []);
  });

  it("does not skip a line holding only a quoted empty field", () => {
    const t = readCsv('a\n""\n');
    assert.deepEqual(t.rows, [{ line: 2, fields: [""] }]);
  });

  it("reports a row with the wrong number of fields with its 1-based line and leaves it out", () => {
    const t = readCsv("a,b,c\n1,2,3\n\n4,5\n6,7,8,9\n10,11,12\n");
    assert.deepEqual(t.problems, [
      { line: 4, message: "this row has 2 fields but the header has 3" },
      { line: 5, message: "this row has 4 fields but the header has 3" },
    ]);
    assert.deepEqual(
      t.rows.map((r) => r.line),
      [2, 6],
    );
  });

  it("reports the line of a row after a multi-line quoted field correctly", () => {
    const t = readCsv('a,b\n"x\ny\nz",1\n2\n');
    assert.deepEqual(t.problems, [{ line: 5, message: "this row has 1 field but the header has 2" }]);
  });

  it("reports an unterminated quoted field at the line where it starts", () => {
    const t = readCsv('a,b\n1,2\n3,"open\n4,5\n');
    assert.equal(t.problems.length, 1);
    assert.equal(t.problems[0]?.line, 3);
    assert.match(t.problems[0]!.message, /never closed/);
    assert.deepEqual(
      t.rows.map((r) => r.line),
      [2],
    );
  });

  it("reports a quote inside an unquoted field and text after a closing quote", () => {
    const inside = readCsv('a\nab"c\n');
    assert.deepEqual(inside.problems.map((p) => p.line), [2]);
    assert.match(inside.problems[0]!.message, /inside an unquoted field/);
    const after = readCsv('a,b\n"ab"c,1\n');
    assert.deepEqual(after.problems.map((p) => p.line), [2]);
    assert.match(after.problems[0]!.message, /after a closing quote/);
    assert.deepEqual(after.rows, []);
  });

  it("gives an empty header for empty or blank text", () => {
    assert.deepEqual(readCsv(""), { header: [], headerLine: 0, rows: [], problems: [] });
    assert.deepEqual(readCsv("\uFEFF\r\n\r\n"), { header: [], headerLine: 0, rows: [], problems: [] });
  });

  it("reads another delimiter when asked and refuses an impossible one", () => {
    const t = readCsv("a;b\n1,5;2\n", { delimiter: ";" });
    assert.deepEqual(t.rows[0]?.fields, ["1,5", "2"]);
    assert.equal(readCsv("a\n", { delimiter: '"' }).problems.length, 1);
  });
});
