/**
 * Semantic tokens: what a name means, which the TextMate grammar cannot know. Factors are `type`, levels
 * `enumMember`, responses `property`, covariates `variable`, measured values `number` and run ids `string`;
 * declarations carry the `declaration` modifier and every cell of an excluded run `deprecated`.
 */
import type { Name, Span, TrialFile } from "../../../grammar/src/ast.js";
import { isPendingCell } from "../../../grammar/src/runs-table.js";
import { classifyName, columnKind, columnOfCell } from "../analysis/symbol-at.js";
import type { Range, SemanticTokens, SemanticTokensLegend } from "vscode-languageserver";
import { rangeToSpan } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** Token types, indexed by the numbers in the encoded data. */
export const TOKEN_TYPES = ["type", "enumMember", "property", "variable", "number", "string"] as const;
/** Token modifiers, as bits in the encoded data. */
export const TOKEN_MODIFIERS = ["declaration", "deprecated"] as const;

/** The legend announced in the server capabilities. */
export const SEMANTIC_TOKENS_LEGEND: SemanticTokensLegend = { tokenTypes: [...TOKEN_TYPES], tokenModifiers: [...TOKEN_MODIFIERS] };

type TokenType = (typeof TOKEN_TYPES)[number];
const TYPE_INDEX = new Map<TokenType, number>(TOKEN_TYPES.map((t, i) => [t, i]));
const DECLARATION = 1;
const DEPRECATED = 2;

/** A token before encoding, in offsets. */
export interface RawToken {
  readonly span: Span;
  readonly type: TokenType;
  readonly modifiers: number;
}

/** The encoded tokens of a document, or of the lines intersecting `range`. */
export function semanticTokens(doc: AnalyzedDocument, range?: Range): SemanticTokens {
  const limit = range ? rangeToSpan(doc.lineIndex, range) : undefined;
  const tokens = collectTokens(doc.file).filter((t) => !limit || (t.span.end >= limit.start && t.span.start <= limit.end));
  const data: number[] = [];
  let prevLine = 0;
  let prevChar = 0;
  for (const t of tokens) {
    const start = doc.lineIndex.positionAt(t.span.start);
    const end = doc.lineIndex.positionAt(t.span.end);
    if (end.line !== start.line || t.span.end <= t.span.start) continue; // tokens may not span lines
    const deltaLine = start.line - prevLine;
    data.push(deltaLine, deltaLine === 0 ? start.character - prevChar : start.character, end.character - start.character, TYPE_INDEX.get(t.type)!, t.modifiers);
    prevLine = start.line;
    prevChar = start.character;
  }
  return { data };
}

/** Every semantic token of a file, sorted by position. */
export function collectTokens(file: TrialFile): RawToken[] {
  const out: RawToken[] = [];
  const push = (span: Span, type: TokenType, modifiers = 0) => out.push({ span, type, modifiers });
  const typeOf = (kind: ReturnType<typeof classifyName>): TokenType | undefined =>
    kind === "factor" ? "type" : kind === "covariate" ? "variable" : kind === "response" ? "property" : undefined;
  const use = (name: Name | undefined) => {
    if (!name) return;
    const type = typeOf(classifyName(file, name.text));
    if (type) push(name.span, type);
  };

  for (const f of file.factors) {
    if (f.name) push(f.name.span, "type", DECLARATION);
    for (const l of f.levels) push(l.name.span, "enumMember", DECLARATION);
    if (f.control) push(f.control.span, "enumMember");
    use(f.within);
  }
  for (const c of file.covariates) if (c.name) push(c.name.span, "variable", DECLARATION);
  for (const r of file.responses) if (r.name) push(r.name.span, "property", DECLARATION);
  for (const s of file.plan?.settings ?? []) {
    if (s.kind === "model") for (const t of s.terms) t.names.forEach(use);
    if (s.kind === "pairwise") s.term?.names.forEach(use);
    if (s.kind === "fraction") [s.generated, ...(s.generator?.names ?? [])].forEach(use);
    if (s.kind === "detect" || s.kind === "sigma") use(s.response);
  }
  const table = file.runs;
  if (table) {
    table.columns.forEach((c) => use(c));
    const kinds = table.columns.map((_, i) => columnKind(file, table, i));
    const rows = table.rows;
    for (let r = 0; r < rows.count; r++) {
      const first = rows.cellOffset[r]!;
      const n = rows.cellOffset[r + 1]! - first;
      const modifiers = rows.excluded.has(r) ? DEPRECATED : 0;
      for (let k = 0; k < n; k++) {
        const kind = kinds[columnOfCell(table, r, k)];
        const cell = first + k;
        const span = { start: rows.cellStart[cell]!, end: rows.cellEnd[cell]! };
        if (kind === "factor") push(span, "enumMember", modifiers);
        else if (kind === "id") push(span, "string", modifiers);
        else if ((kind === "response" || kind === "covariate") && !isPendingCell(file.source, rows, cell)) push(span, "number", modifiers);
      }
    }
  }
  return out.sort((a, b) => a.span.start - b.span.start);
}
