/**
 * In-process tests of the feature handlers on cursor-marked snippets. The numbers the editor shows are
 * compared with what `analyzeDocument` computes for the same text (the engine's numbers are verified
 * against R and NIST StRD in test/stats); these tests check that each face shows the right ones.
 */
import assert from "node:assert/strict";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { formatF, formatNumber, formatP } from "../../server/src/text/format-number.js";
import { codeLenses, responseLensTitle, SHOW_ANALYSIS_COMMAND } from "../../server/src/lsp/code-lens.js";
import { completion } from "../../server/src/lsp/completion.js";
import { toLspDiagnostics } from "../../server/src/lsp/convert.js";
import { foldingRanges } from "../../server/src/lsp/folding.js";
import { hover } from "../../server/src/lsp/hover.js";
import { definition, references } from "../../server/src/lsp/navigation.js";
import { prepareRename, rename } from "../../server/src/lsp/rename.js";
import { collectTokens, semanticTokens, TOKEN_TYPES } from "../../server/src/lsp/semantic-tokens.js";
import { readSettings, toAnalysisDefaults } from "../../server/src/lsp/settings.js";
import { documentSymbols } from "../../server/src/lsp/symbols.js";
import { type MarkupContent, ResponseError, type WorkspaceEdit } from "vscode-languageserver";
import { applyEdits, COATING, marked, open, TEST_URI, textOf } from "./helpers.js";

const hoverText = (snippet: string) => {
  const { doc, position } = marked(snippet);
  const h = hover(doc, position);
  return h ? (h.contents as MarkupContent).value : undefined;
};
const at = (text: string, needle: string, delta = 0) => text.replace(needle, needle.slice(0, delta) + "<|>" + needle.slice(delta));
const editsOf = (edit: WorkspaceEdit | ResponseError<void> | null) => {
  assert.ok(edit && !(edit instanceof ResponseError), "expected a workspace edit");
  return edit.changes![TEST_URI]!;
};

describe("lsp handlers (in process)", () => {
  const expected = analyzeDocument(COATING);
  const gloss = expected.responses[0]!;
  const tempRow = gloss.anova.find((r) => r.source === "temp")!;

  describe("diagnostics", () => {
    it("keeps the code, the narrowest span and related locations (duplicate run points at the first)", () => {
      const text = COATING.replace("r08  warm", "r01  warm");
      const doc = open(text);
      const lsp = toLspDiagnostics(doc.analysis.diagnostics, doc.lineIndex, TEST_URI);
      const dup = lsp.find((d) => d.code === "duplicate-run");
      assert.ok(dup, "duplicate-run reported");
      assert.equal(textOf(doc, dup.range), "r01");
      assert.equal(dup.range.start.line, 16);
      assert.equal(dup.source, "trialbook");
      assert.equal(dup.relatedInformation?.length, 1);
      assert.equal(dup.relatedInformation![0]!.location.range.start.line, 9);
    });

    it("points unknown-level at the cell", () => {
      const doc = open(COATING.replace("r03  cool", "r03  hot "));
      const lsp = toLspDiagnostics(doc.analysis.diagnostics, doc.lineIndex, TEST_URI);
      const d = lsp.find((x) => x.code === "unknown-level")!;
      assert.equal(textOf(doc, d.range), "hot");
      assert.equal(d.severity, 1);
    });
  });

  describe("hover", () => {
    it("shows the response's ANOVA table with the engine's F, p, R² and a verdict", () => {
      const md = hoverText(at(COATING, "response gloss", 10))!;
      assert.match(md, /\| Source \| df \| SS \| MS \| F \| p \|/);
      assert.ok(md.includes(`| temp | 1 |`), md);
      assert.ok(md.includes(formatF(tempRow.f)), `F ${formatF(tempRow.f)} in\n${md}`);
      assert.ok(md.includes(formatP(tempRow.p)));
      assert.ok(md.includes(`R² = ${formatNumber(gloss.rSquared)}`));
      assert.ok(md.includes("temp changes gloss"), md);
    });

    it("shows the same table on the runs header column", () => {
      const md = hoverText(at(COATING, "| gloss", 3))!;
      assert.ok(md.includes(formatF(tempRow.f)));
    });

    it("shows level means with confidence intervals on a factor", () => {
      const md = hoverText(at(COATING, "factor temp", 8))!;
      const warm = gloss.means.find((m) => m.term === "temp" && m.level === "warm")!;
      assert.equal(warm.n, 4);
      assert.ok(md.includes(`| warm | 4 | ${formatNumber(warm.mean)} |`), md);
      assert.ok(md.includes(`[${formatNumber(warm.lower)}, ${formatNumber(warm.upper)}]`));
      // Mean of the four warm runs, by hand: (88.9 + 87.1 + 90.2 + 86.5) / 4 = 88.175.
      assert.ok(Math.abs(warm.mean - 88.175) < 1e-12);
    });

    it("shows n, mean, SD and CI on a level, in a run cell too", () => {
      const md = hoverText(at(COATING, "r06  cool", 6))!;
      const cool = gloss.means.find((m) => m.term === "temp" && m.level === "cool")!;
      assert.ok(md.includes(`n = 4, mean = ${formatNumber(cool.mean)}, SD = ${formatNumber(cool.sd)}`), md);
      assert.ok(Math.abs(cool.mean - 82.175) < 1e-12); // (81.2 + 83.0 + 80.4 + 84.1) / 4, by hand
    });

    it("shows fitted value, residual and studentized residual on a value cell", () => {
      const md = hoverText(at(COATING, "90.2", 2))!;
      const res = gloss.residuals.find((r) => r.run === "r05")!;
      assert.ok(md.includes(`fitted = ${formatNumber(res.fitted)}`), md);
      assert.ok(md.includes(`residual = ${formatNumber(res.residual)}`));
      assert.ok(md.includes(`studentized residual = ${formatNumber(res.studentized)}`));
      // Full two-factor model: fitted = cell mean of warm x long = (88.9 + 90.2) / 2 = 89.55.
      assert.equal(formatNumber(res.fitted), "89.55");
      assert.equal(formatNumber(res.residual), "0.65");
    });

    it("on replicates without 'detect', says what power needs instead of a number", () => {
      const md = hoverText(at(COATING, "replicates 2", 3))!;
      assert.match(md, /\*\*replicates 2\*\*/);
      assert.match(md, /detect <response> <difference>/);
      assert.doesNotMatch(md, /not available yet/);
    });

    it("has nothing to say on white space", () => {
      assert.equal(hoverText(at(COATING, "plan\n", 4)), undefined);
    });
  });

  describe("code lens", () => {
    it("puts a one-line verdict with the engine's numbers above the response", () => {
      const doc = open(COATING);
      const lenses = codeLenses(doc);
      assert.equal(lenses.length, 1);
      const lens = lenses[0]!;
      assert.equal(lens.range.start.line, 2);
      assert.equal(lens.command!.command, SHOW_ANALYSIS_COMMAND);
      assert.deepEqual(lens.command!.arguments, [TEST_URI, "gloss"]);
      const residualDf = gloss.anova.find((r) => r.source === "Residual")!.df;
      assert.equal(residualDf, 4);
      assert.ok(lens.command!.title.startsWith(`temp F(1,4)=${formatF(tempRow.f)} p=${formatP(tempRow.p)} · dwell p=`), lens.command!.title);
      assert.ok(lens.command!.title.endsWith(`R²=${formatNumber(gloss.rSquared, 2)}`));
      assert.equal(responseLensTitle(gloss), lens.command!.title);
    });

    it("says when there is no analysis yet", () => {
      const doc = open(COATING.replace(/\| \d+\.\d/g, "| ?"));
      assert.match(codeLenses(doc)[0]!.command!.title, /no analysis yet \(0 measured runs\)/);
    });
  });

  describe("completion", () => {
    const labels = (snippet: string, snippets = false) => {
      const { doc, position } = marked(snippet);
      return completion(doc, position, { snippets }).map((i) => i.label);
    };
    it("offers top-level keywords at the start of a line", () => {
      const got = labels(COATING.replace("plan\n", "<|>\nplan\n"));
      assert.ok(got.includes("factor") && got.includes("runs") && got.includes("conclusion"));
    });
    it("offers declaration snippets when the client takes snippets, and the new-file snippet in an empty file", () => {
      assert.ok(labels(COATING.replace("plan\n", "<|>\nplan\n"), true).includes("factor"));
      assert.ok(labels("<|>", true).includes("trial file"));
    });
    it("offers plan keywords inside plan", () => {
      const got = labels(COATING.replace("  seed 42\n", "  seed 42\n  <|>\n"));
      assert.ok(got.includes("sums-of-squares") && got.includes("model") && !got.includes("factor"));
    });
    it("offers factor names in model terms", () => {
      const got = labels(COATING.replace("  seed 42\n", "  seed 42\n  model temp x <|>\n"));
      assert.deepEqual(got.filter((l) => l !== "x").sort(), ["dwell", "temp"]);
    });
    it("offers the levels of the cell's column in run rows", () => {
      assert.deepEqual(labels(COATING.replace("      r08  warm  short | 86.5\n", "      r08  warm  short | 86.5\n      r09  <|>\n")), ["cool", "warm"]);
      assert.deepEqual(labels(COATING.replace("      r08  warm  short | 86.5\n", "      r08  warm  short | 86.5\n      r09  cool  l<|>\n")), ["short", "long"]);
      assert.deepEqual(labels(COATING.replace("      r08  warm  short | 86.5\n", "      r08  warm  short | 86.5\n      r09  cool  long | <|>\n")), ["?"]);
    });
    it("offers role keywords after 'as'", () => {
      assert.deepEqual(labels(COATING.replace("factor dwell levels short, long", "factor dwell levels short, long as <|>")), ["block", "random", "subject"]);
    });
  });

  describe("outline, folding, semantic tokens", () => {
    it("lists declarations with factor levels as children", () => {
      const symbols = documentSymbols(open(COATING));
      assert.deepEqual(symbols.map((s) => s.name), ["Coating gloss vs. bath temperature", "gloss", "temp", "dwell", "plan", "runs"]);
      assert.deepEqual(symbols[2]!.children!.map((c) => c.name), ["cool", "warm"]);
      assert.equal(symbols[5]!.detail, "8 runs");
    });
    it("folds the plan and the runs table", () => {
      const folds = foldingRanges(open(COATING));
      assert.deepEqual(folds.map((f) => [f.startLine, f.endLine]), [[5, 7], [8, 16]]);
    });
    it("classifies names, levels, values and ids, with declaration and deprecated modifiers", () => {
      const text = COATING.replace("86.5\n", '86.5  excluded "bath drained"\n');
      const doc = open(text);
      const tokens = collectTokens(doc.analysis.file).map((t) => [text.slice(t.span.start, t.span.end), t.type, t.modifiers]);
      assert.deepEqual(tokens.slice(0, 3), [["gloss", "property", 1], ["temp", "type", 1], ["cool", "enumMember", 1]]);
      assert.deepEqual(tokens.filter((t) => t[0] === "r08" || t[0] === "86.5"), [["r08", "string", 2], ["86.5", "number", 2]]);
      // The encoding is relative: decode it back and compare with the raw tokens.
      const data = semanticTokens(doc).data;
      assert.equal(data.length, tokens.length * 5);
      let line = 0;
      let char = 0;
      for (let i = 0; i < data.length; i += 5) {
        line += data[i]!;
        char = data[i] === 0 ? char + data[i + 1]! : data[i + 1]!;
        const start = doc.lineIndex.offsetAt({ line, character: char });
        assert.equal(text.slice(start, start + data[i + 2]!), tokens[i / 5]![0]);
        assert.equal(TOKEN_TYPES[data[i + 3]!], tokens[i / 5]![1]);
      }
    });
  });

  describe("rename, definition, references", () => {
    it("renames a level in the declaration and every cell, and the analysis is unchanged", () => {
      const { doc, position } = marked(at(COATING, "r04  warm", 6));
      assert.deepEqual(prepareRename(doc, position)?.placeholder, "warm");
      const edits = editsOf(rename(doc, position, "hot"));
      assert.equal(edits.length, 5);
      const renamed = applyEdits(COATING, edits);
      assert.ok(!renamed.includes("warm"));
      const after = analyzeDocument(renamed);
      assert.equal(after.diagnostics.filter((d) => d.severity === "error").length, 0);
      assert.equal(after.responses[0]!.anova.find((r) => r.source === "temp")!.f, tempRow.f);
    });
    it("renames a factor in its declaration, model terms and the header; quotes a name that needs it", () => {
      const text = COATING.replace("  seed 42\n", "  seed 42\n  model temp, dwell, temp x dwell\n");
      const { doc, position } = marked(at(text, "factor temp", 8));
      const renamed = applyEdits(text, editsOf(rename(doc, position, "bath temp")));
      assert.ok(renamed.includes('factor "bath temp" levels'));
      assert.ok(renamed.includes('model "bath temp", dwell, "bath temp" x dwell'));
      assert.ok(renamed.includes('runs  id   "bath temp"  dwell'));
      assert.equal(analyzeDocument(renamed).responses[0]!.anova.find((r) => r.source === "bath temp")!.f, tempRow.f);
    });
    it("refuses a name that is already taken", () => {
      const { doc, position } = marked(at(COATING, "factor temp", 8));
      assert.ok(rename(doc, position, "dwell") instanceof ResponseError);
      assert.ok(rename(doc, position, "") instanceof ResponseError);
    });
    it("goes from a cell to the level declaration and finds every use", () => {
      const { doc, position } = marked(at(COATING, "r07  cool  long", 12));
      const def = definition(doc, position)!;
      assert.equal(def.range.start.line, 4);
      assert.equal(textOf(doc, def.range), "long");
      const refs = references(doc, position, true);
      assert.equal(refs.length, 5); // the declaration and four runs
      assert.equal(references(doc, position, false).length, 4);
    });
  });

  describe("settings", () => {
    it("ignores invalid values and maps names to engine defaults", () => {
      const s = readSettings({ alpha: 0.1, sumsOfSquares: "II", confidence: 2, powerTarget: 0.9, analysisDelay: -5 });
      assert.deepEqual(s, { analysisDelay: 150, alpha: 0.1, powerTarget: 0.9, sumsOfSquares: "II" });
      assert.deepEqual(toAnalysisDefaults(s), { alpha: 0.1, power: 0.9, ssType: "II" });
      assert.equal(readSettings({ analysisDelay: 0 }).analysisDelay, 0);
    });
    it("lets the file win over the editor setting", () => {
      const text = COATING.replace("  seed 42\n", "  seed 42\n  alpha 0.01\n");
      const result = analyzeDocument(text, toAnalysisDefaults(readSettings({ alpha: 0.1 })));
      assert.equal(result.responses[0]!.alpha, 0.01);
    });
  });
});
