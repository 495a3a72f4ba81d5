import type { Span, TrialFile } from "../../../grammar/src/ast.js";
import type { Design, DesignFactor } from "./design.js";
import { type DiagnosticSink, diagnostic } from "./diagnostics.js";

/**
 * Resolves `plan pairwise A x B` settings to factor indices, reporting names that are not factors, and the
 * spans of the plan settings analysis diagnostics point at. Kept apart from build-design.ts so the
 * comparisons feature owns it.
 */
export function resolvePairwise(file: TrialFile, factors: readonly DesignFactor[], sink: DiagnosticSink): Pick<Design, "pairwise" | "planSpans"> {
  const pairwise: { name: string; factors: number[]; span: Span }[] = [];
  let replicates: Span | undefined;
  const detect = new Map<string, Span>();
  for (const s of file.plan?.settings ?? []) {
    if (s.kind === "replicates") replicates = s.value?.span ?? s.span;
    if (s.kind === "detect" && s.response) detect.set(s.response.text, s.span);
    if (s.kind !== "pairwise" || !s.term) continue;
    const indices: number[] = [];
    let ok = true;
    for (const name of s.term.names) {
      const f = factors.findIndex((x) => x.name === name.text);
      if (f < 0) {
        ok = false;
        const known = factors.map((x) => `'${x.name}'`).join(", ");
        sink.add(diagnostic("unknown-factor", name.span, `'${name.text}' in 'pairwise' is not a declared factor${known ? ` (declared: ${known})` : ""}.`));
      } else if (indices.includes(f)) {
        ok = false;
        sink.add(diagnostic("invalid-setting", s.term.span, "'pairwise' names the same factor twice: write each name once."));
      } else indices.push(f);
    }
    if (ok && indices.length > 0) pairwise.push({ name: indices.map((f) => factors[f]!.name).join(" x "), factors: indices, span: s.term.span });
  }
  return {
    ...(pairwise.length > 0 ? { pairwise } : {}),
    planSpans: { ...(replicates ? { replicates } : {}), detect },
  };
}
