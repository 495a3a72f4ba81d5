/**
 * Rename of a factor, covariate, response or level everywhere in the file: declarations, `within` and
 * `control`, plan settings, the runs header and (for levels) every cell of the factor's column. The new
 * name is quoted when it is not an identifier.
 */
import { classifyName, symbolAt, type SymbolKey } from "../analysis/symbol-at.js";
import { symbolOccurrences } from "../analysis/symbol-occurrences.js";
import { ErrorCodes, type Position, type Range, ResponseError, type TextEdit, type WorkspaceEdit } from "vscode-languageserver";
import { positionToOffset, spanToRange } from "./convert.js";
import type { AnalyzedDocument } from "./documents.js";
import { invalidNameReason, nameToSource } from "./name-text.js";

/** The range and current text of the renameable name at `position`, or null when there is none. */
export function prepareRename(doc: AnalyzedDocument, position: Position): { range: Range; placeholder: string } | null {
  const found = symbolAt(doc.file, positionToOffset(doc.lineIndex, position));
  if (!found || found.kind !== "symbol") return null;
  if (found.key.kind === "level" && !isDeclaredLevel(doc, found.key)) return null;
  return { range: spanToRange(doc.lineIndex, found.span), placeholder: found.key.name };
}

/** The edits renaming the name at `position` to `newName`, or an error saying why it cannot be done. */
export function rename(doc: AnalyzedDocument, position: Position, newName: string): WorkspaceEdit | ResponseError<void> | null {
  const { file } = doc;
  const found = symbolAt(file, positionToOffset(doc.lineIndex, position));
  if (!found || found.kind !== "symbol") return null;
  const invalid = invalidNameReason(newName);
  if (invalid) return new ResponseError(ErrorCodes.InvalidParams, invalid);
  const key = found.key;
  if (newName === key.name) return { changes: { [doc.uri]: [] } };
  if (key.kind === "level") {
    if (!isDeclaredLevel(doc, key)) return new ResponseError(ErrorCodes.InvalidParams, `'${key.name}' is not a declared level of '${key.factor}': declare it first.`);
    const clash = file.factors.some((f) => f.name?.text === key.factor && f.levels.some((l) => l.name.text === newName));
    if (clash) return new ResponseError(ErrorCodes.InvalidParams, `Factor '${key.factor}' already has a level '${newName}'.`);
  } else {
    const clash = classifyName(file, newName);
    if (clash) return new ResponseError(ErrorCodes.InvalidParams, `'${newName}' is already the name of a ${clash}.`);
    if (newName === "id" && file.runs?.columns[0]?.text === key.name) {
      return new ResponseError(ErrorCodes.InvalidParams, "'id' as the first runs column names the run-id column: choose another name.");
    }
  }
  const text = nameToSource(newName, key.kind === "level");
  const edits: TextEdit[] = symbolOccurrences(file, key).map((o) => ({ range: spanToRange(doc.lineIndex, o.span), newText: text }));
  return { changes: { [doc.uri]: edits } };
}

function isDeclaredLevel(doc: AnalyzedDocument, key: SymbolKey & { kind: "level" }): boolean {
  return doc.file.factors.some((f) => f.name?.text === key.factor && f.levels.some((l) => l.name.text === key.name));
}
