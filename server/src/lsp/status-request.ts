import type { Connection } from "vscode-languageserver/node";
import { StatusRequest, type StatusResult } from "../protocol.js";
import { reportTitle } from "../report/report-blocks.js";
import { runProgress } from "../report/run-progress.js";
import type { AnalyzedDocument } from "./documents.js";
import type { RequestContext } from "./report-request.js";
import { createHandler } from "./server.js";

/** Run and diagnostic counts of one analysed document: what the status bar shows. */
export function statusOf(doc: AnalyzedDocument): StatusResult {
  const progress = runProgress(doc.analysis.design);
  let errors = 0;
  let warnings = 0;
  for (const d of doc.analysis.diagnostics) {
    if (d.severity === "error") errors++;
    else if (d.severity === "warning") warnings++;
  }
  return { version: doc.version, title: reportTitle(doc.analysis), plannedRuns: progress.planned, doneRuns: progress.done, excludedRuns: progress.excluded, errors, warnings };
}

/** Registers `trialbook/status` (see protocol.ts). */
export function registerStatusRequest(connection: Connection, context: RequestContext): void {
  connection.onRequest(StatusRequest, createHandler("trialbook/status", context.store, context.logError, (doc) => statusOf(doc)));
}
