import type { Connection } from "vscode-languageserver/node";
import type { AnalysisSettings } from "../analysis/build-design.js";
import { compareTextsToMarkdown } from "../cli/compare-report.js";
import { CompareRequest } from "../protocol.js";
import type { RequestContext } from "./report-request.js";
import { createHandler } from "./server.js";

/**
 * Registers `trialbook/compare`: the editor sends the previous revision's text (it has the workspace and
 * the version control), the server answers with the Markdown comparison to the open document.
 * `defaults` gives the editor settings in force, so both revisions are analysed alike.
 */
export function registerCompareRequest(connection: Connection, context: RequestContext, defaults: () => AnalysisSettings): void {
  connection.onRequest(
    CompareRequest,
    createHandler("trialbook/compare", context.store, context.logError, (doc, params) => {
      const previous = typeof params.previousText === "string" ? params.previousText : "";
      const label = typeof params.previousLabel === "string" && params.previousLabel ? params.previousLabel : "previous revision";
      const file = decodeURIComponent(doc.uri.replace(/^.*\//, ""));
      return { markdown: compareTextsToMarkdown(previous, doc.text, { file, before: label, after: "editor" }, defaults()) };
    }),
  );
}
