/**
 * Edit-to-publishDiagnostics latency of the bundled language server (dist/server.cjs over stdio), with
 * `trialbook.analysisDelay` 0, on invented files of 100, 1,000 and 10,000 runs. Each edit replaces one
 * response value with an incremental didChange; the time runs from sending it to receiving the
 * publishDiagnostics of that version. The file is opened after the server has logged the end of its
 * start-up warm-up. Prints a table and writes bench/results-lsp.json.
 *
 * Run: npx tsc -p . && node out/bench/lsp-latency.js   (from the repository root)
 */
import { writeFileSync } from "node:fs";
import { cpus, loadavg } from "node:os";
import { resolve } from "node:path";
import { parseTrial } from "../grammar/src/parse.js";
import { analyzeParsed } from "../server/src/analysis/analyze-document.js";
import { WARM_UP_LOG_PREFIX } from "../server/src/lsp/warm-up.js";
import { ensureServerBundle, ProtocolClient } from "../test/lsp/protocol-client.js";

const SIZES = (process.env.LSP_BENCH_SIZES ?? "100,1000,10000").split(",").map(Number);
const EDITS = 200;
const WARMUP = 20;

/**
 * An invented molding-line experiment: part weight and flash vs. melt temperature (4 levels) and press
 * (2 levels, a block), values made up by a fixed formula. Returns the text and the line of each row.
 */
function inventedFile(runs: number): { text: string; firstRowLine: number } {
  const temps = ["t210", "t220", "t230", "t240"];
  const presses = ["p1", "p2"];
  const head = [
    "# Invented benchmark file: values come from a fixed formula, not from measurement.",
    'trial "Part weight vs. melt temperature (benchmark)"',
    "response weight unit g",
    'response flash unit "mm"',
    "factor temp levels t210, t220, t230, t240",
    "factor press levels p1, p2 as block",
    "plan",
    `  replicates ${Math.max(1, Math.floor(runs / 8))}`,
    "  seed 4187",
    "runs  id       temp  press | weight   flash",
  ];
  const lines = [...head];
  for (let i = 0; i < runs; i++) {
    const weight = (50 + (i % 4) * 0.3 + ((i * 7919) % 97) / 100).toFixed(2);
    const flash = (0.2 + ((i * 104729) % 53) / 1000).toFixed(3);
    lines.push(`      r${String(i + 1).padStart(6, "0")}  ${temps[i % 4]}  ${presses[(i >> 2) % 2]}    | ${weight}  ${flash}`);
  }
  return { text: lines.join("\n") + "\n", firstRowLine: head.length };
}

function percentile(sorted: readonly number[], q: number): number {
  // Nearest-rank percentile (the smallest value with at least q of the sample at or below it).
  const rank = Math.max(1, Math.ceil(q * sorted.length));
  return sorted[rank - 1]!;
}

interface Row {
  runs: number;
  bytes: number;
  edits: number;
  p50: number;
  p95: number;
  max: number;
  openMs: number;
  /** The same work in this process, without the protocol: median ms of parseTrial and of analyzeParsed. */
  engineParseMs: number;
  engineAnalyzeMs: number;
  /** The server's start-up warm-up before the file was opened: analyses run and milliseconds spent. */
  warmUpAnalyses: number;
  warmUpMs: number;
}

/** Median in-process time of parsing and of analysing `text` (where the server's time goes). */
function engineTimes(text: string): { parse: number; analyze: number } {
  const parse: number[] = [];
  const analyze: number[] = [];
  for (let k = 0; k < 25; k++) {
    const a = performance.now();
    const file = parseTrial(text);
    const b = performance.now();
    analyzeParsed(file);
    const c = performance.now();
    if (k >= 5) {
      parse.push(b - a);
      analyze.push(c - b);
    }
  }
  parse.sort((x, y) => x - y);
  analyze.sort((x, y) => x - y);
  return { parse: percentile(parse, 0.5), analyze: percentile(analyze, 0.5) };
}

async function measure(runs: number): Promise<Row> {
  const { text, firstRowLine } = inventedFile(runs);
  const uri = `file:///bench/invented-${runs}.trial`;
  // LSP_BENCH_NODE_ARGS="--cpu-prof --cpu-prof-dir=prof" profiles the server (the numbers then include the profiler).
  const nodeArgs = (process.env.LSP_BENCH_NODE_ARGS ?? "").split(" ").filter((a) => a !== "");
  const client = await ProtocolClient.start({ analysisDelay: 0 }, nodeArgs);
  try {
    // Steady-state typing latency: the file is opened once the server's start-up warm-up has finished
    // (server/src/lsp/warm-up.ts; in an editor the user reads before typing). Its cost is reported.
    const warmUpLine = await client.waitForLog((m) => m.startsWith(WARM_UP_LOG_PREFIX));
    const warmUp = /(\d+) analyses, (\d+) ms/.exec(warmUpLine);
    const t0 = performance.now();
    const opened = client.waitForDiagnostics(uri, (p) => p.version === 1);
    await client.notify("textDocument/didOpen", { textDocument: { uri, languageId: "trial", version: 1, text } });
    await opened;
    const openMs = performance.now() - t0;
    const samples: number[] = [];
    // The weight cell starts after the '| ' of each row; rows are laid out identically.
    const rowLine = (i: number) => firstRowLine + i;
    const sampleRow = text.split("\n")[firstRowLine]!;
    const weightChar = sampleRow.indexOf("| ") + 2;
    let version = 1;
    for (let k = 0; k < WARMUP + EDITS; k++) {
      const row = (k * 7_919) % runs;
      const value = (49 + ((k * 31) % 300) / 100).toFixed(2);
      const v = ++version;
      const published = client.waitForDiagnostics(uri, (p) => p.version === v);
      const start = performance.now();
      await client.notify("textDocument/didChange", {
        textDocument: { uri, version: v },
        contentChanges: [{ range: { start: { line: rowLine(row), character: weightChar }, end: { line: rowLine(row), character: weightChar + 5 } }, text: value }],
      });
      await published;
      if (k >= WARMUP) samples.push(performance.now() - start);
    }
    samples.sort((a, b) => a - b);
    const engine = engineTimes(text);
    return {
      runs,
      bytes: text.length,
      edits: samples.length,
      p50: percentile(samples, 0.5),
      p95: percentile(samples, 0.95),
      max: samples[samples.length - 1]!,
      openMs,
      engineParseMs: engine.parse,
      engineAnalyzeMs: engine.analyze,
      warmUpAnalyses: Number(warmUp?.[1] ?? 0),
      warmUpMs: Number(warmUp?.[2] ?? 0),
    };
  } finally {
    await client.stop();
  }
}

async function main(): Promise<void> {
  await ensureServerBundle();
  const rows: Row[] = [];
  for (const runs of SIZES) rows.push(await measure(runs));
  const targets: Record<number, number> = { 1_000: 15, 10_000: 50 };
  const f = (x: number) => x.toFixed(1).padStart(8);
  console.log("edit -> publishDiagnostics latency, dist/server.cjs --stdio, analysisDelay 0");
  console.log(`${"runs".padStart(7)} ${"bytes".padStart(9)} ${"edits".padStart(6)} ${"p50 ms".padStart(8)} ${"p95 ms".padStart(8)} ${"max ms".padStart(8)} ${"open ms".padStart(8)} ${"parse".padStart(8)} ${"analyze".padStart(8)}  target p95`);
  for (const r of rows) {
    const t = targets[r.runs];
    console.log(`${String(r.runs).padStart(7)} ${String(r.bytes).padStart(9)} ${String(r.edits).padStart(6)} ${f(r.p50)} ${f(r.p95)} ${f(r.max)} ${f(r.openMs)} ${f(r.engineParseMs)} ${f(r.engineAnalyzeMs)}  ${t === undefined ? "-" : `<= ${t} ms ${r.p95 <= t ? "met" : "NOT met"}`}`);
  }
  const out = resolve("bench/results-lsp.json");
  writeFileSync(out, JSON.stringify({ node: process.version, loadAverage: loadavg(), cpus: cpus().length, date: new Date().toISOString(), analysisDelay: 0, warmupEdits: WARMUP, results: rows, targetsP95Ms: targets }, null, 2) + "\n");
  console.log("parse / analyze: median ms of parseTrial and analyzeParsed on the same text in this process (no protocol).");
  console.log(`measured after the server's start-up warm-up (${rows.map((r) => `${r.warmUpAnalyses} analyses in ${r.warmUpMs} ms`).join("; ")}), then ${WARMUP} warm-up edits.`);
  console.log(`load average while measuring: ${loadavg().map((x) => x.toFixed(1)).join(", ")} on ${cpus().length} CPUs`);
  console.log(`wrote ${out}`);
}

main().catch((error) => {
  console.error(error);
  process.exitCode = 1;
});
