import type { Connection } from "vscode-languageserver/node";
import { registerCompareRequest } from "./compare-request.js";
import { registerReportRequest } from "./report-request.js";
import { registerRunSheetRequest } from "./run-sheet-request.js";
import type { TrialbookServer } from "./server.js";
import { toAnalysisDefaults } from "./settings.js";
import { registerStatusRequest } from "./status-request.js";

/**
 * Registers Trialbook's own requests (protocol.ts): report, status, run sheet and compare. Wired once,
 * after `createServer(connection)` and before `connection.listen()`.
 */
export function registerTrialbookRequests(connection: Connection, server: TrialbookServer): void {
  const context = { store: server.store, logError: (message: string) => connection.console.error(message) };
  registerReportRequest(connection, context);
  registerStatusRequest(connection, context);
  registerRunSheetRequest(connection, context);
  registerCompareRequest(connection, context, () => toAnalysisDefaults(server.settings()));
}
