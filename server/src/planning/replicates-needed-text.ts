/**
 * The "replicates needed" line of `trialbook plan --dry-run`: for every response with `plan detect`, the
 * smallest replicates at which the F test of every fixed main effect reaches the power target, read from
 * the analysis' `power` results (extensions/power.ts), so the planner and the editor agree.
 */
import type { DocumentAnalysis } from "../analysis/results.js";
import { sigmaSourceWords } from "../text/comparisons-text.js";
import { formatNumber } from "../text/format-number.js";

/**
 * One line, `replicates needed: ...`, covering each response that has `plan detect`. A response whose power
 * could not be computed says why in words the user can act on (usually: add `plan sigma`).
 */
export function replicatesNeededLine(analysis: DocumentAnalysis): string {
  const parts: string[] = [];
  analysis.design.responses.forEach((response, k) => {
    if (response.detect === undefined) return;
    const power = analysis.responses[k]?.power ?? [];
    if (power.length === 0) {
      parts.push(
        response.sigma === undefined && (analysis.responses[k]?.residualSd ?? null) === null
          ? `${response.name}: unknown, no error SD yet (add 'sigma ${response.name} <value>' to the plan)`
          : `${response.name}: unknown (see 'trialbook check' for why the power is not computed)`,
      );
      return;
    }
    const unit = response.unit ? ` ${response.unit}` : "";
    const first = power[0]!;
    const unreachable = power.some((p) => p.replicatesNeeded === null);
    const most = Math.max(...power.map((p) => p.replicatesNeeded ?? 0));
    const perTerm = power.map((p) => `${p.term} ${p.replicatesNeeded ?? "more than 1000"}`).join(", ");
    const total = unreachable ? "more than 1000" : String(most);
    parts.push(
      `${response.name} ${total} (${perTerm}; to detect ${first.difference}${unit} with power ${first.target} at σ = ${formatNumber(first.sigma, 3)}${unit} ${sigmaSourceWords(first.sigmaSource)}, α = ${analysis.responses[k]!.alpha})`,
    );
  });
  if (parts.length === 0) return "replicates needed: not computed, the plan has no 'detect <response> <difference>' setting";
  return `replicates needed: ${parts.join("; ")}`;
}
