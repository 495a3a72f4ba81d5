/** The messages between the language server and its analysis worker (analysis-worker.ts). */
import type { CodeLens, Diagnostic as LspDiagnostic } from "vscode-languageserver";
import type { AnalysisSettings } from "../analysis/build-design.js";
import type { StatusResult } from "../protocol.js";

/** One version of one document to analyse. */
export interface WorkerJob {
  readonly id: number;
  readonly uri: string;
  readonly version: number;
  readonly text: string;
  readonly defaults: AnalysisSettings;
}

/** What the server answers from a version's analysis without holding the analysis. */
export interface VersionSummary {
  readonly version: number;
  readonly diagnostics: LspDiagnostic[];
  readonly lenses: CodeLens[];
  readonly status: StatusResult;
}

export type WorkerReply = { readonly id: number; readonly ok: true; readonly summary: VersionSummary } | { readonly id: number; readonly ok: false; readonly error: string };
