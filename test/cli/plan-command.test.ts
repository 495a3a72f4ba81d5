/**
 * `trialbook plan` end to end in-process: writing with -o through a temporary file, --dry-run, the
 * printable sheets (HTML escapes every string from the file), and refusing a broken file.
 */
import assert from "node:assert/strict";
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import type { CliIo } from "../../server/src/cli/io.js";
import { runCli } from "../../server/src/cli/run-cli.js";

// Invented scenario: a coating bath.
const FILE = `trial "Bath <A> & \\"B\\""\nresponse thickness unit um\nfactor bath levels "hot & fast", "<cold>"\nplan\n  replicates 2\n  seed 12\n`;

function io(cwd: string) {
  const out: string[] = [];
  const err: string[] = [];
  const value: CliIo = { cwd, stdout: (t) => out.push(t), stderr: (t) => err.push(t), readStdin: async () => "", env: {}, isTty: false };
  return { value, out: () => out.join(""), err: () => err.join("") };
}

describe("cli: trialbook plan", () => {
  it("writes the plan in place with -o FILE, leaves no temporary file, and a second run changes nothing", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "trialbook-plan-"));
    writeFileSync(path.join(dir, "bath.trial"), FILE);
    const a = io(dir);
    assert.equal(await runCli(["plan", "bath.trial", "-o", "bath.trial"], a.value), 0);
    const planned = readFileSync(path.join(dir, "bath.trial"), "utf8");
    assert.ok(planned.startsWith(FILE));
    assert.equal((planned.match(/\| \?/g) ?? []).length, 4);
    assert.deepEqual(readdirSync(dir), ["bath.trial"]);
    const b = io(dir);
    assert.equal(await runCli(["plan", "bath.trial"], b.value), 0);
    assert.equal(b.out(), planned);
  });

  it("--dry-run prints the summary and why replicates needed are not computed without 'detect', writing nothing", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "trialbook-plan-"));
    writeFileSync(path.join(dir, "bath.trial"), FILE);
    const a = io(dir);
    assert.equal(await runCli(["plan", "bath.trial", "--dry-run", "-o", "bath.trial"], a.value), 0);
    assert.match(a.out(), /pending rows added: 4/);
    assert.match(a.out(), /replicates needed: not computed, the plan has no 'detect <response> <difference>' setting/);
    assert.equal(readFileSync(path.join(dir, "bath.trial"), "utf8"), FILE);
  });

  it("--dry-run prints the replicates needed from 'detect' and 'plan sigma' (14, the ceiling of R's power.anova.test n = 13.38)", async () => {
    // Invented adhesive cure; reference: test/stats/fixtures/r/plan-sigma (R 4.2.2 power.anova.test).
    const dir = mkdtempSync(path.join(tmpdir(), "trialbook-plan-"));
    const text = "response strength unit MPa\nfactor profile levels ramp-fast, ramp-slow, step\nplan\n  replicates 3\n  seed 7\n  detect strength 1.5\n  sigma strength 1.2\n";
    writeFileSync(path.join(dir, "cure.trial"), text);
    const a = io(dir);
    assert.equal(await runCli(["plan", "cure.trial", "--dry-run"], a.value), 0);
    assert.match(a.out(), /replicates needed: strength 14 \(profile 14; to detect 1\.5 MPa with power 0\.8 at σ = 1\.2 MPa planned \('plan sigma'\), α = 0\.05\)/);
    assert.doesNotMatch(a.out(), /not available yet/);
    assert.equal(readFileSync(path.join(dir, "cure.trial"), "utf8"), text);
  });

  it("prints an HTML sheet with every user string escaped, and a Markdown sheet", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "trialbook-plan-"));
    writeFileSync(path.join(dir, "bath.trial"), FILE);
    const h = io(dir);
    assert.equal(await runCli(["plan", "bath.trial", "--format", "html"], h.value), 0);
    assert.match(h.out(), /Bath &lt;A&gt; &amp; &quot;B&quot;/);
    assert.match(h.out(), /hot &amp; fast/);
    assert.match(h.out(), /&lt;cold&gt;/);
    assert.doesNotMatch(h.out(), /<cold>|<A>/);
    assert.match(h.out(), /seed 12/);
    const m = io(dir);
    assert.equal(await runCli(["plan", "bath.trial", "--format", "md"], m.value), 0);
    assert.match(m.out(), /\| 1 \| r01 \| /);
    assert.match(m.out(), /\\<cold\\>/);
  });

  it("refuses a file with syntax errors, exit 1, file unchanged", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "trialbook-plan-"));
    writeFileSync(path.join(dir, "bad.trial"), FILE + "factor\n");
    const a = io(dir);
    assert.equal(await runCli(["plan", "bad.trial", "-o", "bad.trial"], a.value), 1);
    assert.match(a.err(), /was not changed/);
    assert.equal(readFileSync(path.join(dir, "bad.trial"), "utf8"), FILE + "factor\n");
  });
});
