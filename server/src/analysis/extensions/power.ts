/**
 * Power of the F test of each fixed main effect to detect `plan detect <response> D`, at the observed
 * residual SD, for the plan's replicates (or, without `plan replicates`, the replicates the data hold), and
 * the replicates needed for the target power (`plan power`, editor setting `trialbook.powerTarget`, 0.80).
 * Convention and method: stats/power/f-test-power.ts. A `low-power` warning on `replicates` (else on the
 * `detect` setting) when the power is below the target names the replicates that reach it.
 */

import type { ResponseExtension } from "../analyze-document.js";
import type { Design } from "../design.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";
import type { PowerResult } from "../results.js";
import { type MainEffectPowerLayout, mainEffectPower, replicatesNeeded } from "../../stats/power/f-test-power.js";
import { formatNumber } from "../../text/format-number.js";
import { fixedMainEffects } from "./compared-groups.js";

/**
 * The layout of factor `factor`'s main-effect test in the planned design: one replicate is one run in every
 * cell of the design's crossed (fixed and block) factors; the model df are those of all model terms.
 * Undefined when the design is not a plain crossed layout (nested or subject factors in the cells).
 */
export function plannedLayout(design: Design, factor: number, difference: number, sigma: number, alpha: number): MainEffectPowerLayout | undefined {
  const cells = design.cellFactors.reduce((product, f) => product * design.factors[f]!.levels.length, 1);
  if (!design.cellFactors.includes(factor)) return undefined;
  let modelDf = 0;
  for (const term of design.terms) {
    let df = 1;
    for (const v of term.variables) df *= v.kind === "factor" ? design.factors[v.index]!.levels.length - 1 : 1;
    modelDf += df;
  }
  return { levels: design.factors[factor]!.levels.length, runsPerReplicate: cells, modelDf, difference, sigma, alpha };
}

/** The power extension (registered in analyze-document.ts): key `power`. */
export const powerExtension: ResponseExtension = (context) => {
  const diagnostics: Diagnostic[] = [];
  const { design, fit } = context;
  const response = design.responses[context.responseIndex]!;
  if (response.detect === undefined) return { add: {}, diagnostics };
  const sigma = fit.residualSd;
  const detectSpan = design.planSpans?.detect?.get(response.name) ?? context.anchors.response;
  if (sigma === null || !(sigma > 0)) {
    diagnostics.push(diagnostic("check-skipped", detectSpan, `The power to detect ${response.detect} in '${response.name}' is not computed: the runs give no estimate of the error SD yet.`));
    return { add: {}, diagnostics };
  }
  const alpha = context.result.alpha;
  const target = design.settings.power;
  const power: PowerResult[] = [];
  for (const f of fixedMainEffects(context)) {
    const layout = plannedLayout(design, f, response.detect, sigma, alpha);
    if (!layout) continue;
    const replicates = design.settings.replicates ?? Math.max(1, Math.floor(context.y.length / layout.runsPerReplicate));
    const value = mainEffectPower(layout, replicates);
    const name = design.factors[f]!.name;
    if (!value.ok) {
      diagnostics.push(diagnostic("check-skipped", detectSpan, `The power of the test of '${name}' for '${response.name}' is not computed: ${value.reason}.`));
      continue;
    }
    const needed = replicatesNeeded(layout, target);
    power.push({ term: name, difference: response.detect, sigma, replicates, power: value.power, target, replicatesNeeded: needed.ok ? needed.replicates : null });
    if (value.power < target) {
      const unit = response.unit ? ` ${response.unit}` : "";
      const fix = needed.ok ? `Set 'replicates ${needed.replicates}' to reach ${formatNumber(needed.power, 2)}.` : `No number of replicates up to 1000 reaches it: detect a larger difference or reduce the error.`;
      diagnostics.push(
        diagnostic(
          "low-power",
          design.planSpans?.replicates ?? detectSpan,
          `With ${replicates} replicate${replicates === 1 ? "" : "s"} the F test of '${name}' has power ${formatNumber(value.power, 2)} to detect a difference of ${response.detect}${unit} in '${response.name}' (σ = ${formatNumber(sigma, 3)}${unit} from the residuals, α = ${alpha}), below the target ${target}: a real difference of that size would be missed ${Math.round((1 - value.power) * 100)}% of the time. ${fix}`,
        ),
      );
    }
  }
  return { add: power.length > 0 ? { power } : {}, diagnostics };
};
