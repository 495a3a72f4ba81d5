/**
 * Test helper: turns a `TrialFile` into plain JSON for golden files (typed arrays become arrays, the
 * excluded-row map becomes an object keyed by row index, the source text is left out).
 */
import type { TrialFile } from "../../grammar/src/index.js";

/** The golden-file form of a parsed file. */
export function astToJson(file: TrialFile): string {
  return (
    JSON.stringify(
      file,
      (key, value: unknown) => {
        if (key === "source") return undefined;
        if (ArrayBuffer.isView(value)) return Array.from(value as Int32Array);
        if (value instanceof Map) return Object.fromEntries(value);
        return value;
      },
      2,
    ) + "\n"
  );
}

/** The AST values with every span and the source removed: what must not change with CRLF, BOM or tabs. */
export function astValues(file: TrialFile): unknown {
  return JSON.parse(
    JSON.stringify(file, (key, value: unknown) => {
      if (key === "source" || key === "span" || key === "keywordSpan" || key === "roleSpan") return undefined;
      if (key === "rowStart" || key === "rowEnd" || key === "cellStart" || key === "cellEnd") return undefined;
      if (ArrayBuffer.isView(value)) return Array.from(value as Int32Array);
      if (value instanceof Map) return Object.fromEntries(value);
      return value;
    }),
  );
}
