/**
 * Engine warm-up at server start. V8 optimises a function only after it has run many times, so the first
 * hundred or so analyses of a session run partly in the interpreter and baseline code: on a 1,000-run
 * file the first edits took 15 to 30 ms where later ones take 5 (bench/lsp-latency.ts traces). Analysing an
 * invented document a few dozen times while the editor is still starting trains the same code, so the
 * user's first keystrokes are answered at full speed. Each analysis runs in its own turn of the event
 * loop, so a request that arrives meanwhile waits for at most one of them (a few milliseconds), and the
 * warm-up stops early when the server shuts down. Nothing it computes is kept or published.
 */
import { LineIndex } from "../../../grammar/src/line-index.js";
import { parseTrial } from "../../../grammar/src/parse.js";
import { analyzeParsed } from "../analysis/analyze-document.js";
import { toLspDiagnostics } from "./convert.js";

/** How many analyses the warm-up runs (measured: the latency trace settles after about this many). */
export const WARM_UP_ANALYSES = 80;

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

/** Analyses the warm-up document `count` times, one per event-loop turn; `cancel` stops it. */
export function warmUpEngine(count = WARM_UP_ANALYSES): { cancel(): void; readonly done: Promise<number> } {
  const text = warmUpDocument();
  let cancelled = false;
  let finish: (ran: number) => void = () => undefined;
  const done = new Promise<number>((resolve) => (finish = resolve));
  let ran = 0;
  const step = () => {
    if (cancelled || ran >= count) {
      finish(ran);
      return;
    }
    try {
      const analysis = analyzeParsed(parseTrial(text));
      toLspDiagnostics(analysis.diagnostics, new LineIndex(text), "trialbook:warm-up");
    } catch {
      // A failure here would show up in the real analysis of the user's file; the warm-up just stops.
      cancelled = true;
    }
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
