/**
 * Consistency checks between the grammar and files derived from it: the TextMate grammar knows every
 * keyword, and the committed CST types equal a fresh generation.
 */
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { ALL_KEYWORDS, TOP_LEVEL_KEYWORDS } from "../../grammar/src/index.js";
import { CST_TYPES_PATH, renderCstTypes } from "../../grammar/scripts/generate-cst-types.js";

describe("grammar consistency", () => {
  const tm = JSON.parse(readFileSync(path.resolve("grammar/syntaxes/trial.tmLanguage.json"), "utf8")) as {
    scopeName: string;
    repository: Record<string, { match?: string }>;
  };

  it("the TextMate grammar has scope source.trial and matches every keyword", () => {
    assert.equal(tm.scopeName, "source.trial");
    const patterns = Object.values(tm.repository)
      .map((r) => r.match)
      .filter((m): m is string => typeof m === "string")
      .map((m) => new RegExp(m));
    for (const word of ALL_KEYWORDS) {
      const line = `  ${word} `;
      const hit = patterns.some((re) => {
        const m = re.exec(line);
        return m !== null && m[0] === word;
      });
      assert.ok(hit, `keyword '${word}' is not highlighted by grammar/syntaxes/trial.tmLanguage.json`);
    }
    const top = new RegExp(tm.repository["top-level-keyword"]!.match!);
    for (const word of TOP_LEVEL_KEYWORDS) assert.ok(top.test(word), word);
    assert.equal(top.test("factors"), false);
    assert.equal(top.test("run-order"), false);
  });

  it("the language configuration comments with # and auto-closes quotes", () => {
    const config = JSON.parse(readFileSync(path.resolve("grammar/language-configuration.json"), "utf8")) as {
      comments: { lineComment: string };
      autoClosingPairs: { open: string }[];
    };
    assert.equal(config.comments.lineComment, "#");
    assert.deepEqual(
      config.autoClosingPairs.map((p) => p.open),
      ['"""', '"'],
    );
  });

  it("the committed CST types equal a fresh generation (run grammar/scripts/generate-cst-types.ts)", () => {
    assert.equal(readFileSync(path.resolve(CST_TYPES_PATH), "utf8"), renderCstTypes());
  });
});
