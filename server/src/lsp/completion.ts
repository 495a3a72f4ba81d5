/**
 * Completion: keywords by context (top level, plan settings, declaration options), factor and covariate
 * names in model terms and the runs header, response names after `detect` and `|`, level names by column
 * in run rows, and snippets for a new trial file and for each declaration.
 */
import type { Declaration, TrialFile } from "../../../grammar/src/ast.js";
import { PLAN_SETTING_KEYWORDS, TOP_LEVEL_KEYWORDS } from "../../../grammar/src/tokens.js";
import { columnKind } from "../analysis/symbol-at.js";
import { type CompletionItem, CompletionItemKind, InsertTextFormat, type Position } from "vscode-languageserver";
import { positionToOffset } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";
import { nameToSource } from "./name-text.js";

/** What the client can insert. */
export interface CompletionCapabilities {
  readonly snippets: boolean;
}

/** Plan setting keywords, in the order the language reference lists them. */
export const PLAN_KEYWORDS = PLAN_SETTING_KEYWORDS;

const DECLARATION_OPTIONS: Record<string, readonly string[]> = {
  factor: ["levels", "unit", "as", "control", "within"],
  response: ["unit", "maximize", "minimize", "target", "spec"],
  covariate: ["unit"],
};

/** Snippet bodies: a new file, and one per top-level declaration. */
export const SNIPPETS: Record<string, { label: string; body: string; plain: string }> = {
  trial: {
    label: "new trial file",
    body: [
      'trial "${1:title}"',
      'owner "${2:team}"',
      "date ${3:2026-01-01}",
      "",
      'conjecture """',
      "${4:What we believe, and what would change our mind.}",
      '"""',
      "",
      "response ${5:yield} unit ${6:g} ${7|maximize,minimize|}",
      "factor ${8:temperature} levels ${9:low}, ${10:high}",
      "",
      "plan",
      "  replicates ${11:3}",
      "  seed ${12:1234}",
      "",
      "runs  id  ${8:temperature} | ${5:yield}",
      "$0",
    ].join("\n"),
    plain: 'trial "title"',
  },
  factor: { label: "factor declaration", body: "factor ${1:name} levels ${2:low}, ${3:high}$0", plain: "factor name levels low, high" },
  response: { label: "response declaration", body: "response ${1:name} unit ${2:unit} ${3|maximize,minimize|}$0", plain: "response name unit unit maximize" },
  covariate: { label: "covariate declaration", body: "covariate ${1:name} unit ${2:unit}$0", plain: "covariate name unit unit" },
  plan: { label: "plan block", body: "plan\n  replicates ${1:3}\n  alpha ${2:0.05}\n  seed ${3:1234}$0", plain: "plan\n  replicates 3" },
  conjecture: { label: "conjecture block", body: 'conjecture """\n$0\n"""', plain: 'conjecture """\n"""' },
  conclusion: { label: "conclusion block", body: 'conclusion """\n$0\n"""', plain: 'conclusion """\n"""' },
};

/** Completion items at `position`. */
export function completion(doc: AnalyzedDocument, position: Position, caps: CompletionCapabilities): CompletionItem[] {
  const { file } = doc;
  const offset = positionToOffset(doc.lineIndex, position);
  const lineStart = offset - position.character;
  const prefix = doc.text.slice(lineStart, offset);
  if (/^\s*#/.test(prefix) || inTextBlock(file, offset)) return [];
  const words = splitWords(prefix);
  const typing = !/\s$/.test(prefix) && words.length > 0;
  const before = typing ? words.slice(0, -1) : words; // complete words before the one being typed
  const container = containingDeclaration(file, lineStart);

  // A line starting at column 0: a top-level keyword or snippet.
  if (before.length === 0 && !/^\s/.test(prefix)) return topLevel(doc, caps);

  if (container?.kind === "runs") {
    const keywordLine = doc.lineIndex.positionAt(container.keywordSpan.start).line;
    if (position.line === keywordLine) return headerItems(file, before);
    if (position.line > keywordLine) return rowItems(file, before);
  }
  if (container?.kind === "plan" && /^\s/.test(prefix)) return planItems(file, before);
  const first = before[0];
  if (first && DECLARATION_OPTIONS[first]) return declarationItems(file, first, before, offset);
  return [];
}

function topLevel(doc: AnalyzedDocument, caps: CompletionCapabilities): CompletionItem[] {
  const items: CompletionItem[] = TOP_LEVEL_KEYWORDS.map((k) => keyword(k));
  if (caps.snippets) {
    const empty = doc.text.trim() === "";
    for (const [key, s] of Object.entries(SNIPPETS)) {
      if (key === "trial" && !empty) continue;
      items.push({ label: key === "trial" ? "trial file" : key, kind: CompletionItemKind.Snippet, detail: s.label, insertText: s.body, insertTextFormat: InsertTextFormat.Snippet, sortText: `~${key}` });
    }
  }
  return items;
}

function planItems(file: TrialFile, before: readonly string[]): CompletionItem[] {
  if (before.length === 0) return PLAN_KEYWORDS.map((k) => keyword(k));
  const key = before[0];
  if (key === "model" || key === "pairwise" || key === "fraction") {
    const last = before[before.length - 1]!;
    const items = variableNames(file);
    // After a name, `x` joins an interaction; after `x` or `,` another name follows.
    if (before.length > 1 && last !== "x" && !last.endsWith(",") && last !== "=") items.push(keyword("x"));
    return items;
  }
  if ((key === "detect" || key === "sigma") && before.length === 1) return names(file.responses, CompletionItemKind.Property, "response");
  if (key === "sums-of-squares" && before.length === 1) return ["I", "II", "III"].map((t) => ({ label: t, kind: CompletionItemKind.EnumMember }));
  return [];
}

function declarationItems(file: TrialFile, kind: string, before: readonly string[], offset: number): CompletionItem[] {
  if (before.length < 2) return [];
  const last = before[before.length - 1]!;
  if (kind === "factor") {
    if (last === "as") return ["block", "random", "subject"].map((k) => keyword(k));
    const decl = file.factors.find((f) => f.span.start <= offset && offset <= f.span.end + 1) ?? file.factors.find((f) => f.name?.text === before[1]);
    if (last === "control") return (decl?.levels ?? []).map((l) => ({ label: l.name.text, kind: CompletionItemKind.EnumMember, insertText: nameToSource(l.name.text, true) }));
    if (last === "within") return names(file.factors.filter((f) => f.name?.text !== before[1]), CompletionItemKind.Class, "factor");
    if (last === "levels" || last.endsWith(",")) return [];
  }
  if (last === "unit" || last === "target" || last === "spec") return [];
  const used = new Set(before);
  return DECLARATION_OPTIONS[kind]!.filter((k) => !used.has(k)).map((k) => keyword(k));
}

function headerItems(file: TrialFile, before: readonly string[]): CompletionItem[] {
  const used = new Set(before.slice(1));
  const afterPipe = before.includes("|") || before.some((w) => w.endsWith("|"));
  if (afterPipe) return names(file.responses.filter((r) => !used.has(r.name?.text ?? "")), CompletionItemKind.Property, "response");
  const items: CompletionItem[] = [];
  if (before.length === 1) items.push(keyword("id"));
  items.push(...names([...file.factors, ...file.covariates].filter((d) => !used.has(d.name?.text ?? "")), CompletionItemKind.Class, "factor or covariate"));
  if (before.length > 1) items.push({ label: "|", kind: CompletionItemKind.Operator, detail: "responses follow" });
  return items;
}

function rowItems(file: TrialFile, before: readonly string[]): CompletionItem[] {
  const table = file.runs!;
  const pipeAt = before.indexOf("|");
  const column = pipeAt >= 0 ? table.responseStart + (before.length - pipeAt - 1) : before.length;
  if (before.includes("excluded")) return [];
  if (column >= table.columns.length && column > 0) return [keyword("excluded")];
  const kind = columnKind(file, table, column);
  const name = table.columns[column]?.text;
  if (kind === "factor") {
    const decl = file.factors.find((f) => f.name?.text === name);
    return (decl?.levels ?? []).map((l) => ({ label: l.name.text, kind: CompletionItemKind.EnumMember, detail: `level of ${name}`, insertText: nameToSource(l.name.text, true) }));
  }
  if (kind === "response") return [{ label: "?", kind: CompletionItemKind.Value, detail: `${name} not measured yet` }];
  return [];
}

function variableNames(file: TrialFile): CompletionItem[] {
  return [...names(file.factors, CompletionItemKind.Class, "factor"), ...names(file.covariates, CompletionItemKind.Variable, "covariate")];
}

function names(decls: readonly { name?: { text: string } }[], kind: CompletionItemKind, detail: string): CompletionItem[] {
  const seen = new Set<string>();
  const out: CompletionItem[] = [];
  for (const d of decls) {
    if (!d.name || seen.has(d.name.text)) continue;
    seen.add(d.name.text);
    out.push({ label: d.name.text, kind, detail, insertText: nameToSource(d.name.text, false) });
  }
  return out;
}

function keyword(label: string): CompletionItem {
  return { label, kind: CompletionItemKind.Keyword };
}

/** The last declaration that starts at or before `offset` (the one a line at `offset` continues). */
function containingDeclaration(file: TrialFile, offset: number): Declaration | undefined {
  let found: Declaration | undefined;
  for (const d of file.declarations) if (d.keywordSpan.start <= offset) found = d;
    else break;
  return found;
}

function inTextBlock(file: TrialFile, offset: number): boolean {
  return file.declarations.some((d) => (d.kind === "conjecture" || d.kind === "conclusion") && d.body !== undefined && d.body.span.start < offset && offset < d.body.span.end);
}

/** Splits a line prefix into words: quoted strings stay whole, `|` and `,` end a word and `|` is one. */
function splitWords(prefix: string): string[] {
  const out: string[] = [];
  const re = /"(?:[^"\\]|\\.)*"?|\||[^\s|]+/g;
  for (const m of prefix.matchAll(re)) out.push(m[0]);
  return out;
}
