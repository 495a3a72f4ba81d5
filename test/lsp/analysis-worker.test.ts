/**
 * Large documents are analysed for publishing in the server's worker thread: the diagnostics, code lenses
 * and status it sends back must be exactly those of the main thread's analysis of the same text
 * (analyzeText, whose statistics the R and NIST tests check), and the main thread must not analyse. When
 * the worker cannot run, the main thread analyses instead. In process over in-memory streams (the store's
 * counters are read), with a small size limit; then the bundled server with a document above the real one.
 */
import assert from "node:assert/strict";
import { AnalysisWorker, SupersededError } from "../../server/src/lsp/analysis-worker-client.js";
import { codeLenses } from "../../server/src/lsp/code-lens.js";
import { toLspDiagnostics } from "../../server/src/lsp/convert.js";
import { analyzeText, LARGE_DOCUMENT_CHARS } from "../../server/src/lsp/documents.js";
import { WORKER_STARTED_LOG } from "../../server/src/lsp/server.js";
import { InProcessServer } from "./in-process-server.js";
import { statusOf } from "../../server/src/lsp/status-of.js";
import { ensureServerBundle, ProtocolClient } from "./protocol-client.js";

const URI = "file:///w/invented-press.trial";

/** An invented press trial: two factors, a pending run, an out-of-spec value (so that there are diagnostics). */
function pressTrial(runs: number, firstValue = "41.2"): string {
  const lines = ["# Invented data for a test.", 'trial "Invented: press force"', "response force unit kN spec <= 48", "factor die levels d1, d2, d3", "factor lube levels dry, oiled", "runs id die lube | force"];
  for (let i = 0; i < runs; i++) {
    const value = i === 0 ? firstValue : i === 5 ? "?" : (40 + (i % 3) * 1.7 + ((i * 37) % 11) / 10 + (i % 7 === 3 ? 9 : 0)).toFixed(1);
    lines.push(`  r${i + 1} d${(i % 3) + 1} ${i % 2 === 0 ? "dry" : "oiled"} | ${value}`);
  }
  return lines.join("\n") + "\n";
}

/** What the main thread would answer for `text`. */
function expected(text: string, version: number) {
  const doc = analyzeText(URI, version, text);
  return { diagnostics: toLspDiagnostics(doc.analysis.diagnostics, doc.lineIndex, URI), lenses: codeLenses(doc), status: statusOf(doc) };
}

describe("lsp: large documents are analysed in the worker thread", function () {
  this.timeout(120_000);
  const worker = new URL("../../server/src/lsp/analysis-worker.js", import.meta.url);

  it("publishes the main thread's diagnostics and answers code lens and status from the worker, without analysing on the main thread", async () => {
    const s = new InProcessServer({ analysisWorker: worker, largeDocumentChars: 500 });
    try {
      await s.start(0);
      const text = pressTrial(60);
      assert.ok(text.length >= 500);
      assert.ok(!s.logs.some((l) => l.startsWith(WORKER_STARTED_LOG)), "no worker before a large document");
      let published = s.published(1);
      await s.client.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version: 1, text } });
      const want = expected(text, 1);
      assert.ok(want.diagnostics.length > 0, "the invented trial has diagnostics");
      assert.deepEqual((await published).diagnostics, want.diagnostics);
      assert.deepEqual(await s.client.sendRequest("textDocument/codeLens", { textDocument: { uri: URI } }), want.lenses);
      assert.deepEqual(await s.client.sendRequest("trialbook/status", { textDocument: { uri: URI } }), want.status);

      // An edit: the new version's diagnostics, still from the worker.
      published = s.published(2);
      await s.client.sendNotification("textDocument/didChange", {
        textDocument: { uri: URI, version: 2 },
        contentChanges: [{ range: { start: { line: 6, character: 14 }, end: { line: 6, character: 18 } }, text: "55.0" }],
      });
      const edited = pressTrial(60, "55.0");
      assert.deepEqual((await published).diagnostics, expected(edited, 2).diagnostics);
      assert.deepEqual(await s.client.sendRequest("textDocument/codeLens", { textDocument: { uri: URI } }), expected(edited, 2).lenses);
      assert.equal(s.server.store.stats.analyses, 0, "nothing analysed on the main thread");
      assert.equal(s.logs.filter((l) => l.startsWith(WORKER_STARTED_LOG)).length, 1, "one worker thread");
      assert.ok(s.server.store.stats.workerAnalyses >= 2, `worker analyses: ${s.server.store.stats.workerAnalyses}`);
    } finally {
      await s.stop([URI]);
    }
  });

  it("runs one version at a time; a newer version of a document replaces a waiting older one", async () => {
    const analyses = new AnalysisWorker(worker);
    try {
      const text = (v: number) => pressTrial(20, `4${v}.0`);
      const first = analyses.analyze({ uri: URI, version: 1, text: text(1), defaults: {} });
      const replaced = analyses.analyze({ uri: URI, version: 2, text: text(2), defaults: {} });
      const other = analyses.analyze({ uri: "file:///w/other.trial", version: 1, text: text(9), defaults: {} });
      const latest = analyses.analyze({ uri: URI, version: 3, text: text(3), defaults: {} });
      await assert.rejects(replaced, SupersededError);
      assert.equal((await first).version, 1, "the running version finishes");
      assert.equal((await other).version, 1, "another document's waiting version is kept");
      const summary = await latest;
      assert.equal(summary.version, 3);
      assert.deepEqual(summary.diagnostics, toLspDiagnostics(analyzeText(URI, 3, text(3)).analysis.diagnostics, analyzeText(URI, 3, text(3)).lineIndex, URI));
    } finally {
      analyses.dispose();
    }
  });

  it("analyses a document below the size on the main thread", async () => {
    const s = new InProcessServer({ analysisWorker: worker, largeDocumentChars: 1_000_000 });
    try {
      await s.start(0);
      const text = pressTrial(12);
      const published = s.published(1);
      await s.client.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version: 1, text } });
      assert.deepEqual((await published).diagnostics, expected(text, 1).diagnostics);
      assert.equal(s.server.store.stats.analyses, 1);
      assert.equal(s.server.store.stats.workerAnalyses, 0);
    } finally {
      await s.stop([URI]);
    }
  });

  it("falls back to the main thread when the worker cannot start, and says so in the log", async () => {
    const s = new InProcessServer({ analysisWorker: new URL("./no-such-worker.js", import.meta.url), largeDocumentChars: 500 });
    try {
      await s.start(0);
      const text = pressTrial(60);
      const published = s.published(1);
      await s.client.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version: 1, text } });
      assert.deepEqual((await published).diagnostics, expected(text, 1).diagnostics);
      assert.equal(s.server.store.stats.analyses, 1, "analysed on the main thread instead");
      assert.deepEqual(await s.client.sendRequest("textDocument/codeLens", { textDocument: { uri: URI } }), expected(text, 1).lenses);
      assert.ok(s.logs.some((l) => l.includes("the analysis worker failed")), s.logs.join("\n"));
      // After two workers stopped without answering, no more are started: later versions go straight to the main thread.
      for (const version of [2, 3, 4]) {
        const next = s.published(version);
        await s.client.sendNotification("textDocument/didChange", {
          textDocument: { uri: URI, version },
          contentChanges: [{ range: { start: { line: 6, character: 14 }, end: { line: 6, character: 18 } }, text: `4${version}.5` }],
        });
        assert.deepEqual((await next).diagnostics, expected(pressTrial(60, `4${version}.5`), version).diagnostics);
      }
      assert.ok(s.logs.filter((l) => l.startsWith(WORKER_STARTED_LOG)).length <= 2, s.logs.join("\n"));
    } finally {
      await s.stop([URI]);
    }
  });

  it("the bundled server (dist/server.cjs) analyses a document above LARGE_DOCUMENT_CHARS in its worker", async () => {
    await ensureServerBundle();
    const client = await ProtocolClient.start({ analysisDelay: 0 });
    try {
      const text = pressTrial(Math.ceil(LARGE_DOCUMENT_CHARS / 20));
      assert.ok(text.length >= LARGE_DOCUMENT_CHARS, `${text.length} characters`);
      const published = client.waitForDiagnostics(URI, (p) => p.version === 1, 60_000);
      await client.notify("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version: 1, text } });
      const want = expected(text, 1);
      assert.deepEqual((await published).diagnostics, want.diagnostics);
      assert.deepEqual(await client.request("textDocument/codeLens", { textDocument: { uri: URI } }), want.lenses);
      assert.ok(!client.logs.some((l) => l.includes("the analysis worker failed")), client.logs.join("\n"));
      assert.ok(client.logs.some((l) => l.startsWith(WORKER_STARTED_LOG)), `the worker was started: ${client.logs.join("\n")}`);
    } finally {
      await client.stop();
    }
  });
});
