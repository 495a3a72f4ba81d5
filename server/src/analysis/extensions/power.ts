/**
 * Power of the F test of each fixed main effect to detect `plan detect <response> D`, for the plan's
 * replicates (or, without `plan replicates`, the replicates the data hold), and the replicates needed for
 * the target power (`plan power`, editor setting `trialbook.powerTarget`, 0.80). The error SD is the
 * residual SD of the measured runs once they give one ("observed"), else `plan sigma <response> S`
 * ("planned"); before any run is measured `plannedPower` computes the same from the planned SD alone.
 * Convention and method: stats/power/f-test-power.ts. A `low-power` warning on `replicates` (else on the
 * `detect` setting) when the power is below the target names the replicates that reach it.
 */

import type { Span } from "../../../../grammar/src/ast.js";
import type { ResponseExtension } from "../analyze-document.js";
import type { AnalysisAnchors } from "../analyze-response.js";
import type { Design } from "../design.js";
import { type Diagnostic, diagnostic } from "../diagnostics.js";
import type { PowerResult, ResponseAnalysis } from "../results.js";
import { type MainEffectPowerLayout, mainEffectPower, replicatesNeeded } from "../../stats/power/f-test-power.js";
import { sigmaSourceWords } from "../../text/comparisons-text.js";
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

/** Where the error SD of a power computation came from. */
export type SigmaSource = "planned" | "observed";

/** The power extension (registered in analyze-document.ts): key `power`. */
export const powerExtension: ResponseExtension = (context) => {
  const { design, fit } = context;
  const response = design.responses[context.responseIndex]!;
  if (response.detect === undefined) return { add: {}, diagnostics: [] };
  const observed = fit.residualSd;
  const useObserved = observed !== null && observed > 0 && Number.isFinite(observed);
  const sigma = useObserved ? observed : response.sigma;
  const detectSpan = design.planSpans?.detect?.get(response.name) ?? context.anchors.response;
  if (sigma === undefined) {
    return {
      add: {},
      diagnostics: [diagnostic("check-skipped", detectSpan, `The power to detect ${response.detect} in '${response.name}' is not computed: the runs give no estimate of the error SD yet. Add 'sigma ${response.name} <value>' to the plan to size the experiment from a planned SD.`)],
    };
  }
  const effects = fixedMainEffects(context);
  const replicatesOf = (runsPerReplicate: number) => design.settings.replicates ?? Math.max(1, Math.floor(context.y.length / runsPerReplicate));
  return powerOfEffects(design, context.responseIndex, effects, { sigma, source: useObserved ? "observed" : "planned", alpha: context.result.alpha, detectSpan, replicatesOf });
};

/**
 * Power before any run of `responseIndex` is measured (no fit exists, so the power extension cannot run):
 * from `plan sigma`, for the fixed main effects of the design's model and the plan's replicates (1 when the
 * plan gives none, as the planner assumes). Returns nothing when the response has no `detect` or no `sigma`.
 */
export function plannedPower(design: Design, responseIndex: number, anchors: AnalysisAnchors): { readonly add: Partial<ResponseAnalysis>; readonly diagnostics: readonly Diagnostic[] } {
  const response = design.responses[responseIndex]!;
  if (response.detect === undefined || response.sigma === undefined) return { add: {}, diagnostics: [] };
  const effects: number[] = [];
  for (const term of design.terms) {
    if (term.variables.length !== 1 || term.variables[0]!.kind !== "factor") continue;
    const f = design.factors[term.variables[0]!.index]!;
    if (f.role === "fixed" && f.within === undefined) effects.push(term.variables[0]!.index);
  }
  effects.sort((a, b) => a - b);
  const detectSpan = design.planSpans?.detect?.get(response.name) ?? anchors.response;
  return powerOfEffects(design, responseIndex, effects, {
    sigma: response.sigma,
    source: "planned",
    alpha: design.settings.alpha,
    detectSpan,
    replicatesOf: () => design.settings.replicates ?? 1,
  });
}

interface PowerInputs {
  readonly sigma: number;
  readonly source: SigmaSource;
  readonly alpha: number;
  readonly detectSpan: Span;
  /** The replicates the power is computed for, given the runs in one replicate. */
  readonly replicatesOf: (runsPerReplicate: number) => number;
}

/** The power entries and diagnostics of the main effects `effects` of one response (shared by both paths). */
function powerOfEffects(design: Design, responseIndex: number, effects: readonly number[], inputs: PowerInputs): { add: Partial<ResponseAnalysis>; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const response = design.responses[responseIndex]!;
  const difference = response.detect!;
  const { sigma, source, alpha, detectSpan } = inputs;
  const target = design.settings.power;
  const unit = response.unit ? ` ${response.unit}` : "";
  const sigmaText = `σ = ${formatNumber(sigma, 3)}${unit} ${sigmaSourceWords(source)}`;
  const power: PowerResult[] = [];
  for (const f of effects) {
    const layout = plannedLayout(design, f, difference, sigma, alpha);
    if (!layout) continue;
    const replicates = inputs.replicatesOf(layout.runsPerReplicate);
    const value = mainEffectPower(layout, replicates);
    const name = design.factors[f]!.name;
    const needed = replicatesNeeded(layout, target);
    if (!value.ok) {
      const reach = needed.ok ? ` ${needed.replicates} replicates reach power ${formatNumber(needed.power, 2)} (${sigmaText}).` : "";
      diagnostics.push(diagnostic("check-skipped", detectSpan, `The power of the test of '${name}' for '${response.name}' is not computed: ${value.reason}.${reach}`));
      continue;
    }
    power.push({ term: name, difference, sigma, replicates, power: value.power, target, replicatesNeeded: needed.ok ? needed.replicates : null, sigmaSource: source });
    if (value.power < target) {
      const fix = needed.ok ? `Set 'replicates ${needed.replicates}' to reach ${formatNumber(needed.power, 2)}.` : `No number of replicates up to 1000 reaches it: detect a larger difference or reduce the error.`;
      diagnostics.push(
        diagnostic(
          "low-power",
          design.planSpans?.replicates ?? detectSpan,
          `With ${replicates} replicate${replicates === 1 ? "" : "s"} the F test of '${name}' has power ${formatNumber(value.power, 2)} to detect a difference of ${difference}${unit} in '${response.name}' (${sigmaText}, α = ${alpha}), below the target ${target}: a real difference of that size would be missed ${Math.round((1 - value.power) * 100)}% of the time. ${fix}`,
        ),
      );
    }
  }
  return { add: power.length > 0 ? { power } : {}, diagnostics };
}
