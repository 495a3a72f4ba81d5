/**
 * Property test: whatever table of factor labels and decimal texts goes into `csvToTrial`, the
 * produced `.trial` text parses with the project's parser with zero problems, and every cell reads
 * back (through `cellText`) as exactly the text that was in the CSV, in the same order. The parser
 * is the reference here: it is written independently from the importer, from the same syntax notes.
 */
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import fc from "fast-check";
import { parseTrial } from "../../grammar/src/index.js";
import { cellText, rowCellCount, rowCellIndex } from "../../grammar/src/runs-table.js";
import { csvToTrial } from "../../server/src/import/csv-to-trial.js";

const KEYWORDS = [
  "trial", "owner", "date", "conjecture", "conclusion", "response", "factor", "covariate", "plan", "runs",
  "unit", "levels", "as", "block", "control", "within", "x", "to", "excluded", "id", "Plan", "RUNS",
];

/** Factor labels and column names: identifiers, keywords, numbers and free text with awkward characters. */
const label = fc
  .oneof(
    fc.stringMatching(/^[A-Za-z_][A-Za-z0-9_-]{0,8}$/),
    fc.constantFrom(...KEYWORDS),
    fc.stringMatching(/^-?[0-9]{1,3}(\.[0-9]{1,2})?$/),
    fc.array(fc.constantFrom(..."ab Z9,\"\\'-.°µ#|?;=\u{1F600}"), { minLength: 1, maxLength: 8 }).map((cs) => cs.join("")),
  )
  .map((s) => s.replace(/^[ \t]+|[ \t]+$/g, ""))
  .filter((s) => s !== "" && s !== "?");

/** Numbers in the grammar's form, or a pending cell ("", "?", "NA") whose expected text is "?". */
const decimal = fc.oneof(
  { weight: 5, arbitrary: fc.stringMatching(/^-?[0-9]{1,6}(\.[0-9]{1,6})?([eE][+-]?[0-9]{1,3})?$/) },
  { weight: 1, arbitrary: fc.constantFrom("", "?", "NA") },
);

function csvField(text: string, alwaysQuote: boolean): string {
  return alwaysQuote || /[",\r\n]/.test(text) || text !== text.trim() ? `"${text.replace(/"/g, '""')}"` : text;
}

const table = fc
  .record({
    factorCount: fc.integer({ min: 1, max: 3 }),
    covariateCount: fc.integer({ min: 0, max: 1 }),
    responseCount: fc.integer({ min: 1, max: 2 }),
    rowCount: fc.integer({ min: 1, max: 12 }),
  })
  .chain(({ factorCount, covariateCount, responseCount, rowCount }) =>
    fc.record({
      names: fc.uniqueArray(label, { minLength: factorCount + covariateCount + responseCount, maxLength: factorCount + covariateCount + responseCount }),
      factorCells: fc.array(fc.array(label, { minLength: factorCount, maxLength: factorCount }), { minLength: rowCount, maxLength: rowCount }),
      numberCells: fc.array(fc.array(decimal, { minLength: covariateCount + responseCount, maxLength: covariateCount + responseCount }), {
        minLength: rowCount,
        maxLength: rowCount,
      }),
      factorCount: fc.constant(factorCount),
      covariateCount: fc.constant(covariateCount),
      lineBreak: fc.constantFrom("\n", "\r\n"),
      bom: fc.boolean(),
      alwaysQuote: fc.boolean(),
    }),
  );

describe("csvToTrial output parses (property)", () => {
  it("random tables of labels and decimals parse with zero problems and read back cell for cell", () => {
    fc.assert(
      fc.property(table, (t) => {
        const factors = t.names.slice(0, t.factorCount);
        const covariates = t.names.slice(t.factorCount, t.factorCount + t.covariateCount);
        const responses = t.names.slice(t.factorCount + t.covariateCount);
        const lines = [t.names.map((n) => csvField(n, t.alwaysQuote)).join(",")];
        t.factorCells.forEach((fs, r) => lines.push([...fs, ...t.numberCells[r]!].map((c) => csvField(c, t.alwaysQuote)).join(",")));
        const csv = (t.bom ? "\uFEFF" : "") + lines.join(t.lineBreak) + t.lineBreak;

        const result = csvToTrial(csv, { factors, covariates, responses });
        if (!result.ok) assert.fail(`import failed: ${JSON.stringify(result.problems)}\n${csv}`);
        const trial = parseTrial(result.text);
        assert.deepEqual(trial.problems, [], result.text);

        assert.deepEqual(trial.factors.map((f) => f.name?.text), factors, result.text);
        t.factorCells[0]!.forEach((_, k) => {
          const firstAppearance = [...new Set(t.factorCells.map((row) => row[k]!))];
          assert.deepEqual(trial.factors[k]!.levels.map((l) => l.name.text), firstAppearance, result.text);
        });
        assert.deepEqual(trial.covariates.map((c) => c.name?.text), covariates, result.text);
        assert.deepEqual(trial.responses.map((c) => c.name?.text), responses, result.text);

        const runs = trial.runs;
        assert.ok(runs !== undefined, result.text);
        assert.deepEqual(runs.columns.map((c) => c.text), ["id", ...t.names], result.text);
        assert.equal(runs.responseStart, 1 + t.factorCount + t.covariateCount);
        assert.equal(runs.rows.count, t.factorCells.length, result.text);
        const width = Math.max(2, String(t.factorCells.length).length);
        for (let r = 0; r < runs.rows.count; r++) {
          const expected = [
            "r" + String(r + 1).padStart(width, "0"),
            ...t.factorCells[r]!,
            ...t.numberCells[r]!.map((c) => (c === "" || c === "NA" ? "?" : c)),
          ];
          assert.equal(rowCellCount(runs.rows, r), expected.length, result.text);
          const actual: string[] = expected.map((_, k): string => cellText(result.text, runs.rows, rowCellIndex(runs.rows, r, k)));
          assert.deepEqual(actual, expected, result.text);
        }
      }),
      { numRuns: 300, seed: 20260311 },
    );
  });

  it("the golden import outputs parse with zero problems", () => {
    for (const name of ["plating-bath", "awkward-levels"]) {
      const text = readFileSync(path.resolve("test/import/fixtures/invented", `${name}.trial`), "utf8");
      assert.deepEqual(parseTrial(text).problems, [], name);
    }
  });
});
