import * as vscode from "vscode";
import type { LanguageClient } from "vscode-languageclient/node";
import { ReportRequest } from "../../server/src/protocol.js";
import { panelTitle } from "./status-text.js";

/** One open panel: its last shown version, its debounce timer, and whether a request is in flight. */
interface PanelEntry {
  readonly panel: vscode.WebviewPanel;
  version: number;
  timer?: ReturnType<typeof setTimeout>;
  /** True while a report request runs; `again` asks for one more when it ends. */
  busy: boolean;
  again: boolean;
}

/**
 * The analysis report beside the editor, one panel per document, updated as the user types. The HTML
 * comes from the language server (one renderer for the panel and `trialbook report`), with its own strict
 * Content-Security-Policy: a nonce for its one style sheet and one script, no `unsafe-eval`, no remote
 * resources. The panel allows scripts only for that nonce'd script and loads no local files.
 */
export class ReportPanels implements vscode.Disposable {
  private readonly panels = new Map<string, PanelEntry>();
  private readonly subscriptions: vscode.Disposable[] = [];

  constructor(
    private readonly client: LanguageClient,
    private readonly log: vscode.LogOutputChannel,
    private readonly delay: () => number,
  ) {
    this.subscriptions.push(
      vscode.workspace.onDidChangeTextDocument((e) => this.schedule(e.document)),
      vscode.workspace.onDidChangeConfiguration((e) => {
        if (e.affectsConfiguration("trialbook")) for (const uri of this.panels.keys()) this.scheduleUri(uri);
      }),
    );
  }

  /** Shows (or reveals) the report of `document` beside the editor. */
  show(document: vscode.TextDocument): void {
    const key = document.uri.toString();
    const existing = this.panels.get(key);
    if (existing) {
      existing.panel.reveal(vscode.ViewColumn.Beside, true);
      return;
    }
    const panel = vscode.window.createWebviewPanel("trialbook.report", panelTitle(""), { viewColumn: vscode.ViewColumn.Beside, preserveFocus: true }, {
      enableScripts: true,
      enableCommandUris: false,
      enableForms: false,
      localResourceRoots: [],
      retainContextWhenHidden: false,
    });
    panel.webview.html = `<!DOCTYPE html><html><head><meta http-equiv="Content-Security-Policy" content="default-src 'none';"></head><body><p>Analysing…</p></body></html>`;
    const entry: PanelEntry = { panel, version: -1, busy: false, again: false };
    this.panels.set(key, entry);
    panel.onDidDispose(() => {
      const e = this.panels.get(key);
      if (e?.timer) clearTimeout(e.timer);
      this.panels.delete(key);
    });
    void this.update(key);
  }

  private schedule(document: vscode.TextDocument): void {
    if (document.languageId === "trial") this.scheduleUri(document.uri.toString());
  }

  private scheduleUri(key: string): void {
    const entry = this.panels.get(key);
    if (!entry) return;
    if (entry.timer) clearTimeout(entry.timer);
    // A little after the server's own analysis delay, so the report is made from the analysed version.
    entry.timer = setTimeout(() => void this.update(key), this.delay() + 50);
  }

  private async update(key: string): Promise<void> {
    const entry = this.panels.get(key);
    if (!entry) return;
    // Drawing plots takes a while: while one report is being made, later edits ask for a single new one
    // when it is done, instead of piling requests onto the server.
    if (entry.busy) {
      entry.again = true;
      return;
    }
    entry.busy = true;
    try {
      const result = await this.client.sendRequest(ReportRequest, { textDocument: { uri: key }, format: "html", webview: true });
      const current = this.panels.get(key);
      // A slower, older answer must not overwrite a newer report.
      if (result && current && result.version >= current.version) {
        current.version = result.version;
        current.panel.title = panelTitle(result.title);
        current.panel.webview.html = result.content;
      }
    } catch (error) {
      this.log.error(`Updating the report failed: ${error instanceof Error ? error.message : String(error)}`);
    } finally {
      entry.busy = false;
      if (entry.again && this.panels.get(key) === entry) {
        entry.again = false;
        void this.update(key);
      }
    }
  }

  dispose(): void {
    for (const { panel } of this.panels.values()) panel.dispose();
    for (const s of this.subscriptions) s.dispose();
  }
}
