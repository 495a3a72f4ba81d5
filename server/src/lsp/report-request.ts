import type { Connection } from "vscode-languageserver/node";
import { ReportRequest, type ReportResult } from "../protocol.js";
import { reportTitle } from "../report/report-blocks.js";
import type { VersionSummary } from "./analysis-worker-protocol.js";
import type { AnalyzedDocument } from "./documents.js";
import { createHandler } from "./server.js";

/** The part of the server the Trialbook requests need: open documents and the error log. */
export interface RequestContext {
  readonly store: { get(uri: string): AnalyzedDocument | undefined; summary?(uri: string): Promise<VersionSummary> | undefined };
  readonly logError: (message: string) => void;
}

/**
 * The report of one analysed document as HTML (for a file, or for the editor's panel with its nonce'd
 * script) or Markdown. Never rejects: a rendering failure is logged and answered with a short page that
 * says so.
 */
export async function reportOf(doc: AnalyzedDocument, format: "html" | "markdown", webview: boolean, logError: (message: string) => void): Promise<ReportResult> {
  const title = reportTitle(doc.analysis);
  try {
    // Loaded with the first report, so the server starts without the plotting libraries.
    const { renderReportHtml, renderReportMarkdown } = await import("../report/render-report.js");
    const content = format === "markdown" ? await renderReportMarkdown(doc.analysis) : await renderReportHtml(doc.analysis, { webview });
    return { version: doc.version, title, content };
  } catch (error) {
    logError(`trialbook/report failed for ${doc.uri}: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}`);
    return { version: doc.version, title, content: format === "markdown" ? "The report could not be rendered; see the Trialbook output channel.\n" : "<!DOCTYPE html><p>The report could not be rendered; see the Trialbook output channel.</p>" };
  }
}

/** Registers `trialbook/report` (see protocol.ts). */
export function registerReportRequest(connection: Connection, context: RequestContext): void {
  connection.onRequest(
    ReportRequest,
    createHandler("trialbook/report", context.store, context.logError, (doc, params) => reportOf(doc, params.format === "markdown" ? "markdown" : "html", params.webview === true, context.logError)),
  );
}
