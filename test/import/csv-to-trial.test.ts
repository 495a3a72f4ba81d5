/**
 * Tests of `csvToTrial`. Golden files (test/import/fixtures/invented/, invented data) hold the
 * expected `.trial` text, checked by hand against the language summary; regenerate them with
 * UPDATE_EXPECT=1 and review the diff. The other cases check the documented rules one by one.
 */
import assert from "node:assert/strict";
import { readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { csvToTrial, type CsvToTrialOptions } from "../../server/src/import/csv-to-trial.js";

const fixtures = path.resolve("test/import/fixtures/invented");

function golden(name: string, options: CsvToTrialOptions): { text: string; warnings: string[] } {
  const csv = readFileSync(path.join(fixtures, `${name}.csv`), "utf8");
  const result = csvToTrial(csv, options);
  if (!result.ok) assert.fail(`import failed: ${JSON.stringify(result.problems)}`);
  const expectedPath = path.join(fixtures, `${name}.trial`);
  if (process.env["UPDATE_EXPECT"] === "1") writeFileSync(expectedPath, result.text);
  assert.equal(result.text, readFileSync(expectedPath, "utf8"));
  return { text: result.text, warnings: result.warnings.map((w) => (w.line !== undefined ? `${w.line}: ` : "") + w.message) };
}

function fail(csv: string, options: CsvToTrialOptions): { line?: number; message: string }[] {
  const result = csvToTrial(csv, options);
  if (result.ok) assert.fail(`expected the import to fail, got:\n${result.text}`);
  return result.problems;
}

function ok(csv: string, options: CsvToTrialOptions): { text: string; warnings: { line?: number; message: string }[] } {
  const result = csvToTrial(csv, options);
  if (!result.ok) assert.fail(`import failed: ${JSON.stringify(result.problems)}`);
  return result;
}

describe("csvToTrial", () => {
  it("imports the plating-bath CSV (BOM, CRLF, id column, block, covariate, empty and NA cells) as the golden file", () => {
    const { warnings } = golden("plating-bath", {
      id: "run",
      factors: ["additive"],
      blocks: ["shift"],
      covariates: ["bath temp"],
      responses: ["thickness", "gloss"],
      source: "lab/plating-bath.csv",
    });
    assert.deepEqual(warnings, [
      '1: columns not imported: "notes"',
      'response "thickness": 1 of 12 cells were empty, ? or NA and are written as ? - pending values',
      'response "gloss": 1 of 12 cells were empty, ? or NA and are written as ? - pending values',
    ]);
  });

  it("quotes levels and names with spaces, commas, quotes, backslashes, keywords and `id`, as the golden file", () => {
    const { text, warnings } = golden("awkward-levels", {
      factors: ["plan", "id", "temp"],
      responses: ["Yield"],
      title: 'Awkward "levels"',
    });
    assert.ok(text.includes('factor "plan"  levels "Lot 7, east", "plan", "back\\\\slash", "Trial"'), text);
    // `x` is a contextual keyword (interactions), so it is quoted too.
    assert.ok(text.includes('factor "id"    levels "x", "say \\"hi\\"", "excluded", "id", "°C"'), text);
    assert.ok(text.includes('      r09  "Lot 7, east"  "°C"          200  | ?'), text);
    assert.deepEqual(warnings, [
      'response "Yield": 1 of 9 cells were empty, ? or NA and are written as ? - pending values',
      "replicates is not written in the plan: only 9 of the 4 x 5 x 3 combinations of factor levels have runs (the factors are not fully crossed)",
    ]);
  });

  it("copies decimal text exactly, never through a float", () => {
    const csv = "g,y,c\na,1.10,0.300\na,1e-3,-0\nb,12.50,007\nb,-0.0,1E+5\n";
    const { text } = ok(csv, { factors: ["g"], covariates: ["c"], responses: ["y"] });
    const rows = text.split("\n").filter((l) => /^ {6}r0/.test(l));
    assert.deepEqual(rows, [
      "      r01  a  0.300 | 1.10",
      "      r02  a  -0    | 1e-3",
      "      r03  b  007   | 12.50",
      "      r04  b  1E+5  | -0.0",
    ]);
  });

  it("keeps levels in order of first appearance and writes roles", () => {
    const csv = "op,day,t,y\nkim,d2,b,1\nlee,d1,a,2\nkim,d1,b,3\nlee,d2,a,4\n";
    const { text } = ok(csv, { factors: ["t"], random: ["op"], subjects: ["day"], responses: ["y"] });
    assert.ok(text.includes("factor t    levels b, a\n"), text);
    assert.ok(text.includes("factor op   levels kim, lee  as random\n"), text);
    assert.ok(text.includes("factor day  levels d2, d1    as subject\n"), text);
  });

  it("sets replicates to the smallest cell count, counting pending runs", () => {
    const csv = "a,b,y\n1,p,5\n1,q,6\n2,p,?\n2,q,7\n1,p,8\n2,q,9\n1,q,\n2,p,3\n";
    // cells: 1/p 2, 1/q 2, 2/p 2, 2/q 2 -> 2
    assert.match(ok(csv, { factors: ["a", "b"], responses: ["y"] }).text, /^plan\n {2}replicates 2\n {2}alpha 0\.05\n/m);
    const unequal = "a,y\nu,1\nu,2\nv,3\nu,4\nv,5\n";
    assert.match(ok(unequal, { factors: ["a"], responses: ["y"] }).text, /^ {2}replicates 2$/m);
  });

  it("leaves replicates out when a combination of levels has no run, or when there are no factors", () => {
    const nested = "a,b,y\n1,p,5\n1,q,6\n2,r,7\n2,s,8\n";
    const result = ok(nested, { factors: ["a", "b"], responses: ["y"] });
    assert.doesNotMatch(result.text, /replicates/);
    assert.ok(result.warnings.some((w) => w.message.includes("only 4 of the 2 x 4 combinations")));
    const none = ok("y\n1\n2\n", { factors: [], responses: ["y"] });
    assert.doesNotMatch(none.text, /replicates/);
    assert.ok(none.warnings.some((w) => w.message.includes("there are no factor columns")));
  });

  it("generates ids zero-padded to the row count (at least two digits)", () => {
    const many = "g,y\n" + Array.from({ length: 120 }, (_, k) => `g${k % 2},${k}\n`).join("");
    const { text } = ok(many, { factors: ["g"], responses: ["y"] });
    assert.match(text, /^ {6}r001 /m);
    assert.match(text, /^ {6}r120 /m);
    assert.match(ok("g,y\na,1\n", { factors: ["g"], responses: ["y"] }).text, /^ {6}r01 /m);
  });

  it("reports a non-numeric response or covariate value with its line", () => {
    const problems = fail("g,c,y\na,1,2\n\nb,x,3\nb,4,1,5\n", { factors: ["g"], covariates: ["c"], responses: ["y"] });
    // The CSV problem (line 5) stops the import before values are looked at.
    assert.deepEqual(problems, [{ line: 5, message: "this row has 4 fields but the header has 3" }]);
    const values = fail("g,c,y\na,1,2\n\nb,x,3\nb,4,1.5.2\n", { factors: ["g"], covariates: ["c"], responses: ["y"] });
    assert.deepEqual(
      values.map((p) => p.line),
      [4, 5],
    );
    assert.match(values[0]!.message, /^covariate "c": "x" is not a number/);
    assert.match(values[1]!.message, /^response "y": "1\.5\.2" is not a number/);
  });

  it("refuses a decimal comma, a leading plus and a bare point, which the language cannot read as numbers", () => {
    for (const bad of ['"1,5"', "+2", ".5", "5."]) {
      const problems = fail(`g,y\na,${bad}\n`, { factors: ["g"], responses: ["y"] });
      assert.equal(problems[0]?.line, 2, bad);
    }
  });

  it("names a missing column and lists the available ones", () => {
    const problems = fail("run,additive,gloss\nr1,a,1\n", { id: "run", factors: ["additve"], responses: ["gloss", "haze"] });
    assert.deepEqual(problems, [
      { line: 1, message: 'factor column "additve" is not in the CSV header; available columns: "run", "additive", "gloss"' },
      { line: 1, message: 'response column "haze" is not in the CSV header; available columns: "run", "additive", "gloss"' },
    ]);
  });

  it("refuses a column used twice, a duplicated header name, no responses and an empty text", () => {
    assert.match(fail("a,y\n1,2\n", { factors: ["a"], responses: ["a"] })[0]!.message, /named twice \(as factor and as response\)/);
    assert.match(fail("a,a,y\n1,2,3\n", { factors: ["a"], responses: ["y"] })[0]!.message, /2 columns named "a"/);
    assert.match(fail("a,y\n1,2\n", { factors: ["a"], responses: [] })[0]!.message, /at least one response/);
    assert.match(fail("", { factors: [], responses: ["y"] })[0]!.message, /empty/);
  });

  it("refuses an empty or ? factor cell and a value spanning lines, with lines", () => {
    const problems = fail('g,y\n,1\n?,2\n"two\nlines",3\n', { factors: ["g"], responses: ["y"] });
    assert.deepEqual(
      problems.map((p) => p.line),
      [2, 3, 4],
    );
    assert.match(problems[2]!.message, /line break/);
  });

  it("warns about a repeated run id and refuses an empty one", () => {
    const repeated = ok("id,g,y\nr1,a,1\nr1,b,2\n", { id: "id", factors: ["g"], responses: ["y"] });
    assert.deepEqual(repeated.warnings, [{ line: 3, message: 'run id "r1" repeats the one on line 2' }]);
    assert.deepEqual(
      fail("id,g,y\n,a,1\n", { id: "id", factors: ["g"], responses: ["y"] }).map((p) => p.line),
      [2],
    );
  });

  it("takes the title from the option, else the file name, else a default", () => {
    assert.match(ok("g,y\na,1\n", { factors: ["g"], responses: ["y"], source: "C:\\data\\cure run.v2.csv" }).text, /^trial "cure run\.v2"\n# Imported from C:\\data\\cure run\.v2\.csv\n/);
    assert.match(ok("g,y\na,1\n", { factors: ["g"], responses: ["y"] }).text, /^trial "Imported runs"\n# Imported from CSV text\n/);
    assert.match(ok("g,y\na,1\n", { factors: ["g"], responses: ["y"], title: 'A "b" \\ c' }).text, /^trial "A \\"b\\" \\\\ c"\n/);
  });
});
