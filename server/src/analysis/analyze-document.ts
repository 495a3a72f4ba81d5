import type { Span, TrialFile } from "../../../grammar/src/ast.js";
import { parseTrial } from "../../../grammar/src/parse.js";
import { analyzeResponse, extendResult, type ResponseContext, withResult } from "./analyze-response.js";
import { type AnalysisSettings, buildDesign } from "./build-design.js";
import type { EngineOptions } from "./engine-options.js";
import { checkSystematicOrder } from "./checks/systematic-order.js";
import { type Diagnostic, type DiagnosticCode, diagnostic } from "./diagnostics.js";
import type { DocumentAnalysis, ResponseAnalysis } from "./results.js";
import { comparisonsExtension } from "./extensions/comparisons.js";
import { modelChecksExtension } from "./extensions/model-checks.js";
import { plannedPower, powerExtension } from "./extensions/power.js";
import { repeatedMeasuresExtension } from "./extensions/repeated-measures.js";
import { mixedModelExtension } from "./extensions/mixed-model.js";
import { twoLevelExtension } from "./extensions/two-level.js";

/**
 * An analysis that builds on a response's fit and adds named keys to its result (see results.ts), with
 * diagnostics of its own. Extensions run in list order; each sees the result as extended so far.
 */
export type ResponseExtension = (context: ResponseContext) => {
  readonly add: Partial<ResponseAnalysis>;
  readonly diagnostics: readonly Diagnostic[];
  /**
   * Codes of earlier diagnostics about this response that no longer apply because this extension replaced
   * the analysis they describe (e.g. the fixed-effects coding's aliasing when a two-level analysis of a
   * design with centre points replaces the table). They are removed; the extension's own remain.
   */
  readonly supersedes?: readonly DiagnosticCode[];
};

/** The extensions every analysis runs. Add one line per feature module. */
const RESPONSE_EXTENSIONS: readonly ResponseExtension[] = [
  comparisonsExtension,
  modelChecksExtension,
  powerExtension,
  repeatedMeasuresExtension,
  mixedModelExtension,
  twoLevelExtension,
];

/**
 * The engine's single entry point: parse, build the design, analyse every response.
 * `defaults` are editor settings (the file wins over them); `overrides` are CLI flags (they win over the
 * file). `engine` says how the work may be done (another thread for a large table), never what it gives.
 * Never throws for any text.
 */
export function analyzeDocument(text: string, defaults: AnalysisSettings = {}, overrides: AnalysisSettings = {}, engine: EngineOptions = {}): DocumentAnalysis {
  const hints = engine.quickPassContinuation ? { continuation: engine.quickPassContinuation } : {};
  return analyzeParsed(parseTrial(text, hints), defaults, overrides, engine);
}

/** As `analyzeDocument`, for a file already parsed. */
export function analyzeParsed(file: TrialFile, defaults: AnalysisSettings = {}, overrides: AnalysisSettings = {}, engine: EngineOptions = {}): DocumentAnalysis {
  const { design, diagnostics: structural } = buildDesign(file, defaults, overrides, engine);
  const diagnostics: Diagnostic[] = [...structural];
  diagnostics.push(...checkSystematicOrder(file, design));
  const responses: ResponseAnalysis[] = [];
  // A file with errors in its design still gets an analysis of what could be read: the user sees both.
  const termSpans = modelTermSpans(file);
  design.responses.forEach((response, k) => {
    const { result, diagnostics: found, context } = analyzeResponse(design, k, { response: response.span, terms: termSpans }, engine);
    const firstOfResponse = diagnostics.length;
    diagnostics.push(...found);
    let extended = result;
    if (context) {
      // The context is rebuilt only when an extension added keys (most add none for a given design).
      let seen = withResult(context, extended);
      for (const extension of RESPONSE_EXTENSIONS) {
        // One failing analysis must not take the others down: report it where the response is declared.
        try {
          const { add, diagnostics: more, supersedes } = extension(seen);
          if (Object.keys(add).length > 0) {
            extended = extendResult(extended, add);
            seen = withResult(context, extended);
          }
          if (supersedes && supersedes.length > 0) {
            const stale = new Set(supersedes);
            const kept = diagnostics.splice(firstOfResponse).filter((d) => !stale.has(d.code));
            diagnostics.push(...kept);
          }
          diagnostics.push(...more);
        } catch (error) {
          diagnostics.push(diagnostic("internal-error", response.span, `Part of the analysis of '${response.name}' failed (${error instanceof Error ? error.message : String(error)}). This is a bug in Trialbook: please report it with this file.`));
        }
      }
    } else {
      // No fit (no measured runs yet): power can still be planned from `plan sigma`.
      try {
        const planned = plannedPower(design, k, { response: response.span, terms: termSpans });
        extended = extendResult(extended, planned.add);
        diagnostics.push(...planned.diagnostics);
      } catch (error) {
        diagnostics.push(diagnostic("internal-error", response.span, `The planned power of '${response.name}' failed (${error instanceof Error ? error.message : String(error)}). This is a bug in Trialbook: please report it with this file.`));
      }
    }
    responses.push(extended);
  });
  return { file, design, diagnostics, responses };
}

/** Spans of the terms written in `plan model`, keyed by their ANOVA source name. */
function modelTermSpans(file: TrialFile): Map<string, Span> {
  const spans = new Map<string, Span>();
  for (const setting of file.plan?.settings ?? []) {
    if (setting.kind !== "model") continue;
    for (const term of setting.terms) spans.set(term.names.map((n) => n.text).join(" x "), term.span);
  }
  return spans;
}
