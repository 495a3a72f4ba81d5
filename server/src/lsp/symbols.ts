/**
 * The document outline: title, responses, factors (with their levels), covariates, the plan (with its
 * settings), the runs table (with its run count) and the text blocks, in file order.
 */
import type { Declaration, Span } from "../../../grammar/src/ast.js";
import { type DocumentSymbol, SymbolKind } from "vscode-languageserver";
import { spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** The outline of a document. */
export function documentSymbols(doc: AnalyzedDocument): DocumentSymbol[] {
  const { file } = doc;
  const range = (span: Span) => spanToRange(doc.lineIndex, span);
  const symbol = (name: string, kind: SymbolKind, span: Span, selection: Span, detail?: string, children?: DocumentSymbol[]): DocumentSymbol => ({
    name: name === "" ? "(unnamed)" : name,
    kind,
    range: range(span),
    selectionRange: range(selection.start >= span.start && selection.end <= span.end ? selection : span),
    ...(detail !== undefined ? { detail } : {}),
    ...(children && children.length > 0 ? { children } : {}),
  });
  const out: DocumentSymbol[] = [];
  if (file.header.title) out.push(symbol(file.header.title.text, SymbolKind.File, file.header.title.span, file.header.title.span, "trial"));
  for (const d of file.declarations) {
    const s = declarationSymbol(d, symbol);
    if (s) out.push(s);
  }
  return out.sort((a, b) => a.range.start.line - b.range.start.line || a.range.start.character - b.range.start.character);
}

type Make = (name: string, kind: SymbolKind, span: Span, selection: Span, detail?: string, children?: DocumentSymbol[]) => DocumentSymbol;

function declarationSymbol(d: Declaration, symbol: Make): DocumentSymbol | undefined {
  switch (d.kind) {
    case "response":
      return symbol(d.name?.text ?? "", SymbolKind.Property, d.span, d.name?.span ?? d.keywordSpan, `response${d.unit ? ` (${d.unit.text})` : ""}`);
    case "factor": {
      const levels = d.levels.map((l) => symbol(l.name.text, SymbolKind.EnumMember, l.name.span, l.name.span, "level"));
      return symbol(d.name?.text ?? "", SymbolKind.Class, d.span, d.name?.span ?? d.keywordSpan, `factor, ${d.levels.length} levels${d.role === "fixed" ? "" : `, ${d.role}`}`, levels);
    }
    case "covariate":
      return symbol(d.name?.text ?? "", SymbolKind.Variable, d.span, d.name?.span ?? d.keywordSpan, "covariate");
    case "plan": {
      const settings = d.settings.map((s) => symbol(s.kind, SymbolKind.Field, s.span, s.keywordSpan));
      return symbol("plan", SymbolKind.Namespace, d.span, d.keywordSpan, undefined, settings);
    }
    case "runs":
      return symbol("runs", SymbolKind.Array, d.span, d.keywordSpan, `${d.rows.count} run${d.rows.count === 1 ? "" : "s"}`);
    case "conjecture":
    case "conclusion":
      return symbol(d.kind, SymbolKind.String, d.span, d.keywordSpan);
  }
}
