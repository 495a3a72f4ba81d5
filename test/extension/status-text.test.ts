import assert from "node:assert/strict";
import { readdirSync, readFileSync } from "node:fs";
import { resolve } from "node:path";
import { defaultReportPath, panelTitle, statusText, statusTooltip } from "../../extension/src/status-text.js";

describe("extension: status bar and titles", () => {
  it("writes the status bar text in the form of the issue's example '18/24 runs · 2 warnings'", () => {
    assert.equal(statusText({ plannedRuns: 24, doneRuns: 18, errors: 0, warnings: 2 }), "18/24 runs · 2 warnings");
    assert.equal(statusText({ plannedRuns: 24, doneRuns: 24, errors: 1, warnings: 1 }), "24/24 runs · 1 error, 1 warning");
    assert.equal(statusText({ plannedRuns: 0, doneRuns: 0, errors: 0, warnings: 0 }), "no runs yet · no problems");
  });

  it("explains the counts in the tooltip", () => {
    assert.equal(
      statusTooltip({ title: "Cure", plannedRuns: 24, doneRuns: 18, excludedRuns: 1, errors: 0, warnings: 0 }),
      "Cure: 18 of 24 planned runs done, 6 pending, 1 excluded. Click to show the analysis.",
    );
  });

  it("titles the panel 'Trialbook — <trial title>' (design brief §2) and shortens very long titles", () => {
    assert.equal(panelTitle("Lap-shear strength vs. oven cure profile"), "Trialbook — Lap-shear strength vs. oven cure profile");
    assert.equal(panelTitle("  "), "Trialbook — Untitled trial");
    assert.equal(panelTitle("x".repeat(100)).length, "Trialbook — ".length + 60);
  });

  it("proposes the report beside the trial file", () => {
    assert.equal(defaultReportPath("/w/cure.trial", "html"), "/w/cure.report.html");
    assert.equal(defaultReportPath("/w/cure.trial", "markdown"), "/w/cure.report.md");
  });
});

describe("extension: architecture", () => {
  it("imports nothing from the engine: only the shared protocol definitions of the server", () => {
    const dir = resolve("extension/src");
    for (const name of readdirSync(dir).filter((n) => n.endsWith(".ts"))) {
      const source = readFileSync(resolve(dir, name), "utf8");
      for (const m of source.matchAll(/from\s+"([^"]+)"/g)) {
        const target = m[1]!;
        if (target.startsWith("../")) assert.equal(target, "../../server/src/protocol.js", `${name} imports ${target}`);
      }
    }
  });

  it("declares every command of design brief §2 and every setting in package.json", () => {
    const manifest = JSON.parse(readFileSync(resolve("package.json"), "utf8"));
    const titles = manifest.contributes.commands.map((c: { category: string; title: string }) => `${c.category}: ${c.title}`);
    assert.deepEqual(titles, ["Trialbook: Show Analysis", "Trialbook: Write Run Sheet", "Trialbook: Export Report", "Trialbook: Compare with Previous Revision"]);
    assert.deepEqual(Object.keys(manifest.contributes.configuration.properties).sort(), ["trialbook.alpha", "trialbook.analysisDelay", "trialbook.confidence", "trialbook.powerTarget", "trialbook.sumsOfSquares"]);
    assert.deepEqual(manifest.activationEvents, ["onLanguage:trial"]);
    assert.equal(manifest.capabilities.untrustedWorkspaces.supported, true);
    for (const c of manifest.contributes.commands) {
      const used = readdirSync(resolve("extension/src")).some((n) => readFileSync(resolve("extension/src", n), "utf8").includes(`"${c.command}"`));
      assert.ok(used, `${c.command} is registered by the extension`);
    }
  });
});
