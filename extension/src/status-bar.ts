import * as vscode from "vscode";
import type { LanguageClient } from "vscode-languageclient/node";
import { StatusRequest } from "../../server/src/protocol.js";
import { statusText, statusTooltip } from "./status-text.js";

/**
 * The status bar item for the active `.trial` editor: `18/24 runs · 2 warnings`. It asks the server
 * (`trialbook/status`) after each edit, a little after the server's analysis delay, and hides for other
 * editors. Clicking it shows the analysis.
 */
export class TrialStatusBar implements vscode.Disposable {
  private readonly item = vscode.window.createStatusBarItem("trialbook.status", vscode.StatusBarAlignment.Left, 50);
  private readonly subscriptions: vscode.Disposable[] = [];
  private timer: ReturnType<typeof setTimeout> | undefined;
  private request = 0;

  constructor(
    private readonly client: LanguageClient,
    private readonly delay: () => number,
  ) {
    this.item.name = "Trialbook";
    this.item.command = "trialbook.showAnalysis";
    this.subscriptions.push(
      vscode.window.onDidChangeActiveTextEditor(() => this.schedule(0)),
      vscode.workspace.onDidChangeTextDocument((e) => {
        if (e.document === vscode.window.activeTextEditor?.document) this.schedule(this.delay() + 50);
      }),
    );
    this.schedule(0);
  }

  private schedule(wait: number): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = setTimeout(() => void this.refresh(), wait);
  }

  private async refresh(): Promise<void> {
    const document = vscode.window.activeTextEditor?.document;
    if (!document || document.languageId !== "trial") {
      this.item.hide();
      return;
    }
    const id = ++this.request;
    try {
      const status = await this.client.sendRequest(StatusRequest, { textDocument: { uri: document.uri.toString() } });
      if (id !== this.request) return;
      if (!status) {
        // The server has not seen the document yet (it was just opened): ask again shortly.
        this.schedule(this.delay() + 100);
        return;
      }
      this.item.text = `$(beaker) ${statusText(status)}`;
      this.item.tooltip = statusTooltip(status);
      this.item.show();
    } catch {
      if (id === this.request) this.item.hide();
    }
  }

  dispose(): void {
    if (this.timer) clearTimeout(this.timer);
    this.item.dispose();
    for (const s of this.subscriptions) s.dispose();
  }
}
