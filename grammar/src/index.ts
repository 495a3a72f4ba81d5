/**
 * The public API of the grammar package: the AST types, `parseTrial`, the runs-table accessors, the
 * line index and the keyword lists.
 */
export type * from "./ast.js";
export { CellFlag } from "./ast.js";
export { parseTrial } from "./parse.js";
export { cellText, rowCellCount, rowCellIndex, findRowAt, isPendingCell } from "./runs-table.js";
export { LineIndex, type LinePosition } from "./line-index.js";
export { TOP_LEVEL_KEYWORDS, CONTEXTUAL_KEYWORDS, ALL_KEYWORDS, isTopLevelKeyword } from "./tokens.js";
