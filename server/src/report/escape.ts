/**
 * Escaping for the report's two output languages. Every string that comes from a `.trial` file (titles,
 * names, levels, free text, exclusion reasons, diagnostic messages that quote them) goes through one of
 * these before it is written, so no file can inject markup, script or links into a report or the webview.
 */

const HTML_ENTITIES: Readonly<Record<string, string>> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

/** Escapes text for HTML element content and for double- or single-quoted attribute values. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => HTML_ENTITIES[c]!);
}

/**
 * Escapes text for inline Markdown (CommonMark): HTML-significant characters become entities, and the
 * ASCII punctuation that can start emphasis, a link, an image, code, a heading or a table cell is
 * backslash-escaped, so user text is shown literally and cannot form a link (`[x](javascript:...)`) or
 * raw HTML. A list or quote marker at the very start is escaped too; line breaks become spaces.
 */
export function escapeMarkdown(text: string): string {
  return escapeMarkdownCell(text).replace(/^(\s*)([-+]|\d+[.)])/, (_, space: string, marker: string) => space + marker.slice(0, -1) + "\\" + marker.slice(-1));
}

/** As `escapeMarkdown`, for a table cell, where a leading `-` or `1.` cannot start a list. */
export function escapeMarkdownCell(text: string): string {
  return text
    .replace(/\r?\n/g, " ")
    .replace(/[\\`*_{}[\]()#|~!]/g, (c) => "\\" + c)
    .replace(/[&<>"']/g, (c) => HTML_ENTITIES[c]!);
}

/** Escapes a double-quoted attribute value; single quotes stay (a CSP value needs them as written). */
export function escapeAttribute(text: string): string {
  return text.replace(/[&<>"]/g, (c) => HTML_ENTITIES[c]!);
}
