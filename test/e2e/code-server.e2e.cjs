#!/usr/bin/env node
// End-to-end test of the packaged extension in a real VS Code build: code-server 4.100.3 on 127.0.0.1,
// driven by Debian's headless Chromium through playwright-core. It installs trialbook.vsix, opens an
// invented .trial file with one unknown level, and waits for signals (never fixed sleeps): the error
// squiggle, the Problems entry, a hover with the ANOVA table, the quick fix (applied: the squiggle goes),
// the status bar item, and the report panel with its SVG plots; it screenshots the report in the dark
// and the light theme. Recipe and pitfalls: the shared e2e notes (README of ../shared/e2e).
// Env: E2E_WORK (tools, default /tmp/trialbook-e2e), TRIALBOOK_VSIX, SHOT_DIR, CS_PORT, KEEP_TMP=1.
"use strict";
const { spawn, execFileSync } = require("child_process");
const fs = require("fs");
const os = require("os");
const path = require("path");
const http = require("http");

const ROOT = path.resolve(__dirname, "../..");
const WORK = process.env.E2E_WORK || "/tmp/trialbook-e2e";
const { chromium } = require(path.join(WORK, "driver/node_modules/playwright-core"));
const CS = path.join(WORK, "cs/node_modules/.bin/code-server");
const VSIX = process.env.TRIALBOOK_VSIX || path.join(ROOT, "trialbook.vsix");
const SHOTS = process.env.SHOT_DIR || path.join(ROOT, "test/e2e/screenshots");
const PORT = Number(process.env.CS_PORT || 18181);
const BASE = `http://127.0.0.1:${PORT}`;
const t0 = Date.now();
const log = (...a) => console.log(`[${((Date.now() - t0) / 1000).toFixed(1)}s]`, ...a);

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-cs-"));
const ud = path.join(tmp, "user-data"), exts = path.join(tmp, "extensions");
const ws = path.join(tmp, "workspace"), prof = path.join(tmp, "chromium-profile");
for (const d of [path.join(ud, "User"), exts, ws, prof, SHOTS]) fs.mkdirSync(d, { recursive: true });

// The invented two-factor sample with one run whose resin is not a declared level: an unknown-level
// error whose quick fix declares the level.
const sample = fs.readFileSync(path.join(ROOT, "samples/two-factor.trial"), "utf8").replace("r18  virgin   40 ", "r18  recycled 40 ");
if (!sample.includes("recycled")) throw new Error("the sample changed: cannot plant the unknown level");
fs.writeFileSync(path.join(ws, "cover.trial"), sample);

const settingsFile = path.join(ud, "User", "settings.json");
const settings = (theme) => JSON.stringify({
  "telemetry.telemetryLevel": "off",
  "update.mode": "none",
  "extensions.autoCheckUpdates": false,
  "extensions.autoUpdate": false,
  "extensions.ignoreRecommendations": true,
  "workbench.enableExperiments": false,
  "workbench.startupEditor": "none",
  "workbench.tips.enabled": false,
  "security.workspace.trust.enabled": false,
  "editor.hover.delay": 200,
  "workbench.colorTheme": theme,
}, null, 2);
fs.writeFileSync(settingsFile, settings("Default Dark Modern"));

let cs = null, ctx = null, page = null, failed = false;
const csLog = path.join(tmp, "code-server.log");
const cfg = path.join(tmp, "config.yaml");
fs.writeFileSync(cfg, `bind-addr: 127.0.0.1:${PORT}\nauth: none\ncert: false\n`);
const common = ["--config", cfg, "--user-data-dir", ud, "--extensions-dir", exts];
const results = [];
const check = (name) => { results.push(name); log("ok:", name); };

function findFiles(dir, re, acc = []) {
  if (!fs.existsSync(dir)) return acc;
  for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
    const f = path.join(dir, e.name);
    if (e.isDirectory()) findFiles(f, re, acc); else if (re.test(e.name)) acc.push(f);
  }
  return acc;
}
function dumpClientLog() {
  for (const f of findFiles(path.join(ud, "logs"), /Trialbook\.log$/)) log("output channel", path.basename(f) + ":\n" + fs.readFileSync(f, "utf8").trim().slice(-4000));
}
function get(url) {
  return new Promise((res) => { http.get(url, (r) => { r.resume(); res(r.statusCode); }).on("error", () => res(0)); });
}
async function cleanup() {
  if (ctx) await ctx.close().catch(() => {});
  if (cs && cs.exitCode === null) {
    try { process.kill(-cs.pid, "SIGTERM"); } catch {}   // our own process group only
    await new Promise((r) => setTimeout(r, 1000));
    try { process.kill(-cs.pid, "SIGKILL"); } catch {}
  }
  if (!process.env.KEEP_TMP && !failed) fs.rmSync(tmp, { recursive: true, force: true });
  else log("kept temp dir", tmp);
}

/** Screen centre of the top-most occurrence of `word` in the editor's rendered lines (Monaco reuses line
 *  nodes, so DOM order is not line order; spaces render as no-break spaces). */
async function wordBox(word, exactToken = false) {
  return page.evaluate(([w, exact]) => {
    let best = null;
    for (const line of document.querySelectorAll(".editor-instance .view-lines .view-line")) {
      const walker = document.createTreeWalker(line, NodeFilter.SHOW_TEXT);
      for (let n; (n = walker.nextNode());) {
        const text = n.textContent.replace(/\u00a0/g, " ");
        const i = exact ? (text.trim() === w ? text.indexOf(w) : -1) : text.indexOf(w);
        if (i >= 0) {
          const r = document.createRange(); r.setStart(n, i); r.setEnd(n, i + w.length);
          const b = r.getBoundingClientRect();
          if (b.height > 0 && (!best || b.y < best.y)) best = { x: b.x + b.width / 2, y: b.y + b.height / 2 };
        }
      }
    }
    return best;
  }, [word, exactToken]);
}

async function runCommand(title) {
  await page.keyboard.press("F1");
  const input = page.locator(".quick-input-widget input");
  await input.waitFor({ state: "visible", timeout: 10000 });
  await input.fill(">" + title);
  // Pick the row whose label is exactly the title (a longer command may contain it and rank first).
  const exact = new RegExp("^\\s*" + title.replace(/[.*+?^${}()|[\]\\]/g, "\\$&") + "\\s*$");
  const label = page.locator(".quick-input-list .monaco-list-row .label-name", { hasText: exact }).first();
  await label.waitFor({ timeout: 10000 });
  await label.click();
}

async function main() {
  const inst = execFileSync(CS, [...common, "--install-extension", VSIX], { encoding: "utf8" });
  log("install-extension:", inst.trim().split("\n").pop());

  const out = fs.openSync(csLog, "w");
  cs = spawn(CS, ["--bind-addr", `127.0.0.1:${PORT}`, "--auth", "none", ...common, "--disable-telemetry", "--disable-update-check",
    "--disable-workspace-trust", "--disable-getting-started-override", "--ignore-last-opened", ws], { stdio: ["ignore", out, out], detached: true });
  for (let i = 0; i < 120 && (await get(`${BASE}/healthz`)) !== 200; i++) await new Promise((r) => setTimeout(r, 500));
  if ((await get(`${BASE}/healthz`)) !== 200) throw new Error("code-server did not come up; see " + csLog);
  log("code-server up, pid", cs.pid);

  ctx = await chromium.launchPersistentContext(prof, {
    executablePath: "/usr/bin/chromium",
    headless: true,
    viewport: { width: 1600, height: 900 },
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
      "--disable-component-update", "--disable-sync", "--host-resolver-rules=MAP * ~NOTFOUND , EXCLUDE 127.0.0.1"],
  });
  page = ctx.pages()[0] || (await ctx.newPage());
  page.on("pageerror", (e) => log("pageerror:", String(e).slice(0, 200)));
  await page.goto(`${BASE}/?folder=${encodeURIComponent(ws)}`);
  await page.waitForSelector(".monaco-workbench", { timeout: 60000 });

  const row = page.locator(".explorer-folders-view .monaco-list-row", { hasText: "cover.trial" });
  await row.waitFor({ timeout: 60000 });
  await row.click();
  const editor = page.locator(".editor-instance .monaco-editor").first();
  await editor.locator(".view-lines", { hasText: "Cover shrinkage" }).waitFor({ timeout: 30000 });
  // The language mode switches from Plain Text once the extension's contributions are registered.
  const mode = page.locator('.statusbar-item[id="status.editor.mode"]', { hasText: "Trialbook" });
  await mode.waitFor({ timeout: 60000 });
  check("the .trial file opens in language mode " + (await mode.innerText()).trim());

  // 1. Diagnostics: the unknown level (line 45, below the fold) gets a Problems entry; opening the entry
  //    reveals the line, which carries the error squiggle.
  await page.keyboard.press("Control+Shift+M");
  const problem = page.locator(".markers-panel .monaco-list-row", { hasText: "'recycled' is not a level of factor 'resin'" });
  await problem.first().waitFor({ timeout: 60000 });
  check("Problems panel: " + (await problem.first().innerText()).replace(/\s+/g, " ").slice(0, 160));
  await problem.first().click();
  await editor.locator(".squiggly-error").first().waitFor({ timeout: 30000 });
  check("error squiggle under the unknown level");
  await page.screenshot({ path: path.join(SHOTS, "1-problems.png") });
  await editor.locator(".view-lines").click();
  await page.keyboard.press("Control+Home");
  await editor.locator(".view-lines", { hasText: "Invented example" }).waitFor({ timeout: 10000 });

  // 2. Hover over the response name: the ANOVA table.
  const target = await wordBox("shrink", true);   // the response name token, not "shrink" in the prose
  if (!target) throw new Error("response declaration not found in the editor DOM");
  const hover = page.locator(".monaco-hover", { hasText: "Source" });
  for (let attempt = 0; attempt < 6 && !(await hover.first().isVisible().catch(() => false)); attempt++) {
    await page.mouse.move(target.x - 30, target.y + 40);
    await page.mouse.move(target.x, target.y, { steps: 5 });
    try { await hover.first().waitFor({ state: "visible", timeout: 4000 }); } catch {}
  }
  if (!(await hover.first().isVisible())) throw new Error("no hover with the ANOVA table");
  const hoverText = (await hover.first().innerText()).replace(/\s+/g, " ");
  if (!/resin x mold-temp/.test(hoverText)) throw new Error("the hover has no interaction row: " + hoverText);
  check("hover: " + hoverText.slice(hoverText.indexOf("Source"), hoverText.indexOf("Source") + 160));
  await page.screenshot({ path: path.join(SHOTS, "2-hover.png") });
  await page.keyboard.press("Escape");

  // 3. Quick fix on the unknown level: offered, applied, and the error goes away.
  // Asked for in the editor, not in the Problems panel: the panel's row tooltip appears under the pointer
  // after a click and closes the panel's own quick-fix menu (seen on 2026-12-02: the menu was offered, then
  // gone before it could be chosen). So: reveal the line through its Problems entry, put the caret on the
  // unknown level, park the pointer on blank editor space (no hover there) and open the menu with Ctrl+.
  await problem.first().click();
  await editor.locator(".squiggly-error").first().waitFor({ timeout: 30000 });
  const fix = page.locator(".action-widget .monaco-list-row", { hasText: "Declare 'recycled'" });
  for (let attempt = 0; attempt < 4 && !(await fix.first().isVisible().catch(() => false)); attempt++) {
    await page.keyboard.press("Escape");
    const level = await wordBox("recycled", true);
    if (!level) throw new Error("the unknown level 'recycled' is not in the editor's rendered lines");
    await page.mouse.click(level.x, level.y);
    const lines = await editor.locator(".view-lines").boundingBox();
    if (lines) await page.mouse.move(lines.x + lines.width - 20, level.y);   // past the line's end
    await page.keyboard.press("Control+.");
    try { await fix.first().waitFor({ timeout: 8000 }); } catch {}
  }
  await fix.first().waitFor({ timeout: 15000 });
  check("quick fix offered: " + (await fix.first().innerText()).replace(/\s+/g, " "));
  await page.screenshot({ path: path.join(SHOTS, "3-quick-fix.png") });
  // The action list is driven by the keyboard (a pointer block covers it): move to the fix, then Enter.
  for (let i = 0; i < 6 && !/\bfocused\b/.test((await fix.first().getAttribute("class", { timeout: 5000 })) || ""); i++) await page.keyboard.press("ArrowDown");
  await page.keyboard.press("Enter");
  await problem.first().waitFor({ state: "detached", timeout: 30000 });
  await editor.locator(".squiggly-error").first().waitFor({ state: "detached", timeout: 30000 });
  check("quick fix applied: the unknown-level entry and the error squiggle are gone");

  // 4. Status bar item for the active file.
  const status = page.locator(".statusbar-item", { hasText: "runs ·" });
  await status.first().waitFor({ timeout: 30000 });
  check("status bar: " + (await status.first().innerText()).trim());

  // 5. Write Run Sheet: the planner adds the pending runs the new level needs; the status bar follows.
  const before = (await status.first().innerText()).trim();
  await runCommand("Trialbook: Write Run Sheet");
  const toast = page.locator(".notifications-toasts .notification-list-item", { hasText: "Trialbook: Run sheet written with seed 3907" });
  await toast.first().waitFor({ timeout: 30000 });
  check("run sheet: " + (await toast.first().innerText()).replace(/\s+/g, " ").slice(0, 120));
  await page.locator(".statusbar-item", { hasText: /\d+\/\d+ runs ·/ }).filter({ hasNotText: before.replace(/^\W+/, "") }).first().waitFor({ timeout: 30000 });
  check("status bar after the run sheet: " + (await status.first().innerText()).trim());
  await page.keyboard.press("Control+Shift+P");
  await page.keyboard.press("Escape");

  // 6. The report panel beside the editor, with its plots.
  await runCommand("Trialbook: Show Analysis");
  const tab = page.locator(".tab", { hasText: "Trialbook — Cover shrinkage" });
  await tab.first().waitFor({ timeout: 30000 });
  const report = page.frameLocator("iframe.webview.ready").frameLocator("#active-frame");
  await report.locator("h1", { hasText: "Cover shrinkage vs. resin feed and mold temperature" }).waitFor({ timeout: 60000 });
  await report.locator("figure svg").nth(5).waitFor({ timeout: 60000 });
  const figures = await report.locator("figure svg").count();
  const caution = await report.locator(".caution").first().innerText();
  if (!/not engineering acceptance/.test(caution)) throw new Error("no caution in the panel");
  check(`report panel '${(await tab.first().innerText()).trim()}' with ${figures} plots and the caution`);
  // Close the Problems panel and scroll to the plots so the screenshots show them.
  await page.keyboard.press("Control+J");
  await report.locator("figure").first().scrollIntoViewIfNeeded();
  await page.screenshot({ path: path.join(SHOTS, "4-report-dark.png") });

  // 7. The same panel in the light theme, chosen as a user would, from the theme picker.
  await runCommand("Preferences: Color Theme");
  // Wait for the theme list itself (the palette's command list closes first), then filter it.
  await page.locator(".quick-input-list .monaco-list-row", { hasText: "Dark High Contrast" }).first().waitFor({ timeout: 10000 });
  await page.keyboard.type("Light Modern");
  await page.locator(".quick-input-list .monaco-list-row.focused", { hasText: "Light Modern" }).first().waitFor({ timeout: 10000 });
  await page.keyboard.press("Enter");
  await page.locator(".monaco-workbench.vs").waitFor({ timeout: 30000 });
  await report.locator("body.vscode-light").waitFor({ timeout: 30000 });
  await report.locator("figure").first().scrollIntoViewIfNeeded();
  await page.screenshot({ path: path.join(SHOTS, "5-report-light.png") });
  check("report panel in the light theme");

  // 8. The panel follows edits: change the title, wait for the new title in the panel.
  await editor.locator(".view-lines").click();
  await page.keyboard.press("Control+Home");
  await page.keyboard.press("ArrowDown");
  await page.keyboard.press("ArrowDown");   // line 3: trial "Cover shrinkage ..."
  await page.keyboard.press("End");
  await page.keyboard.press("ArrowLeft");
  await page.keyboard.type(" (edited)");
  await report.locator("h1", { hasText: "(edited)" }).waitFor({ timeout: 30000 });
  check("the report follows edits as you type");
}

const guard = setTimeout(() => { console.error("global timeout"); failed = true; cleanup().then(() => process.exit(1)); }, 300000);
main().then(async () => {
  clearTimeout(guard);
  log("PASS; screenshots in", SHOTS);
  await cleanup();
  console.log(`code-server e2e: ${results.length} checks passed`);
}, async (e) => {
  clearTimeout(guard);
  failed = true;
  console.error("FAIL:", (e && e.stack) || e);
  if (page) await page.screenshot({ path: path.join(SHOTS, "FAIL.png") }).then(() => console.error("failure screenshot:", path.join(SHOTS, "FAIL.png")), () => {});
  try { console.error(fs.readFileSync(csLog, "utf8").slice(-3000)); } catch {}
  try { dumpClientLog(); } catch {}
  await cleanup();
  console.log(`code-server e2e: ${results.length} checks passed, then FAILED`);
  process.exitCode = 1;
});
