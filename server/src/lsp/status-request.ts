import type { Connection } from "vscode-languageserver/node";
import { StatusRequest } from "../protocol.js";
import type { RequestContext } from "./report-request.js";
import { createHandler } from "./server.js";
import { statusOf } from "./status-of.js";
import { SupersededError } from "./analysis-worker-client.js";
import type { VersionSummary } from "./analysis-worker-protocol.js";

export { statusOf };

/** Registers `trialbook/status` (see protocol.ts). */
export function registerStatusRequest(connection: Connection, context: RequestContext & { readonly store: { summary?(uri: string): Promise<VersionSummary> | undefined } }): void {
  const here = createHandler("trialbook/status", context.store, context.logError, (doc) => statusOf(doc));
  // A large document's status comes from the worker's summary; if the worker fails, from the main thread.
  connection.onRequest(StatusRequest, (params, token) => {
    const summary = typeof params?.textDocument?.uri === "string" ? context.store.summary?.(params.textDocument.uri) : undefined;
    return summary ? summary.then((s) => s.status, (error: unknown) => (error instanceof SupersededError ? null : here(params, token))) : here(params, token);
  });
}
