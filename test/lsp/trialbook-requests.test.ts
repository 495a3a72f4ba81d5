import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import { resolve } from "node:path";
import { TextDocument } from "vscode-languageserver-textdocument";
import { ReportRequest, type ReportResult, StatusRequest, type StatusResult } from "../../server/src/protocol.js";
import { planRunSheet } from "../../server/src/planning/run-sheet.js";
import { analyzeText } from "../../server/src/lsp/documents.js";
import { reportOf } from "../../server/src/lsp/report-request.js";
import { runSheetOf } from "../../server/src/lsp/run-sheet-request.js";
import { statusOf } from "../../server/src/lsp/status-of.js";
import { ProtocolClient, SERVER_BUNDLE } from "./protocol-client.js";

const text = readFileSync(resolve("samples/incomplete.trial"), "utf8");

/** Rows of the runs table and how many have a `?`, counted from the text itself (not by the engine). */
function countRows(source: string): { rows: number; pending: number; excluded: number } {
  const lines = source.split(/\r?\n/);
  const start = lines.findIndex((l) => /^runs\b/.test(l));
  let rows = 0;
  let pending = 0;
  let excluded = 0;
  for (const line of lines.slice(start + 1)) {
    if (/^(conclusion|trial|owner|date|conjecture|response|factor|covariate|plan)\b/.test(line)) break;
    const body = line.replace(/#.*$/, "").trim();
    if (!body) continue;
    rows++;
    if (/\|.*\?/.test(body)) pending++;
    if (/\bexcluded\b/.test(body)) excluded++;
  }
  return { rows, pending, excluded };
}

describe("lsp: Trialbook requests (in process)", () => {
  it("trialbook/status counts planned, done and excluded runs as the runs table shows them, and the problems", () => {
    const doc = analyzeText("file:///w/incomplete.trial", 7, text);
    const status = statusOf(doc);
    const counted = countRows(text);
    assert.equal(status.plannedRuns, counted.rows);
    assert.equal(status.doneRuns, counted.rows - counted.pending);
    assert.equal(status.excludedRuns, counted.excluded);
    assert.equal(status.errors, doc.analysis.diagnostics.filter((d) => d.severity === "error").length);
    assert.equal(status.warnings, doc.analysis.diagnostics.filter((d) => d.severity === "warning").length);
    assert.equal(status.version, 7);
    assert.ok(counted.pending > 0, "the sample has pending runs");
  });

  it("trialbook/report answers HTML for the panel (with its script) and Markdown, for the document's version", async () => {
    const doc = analyzeText("file:///w/incomplete.trial", 3, text);
    const html = await reportOf(doc, "html", true, () => undefined);
    assert.equal(html.version, 3);
    assert.equal(html.title, doc.analysis.design.title);
    assert.match(html.content, /^<!DOCTYPE html>/);
    assert.match(html.content, /<script nonce="/);
    const md = await reportOf(doc, "markdown", false, () => undefined);
    assert.match(md.content, /^# /);
  });

  it("trialbook/runSheet returns LSP edits that give exactly the planner's text", () => {
    const source = 'trial "Invented: plan me"\nresponse y\nfactor a levels p, q, r\nplan\n  replicates 2\n  seed 11\nruns id a | y\n';
    const doc = analyzeText("file:///w/plan.trial", 1, source);
    const result = runSheetOf(doc, false);
    assert.ok(result.ok, JSON.stringify(result));
    const expected = planRunSheet(source, { fallbackSeed: 1 });
    assert.ok(expected.ok);
    const applied = TextDocument.applyEdits(TextDocument.create("file:///w/plan.trial", "trial", 1, source), [...result.edits]);
    assert.equal(applied, expected.text, "the file's seed 11 makes the plan reproducible");
    assert.match(result.summary, /seed 11: 6 runs added/);
  });

  it("trialbook/runSheet refuses with the planner's reason instead of edits when the design is broken", () => {
    const doc = analyzeText("file:///w/bad.trial", 1, 'trial "Invented"\nresponse y\nfactor a levels p, p\nruns id a | y\n');
    const result = runSheetOf(doc, false);
    assert.equal(result.ok, false);
  });
});

describe("lsp: Trialbook requests over stdio (dist/server.cjs)", function () {
  this.timeout(60_000);
  let client: ProtocolClient;
  const uri = "file:///w/incomplete.trial";

  before(async () => {
    // The bundle is made by esbuild.mjs (its plugin replaces vega-canvas); build it when missing.
    if (!existsSync(SERVER_BUNDLE)) execFileSync(process.execPath, ["esbuild.mjs"], { stdio: "inherit" });
    client = await ProtocolClient.start({ analysisDelay: 0 });
    const published = client.waitForDiagnostics(uri);
    await client.notify("textDocument/didOpen", { textDocument: { uri, languageId: "trial", version: 1, text } });
    await published;
  });
  after(async () => {
    if (client) await client.stop().catch(() => undefined);
  });

  it("answers trialbook/status and trialbook/report: the requests are wired into the server", async () => {
    const status = (await client.connection.sendRequest(StatusRequest.method, { textDocument: { uri } })) as StatusResult;
    const counted = countRows(text);
    assert.equal(status.plannedRuns, counted.rows);
    assert.equal(status.doneRuns, counted.rows - counted.pending);
    const report = (await client.connection.sendRequest(ReportRequest.method, { textDocument: { uri }, format: "html" })) as ReportResult;
    assert.equal(report.version, 1);
    assert.ok((report.content.match(/<svg/g) ?? []).length >= 6, "plots drawn inside the bundled server");
  });
});
