/** The chunk loader of bytes that hold a text's characters one per byte (an ASCII file as read). */
import { isAscii } from "node:buffer";
import type { AsciiChunkLoader } from "../analysis/read-plain-runs.js";

/** Copies `bytes[from, to)` into the reader's window; false when one of them is beyond ASCII. */
export function byteChunks(bytes: Uint8Array): AsciiChunkLoader {
  return (from, to, into) => {
    const piece = bytes.subarray(from, to);
    into.set(piece);
    return isAscii(piece);
  };
}
