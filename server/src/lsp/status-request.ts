import type { Connection } from "vscode-languageserver/node";
import { StatusRequest } from "../protocol.js";
import type { RequestContext } from "./report-request.js";
import { createHandler, fromSummaryOr } from "./server.js";
import { statusOf } from "./status-of.js";

/** Registers `trialbook/status` (see protocol.ts); a large document's status comes from the worker's summary. */
export function registerStatusRequest(connection: Connection, context: RequestContext): void {
  connection.onRequest(StatusRequest, fromSummaryOr(context.store, (s) => s.status, createHandler("trialbook/status", context.store, context.logError, (doc) => statusOf(doc))));
}
