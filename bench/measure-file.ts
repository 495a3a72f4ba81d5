/**
 * Measures the engine stages on one `.trial` file in a fresh process, so that the peak memory (maxRSS) is
 * this file's alone. Prints one JSON line: milliseconds (wall and CPU) per stage and the peak RSS.
 *
 * Stages: parse (parseTrial), model build (buildDesign), analysis (analyzeParsed: model build, checks,
 * fits and every analysis extension), full check (parse + analysis + diagnostics located to lines, what
 * `trialbook check` computes). Each stage runs once after one warm-up on the same text (sizes of 100k runs
 * and more are measured cold: a warm-up there would double the peak memory).
 *
 * Run: node out/bench/measure-file.js FILE
 */
import { readFileSync } from "node:fs";
import { parseTrial } from "../grammar/src/parse.js";
import { analyzeParsed } from "../server/src/analysis/analyze-document.js";
import { buildDesign } from "../server/src/analysis/build-design.js";
import { locateDiagnostics } from "../server/src/cli/check-command.js";

/** Wall and CPU milliseconds of one call. */
function timed<T>(run: () => T): { value: T; wallMs: number; cpuMs: number } {
  const cpu = process.cpuUsage();
  const start = performance.now();
  const value = run();
  const wallMs = performance.now() - start;
  const used = process.cpuUsage(cpu);
  return { value, wallMs, cpuMs: (used.user + used.system) / 1000 };
}

const path = process.argv[2];
if (!path) {
  process.stderr.write("usage: node out/bench/measure-file.js FILE\n");
  process.exit(2);
}
const text = readFileSync(path, "utf8");
const warm = text.length < 2_000_000;
if (warm) locateDiagnostics(text, analyzeParsed(parseTrial(text)).diagnostics);

const parse = timed(() => parseTrial(text));
const build = timed(() => buildDesign(parse.value));
const analysis = timed(() => analyzeParsed(parse.value));
const check = timed(() => {
  const file = parseTrial(text);
  return locateDiagnostics(text, analyzeParsed(file).diagnostics).length;
});
const stage = (t: { wallMs: number; cpuMs: number }) => ({ wallMs: round(t.wallMs), cpuMs: round(t.cpuMs) });
process.stdout.write(
  JSON.stringify({
    runs: parse.value.runs?.rows.count ?? 0,
    bytes: Buffer.byteLength(text),
    warm,
    parse: stage(parse),
    build: stage(build),
    analysis: stage(analysis),
    check: stage(check),
    diagnostics: check.value,
    peakRssMb: round(process.resourceUsage().maxRSS / 1024),
  }) + "\n",
);

function round(v: number): number {
  return Math.round(v * 10) / 10;
}
