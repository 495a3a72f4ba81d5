/**
 * The protocol suite: starts the bundled server (`node dist/server.cjs --stdio`) and drives every feature
 * over JSON-RPC as an editor would. Values are compared with `analyzeDocument` on the same text.
 */
import assert from "node:assert/strict";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { formatF } from "../../server/src/text/format-number.js";
import type {
  CodeAction,
  CodeLens,
  CompletionItem,
  CompletionList,
  DocumentSymbol,
  FoldingRange,
  Hover,
  Location,
  MarkupContent,
  SemanticTokens,
  TextEdit,
  WorkspaceEdit,
} from "vscode-languageserver";
import { applyEdits, COATING } from "./helpers.js";
import { ensureServerBundle, ProtocolClient } from "./protocol-client.js";

const URI = "file:///work/protocol/invented.trial";
const tdoc = { textDocument: { uri: URI } };
const lineOf = (text: string, needle: string) => text.slice(0, text.indexOf(needle)).split("\n").length - 1;
const charOf = (text: string, needle: string) => {
  const k = text.indexOf(needle);
  return k - text.lastIndexOf("\n", k - 1) - 1;
};
const pos = (text: string, needle: string, delta = 0) => ({ line: lineOf(text, needle), character: charOf(text, needle) + delta });

describe("lsp protocol (dist/server.cjs over stdio)", function () {
  this.timeout(60_000);
  let client: ProtocolClient;
  let version = 1;
  let text = COATING;

  before(async () => {
    await ensureServerBundle();
    client = await ProtocolClient.start({ analysisDelay: 0 });
  });
  after(async () => {
    if (client) await client.stop().catch(() => undefined);
  });

  it("publishes diagnostics after didOpen, with codes and related information", async () => {
    text = COATING.replace("r08  warm", "r01  warm");
    const published = client.waitForDiagnostics(URI);
    await client.notify("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version, text } });
    const p = await published;
    assert.equal(p.version, 1);
    const dup = p.diagnostics.find((d) => d.code === "duplicate-run")!;
    assert.ok(dup, JSON.stringify(p.diagnostics));
    assert.deepEqual(dup.range, { start: { line: 16, character: 6 }, end: { line: 16, character: 9 } });
    assert.equal(dup.relatedInformation![0]!.location.range.start.line, 9);
  });

  it("applies incremental didChange edits and republishes for the new version", async () => {
    // Put r08 back: replace the 'r01' of the last row (line 16, characters 6..9) with 'r08'.
    const published = client.waitForDiagnostics(URI, (p) => p.version === 2);
    await client.notify("textDocument/didChange", {
      textDocument: { uri: URI, version: ++version },
      contentChanges: [{ range: { start: { line: 16, character: 6 }, end: { line: 16, character: 9 } }, text: "r08" }],
    });
    text = COATING;
    const p = await published;
    assert.equal(p.diagnostics.filter((d) => d.code === "duplicate-run").length, 0);
    assert.equal(p.diagnostics.filter((d) => d.severity === 1).length, 0);
  });

  it("answers hover with the ANOVA table of the response", async () => {
    const h = await client.request<Hover>("textDocument/hover", { ...tdoc, position: pos(text, "response gloss", 10) });
    const f = analyzeDocument(text).responses[0]!.anova.find((r) => r.source === "temp")!.f;
    assert.ok((h.contents as MarkupContent).value.includes(`| temp | 1 |`));
    assert.ok((h.contents as MarkupContent).value.includes(formatF(f)));
  });

  it("answers codeLens with the verdict and the Show Analysis command", async () => {
    const lenses = await client.request<CodeLens[]>("textDocument/codeLens", tdoc);
    assert.equal(lenses.length, 1);
    assert.equal(lenses[0]!.command!.command, "trialbook.showAnalysis");
    assert.match(lenses[0]!.command!.title, /^temp F\(1,4\)=\d+\.\d\d p=/);
  });

  it("answers codeAction with exclude (as a snippet edit) on a run row", async () => {
    const p = pos(text, "r04  warm", 1);
    const actions = await client.request<CodeAction[]>("textDocument/codeAction", { ...tdoc, range: { start: p, end: p }, context: { diagnostics: [] } });
    const exclude = actions.find((a) => a.title === "Mark run r04 excluded (with a reason)")!;
    assert.ok(exclude);
    assert.ok(exclude.edit!.documentChanges, "snippet edits come as documentChanges");
  });

  it("answers formatting with edits that only change white space", async () => {
    const messy = text.replace("      r02  warm  long  | 88.9", "  r02 warm long|88.9   ");
    const messyVersion = ++version;
    const published = client.waitForDiagnostics(URI, (p) => p.version === messyVersion);
    await client.notify("textDocument/didChange", { textDocument: { uri: URI, version: messyVersion }, contentChanges: [{ text: messy }] });
    await published;
    const edits = await client.request<TextEdit[]>("textDocument/formatting", { ...tdoc, options: { tabSize: 2, insertSpaces: true } });
    assert.equal(applyEdits(messy, edits), text);
    const ranged = await client.request<TextEdit[]>("textDocument/rangeFormatting", { ...tdoc, range: { start: { line: 10, character: 0 }, end: { line: 10, character: 1 } }, options: { tabSize: 2, insertSpaces: true } });
    assert.equal(applyEdits(messy, ranged), text);
    const backVersion = ++version;
    const back = client.waitForDiagnostics(URI, (p) => p.version === backVersion);
    await client.notify("textDocument/didChange", { textDocument: { uri: URI, version: backVersion }, contentChanges: [{ text }] });
    await back;
  });

  it("answers completion with the levels of the column in a run row", async () => {
    const result = await client.request<CompletionItem[] | CompletionList>("textDocument/completion", { ...tdoc, position: pos(text, "r08  warm", 5) });
    const items = Array.isArray(result) ? result : result.items;
    assert.deepEqual(items.map((i) => i.label), ["cool", "warm"]);
  });

  it("answers documentSymbol, foldingRange and semanticTokens", async () => {
    const symbols = await client.request<DocumentSymbol[]>("textDocument/documentSymbol", tdoc);
    assert.deepEqual(symbols.map((s) => s.name), ["Coating gloss vs. bath temperature", "gloss", "temp", "dwell", "plan", "runs"]);
    const folds = await client.request<FoldingRange[]>("textDocument/foldingRange", tdoc);
    assert.deepEqual(folds.map((f) => [f.startLine, f.endLine]), [[5, 7], [8, 16]]);
    const tokens = await client.request<SemanticTokens>("textDocument/semanticTokens/full", tdoc);
    // 3 declared names + 4 levels + header (temp, dwell, gloss) + 8 rows x (id, 2 levels, value).
    assert.equal(tokens.data.length, (3 + 4 + 3 + 8 * 4) * 5);
    const ranged = await client.request<SemanticTokens>("textDocument/semanticTokens/range", { ...tdoc, range: { start: { line: 9, character: 0 }, end: { line: 9, character: 40 } } });
    assert.equal(ranged.data.length, 4 * 5);
  });

  it("answers prepareRename and rename for a level", async () => {
    const p = pos(text, "r06  cool", 6);
    const prepared = await client.request<{ placeholder: string }>("textDocument/prepareRename", { ...tdoc, position: p });
    assert.equal(prepared.placeholder, "cool");
    const edit = await client.request<WorkspaceEdit>("textDocument/rename", { ...tdoc, position: p, newName: "chilled" });
    const renamed = applyEdits(text, edit.changes![URI]!);
    assert.equal(renamed.split("chilled").length - 1, 5);
    assert.equal(analyzeDocument(renamed).diagnostics.filter((d) => d.severity === "error").length, 0);
  });

  it("answers definition and references for a factor", async () => {
    const p = pos(text, "temp  dwell | gloss", 1);
    const def = await client.request<Location>("textDocument/definition", { ...tdoc, position: p });
    assert.deepEqual(def.range.start, { line: 3, character: 7 });
    const refs = await client.request<Location[]>("textDocument/references", { ...tdoc, position: p, context: { includeDeclaration: true } });
    assert.equal(refs.length, 2);
  });

  it("answers a malformed request with an error and keeps serving", async () => {
    await assert.rejects(client.request("textDocument/hover", { position: { line: 0, character: 0 } }), (e: { code?: number }) => e.code === -32602);
    await assert.rejects(client.request("textDocument/hover", null), (e: { code?: number }) => typeof e.code === "number");
    const h = await client.request<Hover>("textDocument/hover", { ...tdoc, position: pos(text, "response gloss", 10) });
    assert.ok(h);
  });

  it("takes editor settings as defaults, and the file wins", async () => {
    client.settings = { analysisDelay: 0, alpha: 0.2 };
    const republished = client.waitForDiagnostics(URI);
    await client.notify("workspace/didChangeConfiguration", { settings: null });
    await republished;
    // The interaction has p = 1 here, so its verdict names the alpha in force.
    const h = await client.request<Hover>("textDocument/hover", { ...tdoc, position: pos(text, "response gloss", 10) });
    assert.match((h.contents as MarkupContent).value, /interact on gloss at alpha 0\.2:/);
    const withAlpha = text.replace("  seed 42\n", "  seed 42\n  alpha 0.01\n");
    const fileVersion = ++version;
    const published = client.waitForDiagnostics(URI, (p) => p.version === fileVersion);
    await client.notify("textDocument/didChange", { textDocument: { uri: URI, version: fileVersion }, contentChanges: [{ text: withAlpha }] });
    await published;
    const h2 = await client.request<Hover>("textDocument/hover", { ...tdoc, position: pos(withAlpha, "response gloss", 10) });
    assert.match((h2.contents as MarkupContent).value, /interact on gloss at alpha 0\.01:/);
  });

  it("clears diagnostics when the document is closed", async () => {
    const cleared = client.waitForDiagnostics(URI, (p) => p.diagnostics.length === 0);
    await client.notify("textDocument/didClose", tdoc);
    const p = await cleared;
    assert.deepEqual(p.diagnostics, []);
    assert.equal(await client.request("textDocument/hover", { ...tdoc, position: { line: 0, character: 0 } }), null);
  });

  it("shuts down and exits with code 0", async () => {
    const code = await client.stop();
    assert.equal(code, 0);
    client = undefined as unknown as ProtocolClient;
  });
});
