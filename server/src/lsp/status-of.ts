/** The status bar's counts of one analysed document (`trialbook/status`), a pure function of the analysis. */
import type { StatusResult } from "../protocol.js";
import { reportTitle } from "../report/report-blocks.js";
import { runProgress } from "../report/run-progress.js";
import type { AnalyzedDocument } from "./documents.js";

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

