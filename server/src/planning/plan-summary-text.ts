/**
 * The plain-text summary of a plan, printed by `trialbook plan --dry-run` (and usable as the editor's
 * message): what design was generated, how many runs were kept, added and moved, and the seed.
 */
import type { PlanSummary } from "./run-sheet.js";

const KIND_WORDS: Record<PlanSummary["kind"], string> = {
  "completely-randomized": "completely randomized design",
  "randomized-blocks": "randomized complete block design (runs randomized within each block)",
  "latin-square": "Latin square (runs randomized within each row)",
};

/**
 * Lines describing `summary`; `replicatesNeeded` is the line about the replicates the power target needs
 * (computed by the caller, or a sentence saying it is not available).
 */
export function planSummaryLines(summary: PlanSummary, replicatesNeeded: string): string[] {
  const lines = [`design: ${KIND_WORDS[summary.kind]}`];
  lines.push(`treatment factors: ${summary.treatmentFactors.join(", ") || "none"}`);
  if (summary.blockFactors.length > 0) lines.push(`blocking factors: ${summary.blockFactors.join(", ")}`);
  if (summary.generators.length > 0) {
    lines.push(`fraction generators: ${summary.generators.join("; ")}`);
    lines.push(`defining relation: I = ${summary.definingWords.join(" = ")}`);
    if (summary.resolution !== undefined) lines.push(`resolution: ${roman(summary.resolution)}`);
  }
  lines.push(`replicates: ${summary.replicates}${summary.replicatesFromFile ? "" : " (the plan says none; 1 assumed)"}`);
  if (summary.centrePoints > 0) lines.push(`centre points: ${summary.centrePoints} per block`);
  lines.push(`runs in the design: ${summary.runsInDesign}`);
  lines.push(`rows kept as written (measured, excluded or not a clean pending row): ${summary.keptRows}`);
  lines.push(`pending rows already in the file: ${summary.pendingRows}${summary.movedRows > 0 ? ` (${summary.movedRows} moved after the last measured run)` : ""}`);
  lines.push(`pending rows added: ${summary.addedRows}`);
  if (summary.extraRows > 0) lines.push(`rows beyond the design (kept): ${summary.extraRows}`);
  const seedFrom = summary.seedSource === "file" ? "from the file" : summary.seedSource === "option" ? "from --seed, written into the file" : "new, written into the file";
  lines.push(`seed: ${summary.seed} (${seedFrom})`);
  lines.push(replicatesNeeded);
  lines.push(summary.changed ? "the file changes" : "nothing to change: every run the design needs is in the file");
  return lines;
}

function roman(n: number): string {
  const table: [number, string][] = [[10, "X"], [9, "IX"], [5, "V"], [4, "IV"], [1, "I"]];
  let out = "";
  let rest = n;
  for (const [v, s] of table) while (rest >= v) [out, rest] = [out + s, rest - v];
  return out;
}
