/**
 * A piece of text as bytes, for the readers that walk large runs tables byte by byte (`runs-scanner.ts`,
 * `server/src/analysis/read-plain-runs.ts`): an element of a byte array is read several times faster
 * than a character of a string (`charCodeAt` checks the string's representation on every call).
 */

const encoder = new TextEncoder();

/**
 * Writes `source[from, to)` into `into` (which must hold `to - from` bytes) and returns true when every
 * character was ASCII: then byte `i` is the character at `from + i`. `encodeInto` writes one byte per
 * character exactly in that case; otherwise the bytes are UTF-8 and the caller reads the string instead.
 */
export function encodeAsciiChunk(source: string, from: number, to: number, into: Uint8Array): boolean {
  const done = encoder.encodeInto(source.substring(from, to), into);
  return done.read === to - from && done.written === to - from;
}
