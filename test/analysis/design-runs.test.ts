import assert from "node:assert/strict";
import { parseTrial } from "../../grammar/src/parse.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import { covariateText, responseSpan, responseText, runId, runRowSpan } from "../../server/src/analysis/design-runs.js";

// Invented coating-bath table; the expected values are read off the text by hand.
const TEXT = `trial "Invented: coating bath thickness"
response thickness unit um
response gloss
factor bath levels warm, hot
covariate humidity
runs id bath humidity | thickness gloss
  b1 warm 41 | 12.5 80
  "b 2" hot 44 | ? 82
  b3 hot ? | 13.25 x
  b1 warm 40 | 11.0 79
  "b1" hot 42 | 12.0
`;

describe("design runs: texts and spans read from the source on demand", () => {
  const file = parseTrial(TEXT);
  const { design, diagnostics } = buildDesign(file);
  const runs = design.runs;
  const at = (span: { start: number; end: number } | undefined) => (span ? TEXT.slice(span.start, span.end) : undefined);

  it("reads ids (quoted ones unquoted), values, covariates and spans as written", () => {
    assert.deepEqual([0, 1, 2, 3, 4].map((r) => runId(runs, r)), ["b1", "b 2", "b3", "b1", "b1"]);
    assert.deepEqual([0, 1, 2, 3, 4].map((r) => responseText(runs, 0, r)), ["12.5", "", "13.25", "11.0", "12.0"]);
    assert.deepEqual([0, 1, 2, 3, 4].map((r) => responseText(runs, 1, r)), ["80", "82", "", "79", ""]);
    assert.deepEqual([0, 1, 2, 3, 4].map((r) => covariateText(runs, 0, r)), ["41", "44", "", "40", "42"]);
    assert.equal(at(responseSpan(runs, 0, 1)), "?");
    assert.equal(at(responseSpan(runs, 1, 2)), "x");
    assert.equal(responseSpan(runs, 1, 4), undefined);
    assert.equal(at(runRowSpan(runs, 1)), `"b 2" hot 44 | ? 82`);
  });

  it("builds the array keys of the contract from the same accessors, once", () => {
    assert.deepEqual(runs.ids, ["b1", "b 2", "b3", "b1", "b1"]);
    assert.equal(runs.ids, runs.ids);
    assert.deepEqual(runs.responseTexts, [
      ["12.5", "", "13.25", "11.0", "12.0"],
      ["80", "82", "", "79", ""],
    ]);
    assert.deepEqual(runs.covariateTexts, [["41", "44", "", "40", "42"]]);
    assert.deepEqual(runs.rowSpans.map(at), [0, 1, 2, 3, 4].map((r) => at(runRowSpan(runs, r))));
    assert.deepEqual(runs.responseSpans[1]!.map(at), ["80", "82", "x", "79", undefined]);
  });

  it("finds duplicate ids compared in place, quoted or not, pointing at the first row", () => {
    const dups = diagnostics.filter((d) => d.code === "duplicate-run");
    assert.deepEqual(dups.map((d) => at(d.span)), ["b1", `"b1"`]);
    for (const d of dups) assert.equal(at(d.related![0]!.span), "b1 warm 41 | 12.5 80");
  });
});
