/**
 * fast-check generators for the hardening tests: random valid `.trial` documents (with the cells they
 * were built from, so a test can compare what the parser reads with what was written), the seed texts
 * the mutations start from, and random mutations of a text (byte flips, deleted or duplicated lines,
 * truncation, extreme numbers, unicode, tabs, CRLF, BOM, 10,000-character lines).
 */
import { readdirSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import fc from "fast-check";
import { ALL_KEYWORDS } from "../../grammar/src/tokens.js";
import { trialName } from "../support/trial-writer.js";
import { COATING } from "../lsp/helpers.js";

/** The sum of the default (CI) case counts of every property in test/hardening (fuzz 10,000, nothing-lost 920). */
export const CI_TOTAL_CASES = 10_920;

/**
 * How many cases a property runs: `ciRuns` in CI, or its share of `FUZZ_RUNS` when that environment
 * variable asks for a long run (`npm run fuzz`). `FUZZ_SEED` replays a reported seed.
 */
export function fuzzParameters<T>(ciRuns: number): fc.Parameters<T> {
  const total = Number(process.env.FUZZ_RUNS);
  const numRuns = Number.isFinite(total) && total > 0 ? Math.max(1, Math.round((total * ciRuns) / CI_TOTAL_CASES)) : ciRuns;
  const seed = Number(process.env.FUZZ_SEED);
  return { numRuns, ...(Number.isInteger(seed) ? { seed } : {}) };
}

/** Cases run per property in this process, printed by the suites so the report can quote real counts. */
export const CASES_RUN = new Map<string, number>();

/** Counts one case of `property`. */
export function countCase(property: string): void {
  CASES_RUN.set(property, (CASES_RUN.get(property) ?? 0) + 1);
}

/** The committed `.trial` texts every mutation starts from: the samples, the test fixtures and COATING. */
export function seedTexts(): { name: string; text: string }[] {
  const out: { name: string; text: string }[] = [{ name: "COATING", text: COATING }];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const path = join(dir, entry.name);
      if (entry.isDirectory()) walk(path);
      else if (entry.name.endsWith(".trial")) out.push({ name: path, text: readFileSync(path, "utf8") });
    }
  };
  walk(resolve("samples"));
  for (const dir of ["test/grammar/fixtures", "test/cli/golden", "test/cli/fixtures", "test/import/fixtures"]) walk(resolve(dir));
  return out;
}

// ---------------------------------------------------------------------------------------------------
// Valid documents.

const KEYWORDS = new Set<string>([...ALL_KEYWORDS, "id"]);

/** Identifier-like names (never a keyword, never `id`). */
const identifier = fc
  .tuple(fc.constantFrom(..."abcdefghijklmnopqrstuvwyzABCDEFGHIJKLMNOPQRSTUVWYZ_"), fc.stringMatching(/^[a-z0-9_-]{0,7}$/))
  .map(([a, b]) => a + b)
  .filter((s) => !KEYWORDS.has(s));

/** Names that must be quoted: spaces, commas, quotes, backslashes, unicode (astral too). */
const quotedName = fc.oneof(
  fc.constantFrom("Lot 7, east", "température", "名前", 'say "hi"', "back\\slash", "x", "plan", "🧪 bath", "a|b", "# not a comment", "?"),
  fc.string({ minLength: 1, maxLength: 8, unit: "grapheme" }).filter((s) => !/[\u0000-\u001f\u007f-\u009f\u2028\u2029\uFEFF]/.test(s) && s.trim() === s && s.length > 0),
);

/** Any name; duplicates are removed by the callers. */
const anyName = fc.oneof({ weight: 4, arbitrary: identifier }, { weight: 1, arbitrary: quotedName });

/** A decimal text as a user writes it: sign, digits, maybe a fraction and an exponent. */
export const decimalText = fc
  .tuple(fc.boolean(), fc.integer({ min: 0, max: 99_999 }), fc.option(fc.stringMatching(/^[0-9]{1,4}$/), { nil: undefined }), fc.option(fc.integer({ min: -4, max: 4 }), { nil: undefined }))
  .map(([neg, int, frac, exp]) => `${neg ? "-" : ""}${int}${frac !== undefined ? "." + frac : ""}${exp !== undefined && exp !== 0 ? "e" + exp : ""}`);

/** One generated factor. */
export interface GeneratedFactor {
  readonly name: string;
  readonly levels: readonly string[];
  readonly numeric: boolean;
  readonly block: boolean;
}

/** A generated valid document and what it was built from. */
export interface GeneratedDocument {
  readonly text: string;
  readonly factors: readonly GeneratedFactor[];
  readonly covariates: readonly string[];
  readonly responses: readonly string[];
  /** Every run in file order: id, factor levels (names), covariate texts, response texts (`?` pending). */
  readonly runs: readonly { readonly id: string; readonly cells: readonly string[]; readonly excluded?: string }[];
}

const levelsOf = (numeric: boolean) =>
  numeric
    ? fc.uniqueArray(fc.integer({ min: -500, max: 500 }), { minLength: 2, maxLength: 4 }).map((xs) => xs.map(String))
    : fc.uniqueArray(anyName, { minLength: 2, maxLength: 4 });

const factorArb = fc.record({ numeric: fc.boolean(), block: fc.constantFrom(false, false, false, true) }).chain(({ numeric, block }) =>
  levelsOf(numeric).map((levels) => ({ levels, numeric, block })),
);

const spacing = fc.constantFrom(" ", "  ", "   ", "\t", " \t");

/**
 * Random valid documents: 1–3 factors (identifier, quoted or numeric levels, maybe a block), 0–1
 * covariates, 1–2 responses with options, an optional plan, and a full factorial times 1–3 replicates in
 * random order, with pending cells, excluded runs, comments and random spacing; some rows dropped.
 */
export const validDocument: fc.Arbitrary<GeneratedDocument> = fc
  .record({
    names: fc.uniqueArray(anyName, { minLength: 6, maxLength: 6, comparator: (a, b) => a.toLowerCase() === b.toLowerCase() }),
    factors: fc.array(factorArb, { minLength: 1, maxLength: 3 }),
    covariate: fc.boolean(),
    responseCount: fc.integer({ min: 1, max: 2 }),
    replicates: fc.integer({ min: 1, max: 3 }),
    plan: fc.record({
      replicates: fc.boolean(),
      alpha: fc.option(fc.constantFrom("0.05", "0.01", "0.1"), { nil: undefined }),
      seed: fc.option(fc.integer({ min: 1, max: 99_999 }), { nil: undefined }),
      ss: fc.option(fc.constantFrom("I", "II", "III"), { nil: undefined }),
      interaction: fc.boolean(),
      detect: fc.boolean(),
    }),
    options: fc
      .tuple(fc.constantFrom("", "unit MPa", 'unit "%"', 'unit "°C"'), fc.constantFrom("", "maximize", "minimize", "target 5"), fc.constantFrom("", "spec >= 10", "spec <= 2.5", "spec 1 to 9"))
      .chain((parts) => fc.shuffledSubarray(parts.filter((p) => p !== ""))),
    title: fc.string({ maxLength: 30, unit: "grapheme" }),
    seed: fc.integer(),
    idStyle: fc.constantFrom("r", "run-", "none"),
    sep: spacing,
  })
  .chain((g) => {
    const factorNames = g.names.slice(0, g.factors.length);
    const covariates = g.covariate ? [g.names[3]!] : [];
    const responses = g.names.slice(4, 4 + g.responseCount);
    const factors: GeneratedFactor[] = g.factors.map((f, i) => ({ name: factorNames[i]!, ...f }));
    // Full factorial of the level indices.
    let cells: number[][] = [[]];
    for (const f of factors) cells = cells.flatMap((c) => f.levels.map((_, k) => [...c, k]));
    const planned = cells.flatMap((c) => Array.from({ length: g.replicates }, () => c));
    const rowArb = fc.record({
      values: fc.array(fc.oneof({ weight: 8, arbitrary: decimalText }, { weight: 1, arbitrary: fc.constant("?") }), { minLength: responses.length, maxLength: responses.length }),
      covariate: decimalText,
      excluded: fc.option(fc.constantFrom("fixture slipped", "oven door open", 'said "stop"', "é 🧪"), { freq: 10, nil: undefined }),
      comment: fc.option(fc.constantFrom("# checked", "# 名前", "#"), { freq: 10, nil: undefined }),
      keep: fc.constantFrom(true, true, true, true, true, true, true, false),
    });
    return fc.tuple(fc.constant({ g, factors, covariates, responses }), fc.shuffledSubarray(planned, { minLength: planned.length, maxLength: planned.length }), fc.array(rowArb, { minLength: planned.length, maxLength: planned.length }));
  })
  .map(([{ g, factors, covariates, responses }, order, rows]) => {
    const lines: string[] = ["# Invented document generated by the hardening fuzzer.", `trial "${g.title.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029\uFEFF]/g, "").replace(/[\\"]/g, "\\$&")}"`];
    responses.forEach((r, i) => lines.push(`response ${trialName(r)}${i === 0 && g.options.length > 0 ? " " + g.options.join(" ") : ""}`));
    for (const f of factors) lines.push(`factor ${trialName(f.name)} levels ${f.levels.map((l) => trialName(l, f.numeric)).join(", ")}${f.block ? " as block" : ""}`);
    for (const c of covariates) lines.push(`covariate ${trialName(c)}`);
    const plan: string[] = [];
    if (g.plan.replicates) plan.push(`replicates ${g.replicates}`);
    if (g.plan.alpha) plan.push(`alpha ${g.plan.alpha}`);
    if (g.plan.seed !== undefined) plan.push(`seed ${g.plan.seed}`);
    if (g.plan.ss) plan.push(`sums-of-squares ${g.plan.ss}`);
    const fixed = factors.filter((f) => !f.block);
    if (g.plan.interaction && fixed.length >= 2) {
      const mains = factors.map((f) => trialName(f.name));
      plan.push(`model ${[...mains, ...covariates.map((c) => trialName(c)), `${trialName(fixed[0]!.name)} x ${trialName(fixed[1]!.name)}`].join(", ")}`);
      plan.push(`pairwise ${trialName(fixed[0]!.name)} x ${trialName(fixed[1]!.name)}`);
    }
    if (g.plan.detect) plan.push(`detect ${trialName(responses[0]!)} 1.5`);
    if (plan.length > 0) lines.push("plan", ...plan.map((p) => "  " + p));
    const withId = g.idStyle !== "none";
    const header = [...(withId ? ["id"] : []), ...factors.map((f) => trialName(f.name)), ...covariates.map((c) => trialName(c))];
    lines.push(`runs${g.sep}${header.join(g.sep)}${g.sep}|${g.sep}${responses.map((r) => trialName(r)).join(g.sep)}`);
    const runs: { id: string; cells: string[]; excluded?: string }[] = [];
    order.forEach((cell, i) => {
      const row = rows[i]!;
      if (!row.keep) return;
      const id = withId ? `${g.idStyle}${String(i + 1).padStart(2, "0")}` : String(runs.length + 1);
      const levelCells = cell.map((k, f) => factors[f]!.levels[k]!);
      const covariateCells = covariates.map(() => row.covariate);
      const cellsOut = [...levelCells, ...covariateCells, ...row.values];
      const source = [
        ...(withId ? [id] : []),
        ...levelCells.map((l, f) => trialName(l, factors[f]!.numeric)),
        ...covariateCells,
        "|",
        ...row.values,
        ...(row.excluded !== undefined ? [`excluded ${JSON.stringify(row.excluded)}`] : []),
        ...(row.comment !== undefined ? [row.comment] : []),
      ];
      lines.push("  " + source.join(g.sep));
      runs.push({ id, cells: cellsOut, ...(row.excluded !== undefined ? { excluded: row.excluded } : {}) });
    });
    lines.push("", 'conclusion """', "Invented.", '"""');
    return { text: lines.join("\n") + "\n", factors, covariates, responses, runs };
  });

// ---------------------------------------------------------------------------------------------------
// Mutations.

/** Values no double holds exactly, or at all: each must give a diagnostic or a finite result. */
export const EXTREME_NUMBERS = [
  "1e308",
  "-1e308",
  "1.7976931348623157e308",
  "1.8e308",
  "1e400",
  "-1e400",
  "1e-308",
  "1e-400",
  "4.9e-324",
  "2.5e-324",
  "-0",
  "-0.0",
  "0e99999",
  "1234567890123456789012345678901234567890",
  "0.1234567890123456789012345678901234567890",
  "-9999999999999999999999999999999999999999.5",
  "1e99999999999",
  "1e-99999999999",
  "9".repeat(400),
  "0." + "0".repeat(400) + "1",
] as const;

const POISON = ['"', "|", "#", "\n", "\r", "\t", "?", " ", "-", ".", ",", "=", "\\", "x", "e", "0", "9", "é", "🧪", "\u0000", "\uFEFF", "\u2028", "\uD800", "\uDFFF", '"""', "excluded", "runs", "plan", "factor"];

/** One mutation; positions are fractions of the text (or line count) so they fit any text. */
export type Mutation =
  | { readonly kind: "flip"; readonly at: number; readonly bit: number }
  | { readonly kind: "poison"; readonly at: number; readonly text: string }
  | { readonly kind: "insert"; readonly at: number; readonly text: string }
  | { readonly kind: "delete-line"; readonly line: number }
  | { readonly kind: "duplicate-line"; readonly line: number; readonly times: number }
  | { readonly kind: "swap-lines"; readonly a: number; readonly b: number }
  | { readonly kind: "truncate"; readonly at: number }
  | { readonly kind: "number"; readonly which: number; readonly value: string }
  | { readonly kind: "tabs" }
  | { readonly kind: "crlf"; readonly lone: boolean }
  | { readonly kind: "bom" }
  | { readonly kind: "long-line"; readonly line: number; readonly pattern: string };

const fraction = fc.double({ min: 0, max: 1, noNaN: true });

/** Random mutations, weighted so every kind turns up often. */
export const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant("flip" as const), at: fraction, bit: fc.integer({ min: 0, max: 15 }) }),
  fc.record({ kind: fc.constant("poison" as const), at: fraction, text: fc.constantFrom(...POISON) }),
  fc.record({ kind: fc.constant("insert" as const), at: fraction, text: fc.oneof(fc.fullUnicodeString({ maxLength: 6 }), fc.constantFrom(...ALL_KEYWORDS).map((k) => ` ${k} `)) }),
  fc.record({ kind: fc.constant("delete-line" as const), line: fraction }),
  fc.record({ kind: fc.constant("duplicate-line" as const), line: fraction, times: fc.integer({ min: 1, max: 3 }) }),
  fc.record({ kind: fc.constant("swap-lines" as const), a: fraction, b: fraction }),
  fc.record({ kind: fc.constant("truncate" as const), at: fraction }),
  fc.record({ kind: fc.constant("number" as const), which: fraction, value: fc.constantFrom(...EXTREME_NUMBERS) }),
  fc.record({ kind: fc.constant("tabs" as const) }),
  fc.record({ kind: fc.constant("crlf" as const), lone: fc.boolean() }),
  fc.record({ kind: fc.constant("bom" as const) }),
  fc.record({ kind: fc.constant("long-line" as const), line: fraction, pattern: fc.constantFrom("a", "1 ", "x ", '"', "é", "🧪", "| ", "? ", "#", "\t", "-") }),
);

const NUMBER = /-?\d+(\.\d+)?(e[+-]?\d+)?/gi;

/** Applies one mutation to a text. */
export function applyMutation(text: string, m: Mutation): string {
  const pos = (f: number) => Math.min(text.length, Math.floor(f * (text.length + 1)));
  const lines = () => text.split("\n");
  const lineAt = (ls: string[], f: number) => Math.min(ls.length - 1, Math.floor(f * ls.length));
  switch (m.kind) {
    case "flip": {
      const i = Math.min(Math.max(0, text.length - 1), pos(m.at));
      if (text.length === 0) return text;
      return text.slice(0, i) + String.fromCharCode(text.charCodeAt(i) ^ (1 << m.bit)) + text.slice(i + 1);
    }
    case "poison": {
      const i = pos(m.at);
      return text.slice(0, i) + m.text + text.slice(i + 1);
    }
    case "insert": {
      const i = pos(m.at);
      return text.slice(0, i) + m.text + text.slice(i);
    }
    case "delete-line": {
      const ls = lines();
      ls.splice(lineAt(ls, m.line), 1);
      return ls.join("\n");
    }
    case "duplicate-line": {
      const ls = lines();
      const k = lineAt(ls, m.line);
      ls.splice(k, 0, ...Array.from({ length: m.times }, () => ls[k]!));
      return ls.join("\n");
    }
    case "swap-lines": {
      const ls = lines();
      const a = lineAt(ls, m.a);
      const b = lineAt(ls, m.b);
      [ls[a], ls[b]] = [ls[b]!, ls[a]!];
      return ls.join("\n");
    }
    case "truncate":
      return text.slice(0, pos(m.at));
    case "number": {
      const found = [...text.matchAll(NUMBER)];
      if (found.length === 0) return text + " " + m.value;
      const hit = found[Math.min(found.length - 1, Math.floor(m.which * found.length))]!;
      return text.slice(0, hit.index) + m.value + text.slice(hit.index! + hit[0].length);
    }
    case "tabs":
      return text.replace(/ {2}/g, "\t");
    case "crlf":
      return text.replace(/\r?\n/g, m.lone ? "\r" : "\r\n");
    case "bom":
      return "\uFEFF" + text;
    case "long-line": {
      const ls = lines();
      const line = m.pattern.repeat(Math.ceil(10_000 / m.pattern.length)).slice(0, 10_000);
      const k = lineAt(ls, m.line);
      // Half the time a new line, half the time appended to a line (a 10k-character run row).
      if (m.line < 0.5) ls.splice(k, 0, line);
      else ls[k] = ls[k] + " " + line;
      return ls.join("\n");
    }
  }
}

/** A seed text with 1–4 mutations applied. */
export function mutatedDocument(seeds: readonly { name: string; text: string }[]): fc.Arbitrary<{ seed: string; original: string; text: string; mutations: Mutation[] }> {
  return fc.record({ k: fc.integer({ min: 0, max: seeds.length - 1 }), mutations: fc.array(mutation, { minLength: 1, maxLength: 4 }) }).map(({ k, mutations }) => {
    const original = seeds[k]!.text;
    return { seed: seeds[k]!.name, original, text: mutations.reduce(applyMutation, original), mutations };
  });
}

/**
 * A fragment of a seed text (1–25 consecutive lines, as while a file is being written or pasted) with
 * 0–3 mutations: small enough that thousands of cases run in seconds.
 */
export function fragmentDocument(seeds: readonly { name: string; text: string }[]): fc.Arbitrary<{ seed: string; text: string; mutations: Mutation[] }> {
  return fc
    .record({ k: fc.integer({ min: 0, max: seeds.length - 1 }), from: fraction, lines: fc.integer({ min: 1, max: 25 }), mutations: fc.array(mutation, { maxLength: 3 }) })
    .map(({ k, from, lines, mutations }) => {
      const all = seeds[k]!.text.split("\n");
      const first = Math.min(all.length - 1, Math.floor(from * all.length));
      const fragment = all.slice(first, first + lines).join("\n");
      return { seed: `${seeds[k]!.name} lines ${first + 1}-${first + lines}`, text: mutations.reduce(applyMutation, fragment), mutations };
    });
}

