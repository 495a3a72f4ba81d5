/**
 * Test helpers for the language-server handlers: cursor-marked snippets (`<|>` marks a position),
 * in-process documents, and applying LSP text edits to a text.
 */
import { LineIndex } from "../../grammar/src/line-index.js";
import type { Position, Range, TextEdit } from "vscode-languageserver";
import { type AnalyzedDocument, analyzeText } from "../../server/src/lsp/documents.js";

/** The URI the in-process documents use. */
export const TEST_URI = "file:///work/invented.trial";

/** The cursor marker in snippets. */
export const CURSOR = "<|>";

/** A snippet with its cursor markers removed: the text, the marked offsets and the analysed document. */
export interface MarkedDocument {
  readonly doc: AnalyzedDocument;
  readonly offsets: readonly number[];
  /** The position of the first marker. */
  readonly position: Position;
  /** The positions of all markers, in order. */
  readonly positions: readonly Position[];
}

/** Removes every `<|>` from `snippet`, analyses the text and returns the marked positions. */
export function marked(snippet: string): MarkedDocument {
  const offsets: number[] = [];
  let text = "";
  let rest = snippet;
  for (;;) {
    const k = rest.indexOf(CURSOR);
    if (k < 0) break;
    text += rest.slice(0, k);
    offsets.push(text.length);
    rest = rest.slice(k + CURSOR.length);
  }
  text += rest;
  const doc = analyzeText(TEST_URI, 1, text);
  const positions = offsets.map((o) => doc.lineIndex.positionAt(o));
  return { doc, offsets, position: positions[0] ?? { line: 0, character: 0 }, positions };
}

/** Analyses a text without markers. */
export function open(text: string): AnalyzedDocument {
  return analyzeText(TEST_URI, 1, text);
}

/** Applies LSP text edits (non-overlapping, any order) to `text`. */
export function applyEdits(text: string, edits: readonly TextEdit[]): string {
  const index = new LineIndex(text);
  const located = edits.map((e) => ({ start: index.offsetAt(e.range.start), end: index.offsetAt(e.range.end), text: e.newText }));
  located.sort((a, b) => b.start - a.start || b.end - a.end);
  let out = text;
  for (const e of located) out = out.slice(0, e.start) + e.text + out.slice(e.end);
  return out;
}

/** The text a range covers. */
export function textOf(doc: AnalyzedDocument, range: Range): string {
  return doc.text.slice(doc.lineIndex.offsetAt(range.start), doc.lineIndex.offsetAt(range.end));
}

/**
 * An invented coating-bath experiment: gloss (GU) vs. bath temperature and dwell time, two replicates,
 * values made up for these tests.
 */
export const COATING = `# Invented example: gloss of a coating bath; the values are made up for tests.
trial "Coating gloss vs. bath temperature"
response gloss unit GU maximize
factor temp levels cool, warm
factor dwell levels short, long
plan
  replicates 2
  seed 42
runs  id   temp  dwell | gloss
      r01  cool  short | 81.2
      r02  warm  long  | 88.9
      r03  cool  long  | 83.0
      r04  warm  short | 87.1
      r05  warm  long  | 90.2
      r06  cool  short | 80.4
      r07  cool  long  | 84.1
      r08  warm  short | 86.5
`;
