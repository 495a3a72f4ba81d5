/**
 * Code lenses: above each response declaration, a one-line verdict of its ANOVA, clicking which runs the
 * extension's "Show Analysis" command for the document.
 */
import type { ResponseAnalysis } from "../analysis/results.js";
import { formatF, formatNumber, formatP } from "../text/format-number.js";
import { denominatorDf, termRows } from "../text/verdicts.js";
import type { CodeLens } from "vscode-languageserver";
import { spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** The command the extension registers; the server only names it. */
export const SHOW_ANALYSIS_COMMAND = "trialbook.showAnalysis";

/** One lens per declared response, on the declaration's first line. */
export function codeLenses(doc: AnalyzedDocument): CodeLens[] {
  const lenses: CodeLens[] = [];
  for (const decl of doc.analysis.file.responses) {
    if (!decl.name) continue;
    const analysis = doc.analysis.responses.find((r) => r.name === decl.name!.text);
    const title = analysis ? responseLensTitle(analysis) : `${decl.name.text}: not analysed`;
    lenses.push({
      range: spanToRange(doc.lineIndex, decl.keywordSpan),
      command: { title, command: SHOW_ANALYSIS_COMMAND, arguments: [doc.uri, decl.name.text] },
    });
  }
  return lenses;
}

/**
 * The verdict line of a response, e.g. `profile F(3,16)=9.84 p=0.0007 · line p=0.4100 · R²=0.71`: the first
 * term with its F test, the others with their p-values, then R².
 */
export function responseLensTitle(r: ResponseAnalysis): string {
  const rows = termRows(r);
  if (r.anova.length === 0) return `${r.name}: no analysis yet (${r.n} measured run${r.n === 1 ? "" : "s"})`;
  const parts = rows.map((row, i) => {
    const df = denominatorDf(row, r);
    return i === 0 ? `${row.source} F(${row.df},${df === undefined ? "?" : formatNumber(df, 4)})=${formatF(row.f)} p=${formatP(row.p)}` : `${row.source} p=${formatP(row.p)}`;
  });
  parts.push(`R²=${formatNumber(r.rSquared, 2)}`);
  return parts.join(" · ");
}
