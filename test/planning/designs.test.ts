/**
 * Latin squares are Latin; two-level fractions have the defining relation and resolution listed in the
 * NIST/SEMATECH e-Handbook of Statistical Methods, §5.3.3.4.7 "Summary tables of useful fractional factorial
 * designs" (generators and resolution per design; the same designs as Box, Hunter & Hunter 2005, Table 6.22).
 */
import assert from "node:assert/strict";
import { cyclicLatinSquare, isLatinSquare, randomLatinSquare } from "../../server/src/planning/latin-square.js";
import { planRandom } from "../../server/src/planning/seeded-random.js";
import { aliasesOf, definingRelation, fractionSigns, resolution } from "../../server/src/planning/two-level-fraction.js";

const A = 0, B = 1, C = 2, D = 3, E = 4, F = 5;
const letters = (w: readonly number[]) => w.map((i) => "ABCDEF"[i]).join("");

describe("planning: Latin squares", () => {
  it("builds Latin squares of order 1 to 9 for many seeds (each symbol once per row and column)", () => {
    for (let t = 1; t <= 9; t++) {
      assert.ok(isLatinSquare(cyclicLatinSquare(t)), `cyclic ${t}`);
      for (let seed = 0; seed < 25; seed++) assert.ok(isLatinSquare(randomLatinSquare(t, planRandom(seed))), `t=${t} seed=${seed}`);
    }
  });

  it("randomizes: different seeds give different squares of order 5", () => {
    const seen = new Set<string>();
    for (let seed = 0; seed < 20; seed++) seen.add(JSON.stringify(randomLatinSquare(5, planRandom(seed))));
    assert.ok(seen.size > 15, String(seen.size));
  });

  it("rejects squares that are not Latin", () => {
    assert.equal(isLatinSquare([[0, 1], [0, 1]]), false);
    assert.equal(isLatinSquare([[0, 1], [1, 1]]), false);
    assert.equal(isLatinSquare([[0, 2], [2, 0]]), false);
  });
});

describe("planning: two-level fractions (NIST e-Handbook §5.3.3.4.7)", () => {
  it("2^(4-1) with D = ABC: I = ABCD, resolution IV", () => {
    const g = [{ generated: D, from: [A, B, C] }];
    assert.deepEqual(definingRelation(g).map(letters), ["ABCD"]);
    assert.equal(resolution(g), 4);
    assert.deepEqual(aliasesOf([A, B], g).map(letters), ["CD"]);
  });

  it("2^(5-2) with D = AB, E = AC: I = ABD = ACE = BCDE, resolution III", () => {
    const g = [{ generated: D, from: [A, B] }, { generated: E, from: [A, C] }];
    assert.deepEqual(definingRelation(g).map(letters), ["ABD", "ACE", "BCDE"]);
    assert.equal(resolution(g), 3);
  });

  it("2^(6-2) with E = ABC, F = BCD: I = ABCE = ADEF = BCDF, resolution IV", () => {
    const g = [{ generated: E, from: [A, B, C] }, { generated: F, from: [B, C, D] }];
    assert.deepEqual(definingRelation(g).map(letters), ["ABCE", "ADEF", "BCDF"]);
    assert.equal(resolution(g), 4);
  });

  it("2^(5-1) with E = ABCD: resolution V; a full factorial has none", () => {
    assert.equal(resolution([{ generated: E, from: [A, B, C, D] }]), 5);
    assert.equal(resolution([]), undefined);
  });

  it("the runs of a 2^(4-1) are 8 distinct, balanced and satisfy D = ABC", () => {
    const runs = fractionSigns(4, [{ generated: D, from: [A, B, C] }]);
    assert.equal(runs.length, 8);
    assert.equal(new Set(runs.map((r) => r.join())).size, 8);
    for (const r of runs) assert.equal(r[D], r[A]! * r[B]! * r[C]!);
    for (let f = 0; f < 4; f++) assert.equal(runs.reduce((s, r) => s + r[f]!, 0), 0, `factor ${f} balanced`);
  });
});
