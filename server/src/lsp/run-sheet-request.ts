import { randomInt } from "node:crypto";
import type { Connection, TextEdit } from "vscode-languageserver/node";
import { planRunSheet } from "../planning/run-sheet.js";
import { RunSheetRequest, type RunSheetResult } from "../protocol.js";
import type { AnalyzedDocument } from "./documents.js";
import type { RequestContext } from "./report-request.js";
import { createHandler } from "./server.js";

/**
 * Plans the run sheet of a document and returns LSP edits for the editor to apply (the server never
 * writes files). A fresh seed, drawn from a cryptographic source, is used only when the file has none;
 * it is then written into the file so the order can be reproduced.
 */
export function runSheetOf(doc: AnalyzedDocument, reshuffle: boolean): RunSheetResult {
  const result = planRunSheet(doc.text, { fallbackSeed: randomInt(1, 0x7fff_ffff), ...(reshuffle ? { reshuffle: true } : {}) });
  if (!result.ok) return { ok: false, message: result.problems.map((p) => p.message).join(" ") || "The run sheet cannot be planned." };
  const edits: TextEdit[] = result.edits.map((e) => ({ range: { start: doc.lineIndex.positionAt(e.start), end: doc.lineIndex.positionAt(e.end) }, newText: e.newText }));
  const s = result.summary;
  const summary = s.changed
    ? `Run sheet written with seed ${s.seed}: ${s.addedRows} run${s.addedRows === 1 ? "" : "s"} added, ${s.movedRows} moved, ${s.keptRows} kept.`
    : `The run sheet is complete (seed ${s.seed}): nothing to add.`;
  return { ok: true, version: doc.version, edits, summary };
}

/** Registers `trialbook/runSheet` (see protocol.ts). */
export function registerRunSheetRequest(connection: Connection, context: RequestContext): void {
  connection.onRequest(RunSheetRequest, createHandler("trialbook/runSheet", context.store, context.logError, (doc, params) => runSheetOf(doc, params.reshuffle === true)));
}
