/**
 * The report as a list of neutral blocks: what to say, not how to mark it up. One builder
 * (report-blocks.ts) fills it, and two writers turn it into HTML or Markdown, so the editor's panel, the
 * HTML file and the Markdown file always say the same thing. All texts are plain, unescaped text: the
 * writers escape them.
 */
export type ReportBlock =
  | { readonly kind: "heading"; readonly level: 1 | 2 | 3; readonly text: string; readonly id?: string }
  | { readonly kind: "meta"; readonly items: readonly (readonly [label: string, value: string])[] }
  | { readonly kind: "paragraph"; readonly text: string }
  /** Preformatted-ish free text from the file: paragraphs separated by blank lines, line breaks kept. */
  | { readonly kind: "text"; readonly text: string }
  | { readonly kind: "list"; readonly items: readonly string[] }
  | { readonly kind: "table"; readonly header: readonly string[]; readonly rows: readonly (readonly string[])[]; readonly numeric: readonly boolean[]; readonly caption?: string }
  | { readonly kind: "plot"; readonly title: string; readonly caption: string; readonly svg: string }
  | { readonly kind: "note"; readonly text: string }
  | { readonly kind: "caution"; readonly text: string };
