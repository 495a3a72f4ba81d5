/**
 * planRunSheet: complete, balanced, randomized and reproducible run sheets; never touching measured or
 * excluded rows. The expected order for seed 4187 is pinned: it must come out the same on every machine and
 * in every version (a change here changes every run sheet ever planned).
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { parseTrial } from "../../grammar/src/parse.js";
import { buildDesign } from "../../server/src/analysis/build-design.js";
import { isLatinSquare } from "../../server/src/planning/latin-square.js";
import { applyEdits, planRunSheet } from "../../server/src/planning/run-sheet.js";

// Invented scenario: an adhesive cure with three oven profiles on two ovens.
const DECLARED = `# invented example: adhesive cure
trial "Cure check"
response strength unit MPa
factor profile levels ramp, step, soak
factor oven levels A, B
plan
  replicates 2
  seed 4187
`;

function rowsOf(text: string): string[][] {
  const lines = text.split("\n");
  const start = lines.findIndex((l) => l.startsWith("runs "));
  return lines.slice(start + 1).filter((l) => l.trim() !== "" && !l.trim().startsWith("#")).map((l) => l.trim().split(/\s+/));
}

describe("planning: planRunSheet", () => {
  it("writes the pinned randomized order for seed 4187", () => {
    // Recorded from this implementation (xoroshiro128+ after one jump, Fisher–Yates over the canonical
    // order) and pinned; the generator itself is checked against the reference algorithm in
    // seeded-random.test.ts.
    const r = planRunSheet(DECLARED);
    assert.ok(r.ok);
    const expected = [
      "runs  id   profile  oven | strength",
      "      r01  soak     B    | ?",
      "      r02  soak     A    | ?",
      "      r03  ramp     A    | ?",
      "      r04  ramp     B    | ?",
      "      r05  step     B    | ?",
      "      r06  step     A    | ?",
      "      r07  step     A    | ?",
      "      r08  soak     B    | ?",
      "      r09  soak     A    | ?",
      "      r10  ramp     B    | ?",
      "      r11  step     B    | ?",
      "      r12  ramp     A    | ?",
    ];
    assert.equal(r.text, DECLARED + "\n" + expected.join("\n") + "\n");
    assert.equal(applyEdits(DECLARED, r.edits), r.text);
    assert.equal(r.summary.addedRows, 12);
  });

  it("is complete and balanced, parses cleanly, and re-running changes nothing", () => {
    const r = planRunSheet(DECLARED);
    assert.ok(r.ok);
    const counts = new Map<string, number>();
    for (const row of rowsOf(r.text)) counts.set(`${row[1]} ${row[2]}`, (counts.get(`${row[1]} ${row[2]}`) ?? 0) + 1);
    assert.equal(counts.size, 6);
    for (const n of counts.values()) assert.equal(n, 2);
    const built = buildDesign(parseTrial(r.text));
    assert.deepEqual(built.diagnostics.filter((d) => d.severity === "error" || d.severity === "warning"), []);
    const again = planRunSheet(r.text);
    assert.ok(again.ok);
    assert.deepEqual(again.edits, []);
    assert.equal(again.text, r.text);
  });

  it("adds 'plan seed' from fallbackSeed when the file has none, and refuses without any seed", () => {
    const text = DECLARED.replace("  seed 4187\n", "");
    const r = planRunSheet(text, { fallbackSeed: 4187 });
    assert.ok(r.ok);
    assert.equal(r.text, planRunSheet(DECLARED).ok && (planRunSheet(DECLARED) as { text: string }).text);
    const none = planRunSheet(text);
    assert.equal(none.ok, false);
  });

  it("randomizes within blocks: each block holds every treatment once per replicate, blocks in order", () => {
    const text = `trial "Blocked"\nresponse y\nfactor slurry levels s1, s2, s3, s4\nfactor lot levels L1, L2, L3 as block\nplan\n  seed 11\n`;
    const r = planRunSheet(text);
    assert.ok(r.ok);
    const rows = rowsOf(r.text);
    assert.equal(rows.length, 12);
    rows.forEach((row, k) => assert.equal(row[2], ["L1", "L2", "L3"][Math.floor(k / 4)]));
    for (let b = 0; b < 3; b++) assert.deepEqual(rows.slice(4 * b, 4 * b + 4).map((x) => x[1]).sort(), ["s1", "s2", "s3", "s4"]);
  });

  it("plans a Latin square for two blocking factors and one treatment factor of equal size", () => {
    const text = `trial "Square"\nresponse y\nfactor day levels d1, d2, d3, d4 as block\nfactor operator levels o1, o2, o3, o4 as block\nfactor mix levels m1, m2, m3, m4\nplan\n  seed 5\n`;
    const r = planRunSheet(text);
    assert.ok(r.ok);
    assert.equal(r.summary.kind, "latin-square");
    const rows = rowsOf(r.text);
    assert.equal(rows.length, 16);
    const square = [0, 1, 2, 3].map((d) => [0, 1, 2, 3].map((o) => {
      const row = rows.find((x) => x[1] === `d${d + 1}` && x[2] === `o${o + 1}`)!;
      return Number(row[3]!.slice(1)) - 1;
    }));
    assert.ok(isLatinSquare(square));
  });

  it("plans a 2^(4-1) fraction with centre points (resolution IV, D = ABC on every factorial run)", () => {
    const text = `trial "Fraction"\nresponse y\nfactor speed levels 100, 150, 200\nfactor feed levels 1, 2, 3\nfactor depth levels 10, 15, 20\nfactor coolant levels 0, 5, 10\nplan\n  fraction coolant = speed x feed x depth\n  centre-points 3\n  seed 3\n`;
    const r = planRunSheet(text);
    assert.ok(r.ok, JSON.stringify(!r.ok && r.problems));
    assert.equal(r.summary.resolution, 4);
    assert.deepEqual(r.summary.definingWords, ["speed x feed x depth x coolant"]);
    const rows = rowsOf(r.text);
    assert.equal(rows.length, 11);
    const sign = (v: string, lo: string) => (v === lo ? -1 : 1);
    const centre = rows.filter((x) => x[1] === "150");
    assert.equal(centre.length, 3);
    for (const x of centre) assert.deepEqual(x.slice(1, 5), ["150", "2", "15", "5"]);
    for (const x of rows.filter((row) => row[1] !== "150")) {
      assert.equal(sign(x[4]!, "0"), sign(x[1]!, "100") * sign(x[2]!, "1") * sign(x[3]!, "10"));
    }
  });

  it("refuses a file with syntax errors and changes nothing", () => {
    const r = planRunSheet(DECLARED + "factor\n");
    assert.equal(r.ok, false);
  });
});

describe("planning: never loses data (property)", () => {
  it("keeps every measured or excluded row byte-identical and in order, and the recorded values", () => {
    const planned = planRunSheet(DECLARED);
    assert.ok(planned.ok);
    const lines = planned.text.split("\n");
    const first = lines.findIndex((l) => l.startsWith("runs ")) + 1;
    fc.assert(
      fc.property(
        fc.array(fc.constantFrom("pending", "measured", "excluded", "drop", "comment"), { minLength: 12, maxLength: 12 }),
        fc.array(fc.integer({ min: 0, max: 999 }), { minLength: 12, maxLength: 12 }),
        fc.integer({ min: 0, max: 1000 }),
        (states, values, seed) => {
          const body: string[] = [];
          states.forEach((state, k) => {
            const line = lines[first + k]!;
            if (state === "drop") return;
            if (state === "comment") body.push("      # note", line);
            else if (state === "measured") body.push(line.replace("| ?", `| ${values[k]! / 10}`));
            else if (state === "excluded") body.push(line.replace("| ?", `| ${values[k]! / 10}  excluded "spill"`));
            else body.push(line);
          });
          const text = [...lines.slice(0, first), ...body].join("\n") + "\n";
          const r = planRunSheet(text, { seed });
          if (!r.ok) return false;
          const kept = body.filter((l) => !l.includes("| ?") && !l.trim().startsWith("#"));
          const after = r.text.split("\n");
          let at = 0;
          for (const line of kept) {
            at = after.indexOf(line, at);
            if (at < 0) return false;
            at++;
          }
          const recorded = (t: string) => (t.match(/\| \d+(\.\d+)?/g) ?? []).sort().join();
          if (recorded(r.text) !== recorded(text)) return false;
          // Every comment line is still there, and the design is complete again.
          if (after.filter((l) => l.trim() === "# note").length !== body.filter((l) => l.trim() === "# note").length) return false;
          const nonExcluded = after.filter((l) => /^\s+r\d+/.test(l) && !l.includes("excluded"));
          return nonExcluded.length >= 12;
        },
      ),
      { numRuns: 300, seed: 42 },
    );
  });
});
