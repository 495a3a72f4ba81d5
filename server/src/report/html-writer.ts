import type { ReportBlock } from "./blocks.js";
import { contentSecurityPolicy } from "./csp.js";
import { escapeAttribute, escapeHtml } from "./escape.js";

/** How the HTML is used: a standalone file, or the editor's panel (which runs one small script). */
export interface HtmlWriterOptions {
  readonly title: string;
  /** The nonce of the style sheet and script; a fresh one per rendering (see csp.ts). */
  readonly nonce: string;
  /** True in the editor's panel: adds the script that keeps the scroll position across updates. */
  readonly webview: boolean;
}

/**
 * The report's style: VS Code's theme variables where the page is shown in the editor, the reader's
 * light or dark preference elsewhere. Plot text uses `currentColor` (plot-theme.ts), so plots follow.
 */
const STYLE = `
:root { color-scheme: light dark; --fg: var(--vscode-editor-foreground, #1f2328); --bg: var(--vscode-editor-background, #ffffff);
  --muted: var(--vscode-descriptionForeground, #59636e); --border: var(--vscode-panel-border, #d1d9e0); --accent: #D55E00;
  --note-bg: var(--vscode-textBlockQuote-background, #f6f8fa); }
@media (prefers-color-scheme: dark) { :root { --fg: var(--vscode-editor-foreground, #e6edf3); --bg: var(--vscode-editor-background, #0d1117);
  --muted: var(--vscode-descriptionForeground, #9198a1); --border: var(--vscode-panel-border, #3d444d); --note-bg: var(--vscode-textBlockQuote-background, #151b23); } }
body { margin: 0 auto; max-width: 1100px; padding: 16px 24px 48px; color: var(--fg); background: var(--bg);
  font-family: var(--vscode-font-family, system-ui, -apple-system, "Segoe UI", sans-serif); font-size: 14px; line-height: 1.5; }
h1 { font-size: 1.6em; margin: 0.4em 0 0.2em; } h2 { font-size: 1.25em; margin-top: 1.8em; border-bottom: 1px solid var(--border); padding-bottom: 0.2em; }
h3 { font-size: 1.05em; margin: 1.4em 0 0.3em; }
dl.meta { display: grid; grid-template-columns: max-content auto; gap: 0.15em 1em; margin: 0.6em 0; } dl.meta dt { color: var(--muted); } dl.meta dd { margin: 0; }
table { border-collapse: collapse; margin: 0.6em 0 1em; font-variant-numeric: tabular-nums; }
caption { text-align: left; font-weight: 600; padding-bottom: 0.3em; }
th, td { padding: 0.25em 0.8em; border-bottom: 1px solid var(--border); text-align: left; vertical-align: top; } th { font-weight: 600; }
td.num, th.num { text-align: right; }
.text p { margin: 0.4em 0; white-space: pre-line; }
.note { color: var(--muted); font-style: italic; }
.caution { border-left: 4px solid var(--accent); background: var(--note-bg); padding: 0.6em 0.9em; margin: 1em 0; }
figure { margin: 1.2em 0 1.6em; } figure svg { max-width: 100%; height: auto; display: block; } figcaption { color: var(--muted); font-size: 0.92em; max-width: 60em; }
`;

/** Keeps the panel's scroll position when its content is replaced as the user types. */
const SCRIPT = `(function () { const vscode = acquireVsCodeApi(); const s = vscode.getState();
if (s && typeof s.y === "number") window.scrollTo(0, s.y);
window.addEventListener("scroll", function () { vscode.setState({ y: window.scrollY }); }, { passive: true }); })();`;

/** Writes the blocks as one self-contained HTML document with a strict Content-Security-Policy. */
export function writeHtml(blocks: readonly ReportBlock[], options: HtmlWriterOptions): string {
  const nonce = escapeHtml(options.nonce);
  const body = blocks.map((b, k) => blockHtml(b, k)).join("\n");
  const script = options.webview ? `\n<script nonce="${nonce}">${SCRIPT}</script>` : "";
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${escapeAttribute(contentSecurityPolicy(options.nonce, { script: options.webview }))}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="Trialbook">
<title>${escapeHtml(options.title)}</title>
<style nonce="${nonce}">${STYLE}</style>
</head>
<body>
${body}${script}
</body>
</html>
`;
}

function blockHtml(block: ReportBlock, k: number): string {
  switch (block.kind) {
    case "heading":
      return `<h${block.level}${block.id ? ` id="${escapeHtml(block.id)}"` : ""}>${escapeHtml(block.text)}</h${block.level}>`;
    case "meta":
      return `<dl class="meta">${block.items.map(([label, value]) => `<dt>${escapeHtml(label)}</dt><dd>${escapeHtml(value)}</dd>`).join("")}</dl>`;
    case "paragraph":
      return `<p>${escapeHtml(block.text)}</p>`;
    case "text":
      return `<div class="text">${block.text.split(/\r?\n\s*\r?\n/).map((p) => `<p>${escapeHtml(p.trim())}</p>`).join("")}</div>`;
    case "list":
      return `<ul>${block.items.map((item) => `<li>${escapeHtml(item)}</li>`).join("")}</ul>`;
    case "table": {
      const cls = (j: number) => (block.numeric[j] ? ` class="num"` : "");
      const head = `<tr>${block.header.map((h, j) => `<th scope="col"${cls(j)}>${escapeHtml(h)}</th>`).join("")}</tr>`;
      const rows = block.rows.map((row) => `<tr>${row.map((cell, j) => `<td${cls(j)}>${escapeHtml(cell)}</td>`).join("")}</tr>`).join("");
      return `<table>${block.caption ? `<caption>${escapeHtml(block.caption)}</caption>` : ""}<thead>${head}</thead><tbody>${rows}</tbody></table>`;
    }
    case "plot":
      // The SVG comes from Vega's renderer, which escapes every text and attribute it writes; ids are made
      // unique per plot so that clip paths of different plots on one page cannot collide.
      return `<figure><h3>${escapeHtml(block.title)}</h3>${uniqueSvgIds(block.svg, `p${k}-`)}<figcaption>${escapeHtml(block.caption)}</figcaption></figure>`;
    case "note":
      return `<p class="note">${escapeHtml(block.text)}</p>`;
    case "caution":
      return `<p class="caution" role="note"><strong>Caution.</strong> ${escapeHtml(block.text)}</p>`;
  }
}

/** Prefixes every `id` of an SVG and every reference to it (`url(#id)`, `href="#id"`). */
export function uniqueSvgIds(svg: string, prefix: string): string {
  return svg
    .replace(/\bid="([^"]+)"/g, (_, id: string) => `id="${prefix}${id}"`)
    .replace(/url\(#([^)]+)\)/g, (_, id: string) => `url(#${prefix}${id})`)
    .replace(/href="#([^"]+)"/g, (_, id: string) => `href="#${prefix}${id}"`);
}
