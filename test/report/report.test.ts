import assert from "node:assert/strict";
import { readdirSync, readFileSync } from "node:fs";
import { resolve } from "node:path";
import { XMLValidator } from "fast-xml-parser";
import { analyzeDocument } from "../../server/src/analysis/analyze-document.js";
import { renderReportHtml, renderReportMarkdown, renderPlots } from "../../server/src/report/render-report.js";
import { CAUTION } from "../../server/src/text/caution.js";
import { formatF, formatNumber, formatP, formatStatistic } from "../../server/src/text/format-number.js";

/** Names of `on...` attributes in any tag (quoted attribute values, where probes may sit escaped, are skipped). */
function eventHandlerAttributes(html: string): string[] {
  const names: string[] = [];
  for (const tag of html.match(/<[a-zA-Z][^>]*>/g) ?? []) {
    for (const m of tag.replace(/"[^"]*"|'[^']*'/g, '""').matchAll(/\s([a-zA-Z:-]+)\s*=/g)) if (/^on/i.test(m[1]!)) names.push(m[1]!);
  }
  return names;
}

const reference = JSON.parse(readFileSync(resolve("test/report/fixtures/r/report-reference.json"), "utf8"));
const SAMPLES = readdirSync(resolve("samples")).filter((n) => n.endsWith(".trial")).map((n) => n.slice(0, -".trial".length)).sort();
const sample = (name: string) => readFileSync(resolve(`samples/${name}.trial`), "utf8");

/** The cells of the HTML table whose caption is `caption`, row by row. */
function htmlTable(html: string, caption: string): string[][] {
  const start = html.indexOf(`<caption>${caption}</caption>`);
  assert.ok(start >= 0, `no table '${caption}'`);
  const table = html.slice(start, html.indexOf("</table>", start));
  return [...table.matchAll(/<tr>(.*?)<\/tr>/g)].map((row) => [...row[1]!.matchAll(/<t[hd][^>]*>(.*?)<\/t[hd]>/g)].map((c) => c[1]!));
}

describe("report: content against R", () => {
  it("shows the Type III ANOVA of the two-factor sample as R's car::Anova computes it", async () => {
    const html = await renderReportHtml(analyzeDocument(sample("two-factor")));
    const rows = htmlTable(html, "Analysis of variance");
    const r = reference.twoFactorShrink;
    // Rows 1-3 are the terms, row 4 the residual (row 0 is the header); R names the interaction resin:temp.
    for (let k = 0; k < 3; k++) {
      const row = rows[k + 1]!;
      assert.equal(row[1], String(r.df[k]));
      assert.equal(row[2], formatStatistic(r.ss[k]), `SS of ${row[0]}`);
      assert.equal(row[4], formatF(r.f[k]), `F of ${row[0]}`);
      assert.equal(row[5], formatP(r.p[k]), `p of ${row[0]}`);
    }
    assert.deepEqual(rows.slice(1, 4).map((row) => row[0]), ["resin", "mold-temp", "resin x mold-temp"]);
    assert.equal(rows[4]![0], "Residual");
    assert.equal(rows[4]![2], formatStatistic(r.ss[3]));
  });

  it("writes the same ANOVA into the Markdown report", async () => {
    const md = await renderReportMarkdown(analyzeDocument(sample("two-factor")));
    const r = reference.twoFactorShrink;
    const line = md.split("\n").find((l) => l.startsWith("| resin x mold\\-temp |") || l.startsWith("| resin x mold-temp |"));
    assert.ok(line, "interaction row in the Markdown table");
    assert.ok(line.includes(`| ${formatStatistic(r.ss[2])} |`) && line.includes(`| ${formatF(r.f[2])} |`) && line.includes(`| ${formatP(r.p[2])} |`), line);
  });
});

describe("report: results of the analysis extensions", () => {
  it("shows the letter groups, comparisons and checks that analyzeDocument computes for the two-factor sample", async () => {
    const analysis = analyzeDocument(sample("two-factor"));
    const r = analysis.responses[0]!;
    const html = await renderReportHtml(analysis);
    assert.ok(r.groups && r.groups.length > 0 && r.comparisons && r.comparisons.length > 0, "the engine computes groups and comparisons here");
    const groups = htmlTable(html, "Letter groups (levels that share a letter do not differ significantly)");
    for (const g of r.groups!.filter((x) => x.term === "resin x mold-temp")) assert.ok(groups.some((row) => row[1] === g.level && row[3] === g.letters), `${g.level} ${g.letters}`);
    const pairs = htmlTable(html, "Pairwise comparisons with 95% simultaneous intervals");
    assert.equal(pairs.length - 1, r.comparisons!.length);
    for (const c of r.comparisons!) assert.ok(pairs.some((row) => row[2] === `${c.a} − ${c.b}` && row[6] === formatP(c.p)), `${c.a} − ${c.b}`);
    if (r.checks?.shapiroWilk) assert.ok(html.includes(`W = ${formatNumber(r.checks.shapiroWilk.w)}, p = ${formatP(r.checks.shapiroWilk.p)}`));
  });

  it("draws the half-normal plot from the two-level analysis of the screening sample", async () => {
    const analysis = analyzeDocument(sample("screening-fraction"));
    const plots = [...(await renderPlots(analysis)).values()].flat();
    assert.ok(plots.some((p) => p.title === "Half-normal plot of effects" && "svg" in p));
  });
});

describe("report: plots", () => {
  for (const name of SAMPLES) {
    it(`every plot of samples/${name}.trial is well-formed SVG`, async () => {
      const plots = await renderPlots(analyzeDocument(sample(name)));
      let drawn = 0;
      for (const list of plots.values()) {
        for (const plot of list) {
          if (!("svg" in plot)) continue;
          drawn++;
          assert.equal(XMLValidator.validate(plot.svg), true, `${plot.title} is not well-formed XML`);
          assert.match(plot.svg, /^<svg[^>]+xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
          assert.doesNotMatch(plot.svg, /NaN|Infinity/, `${plot.title} has a non-finite coordinate`);
        }
      }
      assert.ok(drawn >= 4, `only ${drawn} plots drawn`);
    });
  }

  it("draws main effects, interaction, points, both residual plots and the normal plot for the two-factor sample", async () => {
    const plots = await renderPlots(analyzeDocument(sample("two-factor")));
    const titles = plots.get("shrink")!.filter((p) => "svg" in p).map((p) => p.title);
    assert.deepEqual(titles, ["Main effects", "Interaction", "Observations by level", "Residuals vs fitted", "Residuals vs run order", "Normal probability plot of residuals"]);
    const halfNormal = plots.get("shrink")!.find((p) => p.title === "Half-normal plot of effects")!;
    assert.ok("note" in halfNormal && /two-level/.test(halfNormal.note), "the half-normal plot is skipped with a note for a 2 x 3 design");
  });

  it("puts every plot of the HTML report inline, with ids unique across plots", async () => {
    const html = await renderReportHtml(analyzeDocument(sample("incomplete")));
    const ids = [...html.matchAll(/\sid="([^"]+)"/g)].map((m) => m[1]!);
    assert.equal(new Set(ids).size, ids.length, "duplicate ids");
    assert.doesNotMatch(html, /<(img|link|iframe|object|embed)\b/i);
    assert.doesNotMatch(html, /\b(src|href)="(https?:|\/\/)/i);
  });
});

describe("report: safety", () => {
  it("has a Content-Security-Policy with a nonce, no unsafe-eval or unsafe-inline, and nonce'd style and script", async () => {
    for (const webview of [false, true]) {
      const html = await renderReportHtml(analyzeDocument(sample("one-way")), { webview, nonce: "bm9uY2Utbm9uY2Utbm9uY2U=" });
      const csp = /<meta http-equiv="Content-Security-Policy" content="([^"]+)">/.exec(html)?.[1];
      assert.ok(csp, "CSP meta");
      assert.match(csp, /default-src 'none'/);
      assert.match(csp, /style-src 'nonce-bm9uY2Utbm9uY2Utbm9uY2U='/);
      assert.doesNotMatch(csp, /unsafe-eval|unsafe-inline|https?:/);
      assert.equal(/script-src 'nonce-/.test(csp), webview, "a script only in the panel");
      for (const tag of html.match(/<(style|script)\b[^>]*>/g) ?? []) assert.match(tag, /nonce="bm9uY2Utbm9uY2Utbm9uY2U="/);
      assert.equal((html.match(/<script\b/g) ?? []).length, webview ? 1 : 0);
      assert.deepEqual(eventHandlerAttributes(html), [], "no inline event handlers");
    }
  });

  it("draws a fresh nonce for each report when none is given", async () => {
    const analysis = analyzeDocument(sample("one-way"));
    const nonce = (html: string) => /'nonce-([^']+)'/.exec(html)![1];
    const [a, b] = [nonce(await renderReportHtml(analysis)), nonce(await renderReportHtml(analysis))];
    assert.notEqual(a, b);
    assert.ok(Buffer.from(a!, "base64").length >= 16, "at least 128 bits");
  });

  const SCRIPT = "<script>alert(1)</script>";
  const IMG = '"><img src=x onerror=alert(1)>';
  const JS = "javascript:alert(1)";
  const q = (s: string) => `"${s.replace(/\\/g, "\\\\").replace(/"/g, '\\"')}"`;
  // Every user text field of the language carries a probe: title, owner, date, free text, names, units,
  // levels, run ids and an exclusion reason.
  const PROBED = [
    `trial ${q(SCRIPT + IMG + JS)}`,
    `owner ${q(IMG)}`,
    `date ${q(JS)}`,
    `conjecture """\n${SCRIPT}\n${IMG}\n[x](${JS})\n"""`,
    `response ${q("y" + SCRIPT)} unit ${q(IMG)}`,
    `factor ${q("f" + IMG)} levels ${q(SCRIPT)}, ${q(JS)} unit ${q(SCRIPT)}`,
    `factor ${q("g" + SCRIPT)} levels ${q(IMG)}, plain`,
    "runs id " + q("f" + IMG) + " " + q("g" + SCRIPT) + " | " + q("y" + SCRIPT),
    ...[1.1, 2.3, 1.4, 2.9, 1.2, 2.2, 1.6, 3.1, 0.9, 2.5].map((v, i) => `  ${i === 0 ? q(SCRIPT) : "r" + i} ${q(i % 2 ? JS : SCRIPT)} ${i % 4 < 2 ? q(IMG) : "plain"} | ${v}${i === 3 ? ` excluded ${q(IMG + SCRIPT)}` : ""}`),
    `conclusion """\n${IMG}\n${SCRIPT}\n"""`,
  ].join("\n");

  it("escapes every user text in the HTML report (probes in all text fields)", async () => {
    const analysis = analyzeDocument(PROBED);
    assert.equal(analysis.file.problems.length, 0, JSON.stringify(analysis.file.problems));
    assert.ok(analysis.responses[0]!.anova.length > 0, "the probe file is analysed");
    for (const webview of [false, true]) {
      const html = await renderReportHtml(analysis, { webview });
      assert.doesNotMatch(html, /<script>alert/i);
      assert.doesNotMatch(html, /<img/i);
      assert.deepEqual(eventHandlerAttributes(html), [], "no event-handler attribute in any tag");
      assert.doesNotMatch(html, /(href|src|action|xlink:href)\s*=\s*["']?\s*javascript:/i);
      // The probes are shown, escaped, not dropped.
      assert.ok(html.includes("&lt;script&gt;alert(1)&lt;/script&gt;"), "escaped script probe present");
      assert.ok(html.includes("&quot;&gt;&lt;img src=x onerror=alert(1)&gt;"), "escaped img probe present");
      assert.equal((html.match(/<script\b/g) ?? []).length, webview ? 1 : 0);
    }
  });

  it("escapes every user text in the Markdown report", async () => {
    const md = await renderReportMarkdown(analyzeDocument(PROBED));
    assert.doesNotMatch(md, /<script/i);
    assert.doesNotMatch(md, /<img/i);
    assert.doesNotMatch(md, /\]\(\s*javascript:/i, "no Markdown link to javascript:");
    assert.doesNotMatch(md, /(href|src)\s*=\s*["']?\s*javascript:/i);
    assert.ok(md.includes("&lt;script&gt;alert\\(1\\)&lt;/script&gt;"), "escaped script probe present");
  });
});

describe("report: caution and structure", () => {
  for (const name of SAMPLES) {
    it(`samples/${name}.trial: the HTML and Markdown reports carry the caution, the conjecture and the conclusion`, async () => {
      const analysis = analyzeDocument(sample(name));
      const html = await renderReportHtml(analysis);
      const md = await renderReportMarkdown(analysis);
      assert.ok(html.includes(`<strong>Caution.</strong> ${CAUTION}`));
      assert.ok(md.includes(`> **Caution.** ${CAUTION.replace(/\./g, ".")}`));
      for (const heading of ["Conjecture", "Design", "Conclusion"]) {
        assert.ok(html.includes(`>${heading}</h2>`), `${heading} in HTML`);
        assert.ok(md.includes(`## ${heading}`), `${heading} in Markdown`);
      }
      assert.ok(html.includes(`<title>Trialbook — ${analysis.design.title}</title>`.replace(/&/g, "&amp;")));
    });
  }

  it("never prints NaN or Infinity for a file with no data yet", async () => {
    const text = 'trial "Invented: nothing measured"\nresponse y\nfactor a levels p, q\nruns id a | y\n  r1 p | ?\n  r2 q | ?\n';
    const html = await renderReportHtml(analyzeDocument(text));
    assert.doesNotMatch(html, /NaN|Infinity/);
    assert.ok(html.includes("No analysis yet"));
  });
});
