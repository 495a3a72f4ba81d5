/**
 * What a CLI command may touch of the outside world. Commands receive it instead of using `process`
 * directly, so tests run them in-process with captured output; only `main.ts` touches `process`.
 */
export interface CliIo {
  readonly cwd: string;
  readonly stdout: (text: string) => void;
  readonly stderr: (text: string) => void;
  /** Reads all of standard input (for `-` as a file name). */
  readonly readStdin: () => Promise<string>;
  readonly env: Readonly<Record<string, string | undefined>>;
  /** True when stdout is an interactive terminal (colour and progress are allowed). */
  readonly isTty: boolean;
  /**
   * The helper thread's script (dist/helper-worker.cjs beside the bundled CLI): with it, `analyze`
   * and `check` share a large file's reading and part of its analysis with a second thread
   * (helper-thread.ts). Without it, all on one, with the same output.
   */
  readonly helperWorker?: string;
}

/** Exit codes, documented in the README: 0 clean, 1 problems found, 2 usage error. */
export const EXIT_OK = 0;
export const EXIT_PROBLEMS = 1;
export const EXIT_USAGE = 2;

/** A mistake in how the command was called; reported with usage help and exit code 2. */
export class UsageError extends Error {}
