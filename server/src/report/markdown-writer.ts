import type { ReportBlock } from "./blocks.js";
import { escapeMarkdown, escapeMarkdownCell } from "./escape.js";
import { uniqueSvgIds } from "./html-writer.js";

/**
 * Writes the blocks as CommonMark with GitHub-style tables. Plots are inline `<svg>` HTML blocks (drawn
 * by Vega, which escapes its texts). Every user string is escaped by `escapeMarkdown`.
 */
export function writeMarkdown(blocks: readonly ReportBlock[]): string {
  return blocks.map((b, k) => blockMarkdown(b, k)).join("\n\n") + "\n";
}

function blockMarkdown(block: ReportBlock, k: number): string {
  switch (block.kind) {
    case "heading":
      return `${"#".repeat(block.level)} ${escapeMarkdown(block.text)}`;
    case "meta":
      return block.items.map(([label, value]) => `- **${escapeMarkdown(label)}:** ${escapeMarkdown(value)}`).join("\n");
    case "paragraph":
      return escapeMarkdown(block.text);
    case "text":
      // Paragraphs stay paragraphs; a line break inside one becomes a hard break ("\" at the line end).
      return block.text
        .split(/\r?\n\s*\r?\n/)
        .map((p) => p.trim().split(/\r?\n/).map((line) => escapeMarkdown(line.trim())).join("\\\n"))
        .join("\n\n");
    case "list":
      return block.items.map((item) => `- ${escapeMarkdown(item)}`).join("\n");
    case "table": {
      const cell = (text: string) => escapeMarkdownCell(text) || " ";
      const lines = [`| ${block.header.map(cell).join(" | ")} |`, `| ${block.numeric.map((n) => (n ? "---:" : ":---")).join(" | ")} |`, ...block.rows.map((row) => `| ${row.map(cell).join(" | ")} |`)];
      return (block.caption ? `**${escapeMarkdown(block.caption)}**\n\n` : "") + lines.join("\n");
    }
    case "plot":
      // An HTML block must not contain blank lines, or Markdown ends it early; Vega's SVG has none.
      // Wrapped in a <div> on the same line, the plot is a CommonMark HTML block (type 6): text inside the
      // SVG (level names) is never read as Markdown, so `[x](javascript:...)` cannot become a link.
      return `### ${escapeMarkdown(block.title)}\n\n<div>${uniqueSvgIds(block.svg, `p${k}-`).replace(/\n\s*\n/g, "\n")}</div>\n\n*${escapeMarkdown(block.caption)}*`;
    case "note":
      return `*${escapeMarkdown(block.text)}*`;
    case "caution":
      return `> **Caution.** ${escapeMarkdown(block.text)}`;
  }
}
