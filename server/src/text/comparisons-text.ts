/**
 * Text sections for comparisons (letter groups, best level, Tukey table, Dunnett, trend contrasts), model
 * checks, alternative tests and power, shared by the CLI's `analyze` text and usable by hovers and reports.
 */

import type { ResponseAnalysis } from "../analysis/results.js";
import { alignColumns } from "./align-columns.js";
import { comparisonPFloor } from "../stats/distributions/p-floors.js";
import { formatF, formatNumber, formatP, formatPAtFloor } from "./format-number.js";

/** The lines (indented by two spaces) describing a response's comparisons, checks, alternatives and power. */
export function comparisonsText(r: ResponseAnalysis): string[] {
  const lines: string[] = [];
  const terms = [...new Set((r.groups ?? []).map((g) => g.term))];
  for (const term of terms) {
    lines.push("", `  Groups of ${term} (Tukey HSD at α = ${r.alpha}; levels sharing a letter do not differ):`);
    const table = [["Level", "Mean", "Group"]];
    for (const g of r.groups!.filter((x) => x.term === term)) table.push([g.level, formatNumber(g.mean, 5), g.letters]);
    lines.push(...alignColumns(table, { align: ["left", "right", "left"] }).map((l) => "    " + l));
    const best = r.best?.find((b) => b.term === term);
    if (best) lines.push(`    Best by goal (${best.goal}): ${best.level}${best.indistinguishable.length > 0 ? `; not distinguishable from it: ${best.indistinguishable.join(", ")}` : "; it differs from every other level"}.`);
    const pairs = (r.comparisons ?? []).filter((c) => c.term === term && (c.method === "tukey" || c.method === "dunnett"));
    if (pairs.length > 0) {
      const level = Math.round(r.confidence * 100);
      const rows = [["Method", "Comparison", "Difference", `${level}% simultaneous CI`, "p"]];
      for (const c of pairs) rows.push([c.method, `${c.a} − ${c.b}`, formatNumber(c.diff, 4), c.lower === null || c.upper === null ? "—" : `${formatNumber(c.lower, 4)} to ${formatNumber(c.upper, 4)}`, formatPAtFloor(c.p, comparisonPFloor(c.method))]);
      lines.push(...alignColumns(rows, { align: ["left", "left", "right", "left", "right"] }).map((l) => "    " + l));
    }
  }
  for (const c of r.contrasts ?? []) lines.push(`  Trend of ${r.name} over ${c.term}: ${c.contrast} contrast ${formatNumber(c.estimate, 4)} (SE ${formatNumber(c.standardError)}), t(${c.df}) = ${formatF(c.t)}, p = ${formatP(c.p)}`);
  const k = r.checks;
  if (k) {
    const parts: string[] = [];
    if (k.brownForsythe) parts.push(`Brown-Forsythe F(${k.brownForsythe.df1}, ${k.brownForsythe.df2}) = ${formatF(k.brownForsythe.statistic)}, p = ${formatP(k.brownForsythe.p)}`);
    if (k.levene) parts.push(`Levene F = ${formatF(k.levene.statistic)}, p = ${formatP(k.levene.p)}`);
    if (k.bartlett) parts.push(`Bartlett χ²(${k.bartlett.df}) = ${formatF(k.bartlett.statistic)}, p = ${formatP(k.bartlett.p)}`);
    if (k.shapiroWilk) parts.push(`Shapiro-Wilk W = ${formatNumber(k.shapiroWilk.w, 4)}, p = ${formatP(k.shapiroWilk.p)}`);
    if (k.outliers) parts.push(k.outliers.length === 0 ? "no outlier (Bonferroni)" : `outliers: ${k.outliers.map((o) => o.run).join(", ")}`);
    if (parts.length > 0) lines.push("", `  Checks${k.groupsBy ? ` (groups: ${k.groupsBy})` : ""}: ${parts.join("; ")}.`);
  }
  const a = r.alternatives;
  if (a) {
    const parts: string[] = [];
    if (a.welch) parts.push(`Welch F(${a.welch.df1}, ${formatNumber(a.welch.df2, 4)}) = ${formatF(a.welch.statistic)}, p = ${formatP(a.welch.p)}`);
    if (a.kruskalWallis) parts.push(`Kruskal-Wallis χ²(${a.kruskalWallis.df}) = ${formatF(a.kruskalWallis.statistic)}, p = ${formatP(a.kruskalWallis.p)}`);
    if (a.friedman) parts.push(`Friedman (blocks ${a.friedman.block}) χ²(${a.friedman.df}) = ${formatF(a.friedman.statistic)}, p = ${formatP(a.friedman.p)}`);
    if (a.welchT) parts.push(`Welch t(${formatNumber(a.welchT.df, 4)}) = ${formatF(a.welchT.statistic)}, p = ${formatP(a.welchT.p)}`);
    if (parts.length > 0) lines.push(`  Alternatives for ${a.term}: ${parts.join("; ")}.`);
  }
  for (const p of r.power ?? []) {
    lines.push(`  Power for ${p.term}: ${formatNumber(p.power, 2)} to detect ${p.difference} with ${p.replicates} replicate${p.replicates === 1 ? "" : "s"} (σ = ${formatNumber(p.sigma, 3)} ${sigmaSourceWords(p.sigmaSource)}); target ${p.target} needs ${p.replicatesNeeded ?? "more than 1000"} replicates.`);
  }
  return lines;
}

/** How a text names where a power computation's σ came from: "from the residuals" or "planned ('plan sigma')". */
export function sigmaSourceWords(source: "planned" | "observed" | undefined): string {
  return source === "planned" ? "planned ('plan sigma')" : "from the residuals";
}
