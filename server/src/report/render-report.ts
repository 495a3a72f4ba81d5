import type { DocumentAnalysis } from "../analysis/results.js";
import { createNonce } from "./csp.js";
import { writeHtml } from "./html-writer.js";
import { writeMarkdown } from "./markdown-writer.js";
import { planPlots } from "./plot-specs.js";
import { renderSvg } from "./render-svg.js";
import { type RenderedPlot, reportBlocks, reportTitle } from "./report-blocks.js";

/** Options of `renderReportHtml`. */
export interface HtmlReportOptions {
  /** Nonce for the style sheet (and script); a fresh random one when omitted. */
  readonly nonce?: string;
  /** True for the editor's panel (adds its scroll-keeping script to the CSP and the page). */
  readonly webview?: boolean;
}

/**
 * Renders every plot of every response to SVG. A plot that fails to render becomes a note with the
 * reason, so one bad plot never loses the report. Never throws.
 */
export async function renderPlots(analysis: DocumentAnalysis): Promise<Map<string, RenderedPlot[]>> {
  const out = new Map<string, RenderedPlot[]>();
  for (const response of analysis.responses) {
    if (response.anova.length === 0) continue;
    const rendered: RenderedPlot[] = [];
    for (const plan of planPlots(analysis.design, response)) {
      if (!("spec" in plan)) {
        rendered.push({ title: plan.title, note: plan.note });
        continue;
      }
      const svg = await renderSvg(plan.spec);
      rendered.push(svg.ok ? { title: plan.title, caption: plan.caption, svg: svg.svg } : { title: plan.title, note: `This plot could not be drawn (${svg.reason}).` });
    }
    out.set(response.name, rendered);
  }
  return out;
}

/**
 * The analysis report as one self-contained HTML document: inline style and SVG plots, no external
 * resources, a Content-Security-Policy with a nonce and without `unsafe-eval`, every user string escaped.
 * Shared by `trialbook report` and the editor's report panel. Never throws for a result of
 * `analyzeDocument`.
 */
export async function renderReportHtml(analysis: DocumentAnalysis, options: HtmlReportOptions = {}): Promise<string> {
  const plots = await renderPlots(analysis);
  return writeHtml(reportBlocks(analysis, plots), { title: `Trialbook — ${reportTitle(analysis)}`, nonce: options.nonce ?? createNonce(), webview: options.webview ?? false });
}

/** The same report as CommonMark with tables and inline SVG plots. Never throws. */
export async function renderReportMarkdown(analysis: DocumentAnalysis): Promise<string> {
  return writeMarkdown(reportBlocks(analysis, await renderPlots(analysis)));
}
