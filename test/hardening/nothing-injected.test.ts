/**
 * Nothing injected (issue 11, item 4): our own sources never evaluate strings as code, and the report
 * (HTML for a file, HTML for the editor's panel, Markdown) shows hostile text from every text field of a
 * `.trial` file as text: no script, no element, no `javascript:` link, and a Content-Security-Policy
 * without `unsafe-eval`/`unsafe-inline` whose scripts all carry the nonce.
 */
import assert from "node:assert/strict";
import { readdirSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { renderReportHtml, renderReportMarkdown } from "../../server/src/report/render-report.js";

/** Every .ts source file of ours (grammar, server, extension), recursively. */
function sources(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    let entries;
    try {
      entries = readdirSync(dir, { withFileTypes: true });
    } catch {
      return;
    }
    for (const e of entries) {
      const path = join(dir, e.name);
      if (e.isDirectory() && e.name !== "node_modules") walk(path);
      else if (/\.(ts|mts|cts|js|mjs)$/.test(e.name) && !e.name.endsWith(".d.ts")) out.push(path);
    }
  };
  for (const dir of ["grammar/src", "grammar/scripts", "server/src", "extension/src"]) walk(resolve(dir));
  return out;
}

/** Code that runs a string: eval, the Function constructor, and timers given a string. */
const CODE_FROM_STRING: readonly { name: string; pattern: RegExp }[] = [
  { name: "eval(", pattern: /(^|[^\w.$])eval\s*\(/ },
  { name: "new Function", pattern: /\bnew\s+Function\s*\(/ },
  { name: "Function(string)", pattern: /(^|[^\w.$])Function\s*\(\s*["'`]/ },
  { name: "timer with a string", pattern: /\b(setTimeout|setInterval|setImmediate)\s*\(\s*["'`]/ },
  { name: "vm code execution", pattern: /\b(runInNewContext|runInThisContext|runInContext|compileFunction)\s*\(/ },
];

/** The probes, one per kind of injection. */
const PROBES = ["<script>alert(1)</script>", '"><img src=x onerror=alert(2)>', "javascript:alert(3)", "[click](javascript:alert(4))", "<svg onload=alert(5)>"];

/** A `.trial` text with a probe in every text field: title, owner, blocks, names, units, levels, ids, reasons. */
function hostileDocument(probe: string): string {
  const q = (s: string) => `"${s.replace(/\\/g, "\\\\").replace(/"/g, '\\"')}"`;
  return [
    "# Invented document with hostile text in every field.",
    `trial ${q(probe + " title")}`,
    `owner ${q(probe + " owner")}`,
    "date 2026-01-02",
    'conjecture """',
    `${probe} conjecture`,
    '"""',
    `response ${q(probe + " y")} unit ${q(probe + " unit")} maximize spec >= 1`,
    `factor ${q(probe + " f")} levels ${q(probe + " a")}, ${q(probe + " b")} unit ${q(probe + " funit")}`,
    `covariate ${q(probe + " c")} unit ${q(probe + " cunit")}`,
    "plan",
    "  replicates 3",
    `runs id ${q(probe + " f")} ${q(probe + " c")} | ${q(probe + " y")}`,
    `  ${q(probe + " r1")} ${q(probe + " a")} 1.0 | 10.1`,
    `  r2 ${q(probe + " b")} 2.0 | 12.3`,
    `  r3 ${q(probe + " a")} 1.5 | 10.9`,
    `  r4 ${q(probe + " b")} 2.2 | 12.0`,
    `  r5 ${q(probe + " a")} 1.1 | 9.8`,
    `  r6 ${q(probe + " b")} 2.4 | 13.1`,
    `  r7 ${q(probe + " a")} 1.3 | 11.6  excluded ${q(probe + " reason")}`,
    `  r8 ${q(probe + " b")} 1.9 | ?`,
    'conclusion """',
    `${probe} conclusion`,
    '"""',
    "",
  ].join("\n");
}

/** Asserts that HTML has no element, attribute or URL that the probes could have produced. */
function assertNoInjectedHtml(html: string, what: string): void {
  const nonce = /'nonce-([^']+)'/.exec(html)?.[1];
  assert.ok(nonce, `${what}: a CSP with a nonce`);
  const csp = /<meta http-equiv="Content-Security-Policy" content="([^"]*)"/.exec(html)?.[1];
  assert.ok(csp, `${what}: a CSP meta element`);
  assert.ok(!/unsafe-eval|unsafe-inline/.test(csp), `${what}: CSP without unsafe-eval/unsafe-inline: ${csp}`);
  assert.match(csp, /default-src 'none'/);
  for (const tag of html.match(/<script\b[^>]*>/gi) ?? []) assert.ok(tag.includes(`nonce="${nonce}"`), `${what}: a script without the nonce: ${tag}`);
  for (const tag of html.match(/<style\b[^>]*>/gi) ?? []) assert.ok(tag.includes(`nonce="${nonce}"`), `${what}: a style without the nonce: ${tag}`);
  assert.ok(!/<img\b/i.test(html), `${what}: an injected <img>`);
  assert.ok(!/<svg onload/i.test(html), `${what}: an injected <svg onload>`);
  assert.ok(!/<script>alert/i.test(html), `${what}: an injected <script>`);
  // Escaped probe text inside quoted attribute values (Vega's aria-labels) is text; look at tags without them.
  const tags = (html.match(/<[^>]*>/g) ?? []).map((tag) => tag.replace(/"[^"]*"|'[^']*'/g, '""'));
  assert.deepEqual(tags.filter((tag) => /\son\w+\s*=/i.test(tag)), [], `${what}: an event handler attribute`);
  assert.ok(!/(href|src|xlink:href|action)\s*=\s*["']?\s*javascript:/i.test(html), `${what}: a javascript: URL`);
}

describe("hardening: nothing injected", function () {
  this.timeout(120_000);

  it("our sources never run a string as code (eval, new Function, string timers, vm)", () => {
    const files = sources();
    assert.ok(files.length > 50, `found our sources (${files.length})`);
    const hits: string[] = [];
    for (const file of files) {
      const lines = readFileSync(file, "utf8").split("\n");
      lines.forEach((line, i) => {
        const code = line.replace(/\/\/.*$/, "").replace(/^\s*\*.*$/, "");
        for (const { name, pattern } of CODE_FROM_STRING) if (pattern.test(code)) hits.push(`${file}:${i + 1}: ${name}: ${line.trim()}`);
      });
    }
    // The one exception: the CLI's loader runs our own bundle file (dist/cli-main.cjs, beside it) through
    // vm.Script so that V8's code cache can be given (Node 20 has no other way); it is what `require` of
    // that file does. Checked below: its source is read from that fixed path and nothing else.
    const launcher = resolve("server/src/cli/launcher.ts");
    const allowed = hits.filter((hit) => hit.startsWith(`${launcher}:`) && hit.includes("vm code execution: const run = script.runInThisContext()"));
    assert.equal(allowed.length, 1, `the loader runs one script: ${hits.join("; ")}`);
    assert.deepEqual(hits.filter((hit) => !allowed.includes(hit)), []);
    const loader = readFileSync(launcher, "utf8");
    assert.match(loader, /const source = readFileSync\(main, "utf8"\);/);
    assert.match(loader, /new Script\(WRAPPER_HEAD \+ source \+ WRAPPER_TAIL,/);
    assert.match(loader, /main: join\(directory, "cli-main\.cjs"\)/);
  });

  it("the scan itself finds each forbidden form (so it cannot pass by accident)", () => {
    const samples = ["const f = eval(x);", "const g = new Function('a', 'return a');", "Function('return 1')()", 'setTimeout("go()", 10);', "vm.runInNewContext(code)"];
    for (const s of samples) assert.ok(CODE_FROM_STRING.some(({ pattern }) => pattern.test(s)), s);
    for (const s of ["retrieval(x)", "const evaluate = 1;", "setTimeout(() => go(), 10);", "// eval( in a comment is stripped before the scan"]) {
      const code = s.replace(/\/\/.*$/, "");
      assert.ok(!CODE_FROM_STRING.some(({ pattern }) => pattern.test(code)), s);
    }
  });

  // Found by these probes: in the Markdown report each plot is one line that starts with `<svg …>` and
  // goes on with more tags, which is not a CommonMark HTML block (type 7 needs the open tag alone on its
  // line), so the text inside the SVG is parsed as Markdown: a level named `[x](javascript:alert(1))`
  // becomes a link in renderers that do not sanitize, and `*` or `_` in names turn into emphasis.
  // Pending: the report writer (server/src/report/markdown-writer.ts, another engineer's file) should
  // start each plot as an HTML block, e.g. wrapped in `<div>` … `</div>` on lines of their own.
  it("Markdown plots are HTML blocks, so user text inside an SVG is not parsed as Markdown", async () => {
    const analysis = analyzeDocument(hostileDocument("[click](javascript:alert(4))"));
    const md = await renderReportMarkdown(analysis);
    for (const line of md.split("\n").filter((l) => l.includes("<svg"))) {
      assert.ok(/^<(div|pre|table)\b[^>]*>\s*$/.test(line) || /^<svg\b[^>]*>\s*$/.test(line) || /^<div\b/.test(line), `a plot line is not an HTML block start: ${line.slice(0, 80)}`);
    }
  });

  for (const probe of PROBES) {
    it(`the report shows ${JSON.stringify(probe)} as text in every field (HTML file, HTML panel, Markdown)`, async () => {
      const text = hostileDocument(probe);
      const analysis = analyzeDocument(text);
      assert.equal(analysis.responses.length, 1, "the hostile document is analysed");
      for (const webview of [false, true]) {
        const html = await renderReportHtml(analysis, { webview });
        assertNoInjectedHtml(html, `HTML (webview ${webview})`);
        assert.ok(html.includes("conclusion"), "the conclusion is in the report");
      }
      const md = await renderReportMarkdown(analysis);
      // The plots are Vega's SVG (HTML-escaped, checked as HTML); the Markdown around them is checked here.
      const svgs = md.match(/<svg[\s\S]*?<\/svg>/g) ?? [];
      const prose = md.replace(/<svg[\s\S]*?<\/svg>/g, "");
      assert.ok(!/<script|<img|<svg onload/i.test(prose), "Markdown: no raw HTML from user text");
      assert.ok(!/\]\(\s*javascript:/i.test(prose), "Markdown: no javascript: link");
      for (const svg of svgs) assertNoInjectedHtml(`<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'nonce-n';">${svg}`, "Markdown plot");
    });
  }
});
