/**
 * Trialbook's own requests between the editor extension and the language server, beyond standard LSP.
 * Both sides import these definitions, so a change of shape is a compile error on both. Only protocol
 * types are imported here: the extension must not pull engine code into its bundle.
 */
import { RequestType, type TextDocumentIdentifier, type TextEdit } from "vscode-languageserver-protocol";

/** Params of `trialbook/report`. */
export interface ReportParams {
  readonly textDocument: TextDocumentIdentifier;
  readonly format: "html" | "markdown";
  /** True for the editor's panel: the HTML then carries the panel's small scroll-keeping script. */
  readonly webview?: boolean;
}

/** Result of `trialbook/report`: the whole document, and what the panel's title shows. */
export interface ReportResult {
  /** The version of the document the report was made from. */
  readonly version: number;
  /** The trial's title ("Untitled trial" when the file has none). */
  readonly title: string;
  readonly content: string;
}

/** The analysis report of an open document as HTML or Markdown; null when the document is not open. */
export const ReportRequest = new RequestType<ReportParams, ReportResult | null, void>("trialbook/report");

/** Params of `trialbook/status`. */
export interface StatusParams {
  readonly textDocument: TextDocumentIdentifier;
}

/** Result of `trialbook/status`: what the status bar shows for the active file. */
export interface StatusResult {
  readonly version: number;
  readonly title: string;
  readonly plannedRuns: number;
  /** Runs without a pending value. */
  readonly doneRuns: number;
  readonly excludedRuns: number;
  readonly errors: number;
  readonly warnings: number;
}

/** Run and diagnostic counts of an open document; null when the document is not open. */
export const StatusRequest = new RequestType<StatusParams, StatusResult | null, void>("trialbook/status");

/** Params of `trialbook/runSheet`. */
export interface RunSheetParams {
  readonly textDocument: TextDocumentIdentifier;
  /** Re-randomize the order of the pending runs even when nothing needs adding. */
  readonly reshuffle?: boolean;
}

/** Result of `trialbook/runSheet`: the edits that write the run sheet, or why there are none. */
export type RunSheetResult =
  | { readonly ok: true; readonly version: number; readonly edits: readonly TextEdit[]; readonly summary: string }
  | { readonly ok: false; readonly message: string };

/** Plans the randomized run sheet of an open document (edits only; the editor applies them). */
export const RunSheetRequest = new RequestType<RunSheetParams, RunSheetResult | null, void>("trialbook/runSheet");

/** Params of `trialbook/compare`. */
export interface CompareParams {
  readonly textDocument: TextDocumentIdentifier;
  /** The text of the previous revision, as the editor read it (e.g. from git). */
  readonly previousText: string;
  /** How the previous revision is named in the output, e.g. "HEAD". */
  readonly previousLabel: string;
}

/** What changed between a previous revision and the open document, as Markdown. */
export const CompareRequest = new RequestType<CompareParams, { readonly markdown: string } | null, void>("trialbook/compare");
