import assert from "node:assert/strict";
import fs from "node:fs";
import path from "node:path";

/** Directory of the CLI golden files (relative to the repository root, the cwd when mocha runs). */
export const GOLDEN_DIR = path.resolve("test/cli/golden");

/**
 * Compares `actual` with the golden file `name` under test/cli/golden/; with UPDATE_EXPECT=1 in the
 * environment, writes `actual` as the new golden file instead (then review the diff before committing).
 */
export function expectGolden(name: string, actual: string): void {
  const file = path.join(GOLDEN_DIR, name);
  if (process.env["UPDATE_EXPECT"] === "1") {
    fs.mkdirSync(path.dirname(file), { recursive: true });
    fs.writeFileSync(file, actual);
    return;
  }
  assert.ok(fs.existsSync(file), `golden file ${name} is missing: run the tests with UPDATE_EXPECT=1 to create it`);
  assert.equal(actual, fs.readFileSync(file, "utf8"), `output differs from golden file ${name} (UPDATE_EXPECT=1 regenerates it)`);
}
