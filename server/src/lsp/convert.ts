/**
 * Conversion between the engine's offset spans and LSP positions and ranges, and from engine diagnostics
 * to LSP diagnostics. Every handler converts through here, so line/column arithmetic lives in one file.
 */
import type { Span } from "../../../grammar/src/ast.js";
import type { LineIndex } from "../../../grammar/src/line-index.js";
import type { Diagnostic, Severity } from "../analysis/diagnostics.js";
import {
  type Diagnostic as LspDiagnostic,
  type DiagnosticRelatedInformation,
  DiagnosticSeverity,
  type Position,
  type Range,
} from "vscode-languageserver";

/** The name diagnostics carry as their `source`, so users can tell ours from other extensions'. */
export const DIAGNOSTIC_SOURCE = "trialbook";

/** The LSP range of an offset span. */
export function spanToRange(index: LineIndex, span: Span): Range {
  return { start: index.positionAt(span.start), end: index.positionAt(span.end) };
}

/** The offset of an LSP position (clamped to the text, as the protocol asks). */
export function positionToOffset(index: LineIndex, position: Position): number {
  return index.offsetAt(position);
}

/** The offset span of an LSP range. */
export function rangeToSpan(index: LineIndex, range: Range): Span {
  const a = index.offsetAt(range.start);
  const b = index.offsetAt(range.end);
  return a <= b ? { start: a, end: b } : { start: b, end: a };
}

const SEVERITY: Record<Severity, DiagnosticSeverity> = {
  error: DiagnosticSeverity.Error,
  warning: DiagnosticSeverity.Warning,
  information: DiagnosticSeverity.Information,
  hint: DiagnosticSeverity.Hint,
};

/** The LSP severity of an engine severity. */
export function toLspSeverity(severity: Severity): DiagnosticSeverity {
  return SEVERITY[severity];
}

/**
 * Converts one engine diagnostic: the span becomes a range, the kebab-case code is kept as `code`, and
 * related locations become `relatedInformation` in the same document.
 */
export function toLspDiagnostic(d: Diagnostic, index: LineIndex, uri: string): LspDiagnostic {
  const out: LspDiagnostic = {
    range: spanToRange(index, d.span),
    severity: toLspSeverity(d.severity),
    code: d.code,
    source: DIAGNOSTIC_SOURCE,
    message: d.message,
  };
  if (d.related && d.related.length > 0) {
    out.relatedInformation = d.related.map(
      (r): DiagnosticRelatedInformation => ({ location: { uri, range: spanToRange(index, r.span) }, message: r.message }),
    );
  }
  return out;
}

/** Converts every diagnostic of a document, in document order (editors list them in the order given). */
export function toLspDiagnostics(diagnostics: readonly Diagnostic[], index: LineIndex, uri: string): LspDiagnostic[] {
  return [...diagnostics]
    .sort((a, b) => a.span.start - b.span.start || a.span.end - b.span.end)
    .map((d) => toLspDiagnostic(d, index, uri));
}
