/**
 * Golden parse results: every `samples/*.trial` and every `test/grammar/fixtures/*.trial` parsed and
 * serialized, compared with `test/grammar/golden/<name>.ast.json`. Regenerate with `UPDATE_EXPECT=1`
 * after checking the diff by eye. The samples must also parse with zero problems.
 */
import assert from "node:assert/strict";
import { existsSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { parseTrial } from "../../grammar/src/index.js";
import { astToJson } from "./ast-json.js";

const update = process.env["UPDATE_EXPECT"] === "1";

function trialFiles(dir: string): string[] {
  const abs = path.resolve(dir);
  if (!existsSync(abs)) return [];
  return readdirSync(abs)
    .filter((f) => f.endsWith(".trial"))
    .sort()
    .map((f) => path.join(abs, f));
}

function checkGolden(file: string, prefix: string): void {
  const text = readFileSync(file, "utf8");
  const actual = astToJson(parseTrial(text));
  const golden = path.resolve("test/grammar/golden", `${prefix}${path.basename(file, ".trial")}.ast.json`);
  if (update || !existsSync(golden)) {
    writeFileSync(golden, actual);
    if (!update) assert.fail(`golden file ${golden} was missing and has been written: check it and commit it`);
    return;
  }
  assert.equal(actual, readFileSync(golden, "utf8"), `AST of ${file} differs from ${golden} (UPDATE_EXPECT=1 rewrites)`);
}

describe("grammar golden files", () => {
  const samples = trialFiles("samples");
  it("finds the samples", () => {
    assert.ok(samples.length > 0, "no samples/*.trial found");
  });
  for (const file of samples) {
    it(`sample ${path.basename(file)} parses with zero problems and matches its golden AST`, () => {
      const parsed = parseTrial(readFileSync(file, "utf8"));
      assert.deepEqual(parsed.problems, []);
      checkGolden(file, "sample-");
    });
  }
  for (const file of trialFiles("test/grammar/fixtures")) {
    it(`fixture ${path.basename(file)} matches its golden AST`, () => {
      checkGolden(file, "");
    });
  }
});
