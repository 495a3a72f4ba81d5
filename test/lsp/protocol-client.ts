import { execFileSync } from "node:child_process";
/**
 * A minimal editor for tests and the benchmark: starts the bundled server (`dist/server.cjs --stdio`) and
 * speaks JSON-RPC to it with vscode-jsonrpc, as VS Code's client would. Waiting is always for a message,
 * never for a fixed time.
 */
import { type ChildProcess, spawn } from "node:child_process";
import { readdirSync, statSync } from "node:fs";
import { join, resolve } from "node:path";
import { createMessageConnection, type MessageConnection, StreamMessageReader, StreamMessageWriter } from "vscode-jsonrpc/node";
import type { PublishDiagnosticsParams } from "vscode-languageserver";

/** The bundled server, relative to the repository root (the cwd of mocha and of the benchmark). */
export const SERVER_BUNDLE = resolve("dist/server.cjs");

function newestMtime(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(path) : statSync(path).mtimeMs);
  }
  return newest;
}

/**
 * Builds dist/server.cjs with esbuild (the same options as esbuild.mjs) when it is missing or older than
 * any source file of the server or the grammar.
 */
export async function ensureServerBundle(): Promise<void> {
  let bundled = 0;
  try {
    bundled = statSync(SERVER_BUNDLE).mtimeMs;
  } catch {
    bundled = 0;
  }
  const sources = Math.max(newestMtime(resolve("server/src")), newestMtime(resolve("grammar/src")));
  if (bundled > sources) return;
  // The project's own build script, so the bundle gets the same options and plugins as `npm run build`.
  execFileSync(process.execPath, ["esbuild.mjs"], { stdio: "inherit" });
}

/** A running server and the client end of its connection. */
export class ProtocolClient {
  private readonly waiters: { uri: string; test: (p: PublishDiagnosticsParams) => boolean; resolve: (p: PublishDiagnosticsParams) => void }[] = [];
  /** Every publishDiagnostics notification received, in order. */
  readonly published: PublishDiagnosticsParams[] = [];
  private readonly logWaiters: { test: (message: string) => boolean; resolve: (message: string) => void }[] = [];
  /** Every window/logMessage text received. */
  readonly logs: string[] = [];
  /** Settings the client answers `workspace/configuration` with. */
  settings: Record<string, unknown>;

  private constructor(
    readonly process: ChildProcess,
    readonly connection: MessageConnection,
    settings: Record<string, unknown>,
  ) {
    this.settings = settings;
    connection.onNotification("textDocument/publishDiagnostics", (p: PublishDiagnosticsParams) => {
      this.published.push(p);
      for (let i = 0; i < this.waiters.length; i++) {
        const w = this.waiters[i]!;
        if (w.uri === p.uri && w.test(p)) {
          this.waiters.splice(i--, 1);
          w.resolve(p);
        }
      }
    });
    connection.onNotification("window/logMessage", (p: { message: string }) => {
      this.logs.push(p.message);
      for (let i = 0; i < this.logWaiters.length; i++) {
        const w = this.logWaiters[i]!;
        if (w.test(p.message)) {
          this.logWaiters.splice(i--, 1);
          w.resolve(p.message);
        }
      }
    });
    connection.onRequest("workspace/configuration", (p: { items: { section?: string }[] }) => p.items.map((i) => (i.section === "trialbook" ? this.settings : null)));
    connection.onRequest("client/registerCapability", () => null);
    connection.onRequest("window/workDoneProgress/create", () => null);
  }

  /** Spawns the server over stdio (`nodeArgs` go to node, e.g. `--cpu-prof`) and sends initialize/initialized with editor-like capabilities. */
  static async start(settings: Record<string, unknown> = { analysisDelay: 0 }, nodeArgs: readonly string[] = []): Promise<ProtocolClient> {
    const child = spawn(process.execPath, [...nodeArgs, SERVER_BUNDLE, "--stdio"], { stdio: ["pipe", "pipe", "pipe"] });
    child.stderr!.resume();
    const connection = createMessageConnection(new StreamMessageReader(child.stdout!), new StreamMessageWriter(child.stdin!));
    const client = new ProtocolClient(child, connection, settings);
    connection.listen();
    await connection.sendRequest("initialize", {
      processId: process.pid,
      rootUri: null,
      initializationOptions: { trialbook: settings },
      capabilities: {
        workspace: { configuration: true, didChangeConfiguration: { dynamicRegistration: true }, workspaceEdit: { documentChanges: true, snippetEditSupport: true } },
        textDocument: {
          synchronization: { dynamicRegistration: false },
          publishDiagnostics: { relatedInformation: true, versionSupport: true },
          completion: { completionItem: { snippetSupport: true } },
          hover: { contentFormat: ["markdown", "plaintext"] },
        },
      },
    });
    await connection.sendNotification("initialized", {});
    return client;
  }

  /** The next publishDiagnostics for `uri` that passes `test` (already received ones are not reused). */
  waitForDiagnostics(uri: string, test: (p: PublishDiagnosticsParams) => boolean = () => true, timeoutMs = 15_000): Promise<PublishDiagnosticsParams> {
    return new Promise((resolvePromise, reject) => {
      const timer = setTimeout(() => reject(new Error(`no publishDiagnostics for ${uri} within ${timeoutMs} ms`)), timeoutMs);
      this.waiters.push({
        uri,
        test,
        resolve: (p) => {
          clearTimeout(timer);
          resolvePromise(p);
        },
      });
    });
  }

  /** The first server log message (received already or later) that passes `test`. */
  waitForLog(test: (message: string) => boolean, timeoutMs = 30_000): Promise<string> {
    const seen = this.logs.find(test);
    if (seen !== undefined) return Promise.resolve(seen);
    return new Promise((resolvePromise, reject) => {
      const timer = setTimeout(() => reject(new Error(`no matching server log message within ${timeoutMs} ms`)), timeoutMs);
      this.logWaiters.push({
        test,
        resolve: (message) => {
          clearTimeout(timer);
          resolvePromise(message);
        },
      });
    });
  }

  /** Sends a request and returns its result. */
  request<R>(method: string, params: unknown): Promise<R> {
    return this.connection.sendRequest(method, params) as Promise<R>;
  }

  /** Sends a notification. */
  notify(method: string, params: unknown): Promise<void> {
    return this.connection.sendNotification(method, params);
  }

  /** shutdown, exit, and wait for the process to end. */
  async stop(): Promise<number | null> {
    const exited = new Promise<number | null>((r) => this.process.once("exit", (code) => r(code)));
    try {
      await this.request("shutdown", null);
      await this.notify("exit", null);
    } catch {
      this.process.kill();
    }
    const code = await exited;
    this.connection.dispose();
    return code;
  }
}
