import type { CliIo } from "./io.js";

/** Text decorations for terminal output; every function is the identity when colour is off. */
export interface TerminalStyle {
  readonly enabled: boolean;
  readonly bold: (text: string) => string;
  readonly dim: (text: string) => string;
  readonly red: (text: string) => string;
  readonly yellow: (text: string) => string;
  readonly green: (text: string) => string;
  readonly cyan: (text: string) => string;
}

/**
 * True when output may be coloured: stdout is a terminal and `NO_COLOR` is absent or empty (the convention
 * of no-color.org: any non-empty value turns colour off), and `TERM` is not `dumb`.
 */
export function colourEnabled(io: Pick<CliIo, "isTty" | "env">): boolean {
  const noColor = io.env["NO_COLOR"];
  if (noColor !== undefined && noColor !== "") return false;
  if (io.env["TERM"] === "dumb") return false;
  return io.isTty;
}

/** The style for a command's output: ANSI SGR sequences (ECMA-48) on a colour terminal, plain text otherwise. */
export function terminalStyle(io: Pick<CliIo, "isTty" | "env">): TerminalStyle {
  const enabled = colourEnabled(io);
  const sgr = (on: number, off: number) => (enabled ? (text: string) => `\u001b[${on}m${text}\u001b[${off}m` : (text: string) => text);
  return { enabled, bold: sgr(1, 22), dim: sgr(2, 22), red: sgr(31, 39), yellow: sgr(33, 39), green: sgr(32, 39), cyan: sgr(36, 39) };
}

/** Colours a severity word the way editors do: errors red, warnings yellow, the rest cyan. */
export function severityStyle(style: TerminalStyle, severity: string): string {
  if (severity === "error") return style.red(severity);
  if (severity === "warning") return style.yellow(severity);
  return style.cyan(severity);
}

/** A one-line progress indicator on stderr; `done` clears it. A no-op unless enabled. */
export interface Progress {
  readonly update: (message: string) => void;
  readonly done: () => void;
}

/** Input of at least this many characters counts as large enough to show progress for. */
export const PROGRESS_THRESHOLD = 1_000_000;

/**
 * A progress indicator that rewrites one stderr line (`\r` then erase-to-end-of-line), shown only on an
 * interactive terminal and only when `size` (characters of input) reaches `PROGRESS_THRESHOLD`, so logs
 * in CI and small runs stay clean.
 */
export function createProgress(io: Pick<CliIo, "isTty" | "env" | "stderr">, size: number): Progress {
  if (!io.isTty || io.env["TERM"] === "dumb" || size < PROGRESS_THRESHOLD) return { update: () => {}, done: () => {} };
  let shown = false;
  return {
    update: (message) => {
      shown = true;
      io.stderr(`\r\u001b[K${message}`);
    },
    done: () => {
      if (shown) io.stderr("\r\u001b[K");
      shown = false;
    },
  };
}
