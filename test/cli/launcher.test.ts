import { strict as assert } from "node:assert";
import { spawnSync } from "node:child_process";
import { copyFileSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { ensureServerBundle } from "../lsp/protocol-client.js";

/** Runs a launcher (dist/cli.cjs or a copy) with the code-cache report on. */
function runCli(launcher: string, args: readonly string[]): { status: number | null; stdout: string; stderr: string } {
  const out = spawnSync(process.execPath, [launcher, ...args], { encoding: "utf8", env: { ...process.env, TRIALBOOK_DEBUG_CODE_CACHE: "1", TRIALBOOK_WRITE_CODE_CACHE: "" } });
  return { status: out.status, stdout: out.stdout, stderr: out.stderr };
}

describe("cli: the bin's launcher and its code cache (dist/cli.cjs)", function () {
  this.timeout(120_000);
  const version = (JSON.parse(readFileSync("package.json", "utf8")) as { version: string }).version;
  const sample = resolve("samples/two-factor.trial");
  let copy = "";

  before(async () => {
    // The build makes the bundles and the cache (esbuild.mjs); rebuilt here when sources are newer.
    await ensureServerBundle();
    copy = mkdtempSync(join(tmpdir(), "trialbook-launcher-"));
    for (const name of ["cli.cjs", "cli-main.cjs", "report.cjs"]) copyFileSync(join("dist", name), join(copy, name));
  });

  after(() => rmSync(copy, { recursive: true, force: true }));

  it("the build wrote a cache that this Node accepts, and the CLI answers through it", () => {
    assert.ok(existsSync("dist/cli-main.code-cache"), "npm run build writes dist/cli-main.code-cache");
    const run = runCli("dist/cli.cjs", ["--version"]);
    assert.equal(run.status, 0);
    assert.equal(run.stdout.trim(), version);
    assert.match(run.stderr, /^code cache: used$/m);
  });

  it("gives the same analysis, exit code and report with the cache, without it and with a damaged one", () => {
    const reference = runCli("dist/cli.cjs", ["analyze", "--format", "json", sample]);
    assert.equal(reference.status, 0);
    assert.ok(reference.stdout.includes('"anova"'), "the analysis is printed");
    // No cache file beside the copy: compiled as usual.
    const absent = runCli(join(copy, "cli.cjs"), ["analyze", "--format", "json", sample]);
    assert.match(absent.stderr, /^code cache: absent$/m);
    assert.equal(absent.stdout, reference.stdout);
    // A damaged cache is rejected by V8 and costs nothing but time.
    writeFileSync(join(copy, "cli-main.code-cache"), "not a code cache");
    const damaged = runCli(join(copy, "cli.cjs"), ["analyze", "--format", "json", sample]);
    assert.match(damaged.stderr, /^code cache: rejected$/m);
    assert.equal(damaged.stdout, reference.stdout);
    assert.equal(damaged.status, 0);
    // The user's run never writes the cache: the damaged file is still there as it was.
    assert.equal(readFileSync(join(copy, "cli-main.code-cache"), "utf8"), "not a code cache");
    // The exit code of a file with errors comes through the launcher.
    const bad = join(copy, "bad.trial");
    writeFileSync(bad, 'trial "x"\nfactor a levels a1, a2\nresponse y\nruns id a | y\n  r1 a3 | 1\n');
    assert.equal(runCli("dist/cli.cjs", ["check", bad]).status, 1);
    // The report renderer, loaded on demand from the bundle's directory.
    const html = join(copy, "report.html");
    const report = runCli(join(copy, "cli.cjs"), ["report", sample, "-o", html]);
    assert.equal(report.status, 0, report.stderr);
    assert.ok(readFileSync(html, "utf8").includes("<svg"), "the report has its plots");
  });

  it("reads a large file's table on two threads (dist/helper-worker.cjs) with the same output as on one", () => {
    // About 5 MB of invented runs (a formula, not measurements), with pending values and comments.
    const rows: string[] = [];
    for (let i = 0; i < 200_000; i++) {
      const y = i % 9973 === 17 ? "?" : (20 + (i % 4) * 0.3 + ((i * 7919) % 97) / 100).toFixed(2);
      rows.push(`  r${i + 1} a${(i % 4) + 1} b${((i >> 2) % 3) + 1} | ${y}${i % 50_000 === 3 ? " # re-measured" : ""}\n`);
    }
    const large = join(copy, "large.trial");
    writeFileSync(large, `# Invented benchmark-like file.\nresponse y unit mm\nfactor a levels a1, a2, a3, a4\nfactor b levels b1, b2, b3\nruns id a b | y\n${rows.join("")}`);
    const debug = { TRIALBOOK_DEBUG_HELPER_THREAD: "1" };
    const run = (launcher: string, verb: string) => {
      const out = spawnSync(process.execPath, [launcher, verb, ...(verb === "analyze" ? ["--format", "json"] : []), large], { encoding: "utf8", env: { ...process.env, ...debug }, maxBuffer: 1 << 28 });
      return { status: out.status, stdout: out.stdout, stderr: out.stderr };
    };
    for (const verb of ["analyze", "check"]) {
      const two = run("dist/cli.cjs", verb);
      // The copy has no worker bundle beside it: the same CLI on one thread.
      const one = run(join(copy, "cli.cjs"), verb);
      assert.match(two.stderr, /^helper thread: 1 of 1 parts read, 1 quick pass taken, 1 variance tests, 1 level means$/m, verb);
      assert.match(one.stderr, /^helper thread: not started$/m, verb);
      assert.equal(two.status, one.status, verb);
      assert.equal(two.stdout, one.stdout, verb);
    }
    const analysis = JSON.parse(run("dist/cli.cjs", "analyze").stdout) as { responses: { n: number }[] };
    assert.equal(analysis.responses[0]!.n, 200_000 - 21);
  });
});
