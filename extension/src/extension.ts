/**
 * The Trialbook extension: a launcher with no language knowledge of its own. It starts the bundled
 * language server (dist/server.cjs) over IPC, and adds what LSP has no standard request for: the report
 * panel, the status bar item and the commands of the design brief §2, each of which asks the server
 * (protocol.ts). It never imports engine code.
 */
import * as vscode from "vscode";
import { LanguageClient, type LanguageClientOptions, type ServerOptions, TransportKind } from "vscode-languageclient/node";
import { registerCommands } from "./commands.js";
import { ReportPanels } from "./report-panel.js";
import { TrialStatusBar } from "./status-bar.js";

let client: LanguageClient | undefined;

/** The server's analysis delay, so the panel and the status bar ask after the analysis is done. */
function analysisDelay(): number {
  const delay = vscode.workspace.getConfiguration("trialbook").get<number>("analysisDelay", 150);
  return typeof delay === "number" && Number.isFinite(delay) && delay >= 0 ? Math.min(delay, 60_000) : 150;
}

/** The `trialbook.*` settings as plain data (a WorkspaceConfiguration object does not serialise). */
function settingsSnapshot(): Record<string, unknown> {
  const config = vscode.workspace.getConfiguration("trialbook");
  const keys = ["alpha", "sumsOfSquares", "analysisDelay", "confidence", "powerTarget"];
  return Object.fromEntries(keys.flatMap((key) => (config.get(key) !== undefined ? [[key, config.get(key)]] : [])));
}

/** Starts the client and registers the panel, the status bar and the commands. */
export async function activate(context: vscode.ExtensionContext): Promise<void> {
  // vscode-languageclient 10+ needs a log output channel (a plain one fails at start).
  const log = vscode.window.createOutputChannel("Trialbook", { log: true });
  context.subscriptions.push(log);
  const module = context.asAbsolutePath("dist/server.cjs");
  const serverOptions: ServerOptions = {
    run: { module, transport: TransportKind.ipc },
    debug: { module, transport: TransportKind.ipc, options: { execArgv: ["--nolazy", "--inspect=6019"] } },
  };
  const clientOptions: LanguageClientOptions = {
    documentSelector: [{ language: "trial" }],
    outputChannel: log,
    initializationOptions: { trialbook: settingsSnapshot() },
    synchronize: { configurationSection: "trialbook" },
  };
  client = new LanguageClient("trialbook", "Trialbook", serverOptions, clientOptions);
  const panels = new ReportPanels(client, log, analysisDelay);
  context.subscriptions.push(panels);
  registerCommands(context, client, panels, log);
  await client.start();
  context.subscriptions.push(new TrialStatusBar(client, analysisDelay));
  log.info(`Trialbook started (server ${module}).`);
}

/** Stops the language server. */
export async function deactivate(): Promise<void> {
  await client?.stop();
  client = undefined;
}
