// The CLI's process entry: the only place that reads process.argv and calls process.exit.
import { join } from "node:path";
import { runCli } from "./run-cli.js";

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks).toString("utf8");
}

void runCli(process.argv.slice(2), {
  cwd: process.cwd(),
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
  readStdin,
  env: process.env,
  isTty: process.stdout.isTTY === true,
  // The bundle's own directory (dist/): the helper thread's bundle is built beside it.
  helperWorker: join(__dirname, "helper-worker.cjs"),
}).then((code) => {
  process.exitCode = code;
  // Exit as soon as the output is flushed rather than when the event loop runs dry: at that point Node 20
  // drains V8's background tasks and can deadlock there (nodejs/node#54918; one 1M-run analyze in about
  // forty hung after printing its output). The empty writes call back once everything before them is out.
  process.stdout.write("", () => process.stderr.write("", () => process.exit(code)));
});
