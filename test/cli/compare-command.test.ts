import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { compareAnalyses, readPower } from "../../server/src/analysis/compare-analyses.js";
import type { ResponseAnalysis } from "../../server/src/analysis/results.js";
import { compareTextsToMarkdown } from "../../server/src/cli/compare-report.js";
import { runCli } from "../../server/src/cli/run-cli.js";
import { captureIo } from "../support/capture-io.js";
import { expectGolden } from "./golden.js";

const BEFORE = "test/cli/fixtures/invented/compare-before.trial";
const AFTER = "test/cli/fixtures/invented/compare-after.trial";
/** Type III p-values from R 4.2.2 with car::Anova (test/cli/fixtures/r/compare/generate.R). */
const R = JSON.parse(fs.readFileSync("test/cli/fixtures/r/compare/reference.json", "utf8")) as {
  before: Record<string, number>;
  after: Record<string, number>;
};

function relativeError(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

describe("compareAnalyses", () => {
  const comparison = compareAnalyses(analyzeDocument(fs.readFileSync(BEFORE, "utf8")), analyzeDocument(fs.readFileSync(AFTER, "utf8")));

  it("finds runs added, removed and edited by run id (an exclusion counts as an edit)", () => {
    assert.deepEqual(comparison.runs.added.map((r) => [r.id, r.lineAfter]), [["r19", 34]]);
    assert.deepEqual(comparison.runs.removed.map((r) => [r.id, r.lineBefore]), [["r18", 34]]);
    assert.deepEqual(
      comparison.runs.edited.map((r) => [r.id, r.cells]),
      [
        ["r01", [{ column: "shrink", before: "1.40", after: "1.10" }]],
        ["r05", [{ column: "excluded", before: undefined, after: "short shot" }]],
      ],
    );
    assert.equal(comparison.runs.unchanged, 15);
  });

  it("p-values before and after agree with R (car::Anova, Type III) and the interaction's verdict flips at alpha 0.05", () => {
    const shrink = comparison.responses[0]!;
    assert.equal(shrink.name, "shrink");
    assert.deepEqual([shrink.nBefore, shrink.nAfter], [18, 17]);
    for (const t of shrink.terms) {
      assert.ok(relativeError(t.pBefore!, R.before[t.term]!) < 1e-8, `${t.term} before: ${t.pBefore} vs R ${R.before[t.term]}`);
      assert.ok(relativeError(t.pAfter!, R.after[t.term]!) < 1e-8, `${t.term} after: ${t.pAfter} vs R ${R.after[t.term]}`);
      assert.equal(t.pMoved, true);
    }
    assert.deepEqual(shrink.terms.filter((t) => t.flipped).map((t) => [t.term, t.significantBefore, t.significantAfter]), [["resin x mold-temp", true, false]]);
  });

  it("level means: the regrind x 80 cell mean moves from 1.37 to 1.27 (arithmetic means of the fixture's runs)", () => {
    const cell = comparison.responses[0]!.means.find((m) => m.term === "resin x mold-temp" && m.level === "regrind x 80")!;
    assert.ok(Math.abs(cell.meanBefore! - (1.4 + 1.36 + 1.35) / 3) < 1e-12);
    assert.ok(Math.abs(cell.meanAfter! - (1.1 + 1.36 + 1.35) / 3) < 1e-12);
    assert.equal(cell.moved, true);
    const unchanged = comparison.responses[0]!.means.find((m) => m.term === "resin x mold-temp" && m.level === "virgin x 60")!;
    assert.equal(unchanged.moved, false);
  });

  it("power: absent key → not available; present in either revision → read and paired by term", () => {
    assert.equal(comparison.responses[0]!.power.available, false);
    const base = analyzeDocument(fs.readFileSync(BEFORE, "utf8")).responses[0]!;
    const withPower = (power: unknown) => ({ ...base, power }) as unknown as ResponseAnalysis;
    assert.deepEqual(readPower(withPower(0.8)), [{ label: "", before: null, after: 0.8 }]);
    assert.deepEqual(readPower(withPower([{ term: "resin", power: 0.62 }])), [{ label: "resin", before: null, after: 0.62 }]);
    assert.deepEqual(readPower(withPower({ terms: [{ source: "resin", achieved: 0.5 }] })), [{ label: "resin", before: null, after: 0.5 }]);
    assert.equal(readPower(base), undefined);
    const doc = analyzeDocument(fs.readFileSync(BEFORE, "utf8"));
    const before = { ...doc, responses: [withPower([{ term: "resin", power: 0.62 }])] };
    const after = { ...doc, responses: [withPower([{ term: "resin", power: 0.91 }])] };
    assert.deepEqual(compareAnalyses(before, after).responses[0]!.power, { available: true, changes: [{ label: "resin", before: 0.62, after: 0.91 }] });
  });
});

describe("trialbook compare: golden outputs", () => {
  for (const format of ["text", "md"] as const) {
    it(`OLD NEW --format ${format}`, async () => {
      const io = captureIo();
      assert.equal(await runCli(["compare", BEFORE, AFTER, "--format", format], io), 0);
      expectGolden(`compare-fixtures.${format === "text" ? "txt" : "md"}`, io.out);
    });
  }

  it("compareTextsToMarkdown (for the editor command) equals the CLI's Markdown", async () => {
    const io = captureIo();
    await runCli(["compare", BEFORE, AFTER, "--format", "md"], io);
    const md = compareTextsToMarkdown(fs.readFileSync(BEFORE, "utf8"), fs.readFileSync(AFTER, "utf8"), { file: AFTER, before: BEFORE, after: AFTER });
    assert.equal(md, io.out);
  });
});

describe("trialbook compare on a temporary git repository", () => {
  let repo: string;
  const git = (...args: string[]) => execFileSync("git", args, { cwd: repo, encoding: "utf8" });

  before(() => {
    repo = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-git-"));
    git("init", "-q");
    git("config", "user.email", "test@example.invalid");
    git("config", "user.name", "Trialbook test");
    git("config", "commit.gpgsign", "false");
    fs.mkdirSync(path.join(repo, "experiments"));
    const file = path.join(repo, "experiments", "cover.trial");
    const beforeText = fs.readFileSync(BEFORE, "utf8");
    const afterText = fs.readFileSync(AFTER, "utf8");
    // Commit 1: the plan with the first 12 runs; commit 2: all 18 runs; commit 3: the edits of compare-after.
    const lines = beforeText.split("\n");
    const cut = lines.findIndex((l) => l.includes("r13"));
    fs.writeFileSync(file, lines.slice(0, cut).join("\n") + "\n");
    git("add", ".");
    git("commit", "-q", "-m", "plan and first runs");
    fs.writeFileSync(file, beforeText);
    git("commit", "-q", "-am", "all runs");
    fs.writeFileSync(file, afterText);
    git("commit", "-q", "-am", "re-measured r01, excluded r05, replaced r18");
    fs.writeFileSync(file, afterText.replace("| 1.12\n", "| 1.13\n"));
  });

  it("FILE --rev HEAD~1 compares the working tree with the older commit", async () => {
    const io = captureIo({ cwd: repo });
    assert.equal(await runCli(["compare", "experiments/cover.trial", "--rev", "HEAD~1"], io), 0);
    assert.match(io.out, /^Comparing experiments\/cover\.trial: HEAD~1 → working tree$/m);
    assert.match(io.out, /^Runs: 1 added, 1 removed, 2 edited, 15 unchanged\.$/m);
    assert.match(io.out, /resin x mold-temp: no longer evidence of an interaction on shrink at alpha 0\.05/);
  });

  it("FILE --rev HEAD~2 sees the six runs added since the first commit (r13-r17, r19); --rev HEAD only the uncommitted edit", async () => {
    const first = captureIo({ cwd: path.join(repo, "experiments") });
    assert.equal(await runCli(["compare", "cover.trial", "--rev", "HEAD~2", "--format", "md"], first), 0);
    assert.match(first.out, /\*\*Runs:\*\* 6 added, 0 removed, 2 edited, 10 unchanged\./);
    const head = captureIo({ cwd: repo });
    assert.equal(await runCli(["compare", "experiments/cover.trial", "--rev", "HEAD"], head), 0);
    assert.match(head.out, /^Runs: 0 added, 0 removed, 1 edited, 17 unchanged\.$/m);
    assert.match(head.out, /r19 +shrink 1\.12 → 1\.13/);
  });

  it("OLD NEW with two checked-out revisions gives the same comparison as --rev", async () => {
    fs.writeFileSync(path.join(repo, "old.trial"), git("show", "HEAD~1:experiments/cover.trial"));
    const viaFiles = captureIo({ cwd: repo });
    await runCli(["compare", "old.trial", "experiments/cover.trial", "--format", "md"], viaFiles);
    const viaRev = captureIo({ cwd: repo });
    await runCli(["compare", "experiments/cover.trial", "--rev", "HEAD~1", "--format", "md"], viaRev);
    const body = (s: string) => s.split("\n").slice(1).join("\n");
    assert.equal(body(viaFiles.out), body(viaRev.out));
    fs.rmSync(path.join(repo, "old.trial"));
  });

  it("exit 2 for an unknown revision, a file absent at the revision, a revision that looks like an option, wrong arguments", async () => {
    const unknown = captureIo({ cwd: repo });
    assert.equal(await runCli(["compare", "experiments/cover.trial", "--rev", "no-such-branch"], unknown), 2);
    assert.match(unknown.err, /Cannot read 'experiments\/cover\.trial' at revision 'no-such-branch'/);
    fs.writeFileSync(path.join(repo, "new.trial"), "response y\n");
    assert.equal(await runCli(["compare", "new.trial", "--rev", "HEAD"], captureIo({ cwd: repo })), 2);
    assert.equal(await runCli(["compare", "new.trial", "--rev=--output=x"], captureIo({ cwd: repo })), 2);
    assert.equal(await runCli(["compare", "new.trial"], captureIo({ cwd: repo })), 2);
    assert.equal(await runCli(["compare", "a", "b", "c"], captureIo({ cwd: repo })), 2);
    assert.equal(await runCli(["compare", "new.trial", "new.trial", "--format", "html"], captureIo({ cwd: repo })), 2);
  });

  it("exit 2 outside a git repository", async () => {
    const plain = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-nogit-"));
    fs.writeFileSync(path.join(plain, "x.trial"), "response y\n");
    assert.equal(await runCli(["compare", "x.trial", "--rev", "HEAD"], captureIo({ cwd: plain, env: {} })), 2);
  });

  it("exit 1 when the new revision has errors", async () => {
    fs.writeFileSync(path.join(repo, "broken.trial"), fs.readFileSync(AFTER, "utf8").replace("r02  virgin", "r02  virgn "));
    assert.equal(await runCli(["compare", BEFORE, path.join(repo, "broken.trial")], captureIo()), 1);
  });
});
