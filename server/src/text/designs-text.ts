import type { ResponseAnalysis } from "../analysis/results.js";
import { alignColumns } from "./align-columns.js";
import { formatNumber, formatP, MISSING } from "./format-number.js";

/**
 * Text lines for the design-specific results (docs/designs.md): sphericity and its corrections for
 * repeated measures, variance components for random factors, effects and Lenth's margins for two-level
 * designs. Empty when the response has none of them.
 */
export function designsText(r: ResponseAnalysis): string[] {
  const lines: string[] = [];
  for (const s of r.sphericity ?? []) {
    const read = s.recommended === "huynhFeldt" ? "Huynh-Feldt" : "Greenhouse-Geisser";
    lines.push(
      "",
      `  Sphericity of ${s.term}: Mauchly W = ${formatNumber(s.mauchlyW)}, p = ${formatP(s.p)}; epsilon GG = ${formatNumber(s.greenhouseGeisser.epsilon, 3)}, HF = ${formatNumber(s.huynhFeldt.epsilon, 3)} (read ${read}).`,
    );
    const table = [["Term", "p (GG)", "p (HF)"], ...s.corrected.map((c) => [c.source, formatP(c.greenhouseGeisserP), formatP(c.huynhFeldtP)])];
    lines.push(...alignColumns(table, { align: ["left", "right", "right"] }).map((l) => "    " + l));
  }
  if (r.varianceComponents && r.varianceComponents.length > 0) {
    const table = [["Variance component", "Variance", "Share"]];
    for (const v of r.varianceComponents) {
      table.push([v.source, `${formatNumber(v.variance)}${v.truncated ? " (negative estimate set to 0)" : ""}`, v.share === null ? MISSING : `${formatNumber(v.share * 100, 3)}%`]);
    }
    lines.push("", ...alignColumns(table, { align: ["left", "right", "right"] }).map((l) => "  " + l));
    if (r.icc) lines.push(`  Intraclass correlation (${r.icc.source}): ${formatNumber(r.icc.value, 3)}`);
  }
  if (r.effects && r.effects.length > 0) {
    const table = [["Effect", "Estimate", "Coefficient", "Standardized", "Aliases"]];
    for (const e of r.effects) table.push([e.term, formatNumber(e.effect), formatNumber(e.coefficient), formatNumber(e.standardized, 3), e.aliases.join(", ")]);
    lines.push("", ...alignColumns(table, { align: ["left", "right", "right", "right", "left"] }).map((l) => "  " + l));
    if (r.lenth) lines.push(`  Lenth: PSE = ${formatNumber(r.lenth.pse)}, margin of error = ${formatNumber(r.lenth.me)}, simultaneous margin = ${formatNumber(r.lenth.sme)} (df ${formatNumber(r.lenth.df, 3)}).`);
    if (r.curvature) lines.push(`  Curvature (centre points): SS = ${formatNumber(r.curvature.ss)}, F = ${formatNumber(r.curvature.f)}, p = ${formatP(r.curvature.p)}.`);
  }
  return lines;
}
