/**
 * The language server's entry point (bundled to dist/server.cjs). The transport comes from the command
 * line as vscode-languageserver reads it: `--stdio`, `--node-ipc` or `--socket=PORT`.
 */
import { createConnection, ProposedFeatures } from "vscode-languageserver/node";
import { createServer } from "./server.js";
import { registerTrialbookRequests } from "./trialbook-requests.js";

const connection = createConnection(ProposedFeatures.all);
registerTrialbookRequests(connection, createServer(connection));
connection.listen();
