/**
 * Folding ranges: every declaration that spans several lines (plan, runs table, text blocks, a factor whose
 * levels wrap), and runs of three or more consecutive comment lines.
 */
import { type FoldingRange, FoldingRangeKind } from "vscode-languageserver";
import type { AnalyzedDocument } from "./documents.js";

/** The folding ranges of a document, by start line. */
export function foldingRanges(doc: AnalyzedDocument): FoldingRange[] {
  const { file } = doc;
  const out: FoldingRange[] = [];
  for (const d of file.declarations) {
    const start = doc.lineIndex.positionAt(d.span.start).line;
    // A span ending at a line break belongs to the line before it.
    let endOffset = d.span.end;
    while (endOffset > d.span.start && /\s/.test(doc.text[endOffset - 1] ?? "")) endOffset--;
    const end = doc.lineIndex.positionAt(endOffset).line;
    if (end > start) out.push({ startLine: start, endLine: end });
  }
  const lines = doc.text.split(/\r\n|\r|\n/);
  let first = -1;
  for (let l = 0; l <= lines.length; l++) {
    const isComment = l < lines.length && /^\s*#/.test(lines[l]!);
    if (isComment && first < 0) first = l;
    if (!isComment && first >= 0) {
      if (l - 1 - first >= 2) out.push({ startLine: first, endLine: l - 1, kind: FoldingRangeKind.Comment });
      first = -1;
    }
  }
  return out.sort((a, b) => a.startLine - b.startLine);
}
