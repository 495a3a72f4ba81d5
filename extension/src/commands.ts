import { execFile } from "node:child_process";
import { basename, dirname } from "node:path";
import * as vscode from "vscode";
import type { LanguageClient } from "vscode-languageclient/node";
import { CompareRequest, ReportRequest, RunSheetRequest } from "../../server/src/protocol.js";
import type { ReportPanels } from "./report-panel.js";
import { defaultReportPath } from "./status-text.js";

/** The `.trial` document a command acts on: the active editor's, or a message saying there is none. */
function activeTrial(): vscode.TextDocument | undefined {
  const document = vscode.window.activeTextEditor?.document;
  if (document?.languageId === "trial") return document;
  void vscode.window.showInformationMessage("Open a .trial file first: this Trialbook command works on the active .trial editor.");
  return undefined;
}

/** Registers the commands of design brief §2. */
export function registerCommands(context: vscode.ExtensionContext, client: LanguageClient, panels: ReportPanels, log: vscode.LogOutputChannel): void {
  const register = (id: string, run: (...args: unknown[]) => Promise<void> | void) =>
    context.subscriptions.push(
      vscode.commands.registerCommand(id, async (...args: unknown[]) => {
        try {
          await run(...args);
        } catch (error) {
          log.error(`${id} failed: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}`);
          void vscode.window.showErrorMessage(`Trialbook: the command failed (${error instanceof Error ? error.message : String(error)}). Details are in the Trialbook output.`);
        }
      }),
    );

  // The server's code lens passes the document's URI (and the response name) as arguments.
  register("trialbook.showAnalysis", (uri?: unknown) => {
    const named = typeof uri === "string" ? vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri && d.languageId === "trial") : undefined;
    const document = named ?? activeTrial();
    if (document) panels.show(document);
  });

  register("trialbook.writeRunSheet", async () => {
    const document = activeTrial();
    if (!document) return;
    const result = await client.sendRequest(RunSheetRequest, { textDocument: { uri: document.uri.toString() } });
    if (!result) return;
    if (!result.ok) {
      void vscode.window.showWarningMessage(`Trialbook: ${result.message}`);
      return;
    }
    if (result.version !== document.version) {
      void vscode.window.showWarningMessage("Trialbook: the file changed while the run sheet was planned. Run the command again.");
      return;
    }
    if (result.edits.length > 0) {
      const edit = new vscode.WorkspaceEdit();
      edit.set(document.uri, await client.protocol2CodeConverter.asTextEdits([...result.edits]));
      await vscode.workspace.applyEdit(edit);
    }
    void vscode.window.showInformationMessage(`Trialbook: ${result.summary}`);
  });

  register("trialbook.exportReport", async () => {
    const document = activeTrial();
    if (!document) return;
    const target = await vscode.window.showSaveDialog({
      defaultUri: document.uri.scheme === "file" ? vscode.Uri.file(defaultReportPath(document.uri.fsPath, "html")) : undefined,
      filters: { "HTML report": ["html"], "Markdown report": ["md"] },
      saveLabel: "Export Report",
    });
    if (!target) return;
    const format = /\.(md|markdown)$/i.test(target.path) ? "markdown" : "html";
    const result = await client.sendRequest(ReportRequest, { textDocument: { uri: document.uri.toString() }, format });
    if (!result) return;
    await vscode.workspace.fs.writeFile(target, new TextEncoder().encode(result.content));
    void vscode.window.showInformationMessage(`Trialbook: report written to ${vscode.workspace.asRelativePath(target)}.`);
  });

  register("trialbook.compareWithPrevious", async () => {
    const document = activeTrial();
    if (!document) return;
    if (document.uri.scheme !== "file") {
      void vscode.window.showInformationMessage("Trialbook: comparing needs a file saved in a git repository.");
      return;
    }
    // Running git in a folder runs what its configuration says (hooks, fsmonitor): only in trusted folders.
    if (!vscode.workspace.isTrusted) {
      void vscode.window.showInformationMessage("Trialbook: comparing with the previous revision runs git, which Trialbook does only in a trusted workspace.");
      return;
    }
    const previous = await gitShow(document.uri.fsPath, "HEAD");
    if (!previous.ok) {
      void vscode.window.showWarningMessage(`Trialbook: cannot read the committed revision (${previous.reason}).`);
      return;
    }
    const result = await client.sendRequest(CompareRequest, { textDocument: { uri: document.uri.toString() }, previousText: previous.text, previousLabel: "HEAD" });
    if (!result) return;
    const shown = await vscode.workspace.openTextDocument({ language: "markdown", content: result.markdown });
    await vscode.window.showTextDocument(shown, { viewColumn: vscode.ViewColumn.Beside, preview: true });
    await vscode.commands.executeCommand("markdown.showPreview", shown.uri).then(undefined, () => undefined);
  });
}

/** The text of `file` at git revision `rev`, read with `git show` (no shell; arguments passed as-is). */
function gitShow(file: string, rev: string): Promise<{ ok: true; text: string } | { ok: false; reason: string }> {
  return new Promise((resolve) => {
    execFile("git", ["show", `${rev}:./${basename(file)}`], { cwd: dirname(file), maxBuffer: 256 * 1024 * 1024, encoding: "utf8" }, (error, stdout, stderr) => {
      if (error) resolve({ ok: false, reason: (stderr || error.message).trim().split("\n")[0] ?? "git failed" });
      else resolve({ ok: true, text: stdout });
    });
  });
}
