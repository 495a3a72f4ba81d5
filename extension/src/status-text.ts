/**
 * Pure texts of the extension's status bar item and panel titles: kept apart from the `vscode` API so
 * that they can be tested without an editor.
 */

/** The counts the status bar shows (a subset of the server's `trialbook/status` result). */
export interface StatusCounts {
  readonly plannedRuns: number;
  readonly doneRuns: number;
  readonly errors: number;
  readonly warnings: number;
}

/** `18/24 runs · 2 warnings`, `24/24 runs · 1 error, 3 warnings`, `no runs yet · no problems`. */
export function statusText(s: StatusCounts): string {
  const runs = s.plannedRuns === 0 ? "no runs yet" : `${s.doneRuns}/${s.plannedRuns} runs`;
  const problems: string[] = [];
  if (s.errors > 0) problems.push(`${s.errors} error${s.errors === 1 ? "" : "s"}`);
  if (s.warnings > 0) problems.push(`${s.warnings} warning${s.warnings === 1 ? "" : "s"}`);
  return `${runs} · ${problems.length > 0 ? problems.join(", ") : "no problems"}`;
}

/** The hover text of the status bar item. */
export function statusTooltip(s: StatusCounts & { readonly title: string; readonly excludedRuns: number }): string {
  const pending = s.plannedRuns - s.doneRuns;
  return `${s.title}: ${s.doneRuns} of ${s.plannedRuns} planned runs done, ${pending} pending, ${s.excludedRuns} excluded. Click to show the analysis.`;
}

/** The report panel's title, design brief §2: "Trialbook — <trial title>". */
export function panelTitle(trialTitle: string): string {
  const title = trialTitle.trim() || "Untitled trial";
  // Panel titles are plain text in VS Code, but a very long title would push the editor tabs away.
  return `Trialbook — ${title.length > 60 ? title.slice(0, 59) + "…" : title}`;
}

/** Where "Export Report" proposes to save: beside the trial file, `<name>.report.html`. */
export function defaultReportPath(trialPath: string, format: "html" | "markdown"): string {
  const base = trialPath.replace(/\.trial$/i, "");
  return `${base}.report.${format === "markdown" ? "md" : "html"}`;
}
