/**
 * Protocol robustness (issue 11, item 2): the bundled server (`node dist/server.cjs --stdio`, driven by
 * test/lsp/protocol-client.ts) gets malformed and out-of-range requests, requests for documents that are
 * not open, edit storms and a document closed while its analysis is pending; it must answer each with a
 * result or a clean JSON-RPC error and keep serving.
 *
 * The heap check runs the same server code (createServer, the document store, the Trialbook requests)
 * in this process over in-memory streams instead: that lets the test force a garbage collection (V8's
 * `--expose-gc`, switched on at run time) and read `process.memoryUsage()` without adding a debug-only
 * request to the shipped server. Heap after 10,000 edits must be within 20 % of the heap after 1,000.
 */
import assert from "node:assert/strict";
import { setFlagsFromString } from "node:v8";
import { runInNewContext } from "node:vm";
import { ResponseError } from "vscode-jsonrpc/node";
import type { Hover, MarkupContent, PublishDiagnosticsParams } from "vscode-languageserver";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { COATING } from "../lsp/helpers.js";
import { InProcessServer } from "../lsp/in-process-server.js";
import { ensureServerBundle, ProtocolClient } from "../lsp/protocol-client.js";

const URI = "file:///work/hardening/invented.trial";
const GLOSS_LINE = 9; // "      r01  cool  short | 81.2"
const gloss = (line: number) => ({ start: { line, character: 24 }, end: { line, character: 28 } });

/** A JSON-RPC error code, or "result" when the request was answered normally. */
async function outcome(p: Promise<unknown>): Promise<number | "result"> {
  try {
    await p;
    return "result";
  } catch (error) {
    assert.ok(error instanceof ResponseError, `a JSON-RPC error, not ${String(error)}`);
    return error.code;
  }
}

/** A text with `runs` generated rows (invented values): big enough that its analysis takes a while. */
function bigDocument(runs: number): string {
  const rows: string[] = [];
  for (let i = 0; i < runs; i++) rows.push(`  r${i + 1}  ${["cool", "warm"][i % 2]}  ${["short", "long"][(i >> 1) % 2]} | ${(80 + ((i * 37) % 100) / 10).toFixed(1)}`);
  return `# Invented, generated for the protocol tests.\nresponse gloss\nfactor temp levels cool, warm\nfactor dwell levels short, long\nruns id temp dwell | gloss\n${rows.join("\n")}\n`;
}

describe("hardening: protocol robustness (dist/server.cjs over stdio)", function () {
  this.timeout(120_000);
  let client: ProtocolClient;
  let version = 1;
  const hover = (line: number, character: number) => client.request<Hover | null>("textDocument/hover", { textDocument: { uri: URI }, position: { line, character } });

  before(async () => {
    await ensureServerBundle();
    client = await ProtocolClient.start({ analysisDelay: 0 });
    const published = client.waitForDiagnostics(URI);
    await client.notify("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version, text: COATING } });
    await published;
  });
  after(async () => {
    if (client) await client.stop().catch(() => undefined);
  });

  /** The server still answers a normal hover with the ANOVA table. */
  async function stillServing(): Promise<void> {
    const h = await hover(2, 10);
    assert.ok(h && (h.contents as MarkupContent).value.includes("| Source |"), "hover on the response still answers");
    assert.equal(client.process.exitCode, null, "the server process is alive");
  }

  it("answers malformed requests with JSON-RPC errors or null, never by dying", async () => {
    const methods = ["textDocument/hover", "textDocument/completion", "textDocument/codeAction", "textDocument/formatting", "textDocument/rangeFormatting", "textDocument/documentSymbol", "textDocument/foldingRange", "textDocument/semanticTokens/full", "textDocument/semanticTokens/range", "textDocument/prepareRename", "textDocument/rename", "textDocument/definition", "textDocument/references", "textDocument/codeLens", "trialbook/report", "trialbook/status", "trialbook/runSheet", "trialbook/compare"];
    const bad: unknown[] = [null, {}, { textDocument: null }, { textDocument: { uri: 42 } }, { textDocument: { uri: URI } }, { textDocument: { uri: URI }, position: { line: "a", character: null }, range: { start: 5, end: "x" }, newName: 7, context: null, format: 12 }, [1, 2, 3], "text"];
    const seen = new Set<number | "result">();
    for (const method of methods) {
      for (const params of bad) seen.add(await outcome(client.request(method, params)));
    }
    // Unknown methods get MethodNotFound (-32601).
    assert.equal(await outcome(client.request("trialbook/noSuchRequest", {})), -32601);
    // Only clean outcomes: a result (null or an answer), invalid params (-32602), internal error (-32603,
    // logged by the server), or the request-failed codes of the LSP.
    for (const code of seen) assert.ok(code === "result" || code === -32602 || code === -32603 || code === -32803, `unexpected outcome ${code}`);
    await stillServing();
  });

  it("answers out-of-range positions and ranges without errors", async () => {
    const positions = [
      { line: -1, character: -1 },
      { line: 1e9, character: 1e9 },
      { line: 0, character: 2 ** 31 - 1 },
      { line: 2.5, character: 0.5 },
    ];
    for (const position of positions) {
      for (const method of ["textDocument/hover", "textDocument/completion", "textDocument/definition", "textDocument/prepareRename"]) {
        assert.equal(await outcome(client.request(method, { textDocument: { uri: URI }, position })), "result", `${method} at ${JSON.stringify(position)}`);
      }
      const range = { start: position, end: { line: 0, character: 0 } };
      for (const method of ["textDocument/rangeFormatting", "textDocument/semanticTokens/range", "textDocument/codeAction"]) {
        assert.equal(await outcome(client.request(method, { textDocument: { uri: URI }, range, options: { tabSize: 2, insertSpaces: true }, context: { diagnostics: [] } })), "result", `${method} over ${JSON.stringify(range)}`);
      }
    }
    await stillServing();
  });

  it("answers requests for documents that are not open with null", async () => {
    const other = { textDocument: { uri: "file:///nowhere/never-opened.trial" } };
    assert.equal(await client.request("textDocument/hover", { ...other, position: { line: 0, character: 0 } }), null);
    assert.equal(await client.request("textDocument/formatting", { ...other, options: { tabSize: 2, insertSpaces: true } }), null);
    assert.equal(await client.request("trialbook/status", other), null);
    assert.equal(await client.request("trialbook/report", { ...other, format: "html" }), null);
    assert.equal(await client.request("trialbook/compare", { ...other, previousText: COATING, previousLabel: "HEAD" }), null);
    // Notifications about unknown documents are ignored.
    await client.notify("textDocument/didChange", { textDocument: { uri: "file:///nowhere/x.trial", version: 2 }, contentChanges: [{ text: "trial" }] });
    await client.notify("textDocument/didClose", { textDocument: { uri: "file:///nowhere/x.trial" } });
    await client.notify("trialbook/noSuchNotification", { x: 1 });
    await stillServing();
  });

  it("takes an edit whose range lies outside the document (clamped) and keeps analysing", async () => {
    const target = version + 1;
    const published = client.waitForDiagnostics(URI, (p) => p.version === target);
    await client.notify("textDocument/didChange", { textDocument: { uri: URI, version: ++version }, contentChanges: [{ range: { start: { line: 1e6, character: 0 }, end: { line: 1e6, character: 5 } }, text: "# appended\n" }] });
    const p = await published.catch((e: Error) => {
      throw new Error(`${e.message}; server log: ${client.logs.join("\n")}; published versions ${client.published.map((x) => x.version).join(",")}`);
    });
    assert.ok(Array.isArray(p.diagnostics));
    await stillServing();
  });

  it("publishes the last version after an edit storm of 500 unawaited edits, as the engine analyses it", async () => {
    let text = "";
    // Reset to COATING, then 500 edits that each rewrite the first gloss value.
    await client.notify("textDocument/didChange", { textDocument: { uri: URI, version: ++version }, contentChanges: [{ text: COATING }] });
    text = COATING;
    const storm: Promise<void>[] = [];
    for (let i = 0; i < 500; i++) {
      const value = (70 + (i % 300) / 10).toFixed(1);
      storm.push(client.notify("textDocument/didChange", { textDocument: { uri: URI, version: ++version }, contentChanges: [{ range: gloss(GLOSS_LINE), text: value }] }));
      text = text.replace(/(r01 {2}cool {2}short \| )\d+\.\d/, `$1${value}`);
    }
    const last = version;
    const published = client.waitForDiagnostics(URI, (p) => p.version === last);
    await Promise.all(storm);
    const p = await published;
    const expected = analyzeDocument(text).diagnostics.map((d) => d.code).sort();
    assert.deepEqual(p.diagnostics.map((d) => String(d.code)).sort(), expected);
    // No publication for an older version arrives after the last one.
    const after = client.published.filter((x) => x.uri === URI);
    assert.equal(after[after.length - 1]!.version, last);
    await stillServing();
  });

  it("closes a document in the middle of its analysis: diagnostics cleared, nothing stale published, still serving", async () => {
    const uri = "file:///work/hardening/big.trial";
    const text = bigDocument(3000);
    const cleared = client.waitForDiagnostics(uri, (p) => p.diagnostics.length === 0 && p.version === undefined);
    await client.notify("textDocument/didOpen", { textDocument: { uri, languageId: "trial", version: 1, text } });
    await client.notify("textDocument/didChange", { textDocument: { uri, version: 2 }, contentChanges: [{ range: { start: { line: 6, character: 0 }, end: { line: 6, character: 0 } }, text: "# edited\n" }] });
    const closedAt = client.published.length;
    await client.notify("textDocument/didClose", { textDocument: { uri } });
    await cleared;
    // A status request after the close is answered with null (the document is gone) ...
    assert.equal(await client.request("trialbook/status", { textDocument: { uri } }), null);
    // ... and nothing but the clearing was published for it after the close.
    const late = client.published.slice(closedAt).filter((p: PublishDiagnosticsParams) => p.uri === uri && p.diagnostics.length > 0);
    assert.deepEqual(late, []);
    await stillServing();
  });
});

describe("hardening: server heap under 10,000 edits (in process, in-memory streams)", function () {
  this.timeout(600_000);

  it("holds the heap after 10,000 edits within 20 % of the heap after 1,000 (after garbage collection)", async () => {
    setFlagsFromString("--expose-gc");
    const gc = runInNewContext("gc") as () => void;
    const server = new InProcessServer();
    const client = server.client;
    await server.start(0);

    let version = 1;
    const published = (v: number) => server.published(v);
    let wait = published(1);
    await client.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version, text: COATING } });
    await wait;

    const heapAfterGc = () => {
      gc();
      gc();
      return process.memoryUsage().heapUsed;
    };
    /** `count` edits of the first gloss value; every 100th waits for its analysis, every 50th asks for a hover. */
    const edits = async (count: number) => {
      for (let i = 0; i < count; i++) {
        const value = (70 + (version % 300) / 10).toFixed(1);
        version++;
        const waitHere = version % 100 === 0;
        if (waitHere) wait = published(version);
        await client.sendNotification("textDocument/didChange", { textDocument: { uri: URI, version }, contentChanges: [{ range: gloss(GLOSS_LINE), text: value }] });
        if (version % 50 === 0) await client.sendRequest("textDocument/hover", { textDocument: { uri: URI }, position: { line: 2, character: 10 } });
        if (waitHere) await wait;
      }
    };
    await edits(1000);
    const at1000 = heapAfterGc();
    await edits(9000);
    const at10000 = heapAfterGc();
    const ratio = at10000 / at1000;
    console.log(`      heap after 1,000 edits ${(at1000 / 1e6).toFixed(1)} MB, after 10,000 ${(at10000 / 1e6).toFixed(1)} MB (ratio ${ratio.toFixed(3)})`);
    assert.ok(ratio <= 1.2, `heap grew by ${((ratio - 1) * 100).toFixed(1)} % between 1,000 and 10,000 edits`);

    await server.stop([URI]);
  });
});
