/**
 * Error recovery: broken text still gives a partial AST, and the problems say where and how to fix.
 * Expected spans are written as offsets found in the test text, so each assertion shows what is marked.
 */
import assert from "node:assert/strict";
import { parseTrial, type SyntaxProblem } from "../../grammar/src/index.js";

function at(text: string, needle: string, from = 0): number {
  const i = text.indexOf(needle, from);
  assert.ok(i >= 0, `'${needle}' not in test text`);
  return i;
}

function p(message: string, start: number, end: number): SyntaxProblem {
  return { code: "syntax", message, span: { start, end } };
}

const TOP = "trial, owner, date, conjecture, conclusion, response, factor, covariate, plan or runs";

describe("grammar recovery", () => {
  it("empty file: nothing declared, no problems", () => {
    const f = parseTrial("");
    assert.deepEqual(f.problems, []);
    assert.deepEqual(f.declarations, []);
    assert.deepEqual(f.header, {});
    assert.equal(f.runs, undefined);
  });

  it("a file that is only the runs header: columns, zero rows, no problems", () => {
    const text = "runs id temp | strength";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, []);
    assert.deepEqual(
      f.runs?.columns.map((c) => c.text),
      ["id", "temp", "strength"],
    );
    assert.equal(f.runs?.responseStart, 2);
    assert.equal(f.runs?.headerHasPipe, true);
    assert.equal(f.runs?.rows.count, 0);
    assert.deepEqual(f.runs?.span, { start: 0, end: text.length });
  });

  it("half-typed factor line: factor 'temp' with zero levels and one problem after 'levels'", () => {
    const text = "factor temp levels\nfactor speed levels slow, fast\n";
    const f = parseTrial(text);
    assert.equal(f.factors.length, 2);
    assert.equal(f.factors[0]!.name?.text, "temp");
    assert.deepEqual(f.factors[0]!.levels, []);
    assert.deepEqual(f.factors[0]!.span, { start: 0, end: at(text, "levels") + 6 });
    assert.deepEqual(
      f.factors[1]!.levels.map((l) => l.name.text),
      ["slow", "fast"],
    );
    const end = at(text, "levels") + "levels".length;
    assert.deepEqual(f.problems, [p("expected a level name after 'levels' in factor 'temp'", end, end)]);
  });

  it("missing level after a comma, with the next token on the same line", () => {
    const text = "factor gauge levels a, , b\n";
    const f = parseTrial(text);
    const secondComma = at(text, ",", at(text, ",") + 1);
    assert.deepEqual(f.problems, [
      p("expected a level name after ',' in factor 'gauge', found ','", secondComma, secondComma + 1),
    ]);
    assert.equal(f.factors[0]!.name?.text, "gauge");
  });

  it("factor without a levels clause", () => {
    const text = "factor temp unit C\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, [
      p("factor 'temp' has no levels: add them, e.g. 'levels low, high' or 'levels 150, 175'", 0, "factor temp".length),
    ]);
    assert.equal(f.factors[0]!.unit?.text, "C");
  });

  it("unknown keyword at top level: one problem over the skipped text, the next declaration is read", () => {
    const text = "facter speed levels slow, fast\nfactor temp levels 40, 60\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, [p(`unknown keyword 'facter': a declaration starts with ${TOP}`, 0, at(text, "\n"))]);
    assert.deepEqual(
      f.factors.map((x) => x.name?.text),
      ["temp"],
    );
  });

  it("garbage between declarations", () => {
    const text = "response y unit mm\n  = 3 ; oops\nfactor a levels b, c\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, [p(`unexpected '=': a declaration starts with ${TOP}`, at(text, "="), at(text, "oops") + 4)]);
    assert.equal(f.responses[0]!.unit?.text, "mm");
    assert.equal(f.factors[0]!.levels.length, 2);
  });

  it("a plan setting outside the plan", () => {
    const text = "replicates 3\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, [p("'replicates' is a plan setting: put it on its own line under 'plan'", 0, 12)]);
  });

  it("unterminated string: one problem, the value is kept, the next line still parses", () => {
    const text = 'trial "Cure study\nowner "line team"\n';
    const f = parseTrial(text);
    assert.deepEqual(f.problems, [
      p("unterminated string: add the closing quote '\"' on the same line", 6, at(text, "\n")),
    ]);
    assert.equal(f.header.title?.text, "Cure study");
    assert.equal(f.header.owner?.text, "line team");
  });

  it("unterminated text block stops before the next declaration's opening fence", () => {
    const text = 'conjecture """\nslow ramps help\nconclusion """\nthey did\n"""\n';
    const f = parseTrial(text);
    const open = at(text, '"""');
    assert.deepEqual(f.problems, [
      p('unterminated text block: add a closing """ (on a line of its own, before the next declaration)', open, open + 3),
    ]);
    assert.equal(f.conjecture?.body?.text, "\nslow ramps help");
    assert.equal(f.conclusion?.body?.text, "\nthey did\n");
  });

  it("missing value of a response unit, then a reserved word used as a name", () => {
    const text = 'response y unit\nfactor "trial" levels a\n';
    const f = parseTrial(text);
    const end = "response y unit".length;
    assert.deepEqual(f.problems, [
      p("expected a unit (a word such as MPa, or quoted text such as \"%\") after 'unit' in response 'y'", end, end),
    ]);
    assert.equal(f.responses[0]!.unit, undefined);
    assert.equal(f.factors[0]!.name?.text, "trial");
    assert.equal(f.factors[0]!.name?.quoted, true);
  });

  it("a reserved word as a name is explained", () => {
    const text = "factor plan levels a, b\n";
    const f = parseTrial(text);
    assert.equal(
      f.problems[0]!.message,
      "expected a factor name after 'factor', found 'plan' ('plan' is reserved: write \"plan\" in quotes to use it as a name)",
    );
    assert.deepEqual(f.problems[0]!.span, { start: 7, end: 11 });
  });

  it("wrong role word", () => {
    const text = "factor bath levels A, B as blok\n";
    const f = parseTrial(text);
    const blok = at(text, "blok");
    assert.deepEqual(f.problems, [
      p("expected block, random or subject after 'as' in factor 'bath', found 'blok'", blok, blok + 4),
    ]);
    assert.equal(f.factors[0]!.role, "fixed");
    assert.equal(f.factors[0]!.levels.length, 2);
  });

  it("plan setting without its number keeps the setting and reads the next one", () => {
    const text = "plan\n  replicates\n  alpha 0.05\n";
    const f = parseTrial(text);
    const end = at(text, "replicates") + "replicates".length;
    assert.deepEqual(f.problems, [p("expected a number after 'replicates' in the plan setting 'replicates'", end, end)]);
    const settings = f.plan!.settings;
    assert.deepEqual(
      settings.map((s) => s.kind),
      ["replicates", "alpha"],
    );
    assert.equal(settings[0]!.kind === "replicates" ? settings[0]!.value : "x", undefined);
  });

  it("missing '|' in a row: the row is kept with pipeCell -1", () => {
    const text = "runs id temp | y\n  r1 40 | 12.1\n  r2 50 12.4\n";
    const f = parseTrial(text);
    const r2 = at(text, "r2");
    assert.deepEqual(f.problems, [
      p("missing '|' between factor and response columns: put '|' where the runs header has it", r2, r2 + "r2 50 12.4".length),
    ]);
    const rows = f.runs!.rows;
    assert.equal(rows.count, 2);
    assert.deepEqual(Array.from(rows.pipeCell), [2, -1]);
    assert.deepEqual(Array.from(rows.cellOffset), [0, 3, 6]);
  });

  it("stray characters in a row: a quote inside a cell, a second '|', text after the reason", () => {
    const text = 'runs id a | y\n  r1 a"b | 1\n  r2 b | 2 | 3\n  r3 c | 4 excluded "slip" oops # note\n';
    const f = parseTrial(text);
    const quote = at(text, 'a"b') + 1;
    const secondPipe = at(text, "| 3");
    const oops = at(text, "oops");
    assert.deepEqual(f.problems, [
      p("stray '\"' in cell 'a\"b': quote the whole cell (\"...\") and write \\\" for a quote inside it", quote, quote + 1),
      p("a second '|' in this row: a row has one '|' between factor and response columns", secondPipe, secondPipe + 1),
      p(
        "unexpected text after the excluded reason: 'excluded \"reason\"' must end the row (put notes in a # comment)",
        oops,
        oops + 4,
      ),
    ]);
    assert.equal(f.runs!.rows.count, 3);
    assert.equal(f.runs!.rows.excluded.get(2)?.reason?.text, "slip");
  });

  it("unterminated quoted cell and excluded without a reason", () => {
    const text = 'runs id a | y\n  r1 "60 | 11\n  r2 b | 2 excluded\n';
    const f = parseTrial(text);
    const q = at(text, '"60');
    const ex = at(text, "excluded");
    assert.deepEqual(f.problems, [
      p("unterminated quoted cell: add the closing '\"'", q, at(text, "11") + 2),
      p('excluded needs a reason in quotes: excluded "why the run does not count"', ex, ex + 8),
    ]);
    assert.deepEqual(f.runs!.rows.excluded.get(1), { span: { start: ex, end: ex + 8 } });
  });

  it("duplicate plan, runs and trial lines: a problem on the second, the first is used", () => {
    const text = 'trial "a"\ntrial "b"\nplan\n  seed 1\nplan\n  seed 2\nruns id | y\n  r1 | 1\nruns id | y\n  r2 | 2\n';
    const f = parseTrial(text);
    const secondTrial = at(text, 'trial "b"');
    const secondPlan = at(text, "plan", at(text, "plan") + 1);
    const secondRuns = at(text, "runs", at(text, "runs") + 1);
    assert.deepEqual(f.problems, [
      p("only one trial line per file: remove this one or merge it into the first", secondTrial, secondTrial + 9),
      p("only one plan per file: move these settings into the first plan block", secondPlan, secondPlan + 4),
      p("only one runs table per file: merge these rows into the first table", secondRuns, secondRuns + 4),
    ]);
    assert.equal(f.header.title?.text, "a");
    assert.equal(f.plan?.settings[0]?.kind === "seed" ? f.plan.settings[0].value?.text : "", "1");
    assert.equal(f.runs?.rows.count, 1);
    assert.equal(f.declarations.filter((d) => d.kind === "runs").length, 2);
  });

  it("never throws on hostile input", () => {
    const inputs = ['"""', '"', "runs", "runs |||", "\uFEFF", "\r\r\n\r", "plan x = = ,", "factor", "# only", "runs\n\"", "\u0000\u0001"];
    for (const text of inputs) {
      const f = parseTrial(text);
      assert.equal(f.source, text);
      for (const prob of f.problems) {
        assert.ok(prob.span.start >= 0 && prob.span.end <= text.length && prob.span.start <= prob.span.end, JSON.stringify(prob));
      }
    }
  });
});
