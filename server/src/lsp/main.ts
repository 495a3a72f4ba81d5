/**
 * The language server's entry point (bundled to dist/server.cjs). The transport comes from the command
 * line as vscode-languageserver reads it: `--stdio`, `--node-ipc` or `--socket=PORT`.
 */
import { join } from "node:path";
import { createConnection, ProposedFeatures } from "vscode-languageserver/node";
import { createServer } from "./server.js";
import { registerTrialbookRequests } from "./trialbook-requests.js";

const connection = createConnection(ProposedFeatures.all);
// The analysis worker's bundle lies beside this one (esbuild.mjs).
registerTrialbookRequests(connection, createServer(connection, { analysisWorker: join(__dirname, "analysis-worker.cjs") }));
connection.listen();
