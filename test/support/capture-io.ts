import type { CliIo } from "../../server/src/cli/io.js";

/** A CliIo that records stdout and stderr, for running CLI commands in-process. */
export function captureIo(options: { cwd?: string; stdin?: string; env?: Record<string, string>; isTty?: boolean } = {}): CliIo & { out: string; err: string } {
  const io = {
    cwd: options.cwd ?? process.cwd(),
    out: "",
    err: "",
    stdout: (text: string) => {
      io.out += text;
    },
    stderr: (text: string) => {
      io.err += text;
    },
    readStdin: async () => options.stdin ?? "",
    env: options.env ?? {},
    isTty: options.isTty ?? false,
  };
  return io;
}
