import assert from "node:assert/strict";
import fs from "node:fs";
import { runCli } from "../../server/src/cli/run-cli.js";
import { VERSION } from "../../server/src/version.js";
import { captureIo } from "../support/capture-io.js";

/** The samples are the product's demo: they must check clean except for what the incomplete one shows. */
describe("trialbook check on the samples", () => {
  it("exits 0; only the incomplete sample has warnings, and only the ones it was built to show", async () => {
    const io = captureIo();
    assert.equal(await runCli(["check", "samples"], io), 0);
    const lines = io.out.trim().split("\n").filter((l) => l.length > 0);
    assert.deepEqual(lines.filter((l) => / error /.test(l)), []);
    const warnings = lines.filter((l) => / warning /.test(l));
    assert.ok(warnings.length >= 1);
    for (const w of warnings) assert.match(w, /^samples\/incomplete\.trial:\d+:\d+: warning missing-replicate: /);
    assert.ok(lines.some((l) => /^samples\/incomplete\.trial:\d+:\d+: information pending-run: /.test(l)));
  });

  it("exits 1 on a file with an error and prints path:line:column: severity code: message", async () => {
    const dir = fs.mkdtempSync("/tmp/trialbook-check-");
    fs.writeFileSync(`${dir}/bad.trial`, "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 z | 2\n  r3 q | 2.5\n  r4 p | 1.5\n  r5 q | 3\n");
    const io = captureIo({ cwd: dir });
    assert.equal(await runCli(["check", "bad.trial"], io), 1);
    const errors = io.out.split("\n").filter((l) => / error /.test(l));
    assert.deepEqual(errors, ["bad.trial:5:6: error unknown-level: 'z' is not a level of factor 'a': fix the spelling or add it to the factor's levels (declared: p, q)."]);
  });

  it("exits 2 on usage errors", async () => {
    assert.equal(await runCli(["check", "--no-such-flag"], captureIo()), 2);
    assert.equal(await runCli(["check", "does/not/exist.trial"], captureIo()), 2);
    assert.equal(await runCli(["frobnicate"], captureIo()), 2);
    assert.equal(await runCli([], captureIo()), 2);
  });
});

describe("version", () => {
  it("server/src/version.ts agrees with package.json", () => {
    assert.equal(VERSION, JSON.parse(fs.readFileSync("package.json", "utf8")).version);
  });
});
