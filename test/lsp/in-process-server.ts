/**
 * The language server's own code (createServer and the Trialbook requests) run in this process over
 * in-memory streams, with a JSON-RPC client on the other end: for tests that read the server's state (the
 * document store's counters) or force a garbage collection, which a separate process would not allow.
 */
import { PassThrough } from "node:stream";
import { createMessageConnection, type MessageConnection, StreamMessageReader, StreamMessageWriter } from "vscode-jsonrpc/node";
import { createConnection, ProposedFeatures, type PublishDiagnosticsParams } from "vscode-languageserver/node";
import { createServer, type ServerOptions } from "../../server/src/lsp/server.js";
import { registerTrialbookRequests } from "../../server/src/lsp/trialbook-requests.js";

export class InProcessServer {
  readonly client: MessageConnection;
  readonly server: ReturnType<typeof createServer>;
  /** Every window/logMessage text received. */
  readonly logs: string[] = [];
  private readonly streams = [new PassThrough(), new PassThrough()] as const;
  private readonly waiters = new Map<number, (p: PublishDiagnosticsParams) => void>();

  constructor(options: ServerOptions = {}) {
    const [toServer, toClient] = this.streams;
    const connection = createConnection(ProposedFeatures.all, new StreamMessageReader(toServer), new StreamMessageWriter(toClient));
    this.server = createServer(connection, options);
    registerTrialbookRequests(connection, this.server);
    connection.listen();
    this.client = createMessageConnection(new StreamMessageReader(toClient), new StreamMessageWriter(toServer));
    this.client.onNotification("window/logMessage", (p: { message: string }) => {
      this.logs.push(p.message);
    });
    this.client.onNotification("textDocument/publishDiagnostics", (p: PublishDiagnosticsParams) => {
      if (p.version !== undefined) this.waiters.get(p.version)?.(p);
    });
    this.client.listen();
  }

  /** initialize (with `trialbook.analysisDelay`, no client capabilities) and initialized. */
  async start(analysisDelay: number): Promise<void> {
    await this.client.sendRequest("initialize", { processId: null, rootUri: null, initializationOptions: { trialbook: { analysisDelay } }, capabilities: {} });
    await this.client.sendNotification("initialized", {});
  }

  /** The publishDiagnostics of `version` (of whichever document), from now on. */
  published(version: number): Promise<PublishDiagnosticsParams> {
    return new Promise((resolve) =>
      this.waiters.set(version, (p) => {
        this.waiters.delete(version);
        resolve(p);
      }),
    );
  }

  /** Closes `uris` (cancelling their pending analyses), shuts the server down and closes the streams. */
  async stop(uris: readonly string[]): Promise<void> {
    for (const uri of uris) await this.client.sendNotification("textDocument/didClose", { textDocument: { uri } });
    await this.client.sendRequest("shutdown", null);
    this.client.dispose();
    for (const s of this.streams) s.destroy();
  }
}
