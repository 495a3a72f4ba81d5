/**
 * In-process tests of the handlers that edit text: code actions and formatting. Each applies the edits
 * and checks the result by parsing and analysing it again.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { parseTrial } from "../../grammar/src/parse.js";
import { cellText } from "../../grammar/src/runs-table.js";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { ValueStatus } from "../../server/src/analysis/design.js";
import { type CodeActionCapabilities, codeActions, newRunIds } from "../../server/src/lsp/code-actions.js";
import { formatDocument, formatRange } from "../../server/src/lsp/formatting.js";
import type { CodeAction, Range, TextEdit } from "vscode-languageserver";
import { applyEdits, COATING, marked, open, TEST_URI } from "./helpers.js";

const noSnippets: CodeActionCapabilities = { snippetEdits: false };
const actionsAt = (snippet: string, caps = noSnippets) => {
  const { doc, position } = marked(snippet);
  const range: Range = { start: position, end: position };
  return { doc, actions: codeActions(doc, { textDocument: { uri: TEST_URI }, range, context: { diagnostics: [] } }, caps) };
};
const apply = (text: string, action: CodeAction) => applyEdits(text, action.edit!.changes![TEST_URI]!);

/** All cell texts of a file's runs table, and all column names, sorted: formatting must keep this multiset. */
function cellMultiset(text: string): string[] {
  const file = parseTrial(text);
  const rows = file.runs?.rows;
  const out: string[] = (file.runs?.columns ?? []).map((c) => `column:${c.text}`);
  if (rows) {
    for (let c = 0; c < rows.cellStart.length && c < rows.cellOffset[rows.count]!; c++) out.push(text.slice(rows.cellStart[c]!, rows.cellEnd[c]!));
    for (const [r, mark] of rows.excluded) out.push(`excluded:${r}:${text.slice(mark.span.start, mark.span.end)}`);
  }
  return out.sort();
}

/** Everything but white space, in order: formatting may change nothing else. */
const visible = (text: string) => text.replace(/\s+/g, "");

describe("lsp edits (in process)", () => {
  describe("code action: declare an unknown level", () => {
    it("appends the level to the factor's list and the error goes away", () => {
      const text = COATING.replace("r03  cool", "r03  hot ");
      const { actions } = actionsAt(text.replace("r03  hot", "r03  h<|>ot"));
      const fix = actions.find((a) => a.title === "Declare 'hot' as a level of factor 'temp'")!;
      assert.ok(fix, actions.map((a) => a.title).join("; "));
      assert.equal(fix.diagnostics?.[0]?.code, "unknown-level");
      const fixed = apply(text, fix);
      assert.ok(fixed.includes("factor temp levels cool, warm, hot\n"));
      assert.equal(analyzeDocument(fixed).diagnostics.filter((d) => d.code === "unknown-level").length, 0);
    });
  });

  describe("code action: add pending rows for missing replicates", () => {
    // r05 and r06 are pending; warm x long and cool x short each miss one run, cool x long misses two.
    const text = `# Invented example: gloss of a coating bath; the values are made up for tests.
response gloss unit GU
factor temp levels cool, warm
factor dwell levels short, long
plan
  replicates 2
  seed 42
runs  id   temp  dwell | gloss
      r01  cool  short | 81.2
      r02  warm  long  | 88.9
      r03  warm  short | 87.1
      r04  warm  short | 86.5
      r05  warm  long  | ?
      r06  cool  short | ?   # pending
`;
    const missingFix = () => {
      const { actions } = actionsAt(text.replace("r01  cool", "r0<|>1  cool"));
      return actions.find((a) => a.title.startsWith("Add "))!;
    };

    it("adds exactly the missing runs as pending rows and leaves the design balanced", () => {
      const fix = missingFix();
      assert.ok(fix);
      assert.match(fix.title, /^Add 2 pending runs for the missing replicates \(random order, seed 42\)$/);
      const fixed = apply(text, fix);
      const after = analyzeDocument(fixed);
      assert.equal(after.diagnostics.filter((d) => d.code === "missing-replicate" || d.code === "empty-cell" || d.severity === "error").length, 0);
      assert.equal(after.design.runs.count, 8);
      const pending = [...after.design.runs.responseStatus[0]!].filter((s) => s === ValueStatus.Pending).length;
      assert.equal(pending, 4);
    });

    it("never reorders existing rows and only inserts among the pending rows or at the end", () => {
      const fixed = apply(text, missingFix());
      const ids = analyzeDocument(fixed).design.runs.ids;
      assert.deepEqual(ids.filter((id) => /^r0[1-6]$/.test(id)), ["r01", "r02", "r03", "r04", "r05", "r06"]);
      assert.deepEqual(ids.slice(0, 4), ["r01", "r02", "r03", "r04"]);
      assert.deepEqual(ids.filter((id) => id === "r07" || id === "r08").sort(), ["r07", "r08"]);
      // The existing lines are kept byte for byte.
      for (const line of text.split("\n")) assert.ok(fixed.split("\n").includes(line), line);
    });

    it("is reproducible with the file's seed and changes with another seed", () => {
      assert.equal(apply(text, missingFix()), apply(text, missingFix()));
      const positions = new Set<string>();
      for (const seed of [1, 2, 3, 4, 5, 6, 7, 8]) {
        const t = text.replace("seed 42", `seed ${seed}`);
        const { actions } = actionsAt(t.replace("r01  cool", "r0<|>1  cool"));
        positions.add(analyzeDocument(apply(t, actions.find((a) => a.title.startsWith("Add "))!)).design.runs.ids.join(","));
      }
      assert.ok(positions.size > 1, "different seeds give different placements");
    });

    it("continues the id pattern", () => {
      assert.deepEqual(newRunIds(["r01", "r02", "r09"], 2), ["r10", "r11"]);
      assert.deepEqual(newRunIds(["A-7"], 1), ["A-8"]);
      // Numbers beyond what a double holds exactly, or at all (found by the fuzzer: "rInfinity").
      assert.deepEqual(newRunIds(["r9007199254740993"], 2), ["r9007199254740994", "r9007199254740995"]);
      const nines = "9".repeat(400);
      assert.deepEqual(newRunIds([`r${nines}`], 1), [`r1${"0".repeat(400)}`]);
    });
  });

  describe("code action: exclude and restore a run", () => {
    it("marks a run excluded and restores it to the original text", () => {
      const { actions } = actionsAt(COATING.replace("r04  warm", "r0<|>4  warm"));
      const exclude = actions.find((a) => a.title === "Mark run r04 excluded (with a reason)")!;
      const excluded = apply(COATING, exclude);
      assert.ok(excluded.includes('r04  warm  short | 87.1  excluded "reason"\n'));
      const after = analyzeDocument(excluded);
      assert.equal(after.design.runs.excluded[3], 1);
      assert.equal(after.responses[0]!.n, 7);
      const { actions: again } = actionsAt(excluded.replace("r04  warm", "r0<|>4  warm"));
      const restore = again.find((a) => a.title === "Restore run r04 (remove 'excluded')")!;
      assert.equal(apply(excluded, restore), COATING);
    });

    it("uses a snippet for the reason when the client supports snippet edits", () => {
      const { actions } = actionsAt(COATING.replace("r04  warm", "r0<|>4  warm"), { snippetEdits: true });
      const exclude = actions.find((a) => a.title.startsWith("Mark run r04"))!;
      const change = exclude.edit!.documentChanges![0] as { edits: { snippet?: { value: string } }[] };
      assert.equal(change.edits[0]!.snippet!.value, '  excluded "${1:reason}"');
    });
  });

  describe("formatting", () => {
    const messy = `trial "Coating gloss"   \nresponse gloss unit GU\nfactor temp levels cool, warm\nfactor dwell levels short, "very long"\nplan\n replicates 2\n\t  seed 42\nruns id temp dwell|gloss   # header note\n  r01 cool short | 81.2\n      r02\twarm "very long"|88.9    # a note\n  # a whole-line comment\n r03 cool "very long" | 83.0 excluded "bath \\"drained\\""\n r04 warm short | ? # pending\n`;

    it("aligns the runs table with the | in one column and keeps every cell's text", () => {
      const doc = open(messy);
      const formatted = applyEdits(messy, formatDocument(doc));
      assert.deepEqual(cellMultiset(formatted), cellMultiset(messy));
      assert.equal(visible(formatted), visible(messy));
      const lines = formatted.split("\n");
      const table = lines.slice(7, 13).filter((l) => !l.trim().startsWith("#"));
      const pipes = new Set(table.map((l) => l.indexOf("|")));
      assert.equal(pipes.size, 1, table.join("\n"));
      assert.deepEqual(lines.slice(7, 13), [
        "runs  id   temp  dwell       | gloss  # header note",
        "      r01  cool  short       | 81.2",
        '      r02  warm  "very long" | 88.9   # a note',
        "  # a whole-line comment",
        '      r03  cool  "very long" | 83.0   excluded "bath \\"drained\\""',
        "      r04  warm  short       | ?      # pending",
      ]);
      assert.equal(lines[0], 'trial "Coating gloss"');
      assert.deepEqual(lines.slice(5, 7), ["  replicates 2", "  seed 42"]);
      assert.deepEqual(formatDocument(open(formatted)), [], "formatting is idempotent");
      const before = analyzeDocument(messy);
      const after = analyzeDocument(formatted);
      assert.deepEqual(after.responses[0]!.anova, before.responses[0]!.anova);
    });

    it("formats only the lines of a range, with the whole table's layout", () => {
      const doc = open(messy);
      const full = applyEdits(messy, formatDocument(doc));
      const range: Range = { start: { line: 9, character: 0 }, end: { line: 9, character: 3 } };
      const edits: TextEdit[] = formatRange(doc, range);
      assert.equal(edits.length, 1);
      assert.equal(edits[0]!.range.start.line, 9);
      assert.equal(applyEdits(messy, edits).split("\n")[9], full.split("\n")[9]);
    });

    it("never changes a cell's text or anything but white space (property test on generated tables)", () => {
      const cell = fc.oneof(
        fc.stringMatching(/^[A-Za-z_][A-Za-z0-9_-]{0,6}$/),
        fc.stringMatching(/^-?\d{1,4}(\.\d{1,3})?$/),
        fc.constant("?"),
        fc.stringMatching(/^[a-z °,]{1,5}$/).map((s) => `"${s}"`),
      );
      const space = fc.stringMatching(/^[ \t]{1,4}$/);
      const row = fc.tuple(space, fc.array(fc.tuple(cell, space), { minLength: 1, maxLength: 3 }), fc.array(fc.tuple(cell, space), { minLength: 0, maxLength: 2 }), fc.boolean());
      fc.assert(
        fc.property(fc.array(row, { minLength: 1, maxLength: 6 }), (rows) => {
          const body = rows
            .map(([lead, left, right, comment]) => lead + left.map(([c, s]) => c + s).join("") + "|" + right.map(([c, s]) => s + c).join("") + (comment ? "  # note" : ""))
            .join("\n");
          const text = `factor a levels x, y\nfactor b levels x, y\nresponse y\nruns a  b | y\n${body}\n`;
          const formatted = applyEdits(text, formatDocument(open(text)));
          assert.deepEqual(cellMultiset(formatted), cellMultiset(text));
          assert.equal(visible(formatted), visible(text));
          assert.deepEqual(formatDocument(open(formatted)), []);
        }),
        { numRuns: 200, seed: 20261201 },
      );
    });
  });
});

export { cellText };
