/**
 * Nothing lost (issue 11, item 3): formatting, every quick fix, CSV import and run-sheet planning keep the
 * multiset of recorded values — (run, column, text) for every cell of every run, plus each run's
 * `excluded` reason. Property tests over random valid documents (generators.ts) and mutated samples.
 * The reference is the parser reading the text before and after (its own tests pin what it reads).
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import type { TrialFile } from "../../grammar/src/ast.js";
import { LineIndex } from "../../grammar/src/line-index.js";
import { parseTrial } from "../../grammar/src/parse.js";
import { cellText, isPendingCell } from "../../grammar/src/runs-table.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import { csvToTrial } from "../../server/src/import/csv-to-trial.js";
import { codeActions } from "../../server/src/lsp/code-actions.js";
import type { AnalyzedDocument } from "../../server/src/lsp/documents.js";
import { formatDocument } from "../../server/src/lsp/formatting.js";
import { applyEdits as applyPlanEdits, planRunSheet } from "../../server/src/planning/run-sheet.js";
import { CodeActionKind } from "vscode-languageserver";
import { countCase, fuzzParameters, mutatedDocument, seedTexts, validDocument } from "./generators.js";
import { applyCheckedEdits, excerpt, workspaceEdits } from "./invariants.js";

const URI = "file:///work/hardening/lost.trial";

/** One recorded value: run (its id, or its factor cells without an id column), column name and cell text. */
function recorded(text: string, options: { measuredOnly?: boolean } = {}): string[] {
  const file = parseTrial(text);
  const table = file.runs;
  if (!table) return [];
  const rows = table.rows;
  const withId = table.columns[0]?.text === "id" && !table.columns[0].quoted;
  const out: string[] = [];
  for (let r = 0; r < rows.count; r++) {
    const first = rows.cellOffset[r]!;
    const count = rows.cellOffset[r + 1]! - first;
    // Without an id column a run is known by its factor and covariate cells (rows may move when planned).
    const run =
      withId && count > 0
        ? cellText(text, rows, first)
        : `(${Array.from({ length: Math.min(count, table.responseStart) }, (_, k) => cellText(text, rows, first + k)).join(", ")})`;
    for (let k = withId ? 1 : 0; k < count; k++) {
      if (options.measuredOnly && isPendingCell(text, rows, first + k)) continue;
      out.push(`${run} | ${table.columns[k]?.text ?? `#${k}`} | ${cellText(text, rows, first + k)}`);
    }
    const mark = rows.excluded.get(r);
    if (mark) out.push(`${run} | excluded | ${mark.reason?.text ?? ""}`);
  }
  return out.sort();
}

/** The multiset difference a − b (what a has that b lacks). */
function missing(a: readonly string[], b: readonly string[]): string[] {
  const counts = new Map<string, number>();
  for (const x of b) counts.set(x, (counts.get(x) ?? 0) + 1);
  const out: string[] = [];
  for (const x of a) {
    const c = counts.get(x) ?? 0;
    if (c > 0) counts.set(x, c - 1);
    else out.push(x);
  }
  return out;
}

/** A document analysed structurally (parse and design): what formatting and the quick fixes read. */
function structural(text: string): AnalyzedDocument {
  const file: TrialFile = parseTrial(text);
  const { design, diagnostics } = buildDesign(file);
  return { uri: URI, version: 1, text, lineIndex: new LineIndex(text), file, analysis: { file, design, diagnostics: [...diagnostics], responses: [] } };
}

describe("hardening: nothing lost", function () {
  this.timeout(0);
  const seeds = seedTexts();

  it("formatting keeps every recorded value of valid and of mutated documents", () => {
    fc.assert(
      fc.property(fc.oneof(validDocument.map((g) => g.text), mutatedDocument(seeds).map((m) => m.text)), (text) => {
        countCase("lost/formatting");
        const doc = structural(text);
        const after = applyCheckedEdits(text, doc.lineIndex, formatDocument(doc), "formatting");
        assert.deepEqual(recorded(after), recorded(text), `formatting ${excerpt(text)}`);
      }),
      fuzzParameters(200),
    );
  });

  it("formatting keeps a last cell ending in a character JavaScript trims as white space (found by the fuzzer: a vertical tab was dropped)", () => {
    for (const odd of ["\u000b", "\u00a0", "\u2028"]) {
      const text = `response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1\n  r2 q | 86.5${odd}`;
      const doc = structural(text);
      const after = applyCheckedEdits(text, doc.lineIndex, formatDocument(doc), "formatting");
      assert.deepEqual(recorded(after), recorded(text), `formatting with ${JSON.stringify(odd)}`);
    }
  });

  it("formatting keeps every value when a byte-order mark starts a keyword line inside a table (found by the fuzzer)", () => {
    // Seed 993255374 of the property above: the BOM-prefixed `trial` line was a row, and formatting dropped
    // the BOM with the row's leading blanks, so the table ended there and its later rows were lost.
    const text =
      "      r01  cool  short | 81.2\nresponse gloss unit GU maximize\nfactor temp levels cool, warm\nfactor dwell levels short, long\nplan\n  replicates 2\n  seed 42\nruns  id   temp  dwell | gloss\n\ufefftrial \"Coating gloss vs. bath temperature\"\n      r02  warm  long  | 88.9\n      r03  cool  long  | 83.0\n";
    const doc = structural(text);
    const after = applyCheckedEdits(text, doc.lineIndex, formatDocument(doc), "formatting");
    assert.deepEqual(recorded(after), recorded(text), `formatting ${excerpt(text)}`);
  });

  it("formatting keeps stray text after an excluded reason (found by the fuzzer: it was dropped)", () => {
    const text = 'response y\nfactor a levels p, q\nruns id a | y\n  r1 p | 1 excluded "why" oops\n  r2 q | 2\n';
    const doc = structural(text);
    const after = applyCheckedEdits(text, doc.lineIndex, formatDocument(doc), "formatting");
    assert.ok(after.includes('excluded "why" oops'), after);
  });

  it("every quick fix and refactoring keeps every recorded value; added runs hold only pending values", () => {
    // Valid documents with an unknown level written into a row, and rows dropped (missing replicates).
    const damaged = fc.tuple(validDocument, fc.nat(), fc.boolean()).map(([g, k, unknown]) => {
      let text = g.text;
      const level = g.factors[0]!.levels[0]!;
      if (unknown && !g.factors[0]!.numeric && /^[A-Za-z_][A-Za-z0-9_-]*$/.test(level)) {
        const lines = text.split("\n");
        const header = lines.findIndex((l) => l.startsWith("runs"));
        const rowLines = lines.map((l, i) => (i > header && l.startsWith("  ") ? i : -1)).filter((i) => i >= 0);
        if (rowLines.length > 0) {
          const row = rowLines[k % rowLines.length]!;
          lines[row] = lines[row]!.replace(new RegExp(`(\\s)${level}(\\s)`), "$1unheard-of$2");
        }
        text = lines.join("\n");
      }
      return text;
    });
    fc.assert(
      fc.property(damaged, fc.boolean(), (text, snippets) => {
        const doc = structural(text);
        const before = recorded(text);
        const table = doc.analysis.file.runs;
        const responses = new Set((table?.columns ?? []).slice(table?.responseStart ?? 0).map((c) => c.text));
        const offsets = [...doc.analysis.diagnostics.map((d) => d.span.start), ...(doc.analysis.file.runs ? [doc.analysis.file.runs.rows.rowStart[0] ?? 0] : [])];
        // At most eight places (the first diagnostics and the table): enough to reach every kind of fix.
        for (const offset of [...new Set(offsets)].slice(0, 8)) {
          const p = doc.lineIndex.positionAt(offset);
          const actions = codeActions(doc, { textDocument: { uri: URI }, range: { start: p, end: p }, context: { diagnostics: [], only: [CodeActionKind.QuickFix, CodeActionKind.RefactorRewrite] } }, { snippetEdits: snippets });
          for (const action of actions) {
            countCase("lost/code-action");
            const after = applyCheckedEdits(text, doc.lineIndex, workspaceEdits(action.edit!, URI), action.title);
            const now = recorded(after);
            if (/^(Restore|Mark) run/.test(action.title)) {
              // Toggling `excluded` changes only the excluded entry of that run.
              assert.deepEqual(missing(before, now).filter((x) => !x.includes(" | excluded | ")), [], action.title);
              assert.deepEqual(missing(now, before).filter((x) => !x.includes(" | excluded | ")), [], action.title);
            } else {
              assert.deepEqual(missing(before, now), [], `${action.title} lost values in ${excerpt(text)}`);
              // Anything added belongs to a new run, and its response values are pending.
              const oldRuns = new Set(before.map((x) => x.split(" | ")[0]));
              for (const added of missing(now, before)) {
                const [run, column, value] = added.split(" | ");
                if (responses.has(column!)) assert.equal(value, "?", `${action.title} added a measured value: ${added}`);
                else if (!/^Declare/.test(action.title)) assert.ok(!oldRuns.has(run) || !doc.analysis.file.runs!.columns.some((c) => c.text === "id"), `${action.title} changed run ${run}: ${added}`);
              }
            }
          }
        }
      }),
      fuzzParameters(120),
    );
  });

  it("importing a CSV table keeps every value as (run, column, text)", () => {
    const label = fc.oneof(fc.stringMatching(/^[a-z][a-z0-9-]{0,5}$/), fc.constantFrom("Lot 7, east", "名前", 'say "hi"', "run", "plan", "12", "-0", "1e400"));
    const value = fc.oneof(fc.stringMatching(/^-?[0-9]{1,6}(\.[0-9]{1,6})?([eE][+-]?[0-9]{1,3})?$/), fc.constantFrom("1e308", "1e-308", "-0", "1234567890123456789012345678901234567890"));
    const table = fc.record({ rows: fc.array(fc.tuple(label, label, value, value), { minLength: 1, maxLength: 30 }), crlf: fc.boolean() });
    fc.assert(
      fc.property(table, ({ rows, crlf }) => {
        countCase("lost/import");
        const field = (t: string) => (/[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t);
        const csv = ["run,oven,line,strength,voids", ...rows.map((r, i) => [`r${i + 1}`, ...r].map(field).join(","))].join(crlf ? "\r\n" : "\n") + "\n";
        const result = csvToTrial(csv, { id: "run", factors: ["oven", "line"], responses: ["strength", "voids"] });
        assert.ok(result.ok, `import refused ${excerpt(csv)}: ${result.ok ? "" : result.problems.map((p) => p.message).join("; ")}`);
        const expected = rows.flatMap((r, i) => ["oven", "line", "strength", "voids"].map((c, k) => `r${i + 1} | ${c} | ${r[k]}`)).sort();
        assert.deepEqual(recorded(result.text), expected);
      }),
      fuzzParameters(300),
    );
  });

  it("planning the run sheet keeps every measured value and excluded reason", () => {
    fc.assert(
      fc.property(validDocument, fc.integer({ min: 1, max: 2 ** 31 - 2 }), fc.boolean(), (g, seed, reshuffle) => {
        countCase("lost/plan");
        const result = planRunSheet(g.text, { fallbackSeed: seed, ...(reshuffle ? { reshuffle: true } : {}) });
        if (!result.ok) return;
        const after = applyPlanEdits(g.text, result.edits);
        assert.equal(after, result.text, "the edits give the planned text");
        assert.deepEqual(missing(recorded(g.text, { measuredOnly: true }), recorded(after, { measuredOnly: true })), [], `planning lost values of ${excerpt(g.text)}`);
      }),
      fuzzParameters(300),
    );
  });
});
