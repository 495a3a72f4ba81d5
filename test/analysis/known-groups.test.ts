/**
 * The comparisons and variance checks take the group summaries the level means already formed
 * (ResponseContext.knownGroups) instead of reading the runs again. Reference: summarizeGroupsWithSums over
 * the same observations and the comparisons' own group codes, which the R fixtures of the comparisons check.
 */
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { parseTrial } from "../../grammar/src/parse.js";
import { analyzeResponse } from "../../server/src/analysis/analyze-response.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import { commonGroupings, groupsOf, prepareGroups } from "../../server/src/analysis/extensions/compared-groups.js";
import { summarizeGroupsWithSums } from "../../server/src/stats/comparisons/group-summary.js";

/** Invented: three ovens x two racks, unbalanced, one empty cell, and a third fixed factor. */
const UNBALANCED = [
  "# Invented test data.",
  'trial "Invented: cure oven, rack and tray"',
  "response hardness",
  "factor oven levels o1, o2, o3",
  "factor rack levels top, low",
  "factor tray levels steel, mesh",
  "plan",
  "  model oven, rack, tray",
  "runs id oven rack tray | hardness",
  ...[
    ["o1", "top", "steel", "71.2"],
    ["o1", "top", "mesh", "70.4"],
    ["o1", "low", "steel", "69.9"],
    ["o1", "low", "mesh", "72.5"],
    ["o1", "low", "steel", "70.1"],
    ["o2", "top", "mesh", "74.3"],
    ["o2", "top", "steel", "75.0"],
    ["o2", "top", "mesh", "73.8"],
    ["o3", "top", "steel", "68.2"],
    ["o3", "low", "mesh", "67.7"],
    ["o3", "low", "steel", "69.3"],
    ["o3", "low", "mesh", "66.9"],
  ].map((r, i) => `  r${i + 1} ${r[0]} ${r[1]} ${r[2]} | ${r[3]}`),
  "",
].join("\n");

function checkResponses(text: string, expectShared: readonly string[]): void {
  const { design } = buildDesign(parseTrial(text));
  for (let k = 0; k < design.responses.length; k++) {
    const { context } = analyzeResponse(design, k, { response: design.responses[k]!.span, terms: new Map() });
    assert.ok(context, "the response is fitted");
    const lists = commonGroupings(context);
    prepareGroups(context, lists);
    const shared: string[] = [];
    for (const list of lists) {
      const groups = groupsOf(context, list)!;
      const reference = summarizeGroupsWithSums(context.y, groups.codes, groups.labels.length);
      groups.summaries.forEach((g, i) => {
        const h = reference.summaries[i]!;
        for (const key of ["n", "mean", "variance"] as const) assert.ok(Object.is(g[key], h[key]), `${list} group ${i} ${key}: ${g[key]} vs ${h[key]}`);
      });
      groups.sums.forEach((v, i) => assert.ok(Object.is(v, reference.sums[i]), `${list} sum ${i}`));
      if (groups.sums === context.knownGroups?.get(list.join(","))?.sums) shared.push(list.join(","));
    }
    assert.deepEqual(shared, expectShared, "the groups taken from the level means");
  }
}

describe("analysis: group summaries shared by the level means and the comparisons", () => {
  it("two fixed factors (samples/two-factor.trial): both main effects and the cells come from the level means, bit for bit", () => {
    checkResponses(readFileSync("samples/two-factor.trial", "utf8"), ["0", "1", "0,1"]);
  });

  it("three fixed factors, unbalanced with an empty cell: the main effects are shared, the three-factor cells are summarised anew", () => {
    // The level means form pairs of factors only; the variance checks' cells of all three are their own.
    checkResponses(UNBALANCED, ["0", "1", "2"]);
  });
});
