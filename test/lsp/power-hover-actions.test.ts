/**
 * Hovers with letter groups, best level, checks and power; the `low-power` quick fix; and the "Write Run
 * Sheet" code action. The numbers shown are compared with what analyzeDocument computes for the same text
 * (those are checked against R in test/stats/comparisons and test/analysis/plan-sigma.test.ts); the run
 * sheet action is checked to keep every measured row byte-identical (design brief §6).
 */
import assert from "node:assert/strict";
import type { CodeAction, MarkupContent, Range } from "vscode-languageserver";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { planRunSheet, applyEdits as applyOffsetEdits } from "../../server/src/planning/run-sheet.js";
import { codeActions } from "../../server/src/lsp/code-actions.js";
import { analyzeText } from "../../server/src/lsp/documents.js";
import { hover } from "../../server/src/lsp/hover.js";
import { readSettings, toAnalysisDefaults } from "../../server/src/lsp/settings.js";
import { formatF, formatNumber, formatP } from "../../server/src/text/format-number.js";
import { applyEdits, COATING, marked, TEST_URI } from "./helpers.js";

const hoverText = (snippet: string) => {
  const { doc, position } = marked(snippet);
  const h = hover(doc, position);
  return h ? (h.contents as MarkupContent).value : undefined;
};
const at = (text: string, needle: string, delta = 0) => text.replace(needle, needle.slice(0, delta) + "<|>" + needle.slice(delta));
const actionsAt = (snippet: string) => {
  const { doc, position } = marked(snippet);
  const range: Range = { start: position, end: position };
  return { doc, actions: codeActions(doc, { textDocument: { uri: TEST_URI }, range, context: { diagnostics: [] } }, { snippetEdits: false }) };
};
const apply = (text: string, action: CodeAction) => applyEdits(text, action.edit!.changes![TEST_URI]!);

// The invented coating-bath file of helpers.ts with a difference worth detecting.
const SIZED = COATING.replace("  seed 42\n", "  seed 42\n  detect gloss 2\n");

describe("lsp: hovers with letters, best level, checks and power", () => {
  const r = analyzeDocument(SIZED).responses[0]!;

  it("the response hover shows each term's letter groups and best level as analyzeDocument computes them", () => {
    const md = hoverText(at(SIZED, "response gloss", 10))!;
    assert.ok(r.groups && r.groups.length > 0, "the analysis has letter groups");
    for (const term of new Set(r.groups.map((g) => g.term))) {
      const shown = r.groups.filter((g) => g.term === term).map((g) => `${g.level} **${g.letters}**`).join(" · ");
      assert.ok(md.includes(`Groups of ${term} (Tukey HSD, α = 0.05; levels sharing a letter do not differ): ${shown}`), md);
    }
    for (const b of r.best ?? []) assert.ok(md.includes(`Best ${b.term} by goal (maximize): **${b.level}**`), md);
    assert.equal(r.best?.[0]?.level, "warm");
  });

  it("the response hover shows the model checks with analyzeDocument's statistics", () => {
    const md = hoverText(at(SIZED, "response gloss", 10))!;
    // Two runs per cell: Levene/Brown–Forsythe are undefined (a check-skipped note says so); Bartlett and
    // Shapiro–Wilk are computed.
    const k = r.checks!;
    assert.ok(k.bartlett && k.shapiroWilk && !k.brownForsythe);
    assert.ok(md.includes("Checks (groups: temp x dwell): "), md);
    assert.ok(md.includes(`Bartlett χ²(${k.bartlett.df}) = ${formatF(k.bartlett.statistic)}, p = ${formatP(k.bartlett.p)}`), md);
    assert.ok(md.includes(`Shapiro–Wilk W = ${formatNumber(k.shapiroWilk.w, 4)}, p = ${formatP(k.shapiroWilk.p)}`), md);
    assert.ok(md.includes("no outlier (Bonferroni)"), md);
  });

  it("the response hover shows power per term with the observed sigma and the replicates needed", () => {
    const md = hoverText(at(SIZED, "response gloss", 10))!;
    assert.ok(r.power && r.power.length === 2);
    for (const p of r.power) {
      assert.equal(p.sigmaSource, "observed");
      const needed = `${p.replicatesNeeded} replicate${p.replicatesNeeded === 1 ? "" : "s"} reach it`;
      assert.ok(md.includes(`Power of ${p.term} for gloss: ${formatNumber(p.power, 2)} with 2 replicates to detect 2 GU (σ = ${formatNumber(p.sigma, 3)} GU from the residuals); target 0.8: ${needed}.`), md);
    }
  });

  it("the factor hover shows each level's letters next to its mean", () => {
    const md = hoverText(at(SIZED, "factor temp", 8))!;
    assert.ok(md.includes("| Level | n | Mean | SD | CI | Group |"), md);
    for (const g of r.groups!.filter((x) => x.term === "temp")) {
      const m = r.means.find((x) => x.term === "temp" && x.level === g.level)!;
      assert.match(md, new RegExp(`\\| ${g.level} \\| ${m.n} \\| ${formatNumber(m.mean).replace(".", "\\.")} \\|.*\\| ${g.letters} \\|`));
    }
  });

  it("the replicates hover shows power per term and the replicates reaching the target for every term", () => {
    const md = hoverText(at(SIZED, "replicates 2", 3))!;
    assert.doesNotMatch(md, /not available yet/);
    for (const p of r.power!) assert.ok(md.includes(`Power of ${p.term} for gloss: ${formatNumber(p.power, 2)}`), md);
    const most = Math.max(...r.power!.map((p) => p.replicatesNeeded!));
    assert.ok(md.includes(`gloss: **${most}** replicate${most === 1 ? "" : "s"} reach the target 0.8 for every term.`), md);
  });

  it("before any data, the replicates hover uses the planned sigma and says so", () => {
    // Invented adhesive cure; R's power.anova.test for this layout is in test/stats/fixtures/r/plan-sigma.
    const text = "response strength unit MPa\nfactor profile levels ramp-fast, ramp-slow, step\nplan\n  replicates 3\n  detect strength 1.5\n  sigma strength 1.2\n";
    const p = analyzeDocument(text).responses[0]!.power![0]!;
    const md = hoverText(at(text, "replicates 3", 2))!;
    assert.ok(md.includes(`Power of profile for strength: ${formatNumber(p.power, 2)} with 3 replicates to detect 1.5 MPa (σ = 1.2 MPa planned ('plan sigma')); target 0.8: 14 replicates reach it.`), md);
  });
});

describe("lsp: low-power quick fix", () => {
  const PLANNED = "response strength unit MPa\nfactor profile levels ramp-fast, ramp-slow, step\nplan\n  replicates 3\n  detect strength 1.5\n  sigma strength 1.2\n";

  it("sets replicates to the smallest value reaching the target, and the warning goes away", () => {
    const { actions } = actionsAt(at(PLANNED, "replicates 3", 11));
    const fix = actions.find((a) => a.title.startsWith("Set replicates to"));
    assert.ok(fix, actions.map((a) => a.title).join("; "));
    const needed = analyzeDocument(PLANNED).responses[0]!.power![0]!.replicatesNeeded!;
    assert.equal(fix.title, `Set replicates to ${needed} (the smallest count reaching power 0.8 for every term)`);
    const fixed = apply(PLANNED, fix);
    assert.equal(fixed, PLANNED.replace("replicates 3", `replicates ${needed}`));
    const after = analyzeDocument(fixed);
    assert.equal(after.diagnostics.filter((d) => d.code === "low-power").length, 0);
    assert.ok(after.responses[0]!.power![0]!.power >= 0.8);
    // One fewer replicate does not reach it: the value is the smallest.
    const fewer = analyzeDocument(PLANNED.replace("replicates 3", `replicates ${needed - 1}`));
    assert.ok(fewer.responses[0]!.power![0]!.power < 0.8);
  });

  it("follows the editor's trialbook.powerTarget (mapped to the analysis' power) when the plan sets none", () => {
    const defaults = toAnalysisDefaults(readSettings({ powerTarget: 0.9 }));
    assert.deepEqual(defaults, { power: 0.9 });
    const doc = analyzeText(TEST_URI, 1, PLANNED, defaults);
    const needed = analyzeDocument(PLANNED, { power: 0.9 }).responses[0]!.power![0]!.replicatesNeeded!;
    assert.ok(needed > 14);
    const offset = PLANNED.indexOf("replicates 3") + 11;
    const position = doc.lineIndex.positionAt(offset);
    const actions = codeActions(doc, { textDocument: { uri: TEST_URI }, range: { start: position, end: position }, context: { diagnostics: [] } }, { snippetEdits: false });
    const fix = actions.find((a) => a.title.startsWith("Set replicates to"))!;
    assert.equal(fix.title, `Set replicates to ${needed} (the smallest count reaching power 0.9 for every term)`);
    // The file's own `plan power` wins over the editor setting.
    const own = PLANNED.replace("plan\n", "plan\n  power 0.8\n");
    assert.equal(analyzeText(TEST_URI, 1, own, defaults).analysis.responses[0]!.power![0]!.replicatesNeeded, 14);
  });

  it("adds 'replicates N' as the plan's first setting when the plan has none", () => {
    // Two factors, additive model: one replicate (assumed when the plan says none) leaves 2 residual df.
    const text = "response strength unit MPa\nfactor profile levels ramp-fast, ramp-slow, step\nfactor line levels north, south\nplan\n  model profile, line\n  detect strength 1.5\n  sigma strength 1.2\n";
    const a = analyzeDocument(text);
    const low = a.diagnostics.find((d) => d.code === "low-power");
    assert.ok(low, "low-power without plan replicates (1 assumed)");
    const needed = Math.max(...a.responses[0]!.power!.map((p) => p.replicatesNeeded!));
    const { actions } = actionsAt(at(text, "detect strength", 2));
    const fix = actions.find((x) => x.title.startsWith(`Set replicates to ${needed} `));
    assert.ok(fix, actions.map((x) => x.title).join("; "));
    const fixed = apply(text, fix);
    assert.equal(fixed, text.replace("plan\n", `plan\n  replicates ${needed}\n`));
    assert.equal(analyzeDocument(fixed).diagnostics.filter((d) => d.code === "low-power").length, 0);
  });
});

describe("lsp: Write Run Sheet code action", () => {
  // Invented coating bath, half measured; r02 is excluded and r03 has a comment: all must stay as written.
  const HALF = `response gloss unit GU
factor temp levels cool, warm
factor dwell levels short, long
plan
  replicates 2
  seed 4187
runs  id   temp  dwell | gloss
      r01  cool  short | 81.2   # first run of the day
      r02  warm  long  | 88.9   excluded "bath drained"
      r03  cool  long  | 83.0
`;

  it("is offered on 'runs', writes the planner's edits, and keeps every measured or excluded row byte-identical", () => {
    const { actions } = actionsAt(at(HALF, "runs  id", 2));
    const sheet = actions.find((a) => a.title === "Write Run Sheet");
    assert.ok(sheet, actions.map((a) => a.title).join("; "));
    const written = apply(HALF, sheet);
    const planned = planRunSheet(HALF, { fallbackSeed: 1 });
    assert.ok(planned.ok);
    assert.equal(written, applyOffsetEdits(HALF, planned.edits));
    const rows = HALF.split("\n").filter((l) => /^\s+r0[123]\s/.test(l));
    const lines = written.split("\n");
    const kept = rows.map((row) => lines.indexOf(row));
    assert.ok(kept.every((k) => k >= 0), "every measured/excluded row is kept byte-identical");
    assert.deepEqual([...kept].sort((a, b) => a - b), kept, "in their order");
    // 8 runs in the design (4 cells x 2); r02 is excluded, so its cell still needs 2 runs: 6 pending added.
    assert.equal(lines.filter((l) => /\|\s+\?\s*$/.test(l)).length, planned.summary.addedRows);
    assert.ok(planned.summary.addedRows > 0);
    // Planning again changes nothing: the action is then not offered.
    const again = actionsAt(at(written, "runs  id", 2)).actions.find((a) => a.title === "Write Run Sheet");
    assert.equal(again, undefined);
  });

  it("is offered on 'plan' when the file has no runs table, and not elsewhere", () => {
    const text = HALF.slice(0, HALF.indexOf("runs"));
    const { actions } = actionsAt(at(text, "plan\n", 1));
    const sheet = actions.find((a) => a.title === "Write Run Sheet");
    assert.ok(sheet);
    const written = apply(text, sheet);
    assert.equal(analyzeDocument(written).design.runs.count, 8);
    assert.equal(actionsAt(at(text, "factor temp", 2)).actions.find((a) => a.title === "Write Run Sheet"), undefined);
  });
});
