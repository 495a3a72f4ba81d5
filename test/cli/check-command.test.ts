import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { createRequire } from "node:module";
import { DIAGNOSTIC_RULES } from "../../server/src/analysis/diagnostics.js";
import { checkExitCode } from "../../server/src/cli/check-command.js";
import { hasWrittenHelp } from "../../server/src/cli/diagnostic-help.js";
import { findTrialFiles } from "../../server/src/cli/find-trial-files.js";
import { runCli } from "../../server/src/cli/run-cli.js";
import { captureIo } from "../support/capture-io.js";
import { expectGolden } from "./golden.js";

const require = createRequire(import.meta.url);

/**
 * The published SARIF 2.1.0 schema as shipped in the npm package @microsoft/sarif-multitool-ts 5.7.0
 * (assets/sarif-2.1.0.schema.json, Microsoft's SARIF SDK; the OASIS schema with its `$schema` moved to
 * draft 2020-12), validated with Ajv 8.20.0 and ajv-formats 3.0.1 (uri, date-time, uuid formats checked).
 */
function sarifValidator(): { validate: (log: unknown) => boolean; errors: () => string } {
  const schemaPath = path.resolve("node_modules/@microsoft/sarif-multitool-ts/assets/sarif-2.1.0.schema.json");
  const schema = JSON.parse(fs.readFileSync(schemaPath, "utf8")) as Record<string, unknown>;
  const Ajv2020 = require("ajv/dist/2020.js").default as new (options: object) => {
    compile: (s: object) => ((data: unknown) => boolean) & { errors?: unknown };
  };
  const addFormats = require("ajv-formats").default as (ajv: object) => void;
  const ajv = new Ajv2020({ allErrors: true, strict: false });
  addFormats(ajv);
  const check = ajv.compile(schema);
  return { validate: (log) => check(log), errors: () => JSON.stringify(check.errors, null, 2) };
}

function tempDir(prefix: string): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), prefix));
}

/**
 * The SARIF log with the rules array reduced to the rule ids: the rules' text is checked against
 * DIAGNOSTIC_RULES by the rules test below, and other modules append codes while this golden file stays put.
 */
function withoutRules(sarif: string): string {
  const log = JSON.parse(sarif) as { runs: { tool: { driver: { rules: { id: string }[] } } }[] };
  const driver = log.runs[0]!.tool.driver as unknown as Record<string, unknown>;
  driver["rules"] = "one rule per code of DIAGNOSTIC_RULES (see the rules test)";
  return JSON.stringify(log, null, 2) + "\n";
}

const ERROR_FILE = "response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 z | 2\n  r3 q | 2.5\n  r1 p | 1.5\n  r5 q | 3\n";

const CHECK_FIXTURES = "test/cli/fixtures/invented/check";

describe("trialbook check: golden outputs on the invented check fixtures", () => {
  for (const format of ["text", "json", "sarif"] as const) {
    it(`--format ${format}`, async () => {
      const io = captureIo();
      const code = await runCli(["check", CHECK_FIXTURES, "--format", format], io);
      assert.equal(code, 1); // errors.trial has errors
      expectGolden(`check-fixtures.${format === "text" ? "txt" : format === "json" ? "json" : "sarif"}`, format === "sarif" ? withoutRules(io.out) : io.out);
      if (format === "text") expectGolden("check-fixtures.stderr.txt", io.err);
    });
  }
});

describe("trialbook check: exit codes", () => {
  it("--max-warnings: 0 while warnings are at most N, 1 above it", async () => {
    const file = `${CHECK_FIXTURES}/pending.trial`;
    const json = captureIo();
    assert.equal(await runCli(["check", file, "--format", "json"], json), 0);
    const summary = (JSON.parse(json.out) as { summary: { errors: number; warnings: number } }).summary;
    const report = JSON.parse(json.out) as { files: { diagnostics: { severity: string; code: string }[] }[] };
    assert.equal(summary.errors, 0);
    assert.equal(summary.warnings, report.files[0]!.diagnostics.filter((d) => d.severity === "warning").length);
    assert.ok(report.files[0]!.diagnostics.some((d) => d.code === "missing-replicate"), "dwell=long has 2 of 3 replicates");
    const n = summary.warnings;
    assert.equal(await runCli(["check", file, "--max-warnings", String(n)], captureIo()), 0);
    const io = captureIo();
    assert.equal(await runCli(["check", file, "--max-warnings", String(n - 1)], io), 1);
    assert.match(io.err, new RegExp(`More warnings than --max-warnings ${n - 1} allows\\.`));
  });

  it("1 on errors whatever --max-warnings says; 2 for bad option values", async () => {
    const dir = tempDir("trialbook-check-");
    fs.writeFileSync(path.join(dir, "bad.trial"), ERROR_FILE);
    assert.equal(await runCli(["check", "bad.trial", "--max-warnings", "100"], captureIo({ cwd: dir })), 1);
    assert.equal(await runCli(["check", "bad.trial", "--max-warnings", "-1"], captureIo({ cwd: dir })), 2);
    assert.equal(await runCli(["check", "bad.trial", "--max-warnings", "many"], captureIo({ cwd: dir })), 2);
    assert.equal(await runCli(["check", "bad.trial", "--format", "xml"], captureIo({ cwd: dir })), 2);
  });

  it("checkExitCode follows the documented table", () => {
    assert.equal(checkExitCode(0, 5, null), 0);
    assert.equal(checkExitCode(0, 5, 5), 0);
    assert.equal(checkExitCode(0, 6, 5), 1);
    assert.equal(checkExitCode(1, 0, null), 1);
  });
});

describe("trialbook check --format sarif", () => {
  const validator = sarifValidator();

  it("the logs of the samples and of the check fixtures are valid against the SARIF 2.1.0 schema", async () => {
    const samples = captureIo();
    await runCli(["check", "samples", "--format", "sarif"], samples);
    assert.ok(validator.validate(JSON.parse(samples.out)), validator.errors());
    const io = captureIo();
    await runCli(["check", CHECK_FIXTURES, "--format", "sarif"], io);
    const log = JSON.parse(io.out) as unknown;
    assert.ok(validator.validate(log), validator.errors());
  });

  it("the validator rejects a log that breaks the schema (so the check above can fail)", async () => {
    const io = captureIo();
    await runCli(["check", CHECK_FIXTURES, "--format", "sarif"], io);
    const log = JSON.parse(io.out) as { runs: { results: { level: string }[] }[] };
    log.runs[0]!.results[0]!.level = "fatal";
    assert.equal(validator.validate(log), false);
  });

  it("has a rule with short and full description, help and default level for every diagnostic code", async () => {
    const io = captureIo();
    await runCli(["check", "samples", "--format", "sarif"], io);
    const rules = (JSON.parse(io.out) as { runs: { tool: { driver: { rules: Record<string, any>[] } } }[] }).runs[0]!.tool.driver.rules;
    const codes = Object.keys(DIAGNOSTIC_RULES);
    assert.deepEqual(rules.map((r) => r["id"]), codes);
    // The codes this module was written against all have written entries.
    for (const code of ["syntax", "unknown-level", "duplicate-run", "missing-replicate", "empty-cell", "no-error-df", "aliased-term", "value-out-of-range", "systematic-order"]) {
      assert.ok(hasWrittenHelp(code), code);
    }
    const levels: Record<string, string> = { error: "error", warning: "warning", information: "note", hint: "note" };
    for (const rule of rules) {
      const code = rule["id"] as keyof typeof DIAGNOSTIC_RULES;
      assert.equal(rule["shortDescription"].text, DIAGNOSTIC_RULES[code].summary);
      assert.equal(rule["defaultConfiguration"].level, levels[DIAGNOSTIC_RULES[code].severity]);
      assert.ok(rule["help"].text.length > 10);
      // A code added elsewhere without a written entry falls back to its summary; written ones say more.
      if (hasWrittenHelp(code)) assert.notEqual(rule["fullDescription"].text, rule["shortDescription"].text);
      else assert.equal(rule["fullDescription"].text, rule["shortDescription"].text);
    }
  });

  it("locates results physically: relative URI, 1-based region, related location of a duplicate run; valid too", async () => {
    const dir = tempDir("trialbook-sarif-");
    fs.mkdirSync(path.join(dir, "lab dir"));
    fs.writeFileSync(path.join(dir, "lab dir", "bad.trial"), ERROR_FILE);
    const io = captureIo({ cwd: dir });
    assert.equal(await runCli(["check", ".", "--format", "sarif"], io), 1);
    const log = JSON.parse(io.out) as any;
    assert.ok(validator.validate(log), validator.errors());
    const results = log.runs[0].results as any[];
    // Line 5 `  r2 z | 2`: the level z is at column 6 (1-based), one character long.
    const unknown = results.find((r) => r.ruleId === "unknown-level");
    assert.deepEqual(unknown.locations[0].physicalLocation, {
      artifactLocation: { uri: "lab%20dir/bad.trial", uriBaseId: "%SRCROOT%", index: 0 },
      region: { startLine: 5, startColumn: 6, endLine: 5, endColumn: 7 },
    });
    assert.equal(unknown.level, "error");
    assert.equal(log.runs[0].tool.driver.rules[unknown.ruleIndex].id, "unknown-level");
    const duplicate = results.find((r) => r.ruleId === "duplicate-run");
    assert.equal(duplicate.locations[0].physicalLocation.region.startLine, 7);
    assert.equal(duplicate.relatedLocations[0].physicalLocation.region.startLine, 4);
  });
});

describe("trialbook check: finding files", () => {
  it("respects .gitignore files (root and nested, with negation) and .git/info/exclude; named files are always checked", () => {
    const dir = tempDir("trialbook-find-");
    execFileSync("git", ["init", "-q"], { cwd: dir });
    const write = (p: string) => {
      fs.mkdirSync(path.dirname(path.join(dir, p)), { recursive: true });
      fs.writeFileSync(path.join(dir, p), "response y\n");
    };
    for (const p of ["a.trial", "build/b.trial", "lab/c.trial", "lab/scratch-1.trial", "lab/keep/scratch-2.trial", "lab/keep/d.trial", "local/e.trial", "f.trial.bak"]) write(p);
    fs.writeFileSync(path.join(dir, ".gitignore"), "build/\nscratch-*.trial\n");
    fs.writeFileSync(path.join(dir, "lab", "keep", ".gitignore"), "!scratch-2.trial\n");
    fs.writeFileSync(path.join(dir, ".git", "info", "exclude"), "local\n");
    const found = findTrialFiles(["."], dir).files;
    assert.deepEqual(found, ["a.trial", "lab/c.trial", "lab/keep/d.trial", "lab/keep/scratch-2.trial"]);
    // git itself agrees on what is ignored (the outside reference for the rules).
    const listed = execFileSync("git", ["ls-files", "--others", "--exclude-standard"], { cwd: dir, encoding: "utf8" })
      .split("\n")
      .filter((p) => p.endsWith(".trial"))
      .sort();
    assert.deepEqual(listed, [...found].sort());
    // Searching a subdirectory still applies the root's rules; a file named explicitly is taken as given.
    assert.deepEqual(findTrialFiles(["lab"], dir).files, ["lab/c.trial", "lab/keep/d.trial", "lab/keep/scratch-2.trial"]);
    assert.deepEqual(findTrialFiles(["build/b.trial"], dir).files, ["build/b.trial"]);
  });
});

describe("trialbook check: colour", () => {
  const dir = tempDir("trialbook-colour-");
  fs.writeFileSync(path.join(dir, "bad.trial"), ERROR_FILE);
  const ESC = "\u001b[";

  it("colours only on a TTY", async () => {
    const tty = captureIo({ cwd: dir, isTty: true });
    await runCli(["check", "bad.trial"], tty);
    assert.ok(tty.out.includes(`${ESC}31merror${ESC}39m`));
    const pipe = captureIo({ cwd: dir, isTty: false });
    await runCli(["check", "bad.trial"], pipe);
    assert.ok(!pipe.out.includes(ESC));
  });

  it("never with NO_COLOR set (non-empty), even on a TTY", async () => {
    const io = captureIo({ cwd: dir, isTty: true, env: { NO_COLOR: "1" } });
    await runCli(["check", "bad.trial"], io);
    assert.ok(!io.out.includes(ESC));
    assert.match(io.out, /^bad\.trial:5:6: error unknown-level: /m);
  });

  it("shows progress on stderr for a large file on a TTY only", async () => {
    const big = tempDir("trialbook-big-");
    const rows = Array.from({ length: 60000 }, (_, k) => `  r${k + 1} ${k % 2 ? "p" : "q"} | ${(k % 7) + 1}.25`).join("\n");
    fs.writeFileSync(path.join(big, "big.trial"), `response y\nfactor a levels p, q\nruns id a | y\n${rows}\n`);
    const tty = captureIo({ cwd: big, isTty: true });
    await runCli(["check", "big.trial"], tty);
    assert.match(tty.err, /\r\u001b\[KChecking big\.trial/);
    const pipe = captureIo({ cwd: big, isTty: false });
    await runCli(["check", "big.trial"], pipe);
    assert.ok(!pipe.err.includes("Checking"));
  });
});
