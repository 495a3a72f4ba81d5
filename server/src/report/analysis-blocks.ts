import type { ResponseAnalysis } from "../analysis/results.js";
import { comparisonPFloor } from "../stats/distributions/p-floors.js";
import { formatF, formatNumber, formatP, formatPAtFloor } from "../text/format-number.js";
import type { ReportBlock } from "./blocks.js";

const METHOD_NAMES: Readonly<Record<string, string>> = { tukey: "Tukey HSD", lsd: "Fisher LSD", bonferroni: "Bonferroni", holm: "Holm", "games-howell": "Games–Howell", dunnett: "Dunnett" };

/**
 * Blocks for the analyses that extensions add to a response (results.ts, optional keys): comparisons
 * with letter groups and the best level, polynomial contrasts, model checks and alternative tests,
 * power, and the design-specific results (two-level effects, sphericity, variance components). Each
 * part appears only when its key is present; a missing part is said in one note at the end.
 */
export function analysisBlocks(r: ResponseAnalysis): ReportBlock[] {
  const blocks: ReportBlock[] = [];
  const missing: string[] = [];

  if (r.groups && r.groups.length > 0) {
    blocks.push({ kind: "table", caption: "Letter groups (levels that share a letter do not differ significantly)", header: ["Term", "Level", "Mean", "Group"], numeric: [false, false, true, false], rows: r.groups.map((g) => [g.term, g.level, formatNumber(g.mean, 5), g.letters]) });
  }
  if (r.comparisons && r.comparisons.length > 0) {
    const level = formatNumber(r.confidence * 100);
    blocks.push({
      kind: "table",
      caption: `Pairwise comparisons with ${level}% simultaneous intervals`,
      header: ["Term", "Method", "Levels", "Difference", "Lower", "Upper", "Adjusted p"],
      numeric: [false, false, false, true, true, true, true],
      rows: r.comparisons.map((c) => [c.term, METHOD_NAMES[c.method] ?? c.method, `${c.a} − ${c.b}`, formatNumber(c.diff), formatNumber(c.lower), formatNumber(c.upper), formatPAtFloor(c.p, comparisonPFloor(c.method))]),
    });
  } else missing.push("multiple comparisons");
  if (r.best && r.best.length > 0) {
    blocks.push({
      kind: "list",
      items: r.best.map((b) => `Best level of ${b.term} for ${b.goal === "target" ? "the target" : b.goal === "maximize" ? "a high value" : "a low value"}: ${b.level}${b.indistinguishable.length > 0 ? `; not distinguishable from ${b.indistinguishable.join(", ")}` : ""}.`),
    });
  }
  if (r.contrasts && r.contrasts.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Trend contrasts of numeric factors",
      header: ["Term", "Contrast", "Estimate", "Standard error", "t", "df", "p"],
      numeric: [false, false, true, true, true, true, true],
      rows: r.contrasts.map((c) => [c.term, c.contrast, formatNumber(c.estimate), formatNumber(c.standardError), formatF(c.t), String(c.df), formatP(c.p)]),
    });
  }

  const checks: string[] = [];
  const c = r.checks;
  if (c) {
    const by = c.groupsBy ? ` across ${c.groupsBy}` : "";
    if (c.levene) checks.push(`Levene (equal variances${by}): F(${c.levene.df1}, ${c.levene.df2}) = ${formatF(c.levene.statistic)}, p = ${formatP(c.levene.p)}.`);
    if (c.brownForsythe) checks.push(`Brown–Forsythe (equal variances${by}): F(${c.brownForsythe.df1}, ${c.brownForsythe.df2}) = ${formatF(c.brownForsythe.statistic)}, p = ${formatP(c.brownForsythe.p)}.`);
    if (c.bartlett) checks.push(`Bartlett (equal variances${by}): χ²(${c.bartlett.df}) = ${formatF(c.bartlett.statistic)}, p = ${formatP(c.bartlett.p)}.`);
    if (c.shapiroWilk) checks.push(`Shapiro–Wilk (normal residuals, n = ${c.shapiroWilk.n}): W = ${formatNumber(c.shapiroWilk.w)}, p = ${formatP(c.shapiroWilk.p)}.`);
    for (const o of c.outliers ?? []) checks.push(`Possible outlier: run ${o.run}, studentized residual ${formatNumber(o.studentized, 3)}, Bonferroni p = ${formatP(o.p)}.`);
    if (c.varianceMean) checks.push(`Spread grows with the mean: slope ${formatNumber(c.varianceMean.slope, 3)} of log SD on log mean, suggesting a power transformation with λ ≈ ${formatNumber(c.varianceMean.lambda, 2)}.`);
  }
  const a = r.alternatives;
  if (a) {
    const on = a.term ? ` for ${a.term}` : "";
    if (a.welch) checks.push(`Welch's ANOVA${on} (unequal variances): F(${a.welch.df1}, ${formatNumber(a.welch.df2, 4)}) = ${formatF(a.welch.statistic)}, p = ${formatP(a.welch.p)}.`);
    if (a.welchT) checks.push(`Welch's t test ${a.welchT.a} − ${a.welchT.b}: difference ${formatNumber(a.welchT.diff)}, t(${formatNumber(a.welchT.df, 4)}) = ${formatF(a.welchT.statistic)}, p = ${formatP(a.welchT.p)}.`);
    if (a.kruskalWallis) checks.push(`Kruskal–Wallis${on} (ranks): H(${a.kruskalWallis.df}) = ${formatF(a.kruskalWallis.statistic)}, p = ${formatP(a.kruskalWallis.p)}.`);
    if (a.friedman) checks.push(`Friedman${on}, blocked by ${a.friedman.block} (ranks): χ²(${a.friedman.df}) = ${formatF(a.friedman.statistic)}, p = ${formatP(a.friedman.p)}.`);
  }
  if (checks.length > 0) blocks.push({ kind: "heading", level: 3, text: "Checks and alternatives" }, { kind: "list", items: checks });
  else missing.push("model checks");

  if (r.power && r.power.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Power of the F tests of main effects",
      header: ["Term", "Difference to detect", "σ used", "Replicates", "Power", "Target", "Replicates needed"],
      numeric: [false, true, true, true, true, true, true],
      rows: r.power.map((p) => [p.term, formatNumber(p.difference), formatNumber(p.sigma), String(p.replicates), formatNumber(p.power, 3), formatNumber(p.target, 3), p.replicatesNeeded === null ? "over 1000" : String(p.replicatesNeeded)]),
    });
  } else missing.push("power (it needs a “plan detect” line for the response)");

  if (r.effects && r.effects.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Effects of the two-level design",
      header: ["Term", "Effect", "Coefficient", "Standardized", "Aliases"],
      numeric: [false, true, true, true, false],
      rows: r.effects.map((e) => [e.term, formatNumber(e.effect), formatNumber(e.coefficient), formatNumber(e.standardized), e.aliases.join(", ")]),
    });
  }
  if (r.lenth) blocks.push({ kind: "paragraph", text: `Lenth's pseudo standard error ${formatNumber(r.lenth.pse)} (df ${formatNumber(r.lenth.df)}): margin of error ${formatNumber(r.lenth.me)}, simultaneous margin ${formatNumber(r.lenth.sme)}.` });
  if (r.curvature) blocks.push({ kind: "paragraph", text: `Curvature from the centre points: SS ${formatNumber(r.curvature.ss)}, F = ${formatF(r.curvature.f)}, p = ${formatP(r.curvature.p)}.` });
  if (r.definingRelation && r.definingRelation.length > 0) blocks.push({ kind: "paragraph", text: `Defining relation: I = ${r.definingRelation.join(" = ")}${r.resolution ? `; resolution ${r.resolution}` : ""}.` });

  if (r.sphericity && r.sphericity.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Sphericity (Mauchly) and corrected tests",
      header: ["Term", "Mauchly W", "p", "GG ε", "GG p", "HF ε", "HF p", "Read"],
      numeric: [false, true, true, true, true, true, true, false],
      rows: r.sphericity.map((s) => [s.term, formatNumber(s.mauchlyW), formatP(s.p), formatNumber(s.greenhouseGeisser.epsilon, 3), formatP(s.greenhouseGeisser.p), formatNumber(s.huynhFeldt.epsilon, 3), formatP(s.huynhFeldt.p), s.recommended === "huynhFeldt" ? "Huynh–Feldt" : "Greenhouse–Geisser"]),
    });
  }
  if (r.varianceComponents && r.varianceComponents.length > 0) {
    blocks.push({
      kind: "table",
      caption: "Variance components (ANOVA method)",
      header: ["Source", "Variance", "Share"],
      numeric: [false, true, true],
      rows: r.varianceComponents.map((v) => [v.source + (v.truncated ? " (negative estimate set to 0)" : ""), formatNumber(v.variance), v.share === null ? "—" : `${formatNumber(v.share * 100, 3)}%`]),
    });
  }

  if (missing.length > 0) blocks.push({ kind: "note", text: `Not available for this response: ${missing.join(", ")}.` });
  return blocks;
}
