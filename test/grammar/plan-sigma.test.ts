/**
 * `plan sigma <response> <value>`: the planned error standard deviation of a response. The reference is the
 * language definition in docs/language.md (plan settings table; `sigma` is a contextual keyword).
 */
import assert from "node:assert/strict";
import { parseTrial } from "../../grammar/src/index.js";

describe("grammar: plan sigma", () => {
  it("reads the response name and the value with its decimal text and spans", () => {
    const text = "response strength unit MPa\nplan\n  detect strength 1.5\n  sigma strength 1.20\n";
    const f = parseTrial(text);
    assert.deepEqual(f.problems, []);
    const s = f.plan!.settings.find((x) => x.kind === "sigma");
    assert.ok(s && s.kind === "sigma");
    const at = text.indexOf("sigma strength");
    assert.deepEqual(s.keywordSpan, { start: at, end: at + 5 });
    assert.deepEqual(s.span, { start: at, end: at + "sigma strength 1.20".length });
    assert.equal(s.response?.text, "strength");
    assert.deepEqual(s.value, { text: "1.20", value: 1.2, span: { start: at + 15, end: at + 19 } });
    // Settings stay in file order next to the others.
    assert.deepEqual(
      f.plan!.settings.map((x) => x.kind),
      ["detect", "sigma"],
    );
  });

  it("accepts a quoted response name", () => {
    const f = parseTrial('response "film build"\nplan\n  sigma "film build" 0.4\n');
    assert.deepEqual(f.problems, []);
    const s = f.plan!.settings[0]!;
    assert.equal(s.kind === "sigma" ? s.response?.text : undefined, "film build");
    assert.equal(s.kind === "sigma" ? s.response?.quoted : undefined, true);
  });

  it("is contextual: 'sigma' is still an ordinary name outside the plan", () => {
    const f = parseTrial("factor sigma levels low, sigma\nresponse y\n");
    assert.deepEqual(f.problems, []);
    assert.equal(f.factors[0]!.name?.text, "sigma");
    assert.deepEqual(
      f.factors[0]!.levels.map((l) => l.name.text),
      ["low", "sigma"],
    );
  });

  it("reports a missing value in the words of the setting", () => {
    const f = parseTrial("response y\nplan\n  sigma y\n");
    assert.equal(f.problems.length, 1);
    assert.match(f.problems[0]!.message, /the planned error standard deviation \(a number\)/);
    assert.match(f.problems[0]!.message, /the plan setting 'sigma'/);
  });

  it("outside a plan, says it is a plan setting", () => {
    const f = parseTrial("response y\nsigma y 1.2\n");
    assert.ok(f.problems.length >= 1);
    assert.equal(f.problems[0]!.message, "'sigma' is a plan setting: put it on its own line under 'plan'");
  });
});
