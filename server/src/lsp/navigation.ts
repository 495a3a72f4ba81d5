/**
 * Go to definition and find references for factors, covariates, responses and levels.
 */
import { symbolAt } from "../analysis/symbol-at.js";
import { symbolDefinition, symbolOccurrences } from "../analysis/symbol-occurrences.js";
import type { Location, Position } from "vscode-languageserver";
import { positionToOffset, spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";

/** The declaration of the name at `position`, or null. */
export function definition(doc: AnalyzedDocument, position: Position): Location | null {
  const found = symbolAt(doc.file, positionToOffset(doc.lineIndex, position));
  if (!found || found.kind !== "symbol") return null;
  const span = symbolDefinition(doc.file, found.key);
  return span ? { uri: doc.uri, range: spanToRange(doc.lineIndex, span) } : null;
}

/** Every occurrence of the name at `position`, the declaration included when asked. */
export function references(doc: AnalyzedDocument, position: Position, includeDeclaration: boolean): Location[] {
  const found = symbolAt(doc.file, positionToOffset(doc.lineIndex, position));
  if (!found || found.kind !== "symbol") return [];
  return symbolOccurrences(doc.file, found.key)
    .filter((o) => includeDeclaration || !o.declaration)
    .map((o) => ({ uri: doc.uri, range: spanToRange(doc.lineIndex, o.span) }));
}
