/**
 * Engine warm-up at server start. V8 optimises a function only after it has run many times, and the
 * engine's code keeps being re-optimised for the first few hundred analyses (new object shapes, loops
 * compiled on stack replacement), with the compiler threads busy meanwhile. Measured on a 1,000-run file
 * (bench/lsp-latency.ts, 2026-12-02): with 80 warm-up analyses the edits that followed took p50/p95
 * 5.5-6.3/12-16 ms; after about two seconds of warm-up on two document sizes, 4.9/9.2-12.7 ms, and the
 * server's own share of the p95 halved (10.5 -> 5 ms). So the server analyses two invented documents in
 * turn for a fixed budget of its own time while the editor is starting (the user reads before typing).
 * Each analysis runs in its own turn of the event loop; while the user is editing (an analysis of a real
 * document ran or was scheduled in the last `QUIET_MS`), the warm-up waits, so an edit is never queued
 * behind it for long. It stops early when the server shuts down. Nothing it computes is kept or published.
 */
import { LineIndex } from "../../../grammar/src/line-index.js";
import { parseTrial } from "../../../grammar/src/parse.js";
import { analyzeParsed } from "../analysis/analyze-document.js";
import { toLspDiagnostics } from "./convert.js";

/** Milliseconds of analysis the warm-up spends at most (time spent waiting for the user is not counted). */
export const WARM_UP_BUDGET_MS = 2_000;
/** The most analyses the warm-up runs, whatever the time (a fast machine stops here). */
export const WARM_UP_MAX_ANALYSES = 1_500;
/** The warm-up waits while a real document was analysed or changed within this many milliseconds. */
export const QUIET_MS = 150;
/** How the server log line that reports a finished warm-up begins. */
export const WARM_UP_LOG_PREFIX = "engine warm-up finished:";

/**
 * An invented document (made up by a fixed formula, not measured): a molding-line trial with a fixed
 * factor, a block, two responses, a few pending and excluded runs and a missing replicate, so that the
 * parser, the model builder, the fit, every model check and the diagnostics all run.
 */
export function warmUpDocument(runs = 160): string {
  const temps = ["t210", "t220", "t230", "t240"];
  const lines = [
    "# Invented warm-up document: values come from a fixed formula, not from measurement.",
    'trial "Warm-up: part weight vs. melt temperature"',
    "response weight unit g",
    "response flash unit mm",
    `factor temp levels ${temps.join(", ")}`,
    "factor press levels p1, p2 as block",
    "plan",
    `  replicates ${runs / 8}`,
    "  seed 4187",
    "runs id temp press | weight flash",
  ];
  for (let i = 0; i < runs - 1; i++) {
    const weight = i % 37 === 5 ? "?" : (50 + (i % 4) * 0.3 + ((i * 7919) % 97) / 100).toFixed(2);
    const flash = (0.2 + ((i * 104729) % 53) / 1000).toFixed(3);
    const mark = i % 53 === 7 ? ' excluded "warm-up example"' : "";
    lines.push(`  r${i + 1} ${temps[i % 4]} p${((i >> 2) % 2) + 1} | ${weight} ${flash}${mark}`);
  }
  return lines.join("\n") + "\n";
}

/** What a finished warm-up did. */
export interface WarmUpSummary {
  readonly analyses: number;
  /** Milliseconds spent analysing (not waiting). */
  readonly ms: number;
}

export interface WarmUpOptions {
  readonly budgetMs?: number;
  readonly maxAnalyses?: number;
  /** True while the user is working on real documents: the warm-up then waits. */
  readonly busy?: () => boolean;
}

/**
 * Analyses the invented document at two sizes (160 and 800 runs) in turn, one per event-loop turn, until the budget or the count is reached; `cancel` stops it.
 */
export function warmUpEngine(options: WarmUpOptions = {}): { cancel(): void; readonly done: Promise<WarmUpSummary> } {
  const budgetMs = options.budgetMs ?? WARM_UP_BUDGET_MS;
  const maxAnalyses = options.maxAnalyses ?? WARM_UP_MAX_ANALYSES;
  const busy = options.busy ?? (() => false);
  // Two sizes: the small one reaches every diagnostic path, the larger one trains the per-run loops.
  const texts = [warmUpDocument(160), warmUpDocument(800)];
  let cancelled = false;
  let finish: (summary: WarmUpSummary) => void = () => undefined;
  const done = new Promise<WarmUpSummary>((resolve) => (finish = resolve));
  let ran = 0;
  let spent = 0;
  const step = () => {
    if (cancelled || ran >= maxAnalyses || spent >= budgetMs) {
      finish({ analyses: ran, ms: Math.round(spent) });
      return;
    }
    if (busy()) {
      setTimeout(step, QUIET_MS);
      return;
    }
    const start = performance.now();
    try {
      const text = texts[ran % texts.length]!;
      const analysis = analyzeParsed(parseTrial(text));
      toLspDiagnostics(analysis.diagnostics, new LineIndex(text), "trialbook:warm-up");
    } catch {
      // A failure here would show up in the real analysis of the user's file; the warm-up just stops.
      cancelled = true;
    }
    spent += performance.now() - start;
    ran++;
    setImmediate(step);
  };
  setImmediate(step);
  return {
    cancel: () => {
      cancelled = true;
    },
    done,
  };
}
