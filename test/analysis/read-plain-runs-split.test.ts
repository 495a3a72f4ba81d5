/**
 * A plain runs table read in two parts (`readPlainRuns` with a `PlainSplit`): the second part by a helper,
 * here on this thread from the text's bytes (as the CLI's worker reads them) and, in the last test, by the
 * CLI's real worker thread. Whatever the split row, the result must be exactly the one-part read, and any
 * part that declines makes the whole read decline.
 */
import assert from "node:assert/strict";
import { fileURLToPath } from "node:url";
import { parseTrial } from "../../grammar/src/parse.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import {
  PlainColumn,
  type PlainPart,
  type PlainPartHelper,
  type PlainRunsLayout,
  plainColumns,
  readPlainPart,
  readPlainRuns,
} from "../../server/src/analysis/read-plain-runs.js";
import { byteChunks } from "../../server/src/cli/byte-chunks.js";
import { HelperThread } from "../../server/src/cli/helper-thread.js";

/** Reads the helper's part on this thread, from the text's bytes, and counts the parts it read. */
function sameThreadHelper(text: string): PlainPartHelper & { parts: number } {
  const load = byteChunks(Buffer.from(text, "latin1"));
  return {
    parts: 0,
    columns: (kinds, rowCount) => plainColumns(kinds, rowCount),
    start(job) {
      this.parts++;
      const part = readPlainPart(load, job);
      return () => part;
    },
  };
}

const LAYOUT: PlainRunsLayout = {
  kinds: [PlainColumn.Id, PlainColumn.Factor, PlainColumn.Value, PlainColumn.Response, PlainColumn.Response],
  levelNames: [[], ["a1", "a2", "a3"], [], [], []],
  pipeAt: 3,
};

/** A body of `rows` rows with comments, blank lines, CRLF line ends and pending responses; its rows' line starts. */
function body(rows: number, idOf: (i: number) => string = (i) => `r${i + 1}`): { text: string; lineStarts: number[] } {
  let text = "\n";
  const lineStarts: number[] = [];
  for (let i = 0; i < rows; i++) {
    if (i % 7 === 3) text += "  # a comment line\n";
    if (i % 11 === 5) text += "\r\n";
    lineStarts.push(text.length);
    const y = i % 13 === 2 ? "?" : `${(20 + i / 8).toFixed(3)}`;
    const z = i % 17 === 9 ? "?" : i % 7 === 1 ? (i % 2 ? "0.0" : "-0") : `-${i}.5`;
    text += `  ${idOf(i)} a${(i % 3) + 1} 1${i % 9}.25 | ${y} ${z}${i % 5 === 0 ? " # note" : ""}${i % 2 ? "\r\n" : "\n"}`;
  }
  return { text, lineStarts };
}

function asData(read: ReturnType<typeof readPlainRuns>): unknown {
  if (!read) return undefined;
  return {
    levels: read.levels.map((l) => Array.from(l)),
    values: read.values.map((v) => [Array.from(v.mantissa), Array.from(v.exponent)]),
    pending: read.pending.map((p) => (p ? Array.from(p) : undefined)),
    pendingCells: [...read.pendingCells],
    tallies: Object.fromEntries(Object.entries(read.tallies).map(([key, value]) => [key, Array.isArray(value) ? value.map((a) => Array.from(a as ArrayLike<number>)) : Array.from(value as ArrayLike<number>)])),
  };
}

describe("plain runs tables read in two parts", () => {
  it("gives the one-part result at every split row, pending cells and comments included", () => {
    const rows = 60;
    const { text, lineStarts } = body(rows);
    const whole = asData(readPlainRuns(text, 0, text.length, rows, LAYOUT));
    assert.ok(whole !== undefined);
    const pendingCells = (whole as { pendingCells: number[] }).pendingCells;
    assert.equal(pendingCells.length / 6, 5 + 3, "pending y in 5 rows, z in 3");
    for (let row = 1; row < rows; row++) {
      const helper = sameThreadHelper(text);
      const split = readPlainRuns(text, 0, text.length, rows, LAYOUT, { row, offset: lineStarts[row]!, helper });
      assert.equal(helper.parts, 1, `row ${row}`);
      assert.deepEqual(asData(split), whole, `split at row ${row}`);
    }
  });

  it("declines when either part declines, or when the ids do not increase across the split", () => {
    const rows = 20;
    const { text, lineStarts } = body(rows);
    const odd = (at: number) => text.slice(0, lineStarts[at]!) + text.slice(lineStarts[at]!).replace(/ a\d /, " a9 ");
    for (const at of [3, 15]) {
      const broken = odd(at);
      assert.equal(readPlainRuns(broken, 0, broken.length, rows, LAYOUT, { row: 10, offset: lineStarts[10]!, helper: sameThreadHelper(broken) }), undefined, `unknown level in row ${at}`);
    }
    // Each part's ids increase, but the second part starts lower than the first part ends.
    const ids = body(rows, (i) => `r${i < 10 ? 100 + i : i}`);
    assert.equal(readPlainRuns(ids.text, 0, ids.text.length, rows, LAYOUT), undefined, "one part: ids do not increase");
    assert.equal(readPlainRuns(ids.text, 0, ids.text.length, rows, LAYOUT, { row: 10, offset: ids.lineStarts[10]!, helper: sameThreadHelper(ids.text) }), undefined);
    // A wrong row count in either part (the split row too late) declines too.
    assert.equal(readPlainRuns(text, 0, text.length, rows, LAYOUT, { row: 10, offset: lineStarts[11]!, helper: sameThreadHelper(text) }), undefined);
    // A helper that fails (no part) makes the whole read decline: the general path then reads the table.
    const failing: PlainPartHelper = { columns: (kinds, count) => plainColumns(kinds, count), start: () => () => undefined };
    assert.equal(readPlainRuns(text, 0, text.length, rows, LAYOUT, { row: 10, offset: lineStarts[10]!, helper: failing }), undefined);
    // A helper that cannot start leaves the read to this thread alone.
    const unable: PlainPartHelper = { columns: () => undefined, start: () => undefined };
    assert.deepEqual(asData(readPlainRuns(text, 0, text.length, rows, LAYOUT, { row: 10, offset: lineStarts[10]!, helper: unable })), asData(readPlainRuns(text, 0, text.length, rows, LAYOUT)));
  });

  it("the parser marks a row near the middle of a plain body, and the model builder splits there", () => {
    const rows = Array.from({ length: 400 }, (_, i) => `  r${i + 1} a${(i % 3) + 1} low ${15 + (i % 7)}.5 | ${20 + i / 8} ?\n`).join("");
    const text = `response y unit mm\nresponse z unit mm\nfactor a levels a1, a2, a3\nfactor b levels low, high\ncovariate t unit C\nruns id a b t | y z\n${rows}`;
    const file = parseTrial(text);
    const middle = file.runs!.plainMiddle!;
    assert.ok(middle.row > 150 && middle.row < 250, `middle row ${middle.row}`);
    assert.ok(text.startsWith(`  r${middle.row + 1} a`, middle.offset), text.slice(middle.offset, middle.offset + 20));
    const helper = sameThreadHelper(text);
    const split = buildDesign(file, {}, {}, { plainPartHelper: helper });
    const alone = buildDesign(file);
    assert.equal(helper.parts, 1);
    assert.deepEqual(split.diagnostics, alone.diagnostics);
    // Every run's z is pending (the notes themselves are capped per code, the same way on both paths).
    assert.deepEqual(Array.from(split.design.runs.responseStatus[1]!), new Array(400).fill(1));
    assert.ok(split.diagnostics.filter((d) => d.code === "pending-run").length > 100);
    assert.deepEqual(split.design.runs.levels.map((l) => Array.from(l)), alone.design.runs.levels.map((l) => Array.from(l)));
    assert.deepEqual(Array.from(split.design.runs.responseValues[0]!.mantissa), Array.from(alone.design.runs.responseValues[0]!.mantissa));
    // A table too small to have a row on each side of its middle is not marked.
    assert.equal(parseTrial(`factor a levels a1\nruns a\n  a1\n`).runs!.plainMiddle, undefined);
  });

  it("reads the second part on the CLI's worker thread, with the same result", async function () {
    this.timeout(20000);
    const rows = 30000;
    const { text, lineStarts } = body(rows);
    const shared = new SharedArrayBuffer(text.length);
    Buffer.from(shared).write(text, "latin1");
    const script = fileURLToPath(new URL("../../server/src/cli/helper-worker.js", import.meta.url));
    const thread = HelperThread.start(script, shared);
    assert.ok(thread, "the worker starts");
    try {
      let parts = 0;
      const counted: PlainPartHelper = {
        columns: (kinds, count) => thread.columns(kinds, count),
        start: (job) => {
          parts++;
          return thread.start(job);
        },
      };
      const whole = asData(readPlainRuns(text, 0, text.length, rows, LAYOUT));
      for (const row of [1, 12345, rows - 1]) {
        assert.deepEqual(asData(readPlainRuns(text, 0, text.length, rows, LAYOUT, { row, offset: lineStarts[row]!, helper: counted })), whole, `split at ${row}`);
      }
      assert.equal(parts, 3);
      // A declined part comes back as no part, and the thread serves the next job as before.
      const broken = text.slice(0, lineStarts[20000]!) + text.slice(lineStarts[20000]!).replace(/ a\d /, " a9 ");
      const brokenShared = new SharedArrayBuffer(broken.length);
      Buffer.from(brokenShared).write(broken, "latin1");
      const other = HelperThread.start(script, brokenShared)!;
      try {
        const wait = other.start({ from: lineStarts[15000]!, to: broken.length, firstRow: 15000, endRow: rows, layout: LAYOUT, columns: other.columns(LAYOUT.kinds, rows)! });
        assert.equal(wait!(), undefined);
        const part: PlainPart | undefined = other.start({ from: lineStarts[21000]!, to: broken.length, firstRow: 21000, endRow: rows, layout: LAYOUT, columns: other.columns(LAYOUT.kinds, rows)! })!();
        assert.equal(part?.lastId, rows);
      } finally {
        other.close();
      }
    } finally {
      thread.close();
    }
  });
});
