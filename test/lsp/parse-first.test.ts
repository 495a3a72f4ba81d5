/**
 * Requests that need only the parse of a version (completion while typing, semantic tokens, folding,
 * symbols, formatting, go to definition) are answered without analysing it; the analysis is made when a
 * request or the debounced publish first reads it, once per version. Server code in this process over
 * in-memory streams, so that the store's counters can be read.
 */
import assert from "node:assert/strict";
import { InProcessServer } from "./in-process-server.js";

const URI = "file:///w/invented-cure.trial";
const TEXT = [
  "# Invented data for a test.",
  'trial "Invented: adhesive cure"',
  "response strength unit MPa",
  "factor oven levels low, high",
  "runs id oven | strength",
  "  r1 low  | 20.1",
  "  r2 high | 23.4",
  "  r3 low  | 19.8",
  "  r4 high | 22.9",
  "",
].join("\n");

describe("lsp: syntax requests do not wait for the analysis", function () {
  this.timeout(60_000);
  let s: InProcessServer;

  before(async () => {
    s = new InProcessServer();
    // A long analysis delay: no debounced analysis runs during the test, only what requests ask for.
    await s.start(60_000);
  });
  // Closing the document cancels its pending (60 s) analysis, so nothing outlives the connection.
  after(() => s.stop([URI]));

  it("answers completion, semantic tokens, folding, symbols, formatting and definition from the parse; hover and code lens analyse once", async () => {
    const analyses = () => s.server.store.stats.analyses;
    const client = s.client;
    await client.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "trial", version: 1, text: TEXT } });
    const doc = { textDocument: { uri: URI } };
    const completion = (await client.sendRequest("textDocument/completion", { ...doc, position: { line: 5, character: 8 } })) as { label: string }[] | { items: { label: string }[] };
    const labels = (Array.isArray(completion) ? completion : completion.items).map((i) => i.label);
    assert.ok(labels.includes("high"), `level names of the oven column are offered: ${labels.join(", ")}`);
    const tokens = (await client.sendRequest("textDocument/semanticTokens/full", doc)) as { data: number[] };
    assert.ok(tokens.data.length > 0);
    assert.ok(((await client.sendRequest("textDocument/foldingRange", doc)) as unknown[]).length > 0);
    assert.ok(((await client.sendRequest("textDocument/documentSymbol", doc)) as unknown[]).length > 0);
    assert.ok(Array.isArray(await client.sendRequest("textDocument/formatting", { ...doc, options: { tabSize: 2, insertSpaces: true } })));
    assert.ok(await client.sendRequest("textDocument/definition", { ...doc, position: { line: 5, character: 6 } }), "'low' goes to its declaration");
    assert.equal(analyses(), 0, "no analysis for syntax requests");

    const hover = (await client.sendRequest("textDocument/hover", { ...doc, position: { line: 2, character: 11 } })) as { contents: { value: string } };
    assert.match(hover.contents.value, /oven/, "the response hover shows its ANOVA table");
    assert.equal(analyses(), 1, "the hover analysed the version");
    await client.sendRequest("textDocument/codeLens", doc);
    assert.equal(analyses(), 1, "the code lens reused that analysis");

    // A new version: syntax requests parse it, the code lens analyses it once.
    await client.sendNotification("textDocument/didChange", { textDocument: { uri: URI, version: 2 }, contentChanges: [{ range: { start: { line: 5, character: 14 }, end: { line: 5, character: 18 } }, text: "20.4" }] });
    await client.sendRequest("textDocument/completion", { ...doc, position: { line: 6, character: 8 } });
    await client.sendRequest("textDocument/semanticTokens/full", doc);
    assert.equal(analyses(), 1);
    const lenses = (await client.sendRequest("textDocument/codeLens", doc)) as { command?: { title: string } }[];
    assert.match(lenses[0]!.command!.title, /oven F\(1,2\)=/, "the verdict of the new version");
    assert.equal(analyses(), 2);
  });
});
