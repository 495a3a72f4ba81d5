/**
 * The CLI's file reader gives the very string Node's own `readFile(path, "utf8")` gives (the reference
 * named in each check): on ASCII text, on UTF-8 with a byte-order mark and characters outside ASCII, on
 * bytes that are not valid UTF-8, on an empty file, and on files larger than the chunk size of Node's
 * promise-based reader.
 */
import assert from "node:assert/strict";
import fs from "node:fs";
import { readFile } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import fc from "fast-check";
import { fileURLToPath } from "node:url";
import { HELPER_THREAD_FROM_BYTES } from "../../server/src/cli/helper-thread.js";
import { decodeText, readTextFile, readTrialForAnalysis } from "../../server/src/cli/read-text.js";


describe("readTextFile", () => {
  let dir: string;
  before(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-read-text-"));
  });
  after(() => {
    fs.rmSync(dir, { recursive: true, force: true });
  });

  /** Writes `bytes` to a file and checks the reader against `readFile(path, "utf8")`. */
  async function agrees(name: string, bytes: Uint8Array): Promise<string> {
    const file = path.join(dir, name);
    fs.writeFileSync(file, bytes);
    const reference = await readFile(file, "utf8");
    const text = await readTextFile(file);
    assert.equal(text, reference);
    return text;
  }

  it("reads an ASCII file as Node's UTF-8 reader does", async () => {
    const source = 'trial "Invented adhesive cure"\nruns id a | y\r\n  r1 a1 | 1.5\t# note\n';
    const text = await agrees("ascii.trial", Buffer.from(source, "utf8"));
    assert.equal(text, source);
  });

  it("keeps a byte-order mark and decodes characters outside ASCII", async () => {
    const source = '\uFEFFtrial "Invented coating bath: 25 \u00B0C, \u00E9tuve, \u65E5\u672C, \u{1F9EA}"\nruns id a\n  r1 \u00E9\n';
    const text = await agrees("utf8-bom.trial", Buffer.from(source, "utf8"));
    assert.equal(text, source);
    assert.equal(text.charCodeAt(0), 0xfeff);
  });

  it("replaces invalid UTF-8 bytes as Node's reader does", async () => {
    // A lone continuation byte, a truncated two-byte sequence, a byte that never occurs in UTF-8, and a
    // Latin-1 'é' written as one byte: each must become U+FFFD, not the Latin-1 character.
    const bytes = Buffer.from([0x61, 0x80, 0x62, 0xc3, 0x63, 0xff, 0x64, 0xe9, 0x0a]);
    const text = await agrees("invalid.trial", bytes);
    assert.equal(text, "a\uFFFDb\uFFFDc\uFFFDd\uFFFD\n");
  });

  it("reads an empty file as the empty string", async () => {
    assert.equal(await agrees("empty.trial", new Uint8Array(0)), "");
  });

  it("reads files larger than the reader's chunks, ASCII and not", async () => {
    // 3 MB: larger than the 512 KiB chunks of Node's promise-based reader and than the size at which
    // Node keeps a Latin-1 string outside the engine's heap.
    const line = "  r123456 a4 b2 | 21.74\n";
    const ascii = line.repeat(Math.ceil(3e6 / line.length));
    await agrees("large-ascii.trial", Buffer.from(ascii, "utf8"));
    // The one non-ASCII character is at the very end: the ASCII test must read every byte.
    const mixed = ascii + "# \u00E9\n";
    await agrees("large-mixed.trial", Buffer.from(mixed, "utf8"));
  });

  it("rejects a missing file as readFile does", async () => {
    const missing = path.join(dir, "missing.trial");
    await assert.rejects(readTextFile(missing), { code: "ENOENT" });
  });

  it("rejects a directory and reads a device with no size as readFile does", async () => {
    await assert.rejects(readFile(dir, "utf8"), { code: "EISDIR" });
    await assert.rejects(readTextFile(dir), { code: "EISDIR" });
    assert.equal(await readTextFile("/dev/null"), await readFile("/dev/null", "utf8"));
  });
});

describe("decodeText", () => {
  it("decodeText gives Buffer.toString('utf8') on random bytes", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 300 }), (raw) => {
        const bytes = Buffer.from(raw);
        assert.equal(decodeText(bytes), bytes.toString("utf8"));
      }),
      { numRuns: 300, seed: 20261202 },
    );
  });
});

describe("readTrialForAnalysis", () => {
  let dir: string;
  before(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "trialbook-read-trial-"));
  });
  after(() => {
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it("starts the helper thread only for a large all-ASCII file with the worker's script, and reads the same text", async () => {
    const script = fileURLToPath(new URL("../../server/src/cli/helper-worker.js", import.meta.url));
    const row = "  r1 a1 | 1.5\n";
    const large = "runs id a | y\n" + row.repeat(Math.ceil(HELPER_THREAD_FROM_BYTES / row.length));
    const cases = [
      { name: "large.trial", text: large, thread: true },
      { name: "large-not-ascii.trial", text: "# \u00b5m\n" + large, thread: false },
      { name: "small.trial", text: large.slice(0, 1000), thread: false },
    ];
    for (const { name, text, thread } of cases) {
      const file = path.join(dir, name);
      fs.writeFileSync(file, text, "utf8");
      const reference = await readFile(file, "utf8");
      const read = await readTrialForAnalysis(file, script);
      try {
        assert.equal(read.text, reference, name);
        assert.equal(read.helper !== undefined, thread, name);
      } finally {
        read.helper?.close();
      }
      const alone = await readTrialForAnalysis(file, undefined);
      assert.equal(alone.text, reference);
      assert.equal(alone.helper, undefined, "no script, no thread");
    }
    // A missing script: no thread, the same text.
    const missing = await readTrialForAnalysis(path.join(dir, "large.trial"), path.join(dir, "no-such-worker.cjs"));
    assert.equal(missing.helper, undefined);
    assert.equal(missing.text.length, large.length);
  });
});
