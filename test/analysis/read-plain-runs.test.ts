/**
 * The plain-table reader (`read-plain-runs.ts`) against the general path of the model builder
 * (`readRuns` in build-design.ts, through the parser's `RunRows`): on every table, the design's runs and
 * the diagnostics must be the same whichever path read them. The general path is forced by handing
 * `buildDesign` the same parsed file without its `plainBody`.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import type { RunsTable, TrialFile } from "../../grammar/src/ast.js";
import { parseTrial } from "../../grammar/src/parse.js";
import { analyzeParsed } from "../../server/src/analysis/analyze-document.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import type { DesignRuns } from "../../server/src/analysis/design.js";

/** The file with its runs table as the general path sees it: rows built, no `plainBody`. */
function withoutPlainBody(file: TrialFile): TrialFile {
  const runs = file.runs!;
  const general: RunsTable = {
    kind: "runs",
    span: runs.span,
    keywordSpan: runs.keywordSpan,
    columns: runs.columns,
    responseStart: runs.responseStart,
    headerHasPipe: runs.headerHasPipe,
    rows: runs.rows,
    rowCount: runs.rowCount,
  };
  return { ...file, runs: general };
}

/** The stored fields of runs as plain arrays (values only where measured: elsewhere they mean nothing). */
function runsAsData(runs: DesignRuns): Record<string, unknown> {
  const measured = (status: Uint8Array, column: { mantissa: Float64Array; exponent: Int8Array }) =>
    Array.from(status, (s, r) => (s === 0 ? [column.mantissa[r], column.exponent[r]] : null));
  return {
    count: runs.count,
    idCells: Array.from(runs.idCells),
    levels: runs.levels.map((l) => Array.from(l)),
    responseCells: runs.responseCells.map((c) => Array.from(c)),
    responseStatus: runs.responseStatus.map((s) => Array.from(s)),
    responseValues: runs.responseValues.map((v, k) => measured(runs.responseStatus[k]!, v)),
    covariateCells: runs.covariateCells.map((c) => Array.from(c)),
    covariateStatus: runs.covariateStatus.map((s) => Array.from(s)),
    covariateValues: runs.covariateValues.map((v, k) => measured(runs.covariateStatus[k]!, v)),
    excluded: Array.from(runs.excluded),
    ids: runs.ids,
    rowSpans: runs.rowSpans,
    responseTexts: runs.responseTexts,
    covariateTexts: runs.covariateTexts,
  };
}

/** True when the plain reader made these runs: their `rows` is then the table's lazy getter. */
function readByPlainReader(runs: DesignRuns): boolean {
  return typeof Object.getOwnPropertyDescriptor(runs, "rows")?.get === "function";
}

/** Builds the design both ways, checks they agree, and returns whether the plain reader was used. */
function bothPathsAgree(text: string): boolean {
  const file = parseTrial(text);
  const fast = buildDesign(file);
  const general = buildDesign(withoutPlainBody(file));
  assert.deepEqual(fast.diagnostics, general.diagnostics);
  assert.deepEqual(runsAsData(fast.design.runs), runsAsData(general.design.runs));
  return readByPlainReader(fast.design.runs);
}

const DECLARATIONS = [
  "response y unit mm",
  "response z unit mm",
  "factor a levels a1, a2, a3",
  "factor b levels low, high, x-1, Low",
  "covariate t unit C",
].join("\n");

describe("plain runs tables read in one pass", () => {
  it("reads a regular sheet without building the parser's cell columns, as the general path does", () => {
    const rows = Array.from({ length: 50 }, (_, i) => `  r${i + 1} a${(i % 3) + 1} ${["low", "high", "x-1", "Low"][i % 4]} ${15 + (i % 7)}.${i % 10} | ${20 + i / 8} -${i}.50\n`);
    const text = `${DECLARATIONS}\nruns id a b t | y z\n${rows.join("")}`;
    assert.equal(bothPathsAgree(text), true);
    const design = buildDesign(parseTrial(text)).design;
    // Cell indices are computed: cell k of row r is r * 6 + k; the rows are built only when asked.
    assert.equal(design.runs.idCells[7], 42);
    assert.equal(design.runs.responseCells[1]![7], 47);
    assert.equal(design.runs.ids[7], "r8");
    assert.deepEqual(design.runs.rowSpans[0], { start: text.indexOf("r1 "), end: text.indexOf("\n", text.indexOf("r1 ")) });
    assert.equal(design.runs.responseTexts[1]![3], "-3.50");
    // Read whole by the plain reader, every run is known to be complete; the general path does not say.
    assert.equal(design.runs.complete, true);
    assert.equal(buildDesign(withoutPlainBody(parseTrial(text))).design.runs.complete, undefined);
  });

  it("gives the same analysis as the general path: tables, means, comparisons, checks, residuals", () => {
    // Unbalanced, so that the fit runs on cell statistics; enough runs for the binned variance checks.
    const rows = Array.from({ length: 40000 }, (_, i) => (i % 9 === 4 ? "" : `  r${i + 1} a${(i % 3) + 1} ${["low", "high"][(i >> 1) % 2]} ${15 + (i % 7)}.${i % 10} | ${(20 + (i % 3) + ((i * 7919) % 101) / 50).toFixed(2)} -${i % 13}.5\n`));
    const text = `${DECLARATIONS.replace("x-1, Low", "x-1")}\nruns id a b t | y z\n${rows.join("")}`;
    const file = parseTrial(text);
    const fast = analyzeParsed(file);
    const general = analyzeParsed(withoutPlainBody(file));
    assert.equal(fast.design.runs.complete, true);
    assert.equal(fast.responses.length, 2);
    assert.ok(fast.responses.every((r) => r.anova.length === 6 && r.residuals.length === fast.design.runs.count));
    assert.deepEqual(JSON.parse(JSON.stringify(fast.responses)), JSON.parse(JSON.stringify(general.responses)));
    assert.deepEqual(fast.diagnostics, general.diagnostics);
  });

  it("leaves to the general path what it does not read, with the same results", () => {
    const head = `${DECLARATIONS}\nruns id a b t | y z\n`;
    const ok = (i: number) => `  r${i} a1 low 15 | 20 21\n`;
    const cases = [
      "  r9 a1 low ? | 20 21\n", // a covariate not recorded
      "  r9 a4 low 15 | 20 21\n", // unknown level
      "  r9 a1 low 15 | 2e1 21\n", // not a plain decimal
      "  r9 a1 low 15 | 20\n", // a missing cell
      "  r9 a1 low | 20 21\n", // a missing cell before '|'
      "  r9 a1 low 15 16 | 20 21\n", // an extra cell
      "  r2 a1 low 15 | 20 21\n", // an id that does not increase (a repeat here)
      "  q a1 low 15 | 20 21\n", // an id without a number
      "  r9 a1 low 15 | 1234567890.1234567 21\n", // more than 15 significant digits
      "  r9 a1 low 15 | 20 21 \u00e9\n", // beyond ASCII
    ];
    for (const odd of cases) {
      const text = head + ok(1) + ok(2) + odd + ok(10);
      assert.equal(bothPathsAgree(text), false, odd);
    }
    // A pending response is read, with the same note for its row (from the cells the reader recorded).
    const pending = head + ok(1) + "  r2 a1 low 15 | ? 21\n  r3 a2 high 16 | ? ?\n" + ok(10);
    assert.equal(bothPathsAgree(pending), true);
    const built = buildDesign(parseTrial(pending));
    assert.deepEqual(
      built.diagnostics.filter((d) => d.code === "pending-run").map((d) => d.message),
      ["Run r2 is pending: y not measured yet.", "Run r3 is pending: y, z not measured yet."],
    );
    assert.deepEqual(Array.from(built.design.runs.responseStatus[1]!), [0, 0, 1, 0]);
    assert.equal(built.design.runs.complete, undefined);
    // Responses written in another order than declared, and no id column: the same notes as the general path.
    assert.equal(bothPathsAgree(`${DECLARATIONS}\nruns a b t | z y\n  a1 low 15 | 21 ?\n  a2 high 16 | ? ?\n  a1 low 15 | ? 20\n`), true);
    // Columns the header names but the file does not declare are skipped by both.
    assert.equal(bothPathsAgree(`${DECLARATIONS}\nruns id a b t w | y z\n  r1 a1 low 15 0 | 20 21\n`), true);
  });

  it("reads rows across its 65,536-character chunks at every position", () => {
    const rows = Array.from({ length: 6000 }, (_, i) => (i % 11 === 0 ? `# note ${i}\n` : `  r${i}\ta${(i % 3) + 1} high 1${i % 9}.5  |  ${i}.25 -0.${i % 10}\r\n`)).join("");
    for (let shift = 0; shift < 24; shift++) {
      const text = `${DECLARATIONS}\nruns id a b t | y z\n${" ".repeat(shift)}\n${rows}`;
      assert.ok(text.length > 2 * 65536);
      assert.equal(bothPathsAgree(text), true, `shift ${shift}`);
    }
  });

  it("agrees with the general path on random tables", () => {
    let plain = 0;
    let runs = 0;
    const value = fc.tuple(fc.integer({ min: -9999, max: 99999 }), fc.nat({ max: 4 })).map(([m, d]) => (m / 10 ** d).toFixed(d));
    const row = fc.record({
      a: fc.constantFrom("a1", "a2", "a3"),
      b: fc.constantFrom("low", "high", "x-1", "Low"),
      t: value,
      y: value,
      z: value,
      gap: fc.constantFrom(" ", "  ", "\t"),
      note: fc.constantFrom("", "", "", " # checked", "\t#", ' # "re-measured", excluded nothing'),
    });
    // Oddities put into some rows: each makes the plain reader decline, or (a comment or blank line)
    // tests its line handling.
    const oddity = fc.tuple(
      fc.nat(),
      fc.constantFrom("a4", "?", "lo", "1e3", ".5", "5.", "1.2.3", "-", "+1.5", "-0", "0.000", "123456789012345678", "short", "long", "comment", "blank", "repeat-id", "no-id"),
    );
    fc.assert(
      fc.property(fc.array(row, { minLength: 1, maxLength: 30 }), fc.array(oddity, { maxLength: 2 }), fc.constantFrom("\n", "\r\n"), (rows, oddities, lineBreak) => {
        const lines = rows.map((r, i) => {
          const cells = [`r${(i + 1) * 3}`, r.a, r.b, r.t, "|", r.y, r.z];
          let line: string | undefined;
          for (const [at, what] of oddities) {
            if (at % rows.length !== i) continue;
            if (what === "short") cells.pop();
            else if (what === "long") cells.push("9");
            else if (what === "repeat-id") cells[0] = "r3";
            else if (what === "no-id") cells[0] = "x";
            else if (what === "comment") line = `  # ${cells.join(" ")}`;
            else if (what === "blank") line = "   ";
            else cells[(at >> 3) % 2 === 0 ? 1 + (at % 3) : 5 + (at % 2)] = what;
          }
          return line ?? "  " + cells.join(r.gap) + r.note;
        });
        if (bothPathsAgree(`${DECLARATIONS}\nruns id a b t | y z${lineBreak}${lines.join(lineBreak)}${lineBreak}`)) plain++;
        runs++;
      }),
      { numRuns: 400, seed: 20261204 },
    );
    // Both paths are exercised: the generator makes regular tables often enough.
    assert.ok(plain > runs / 5 && plain < runs, `${plain} of ${runs} read by the plain reader`);
  });

  it("counts as it reads what the checks and the centring would count afterwards (tallies)", () => {
    // Header columns in another order than the declarations, a random factor (not a cell factor), a
    // sorted run order of 'a', a missing replicate, zeros of both signs and values of several exponents.
    const declarations = ["response y unit mm", "response z unit mm", "factor a levels a1, a2, a3", "factor b levels low, high", "factor lot levels L1, L2 as random", "plan", "  replicates 17"].join("\n");
    const rows: string[] = [];
    for (let i = 0; i < 200; i++) {
      if (i === 17) continue; // a2 x low x L2 loses a run
      const a = `a${Math.floor(i / 67) + 1}`;
      const y = ["-0", "0.0", "12.5", "-3", "1250", "0.00125"][i % 6];
      rows.push(`  r${i + 1} ${["low", "high"][i % 2]} L${((i >> 1) % 2) + 1} ${a} | ${(7.25 + i / 16).toFixed(3)} ${y}\n`);
    }
    const text = `${declarations}\nruns id b lot a | y z\n${rows.join("")}`;
    const file = parseTrial(text);
    const fast = analyzeParsed(file);
    const general = analyzeParsed(withoutPlainBody(file));
    const tallies = fast.design.runs.tallies!;
    assert.ok(tallies, "the plain reader's tallies");
    assert.equal(general.design.runs.tallies, undefined);
    assert.deepEqual(fast.diagnostics, general.diagnostics);
    assert.deepEqual(JSON.parse(JSON.stringify(fast.responses)), JSON.parse(JSON.stringify(general.responses)));
    const codes = new Set<string>(fast.diagnostics.map((d) => d.code));
    for (const code of ["systematic-order", "missing-replicate", "unbalanced-cells"]) assert.ok(codes.has(code), `${code} in ${[...codes].join(", ")}`);
    // The tallies against counting the design's runs afterwards.
    const { levels } = fast.design.runs;
    fast.design.factors.forEach((factor, f) => {
      const counts = new Int32Array(factor.levels.length);
      const rankSums = new Float64Array(factor.levels.length);
      const firstRuns = new Int32Array(factor.levels.length).fill(-1);
      levels[f]!.forEach((level, r) => {
        counts[level]!++;
        rankSums[level] += r + 1;
        if (firstRuns[level]! < 0) firstRuns[level] = r;
      });
      assert.deepEqual(tallies.levels[f], { counts, rankSums, firstRuns }, factor.name);
    });
    const radices = fast.design.factors.map((f) => f.levels.length);
    const cellCounts = new Int32Array(radices.reduce((a, b) => a * b, 1));
    const cellFirst = new Int32Array(cellCounts.length).fill(-1);
    for (let r = 0; r < fast.design.runs.count; r++) {
      const d = levels.reduce((cell, l, f) => cell * radices[f]! + l[r]!, 0);
      cellCounts[d]!++;
      if (cellFirst[d]! < 0) cellFirst[d] = r;
    }
    assert.deepEqual(tallies.cells, { counts: cellCounts, firstRuns: cellFirst });
    // z holds zeros of both signs (-0 first) and -3 at exponent 0: the largest is the first zero met, as in
    // the centring's own pass.
    assert.equal(tallies.responseExtremes[1]!.lowest[22], -3);
    assert.ok(Object.is(tallies.responseExtremes[1]!.highest[22], -0));
    assert.equal(tallies.responseExtremes[1]!.scale, -5);
    assert.deepEqual(Array.from(tallies.responseExtremes[1]!.present.keys()).filter((k) => tallies.responseExtremes[1]!.present[k]), [-5 + 22, -1 + 22, 22, 23]);
  });
});

