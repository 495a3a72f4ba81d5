import assert from "node:assert/strict";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { readCsv } from "../../server/src/import/csv.js";
import { runCli } from "../../server/src/cli/run-cli.js";
import { captureIo } from "../support/capture-io.js";
import { expectGolden } from "./golden.js";

const SAMPLES = fs.readdirSync("samples").filter((f) => f.endsWith(".trial")).sort();

describe("trialbook analyze: golden outputs on the samples", () => {
  for (const sample of SAMPLES) {
    for (const format of ["text", "json"] as const) {
      it(`${sample} --format ${format}`, async () => {
        const io = captureIo();
        assert.equal(await runCli(["analyze", `samples/${sample}`, "--format", format], io), 0);
        expectGolden(`analyze-${sample.replace(/\.trial$/, "")}.${format === "text" ? "txt" : "json"}`, io.out);
      });
    }
  }
});

const PLATING_CSV = "test/import/fixtures/invented/plating-bath.csv";
const IMPORT_ARGS = ["import", PLATING_CSV, "--id", "run", "--factor", "additive", "--block", "shift", "--covariate", "bath temp", "--response", "thickness", "gloss"];

describe("trialbook import and export: golden outputs", () => {
  it("import of the invented plating-bath CSV", async () => {
    const io = captureIo();
    assert.equal(await runCli(IMPORT_ARGS, io), 0);
    expectGolden("import-plating-bath.trial", io.out);
    expectGolden("import-plating-bath.stderr.txt", io.err);
  });

  for (const sample of SAMPLES) {
    it(`export samples/${sample} --format csv`, async () => {
      const io = captureIo();
      assert.equal(await runCli(["export", `samples/${sample}`, "--format", "csv"], io), 0);
      expectGolden(`export-${sample.replace(/\.trial$/, "")}.csv`, io.out);
    });
  }
});

describe("trialbook export --format csv", () => {
  it("import → export keeps every value's text (the CSV reader of server/src/import is the reference)", async () => {
    const imported = captureIo();
    assert.equal(await runCli(IMPORT_ARGS, imported), 0);
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-export-"));
    fs.writeFileSync(path.join(dir, "plating.trial"), imported.out);
    const exported = captureIo({ cwd: dir });
    assert.equal(await runCli(["export", "plating.trial", "--format", "csv", "-o", "out.csv"], exported), 0);

    const original = readCsv(fs.readFileSync(PLATING_CSV, "utf8"));
    const back = readCsv(fs.readFileSync(path.join(dir, "out.csv"), "utf8"));
    assert.deepEqual(back.problems, []);
    assert.deepEqual(back.header, ["id", "additive", "shift", "bath temp", "thickness", "gloss"]);
    assert.equal(back.rows.length, original.rows.length);
    const column = (table: typeof original, name: string) => table.header.findIndex((h) => h.trim() === name);
    const pairs: [string, string][] = [["run", "id"], ["additive", "additive"], ["shift", "shift"], ["bath temp", "bath temp"], ["thickness", "thickness"], ["gloss", "gloss"]];
    let compared = 0;
    original.rows.forEach((row, r) => {
      for (const [from, to] of pairs) {
        const text = row.fields[column(original, from)]!.trim();
        // import writes an empty, ? or NA cell as ? (pending); everything else is copied as written.
        const expected = text === "" || text === "NA" ? "?" : text;
        assert.equal(back.rows[r]!.fields[column(back, to)], expected, `row ${r + 1}, column ${from}`);
        compared++;
      }
    });
    assert.equal(compared, original.rows.length * pairs.length);
  });

  it("quotes fields as RFC 4180 requires, keeps quoted levels' text, writes excluded runs' reasons, ends records in CRLF", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-export-"));
    fs.writeFileSync(
      path.join(dir, "q.trial"),
      [
        "response y",
        'factor lot levels "Lot 7, east", "say \\"hi\\"", plain',
        "runs id lot | y",
        '  r1 "Lot 7, east" | 1.50',
        '  r2 "say \\"hi\\"" | ?',
        '  r3 plain | 2.0e-3 excluded "gauge \\"B\\" offline"',
        "",
      ].join("\n"),
    );
    const io = captureIo({ cwd: dir });
    assert.equal(await runCli(["export", "q.trial", "--format", "csv"], io), 0);
    assert.equal(io.out, 'id,lot,y,excluded\r\nr1,"Lot 7, east",1.50,\r\nr2,"say ""hi""",?,\r\nr3,plain,2.0e-3,"gauge ""B"" offline"\r\n');
    const empty = captureIo({ cwd: dir });
    await runCli(["export", "q.trial", "--format", "csv", "--pending", ""], empty);
    assert.match(empty.out, /^r2,"say ""hi""",,$/m);
  });

  it("exit codes: 2 without --format or with another format; 1 without a runs table or with rows that do not fit", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-export-"));
    fs.writeFileSync(path.join(dir, "none.trial"), "response y\n");
    fs.writeFileSync(path.join(dir, "short.trial"), "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 | 2\n");
    assert.equal(await runCli(["export", "none.trial"], captureIo({ cwd: dir })), 2);
    assert.equal(await runCli(["export", "none.trial", "--format", "xlsx"], captureIo({ cwd: dir })), 2);
    assert.equal(await runCli(["export", "missing.trial", "--format", "csv"], captureIo({ cwd: dir })), 2);
    const none = captureIo({ cwd: dir });
    assert.equal(await runCli(["export", "none.trial", "--format", "csv"], none), 1);
    assert.match(none.err, /has no runs table/);
    const short = captureIo({ cwd: dir });
    assert.equal(await runCli(["export", "short.trial", "--format", "csv"], short), 1);
    assert.equal(short.out, "id,a,y\r\nr1,p,1\r\nr2,,2\r\n");
    assert.match(short.err, /^short\.trial:5: warning: 1 missing cell exported as empty$/m);
  });
});
