import type { AnovaRow, ResponseAnalysis } from "../analysis/results.js";
import { formatF, formatNumber, pClause } from "./format-number.js";

/** The degrees of freedom of the residual row, or undefined when the table has none. */
export function residualDf(analysis: ResponseAnalysis): number | undefined {
  return analysis.anova.find((row) => row.source === "Residual")?.df;
}

/**
 * The model-term rows of an ANOVA table: without Residual and Total, and without the error strata that
 * other rows are tested against (repeated-measures and random-factor designs).
 */
export function termRows(analysis: ResponseAnalysis): AnovaRow[] {
  const errorTerms = new Set(analysis.anova.flatMap((row) => (row.error ? [row.error] : [])));
  return analysis.anova.filter((row) => row.source !== "Residual" && row.source !== "Total" && !(errorTerms.has(row.source) && row.f === undefined));
}

/** The denominator df of a term's F test: its own error df where the design has strata, else the residual df. */
export function denominatorDf(row: AnovaRow, analysis: ResponseAnalysis): number | undefined {
  return row.errorDf ?? residualDf(analysis);
}

/**
 * `F(3, 16) = 9.84, p = 0.0007` for a term row. The denominator df is the row's own error df where the
 * design tests the term against another mean square (error strata, random factors), else the residual df.
 */
export function testSummary(row: AnovaRow, dfResidual: number | undefined): string {
  const df2 = row.errorDf ?? dfResidual;
  return `F(${row.df}, ${df2 === undefined || df2 === null ? "?" : formatNumber(df2, 4)}) = ${formatF(row.f)}, ${pClause(row.p)}`;
}

/**
 * One sentence per term saying, in words, whether it changes the response at the analysis's alpha:
 * "profile changes strength: F(3, 16) = 9.84, p = 0.0007".
 */
export function termVerdict(row: AnovaRow, analysis: ResponseAnalysis): string {
  const test = testSummary(row, residualDf(analysis));
  if (row.p === null || row.p === undefined) return `${row.source}: no test possible (${test}).`;
  const parts = row.source.split(" x ");
  const significant = row.p < analysis.alpha;
  if (parts.length > 1) {
    const joined = parts.slice(0, -1).join(", ") + " and " + parts[parts.length - 1];
    return significant
      ? `${joined} interact: the effect of one on ${analysis.name} depends on the other${parts.length > 2 ? "s" : ""}: ${test}.`
      : `No evidence that ${joined} interact on ${analysis.name} at alpha ${analysis.alpha}: ${test}.`;
  }
  return significant
    ? `${row.source} changes ${analysis.name}: ${test}.`
    : `No evidence that ${row.source} changes ${analysis.name} at alpha ${analysis.alpha}: ${test}.`;
}
