/**
 * The systematic-order check. H is checked against R 4.2.2 kruskal.test (script and output in
 * test/analysis/fixtures/r/systematic-order/). The threshold 0.7 is a rule of thumb (a correlation of 0.7 or
 * more is "high": Hinkle, Wiersma & Jurs 2003, tabulated by Mukaka 2012), not a significance level.
 */
import assert from "node:assert/strict";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { orderClustering } from "../../server/src/analysis/checks/systematic-order.js";
import { planRunSheet } from "../../server/src/planning/run-sheet.js";

// Invented scenario: molding line, mold temperature and hold time.
const HEAD = `trial "Molding"\nresponse warp unit mm\nfactor temp levels 60, 80, 100\nfactor hold levels short, long\nplan\n  replicates 2\n  seed 77\n`;

describe("analysis: systematic-order", () => {
  it("computes the Kruskal–Wallis H of run positions as R's kruskal.test does", () => {
    // R: kruskal.test(seq_along(x), factor(x)) for x = 0 0 1 0 1 1 2 2 1 2 0 2 gives 3.73076923076923;
    // for y = 0 1 0 1 0 1 0 1 gives 0.333333333333332.
    assert.ok(Math.abs(orderClustering([0, 0, 1, 0, 1, 1, 2, 2, 1, 2, 0, 2])!.h - 3.73076923076923) < 1e-12);
    assert.ok(Math.abs(orderClustering([0, 1, 0, 1, 0, 1, 0, 1])!.h - 0.333333333333332) < 1e-12);
    assert.equal(orderClustering([0, 0, 0]), undefined);
    assert.equal(orderClustering([0, 1]), undefined);
  });

  it("reaches 1 for a fully sorted order and 0 for a perfectly alternating one of two levels", () => {
    assert.ok(Math.abs(orderClustering([0, 0, 0, 0, 1, 1, 1, 1])!.correlation - Math.sqrt((16 / 3 - 1) / 6)) < 1e-12);
    assert.equal(orderClustering([0, 1, 1, 0, 0, 1, 1, 0])!.correlation, 0);
  });

  it("fires on a run order sorted by a factor and quotes the factor", () => {
    const rows = ["60", "60", "60", "60", "80", "80", "80", "80", "100", "100", "100", "100"].map((t, k) => `  r${k + 1} ${t} ${k % 2 ? "long" : "short"} | ?`);
    const text = `${HEAD}runs id temp hold | warp\n${rows.join("\n")}\n`;
    const found = analyzeDocument(text).diagnostics.filter((d) => d.code === "systematic-order");
    assert.equal(found.length, 1);
    assert.match(found[0]!.message, /factor 'temp'/);
    assert.equal(found[0]!.severity, "warning");
    assert.equal(text.slice(found[0]!.span.start, found[0]!.span.end), "temp");
  });

  it("does not fire on the randomized order the planner writes, for 50 seeds", () => {
    let fired = 0;
    for (let seed = 1; seed <= 50; seed++) {
      const r = planRunSheet(HEAD.replace("seed 77", `seed ${seed}`).replace("replicates 2", "replicates 3"));
      assert.ok(r.ok);
      if (analyzeDocument(r.text).diagnostics.some((d) => d.code === "systematic-order")) fired++;
    }
    // 18 runs per file, two factors: by chance a warning is rare (well under 5% of factors).
    assert.ok(fired <= 2, `fired on ${fired} of 50 randomized files`);
  });

  it("skips blocking factors, whose runs are grouped on purpose", () => {
    const r = planRunSheet(`trial "B"\nresponse y\nfactor s levels a, b, c\nfactor lot levels L1, L2, L3 as block\nplan\n  replicates 2\n  seed 9\n`);
    assert.ok(r.ok);
    assert.deepEqual(analyzeDocument(r.text).diagnostics.filter((d) => d.code === "systematic-order"), []);
  });
});
