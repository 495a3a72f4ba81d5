/**
 * Fuzzing (issue 11, item 1): random valid documents and random mutations of the committed `.trial`
 * texts through the parser, the design builder, the analysis, the CLI output and every LSP feature
 * function in process. The invariants are in invariants.ts; every single answer must come within one
 * second (CASE_BUDGET_MS), measured and failed loudly.
 *
 * Full cases (parse, design, fit with every analysis extension, then every feature) cost 50–300 ms each
 * on a loaded two-core machine, most of it in the pairwise comparisons, so CI runs a couple of hundred of
 * them, and thousands of cheaper cases on mutated fragments of the seeds (1–25 lines, as while a file is
 * being written): structure-only cases (every feature on the structural analysis, as for a document
 * whose responses are not fitted) and parser-and-model cases. Counts: CI_TOTAL_CASES in generators.ts;
 * `npm run fuzz` (FUZZ_RUNS=200000) scales every property up in proportion. A failure prints
 * fast-check's seed: replay it with FUZZ_SEED=<seed>.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { parseTrial } from "../../grammar/src/parse.js";
import { cellText } from "../../grammar/src/runs-table.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import { applyMutation, CASES_RUN, countCase, fragmentDocument, fuzzParameters, mutatedDocument, seedTexts, validDocument } from "./generators.js";
import { assertAstInside, assertDiagnosticsInside, CASE_BUDGET_MS, type CaseTiming, excerpt, exerciseText } from "./invariants.js";

const probeArb = fc.record({
  at: fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 3 }),
  newName: fc.constantFrom("renamed", "", "two words", '"quoted"', "x", "plan", "名前", "a".repeat(300), "1e400", "-0", "?"),
  runSheet: fc.boolean(),
  compare: fc.constantFrom(false, false, false, true),
});

/** The slowest single answer seen, for the summary line. */
const slowest = { ms: 0, what: "" };
const note = (t: CaseTiming, what: string) => {
  if (t.slowest > slowest.ms) {
    slowest.ms = t.slowest;
    slowest.what = `${t.slowestWhat}, ${what}`;
  }
};

/** Parse and design time of a text, measured again (see AnswerClock in invariants.ts). */
const retimed = (text: string) => {
  const t0 = performance.now();
  buildDesign(parseTrial(text));
  return performance.now() - t0;
};

describe("hardening: fuzzing (in process)", function () {
  this.timeout(0);
  const seeds = seedTexts();

  before(() => {
    // Warm the JIT and the lazily built parser so the first case is not charged for them.
    for (const s of seeds) exerciseText(s.text, { at: [0.5], newName: "warm", runSheet: true, previous: s.text }, { fit: true, warmUp: true });
  });

  after(() => {
    const counts = [...CASES_RUN].map(([k, v]) => `${k}: ${v}`).join(", ");
    console.log(`      fuzz cases run (with shrinking): ${counts}; slowest answer ${slowest.ms.toFixed(0)} ms (${slowest.what}; budget ${CASE_BUDGET_MS} ms)`);
  });

  it("reads back every cell of random valid documents exactly as generated, with no error", () => {
    fc.assert(
      fc.property(validDocument, (g) => {
        countCase("valid/read-back");
        const file = parseTrial(g.text);
        assert.deepEqual(file.problems, [], `no syntax problem in ${excerpt(g.text)}`);
        const table = file.runs!;
        const rows = table.rows;
        assert.equal(rows.count, g.runs.length);
        const withId = table.columns[0]?.text === "id";
        g.runs.forEach((run, r) => {
          const first = rows.cellOffset[r]!;
          const count = rows.cellOffset[r + 1]! - first;
          const read = Array.from({ length: count }, (_, k) => cellText(g.text, rows, first + k)).slice(withId ? 1 : 0);
          assert.deepEqual(read, run.cells, `row ${r}`);
          assert.equal(rows.excluded.get(r)?.reason?.text, run.excluded);
        });
        const { diagnostics } = buildDesign(file);
        const errors = diagnostics.filter((d) => d.severity === "error");
        assert.deepEqual(errors.map((d) => `${d.code}: ${d.message}`), [], `no error in a valid document ${excerpt(g.text)}`);
      }),
      fuzzParameters(1000),
    );
  });

  it("keeps every invariant for random valid documents through the fit and every feature", () => {
    fc.assert(
      fc.property(validDocument, probeArb, (g, probe) => {
        countCase("valid/full");
        note(exerciseText(g.text, { ...probe, ...(probe.compare ? { previous: g.text.replace(/\d/, "7") } : {}) }), "valid document");
      }),
      fuzzParameters(50),
    );
  });

  it("keeps every invariant for random mutations of the samples through the fit and every feature", () => {
    fc.assert(
      fc.property(mutatedDocument(seeds), probeArb, (m, probe) => {
        countCase("mutated/full");
        note(exerciseText(m.text, { ...probe, ...(probe.compare ? { previous: m.original } : {}) }), `mutations ${m.mutations.map((x) => x.kind).join("+")} of ${m.seed}`);
      }),
      fuzzParameters(150),
    );
  });

  it("keeps every invariant for mutated fragments through the structural analysis and every feature", () => {
    fc.assert(
      fc.property(fragmentDocument(seeds), probeArb, (m, probe) => {
        countCase("fragment/structure");
        note(exerciseText(m.text, { ...probe, runSheet: false }, { fit: false }), `structure-only, mutations ${m.mutations.map((x) => x.kind).join("+")} of ${m.seed}`);
      }),
      fuzzParameters(1800),
    );
  });

  it("parses and builds the design of mutated fragments, damage piled up (parser and model only)", () => {
    fc.assert(
      fc.property(fragmentDocument(seeds), fc.array(fc.integer({ min: 0, max: 999 }), { maxLength: 1 }), (m, shifts) => {
        countCase("fragment/parse+design");
        // Re-apply the same mutations at shifted positions to pile up damage (once, while under 15,000 characters).
        let text = m.text;
        for (const e of shifts) if (text.length < 15_000) text = m.mutations.reduce((acc, mu) => applyMutation(acc, "at" in mu ? { ...mu, at: ((mu.at * 1000 + e) % 1000) / 1000 } : mu), text);
        const t0 = performance.now();
        const file = parseTrial(text);
        const { diagnostics } = buildDesign(file);
        const ms = performance.now() - t0;
        assertAstInside(file);
        assertDiagnosticsInside(diagnostics, text.length, "buildDesign");
        assert.ok(ms <= CASE_BUDGET_MS || retimed(text) <= CASE_BUDGET_MS, `parse and design took ${ms.toFixed(0)} ms twice for ${excerpt(text)}`);
      }),
      fuzzParameters(7000),
    );
  });
});
