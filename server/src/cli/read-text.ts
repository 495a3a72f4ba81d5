/**
 * Reads a text file into one flat string, giving exactly what `readFile(path, "utf8")` gives, faster.
 *
 * Why not `readFile(path, "utf8")` from `node:fs/promises`: on Node 20 it decodes the file in 512 KiB
 * chunks and joins them with `+`, so a large file comes back as a rope of chunk strings that the engine
 * copies into one flat string at the first character access (about 25 ms for a 22 MB file, paid inside
 * the parser). Reading the bytes whole and decoding them once gives a flat string straight away.
 *
 * When every byte is ASCII (the usual `.trial` file), the bytes are copied into the string as Latin-1:
 * for bytes below 0x80, Latin-1 and UTF-8 decode to the same characters, and the copy needs no decoder.
 * Otherwise the bytes are decoded as UTF-8 exactly as before (a byte-order mark is kept as U+FEFF, an
 * invalid byte becomes U+FFFD, as `Buffer.toString("utf8")` does).
 */
import { isAscii } from "node:buffer";
import { open } from "node:fs/promises";
import { prepareParsing } from "../../../grammar/src/parse.js";
import { Char } from "../../../grammar/src/char-codes.js";
import type { EngineOptions } from "../analysis/engine-options.js";
import { analyzeDocument } from "../analysis/analyze-document.js";
import type { AnalysisSettings } from "../analysis/build-design.js";
import type { DocumentAnalysis } from "../analysis/results.js";
import { HELPER_THREAD_FROM_BYTES, HelperThread, reportHelperThread } from "./helper-thread.js";
import type { CliIo } from "./io.js";

/** The text of a file's bytes: a Latin-1 copy when all are ASCII, else UTF-8 decoding (`Buffer.toString`). */
export function decodeText(bytes: Buffer, ascii = isAscii(bytes)): string {
  return bytes.toString(ascii ? "latin1" : "utf8");
}

/** Reads the file at `path` as text: the same string as `readFile(path, "utf8")`, flat. Rejects as it does. */
export async function readTextFile(path: string): Promise<string> {
  return decodeText(await readBytes(path));
}

/**
 * `readTextFile` of a `.trial` file that is about to be parsed: the lexer and parser (tens of ms of
 * grammar analysis, once per process) are built while the bytes are read.
 */
export async function readTrialFile(path: string): Promise<string> {
  return (await readTrialForAnalysis(path, undefined)).text;
}

/** A `.trial` file read for analysis: its text, and for a large file the thread that helps analyse it. */
export interface TrialText {
  readonly text: string;
  /** `close` it when done (`analyzeTrialText` does). */
  readonly helper?: HelperThread;
  /** What the engine is given: the helper thread's jobs (empty without one). */
  readonly engine: EngineOptions;
}

/**
 * `analyzeDocument` of a file read by `readTrialForAnalysis`, with its helper thread, which is closed
 * after (and reported on stderr with `TRIALBOOK_DEBUG_HELPER_THREAD=1`).
 */
export function analyzeTrialText(read: TrialText, overrides: AnalysisSettings, io: Pick<CliIo, "env" | "stderr">): DocumentAnalysis {
  try {
    return analyzeDocument(read.text, {}, overrides, read.engine);
  } finally {
    read.helper?.close();
    reportHelperThread(io.env, io.stderr, read.helper);
  }
}

/**
 * `readTrialFile`, and for a file of `HELPER_THREAD_FROM_BYTES` or more, with `workerScript`, its
 * bytes are read into shared memory and the helper thread (helper-thread.ts) is started on them
 * while they are read. The thread is kept only when every byte is ASCII, so that the text's offsets are
 * the bytes' offsets (`decodeText` then copies them as Latin-1).
 */
export async function readTrialForAnalysis(path: string, workerScript: string | undefined): Promise<TrialText> {
  let thread: HelperThread | undefined;
  let shared: SharedArrayBuffer | undefined;
  const allocate = (size: number): Buffer => {
    if (workerScript === undefined || size < HELPER_THREAD_FROM_BYTES) return Buffer.allocUnsafe(size);
    shared = new SharedArrayBuffer(size);
    thread = HelperThread.start(workerScript, shared);
    return Buffer.from(shared);
  };
  try {
    // The parser is built while the file's bytes are read on the thread pool.
    const bytes = await readBytes(path, allocate, prepareParsing);
    const ascii = isAscii(bytes);
    // The thread reads the shared bytes: only useful when they are the whole file and the text's characters.
    if (thread && !(ascii && bytes.buffer === shared && bytes.byteOffset === 0 && bytes.length === shared.byteLength)) {
      thread.close();
      thread = undefined;
    }
    // Asked for before the text is made, so that the thread's quick pass over the second half overlaps it.
    const middle = thread ? bytes.indexOf(Char.LF, bytes.length >> 1) : -1;
    const continuation = thread && middle >= 0 ? thread.continuation(middle, bytes.length) : undefined;
    const text = decodeText(bytes, ascii);
    if (!thread) return { text, engine: {} };
    const engine = { plainPartHelper: thread, sharedMemory: thread.sharedMemory, analysisHelper: thread, ...(continuation ? { quickPassContinuation: continuation } : {}) };
    return { text, helper: thread, engine };
  } catch (error) {
    (thread as HelperThread | undefined)?.close();
    throw error;
  }
}

/**
 * The file's bytes, as `readFile(path)` gives them. A regular file is read with one read request for its
 * whole size: `readFile` reads in 512 KiB pieces, one thread-pool round trip each (about 90 ms for a
 * 22 MB file here), and the caller's work meanwhile (building the parser) finished long before. Anything
 * else (empty, a pipe, a file that grew) is read on to its end as `readFile` would. `allocate` gives the
 * buffer for a regular file's size (shared memory for the helper thread). `meanwhile` runs once, after
 * the first read request is on its way (the caller's own work then overlaps the read: building the
 * parser took about as long as reading a 24 MB file, and ran before the read when called after the open).
 */
async function readBytes(path: string, allocate: (size: number) => Buffer = Buffer.allocUnsafe, meanwhile: () => void = () => undefined): Promise<Buffer> {
  let waiting = true;
  const whileReading = () => {
    if (waiting) {
      waiting = false;
      meanwhile();
    }
  };
  const handle = await open(path, "r");
  try {
    const { size } = await handle.stat();
    if (size === 0) {
      whileReading();
      return await handle.readFile();
    }
    const bytes = allocate(size);
    let filled = 0;
    while (filled < size) {
      const reading = handle.read(bytes, filled, size - filled, filled);
      whileReading();
      const { bytesRead } = await reading;
      if (bytesRead === 0) return bytes.subarray(0, filled);
      filled += bytesRead;
    }
    // The file may have grown since `stat`: the rest, to its end (usually one read that returns nothing).
    const parts = [bytes];
    for (let position = size; ; ) {
      const more = Buffer.allocUnsafe(64 * 1024);
      const { bytesRead } = await handle.read(more, 0, more.length, position);
      if (bytesRead === 0) break;
      parts.push(more.subarray(0, bytesRead));
      position += bytesRead;
    }
    return parts.length === 1 ? bytes : Buffer.concat(parts);
  } finally {
    await handle.close();
  }
}
