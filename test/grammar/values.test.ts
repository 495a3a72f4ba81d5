/**
 * Values as written: numbers keep their decimal text, CRLF/BOM/tab variants of a file give the same AST
 * values. The reference is the language definition in docs/language.md (numbers `-?d+[.d+][e[+-]d+]`).
 */
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { cellText, parseTrial } from "../../grammar/src/index.js";
import { astValues } from "./ast-json.js";

describe("grammar values", () => {
  it("numbers keep their decimal text next to the double value", () => {
    const text = "response y target 1000000000000.4 spec -0.50 to 1.2e-3\nfactor t levels 150, -2.5E+2, 007\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, []);
    const r = f.responses[0]!;
    assert.equal(r.goal?.kind, "target");
    const target = r.goal?.kind === "target" ? r.goal.target : undefined;
    assert.deepEqual(target, { text: "1000000000000.4", value: 1000000000000.4, span: { start: 18, end: 33 } });
    assert.equal(r.spec?.lower?.text, "-0.50");
    assert.equal(r.spec?.lower?.value, -0.5);
    assert.equal(r.spec?.upper?.text, "1.2e-3");
    assert.equal(r.spec?.upper?.value, 0.0012);
    const levels = f.factors[0]!.levels;
    assert.deepEqual(
      levels.map((l) => [l.name.text, l.number?.text, l.number?.value]),
      [
        ["150", "150", 150],
        ["-2.5E+2", "-2.5E+2", -250],
        ["007", "007", 7],
      ],
    );
  });

  it("a number too large for a double is reported, not turned into Infinity", () => {
    const f = parseTrial("plan\n  alpha 1e999\n");
    assert.equal(f.problems.length, 1);
    assert.equal(f.problems[0]!.message, "the number 1e999 is too large to represent: write a smaller magnitude");
    const s = f.plan!.settings[0]!;
    assert.equal(s.kind === "alpha" ? s.value : "x", undefined);
  });

  it("CRLF, a BOM and tabs give the same AST values as the LF file", () => {
    const lf = readFileSync(path.resolve("test/grammar/fixtures/constructs.trial"), "utf8").replace(/\r\n/g, "\n");
    const crlf = lf.replace(/\n/g, "\r\n");
    const bom = "\uFEFF" + crlf;
    const tabs = lf.replace(/ {2,}/g, "\t");
    const base = parseTrial(lf);
    assert.deepEqual(base.problems, []);
    for (const variant of [crlf, bom, tabs]) {
      const f = parseTrial(variant);
      assert.deepEqual(f.problems, []);
      assert.deepEqual(astValues(f), astValues(base));
    }
    // Offsets stay those of the text as given: with a BOM everything moves by one.
    const fb = parseTrial("\uFEFFtrial \"x\"\n");
    assert.deepEqual(fb.header.title?.span, { start: 7, end: 10 });
  });

  it("tabs between cells and a tab-only blank line", () => {
    const text = "runs\tid\ttemp\t|\ty\n\tr1\t40\t|\t12.5\n\t\n\tr2\t\"60 C\"\t|\t?\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, []);
    const rows = f.runs!.rows;
    assert.equal(rows.count, 2);
    const cells = (r: number) =>
      Array.from({ length: rows.cellOffset[r + 1]! - rows.cellOffset[r]! }, (_, k) => cellText(text, rows, rows.cellOffset[r]! + k));
    assert.deepEqual(cells(0), ["r1", "40", "12.5"]);
    assert.deepEqual(cells(1), ["r2", "60 C", "?"]);
  });

  it("quoted names and strings are unescaped; spans include the quotes", () => {
    const text = 'factor "Lot 7, east" levels "a \\"b\\"", "c\\\\d"\n';
    const f = parseTrial(text);
    assert.deepEqual(f.problems, []);
    const factor = f.factors[0]!;
    assert.deepEqual(factor.name, { text: "Lot 7, east", span: { start: 7, end: 20 }, quoted: true });
    assert.deepEqual(
      factor.levels.map((l) => l.name.text),
      ['a "b"', "c\\d"],
    );
  });

  it("text blocks keep their text between the fences, with line breaks as \\n", () => {
    const f = parseTrial('conjecture """\r\nline one\r\n  line two\r\n"""\r\n');
    assert.equal(f.conjecture?.body?.text, "\nline one\n  line two\n");
  });

  it("contextual keywords can be names where the grammar expects a name", () => {
    const f = parseTrial("factor block levels target, x, power\nplan\n  model block x power\n");
    assert.deepEqual(f.problems, []);
    assert.equal(f.factors[0]!.name?.text, "block");
    assert.deepEqual(
      f.factors[0]!.levels.map((l) => l.name.text),
      ["target", "x", "power"],
    );
    const model = f.plan!.settings[0]!;
    assert.deepEqual(
      model.kind === "model" ? model.terms[0]!.names.map((n) => n.text) : [],
      ["block", "power"],
    );
  });
});
