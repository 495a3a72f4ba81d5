/**
 * Wires the language server: capabilities negotiated once in `onInitialize`, settings, the document store
 * and one thin handler per feature. Every request goes through `createHandler`, which resolves the
 * document, honours cancellation and turns any exception into a logged `ResponseError`, so one broken
 * request never takes the server down.
 */
import {
  type CancellationToken,
  type ClientCapabilities,
  CodeActionKind,
  type Connection,
  DidChangeConfigurationNotification,
  ErrorCodes,
  type InitializeResult,
  LSPErrorCodes,
  ResponseError,
  TextDocumentSyncKind,
} from "vscode-languageserver/node";
import { VERSION } from "../version.js";
import { codeActions } from "./code-actions.js";
import { codeLenses } from "./code-lens.js";
import { completion } from "./completion.js";
import { type AnalyzedDocument, describeError, DocumentStore, LARGE_DOCUMENT_CHARS } from "./documents.js";
import { AnalysisWorker, SupersededError } from "./analysis-worker-client.js";
import type { VersionSummary } from "./analysis-worker-protocol.js";
import { foldingRanges } from "./folding.js";
import { formatDocument, formatRange } from "./formatting.js";
import { hover } from "./hover.js";
import { definition, references } from "./navigation.js";
import { prepareRename, rename } from "./rename.js";
import { SEMANTIC_TOKENS_LEGEND, semanticTokens } from "./semantic-tokens.js";
import { DEFAULT_SERVER_SETTINGS, readSettings, type ServerSettings } from "./settings.js";
import { documentSymbols } from "./symbols.js";
import { QUIET_MS, WARM_UP_LOG_PREFIX, warmUpEngine } from "./warm-up.js";

/** The settings section the server reads. */
export const SETTINGS_SECTION = "trialbook";

/** What the running server exposes to its entry point and to tests. */
export interface TrialbookServer {
  readonly store: DocumentStore;
  settings(): ServerSettings;
}

/** Features of the client that change what the server sends, read once from `initialize`. */
interface ClientFeatures {
  configuration: boolean;
  dynamicConfiguration: boolean;
  snippets: boolean;
  snippetEdits: boolean;
}

/**
 * Wraps a document request handler: checks that params name a document, returns null for a document that
 * is not open, answers a cancelled request with `RequestCancelled`, and logs and answers with
 * `InternalError` whatever `body` throws.
 */
export function createHandler<P extends { textDocument: { uri: string } }, R>(
  name: string,
  store: { get(uri: string): AnalyzedDocument | undefined },
  logError: (message: string) => void,
  body: (doc: AnalyzedDocument, params: P, token: CancellationToken) => R,
): (params: P, token: CancellationToken) => R | null | ResponseError<void> {
  return (params, token) => {
    const uri = (params as { textDocument?: { uri?: unknown } } | null | undefined)?.textDocument?.uri;
    if (typeof uri !== "string") return new ResponseError(ErrorCodes.InvalidParams, `${name}: the request has no textDocument.uri.`);
    try {
      if (token?.isCancellationRequested) return new ResponseError(LSPErrorCodes.RequestCancelled, `${name}: cancelled.`);
      const doc = store.get(uri);
      if (!doc) return null;
      return body(doc, params, token);
    } catch (error) {
      logError(`${name} failed for ${uri}: ${describeError(error)}`);
      return new ResponseError(ErrorCodes.InternalError, `${name} failed: ${error instanceof Error ? error.message : String(error)}`);
    }
  };
}

/**
 * Wraps a handler whose answer a large document's worker summary also carries (code lenses, status):
 * from the summary of the current version when the store has one, else from `here` (the main thread's
 * analysis), also when the worker failed. A version replaced before its analysis started gets null: the
 * editor asks again for the new one.
 */
export function fromSummaryOr<P extends { textDocument: { uri: string } }, R>(
  store: { summary?(uri: string): Promise<VersionSummary> | undefined },
  pick: (summary: VersionSummary) => R,
  here: (params: P, token: CancellationToken) => R | null | ResponseError<void>,
): (params: P, token: CancellationToken) => R | null | ResponseError<void> | Promise<R | null | ResponseError<void>> {
  return (params, token) => {
    const uri = (params as { textDocument?: { uri?: unknown } } | null | undefined)?.textDocument?.uri;
    const summary = typeof uri === "string" ? store.summary?.(uri) : undefined;
    if (!summary) return here(params, token);
    return summary.then(pick, (error: unknown) => (error instanceof SupersededError ? null : here(params, token)));
  };
}

/** How the server log line begins that says the analysis worker thread was started. */
export const WORKER_STARTED_LOG = "analysis worker thread started";

/** How the server is set up beyond the connection. */
export interface ServerOptions {
  /**
   * The analysis worker's script (dist/analysis-worker.cjs for the bundled server). Without it every
   * document is analysed on the main thread.
   */
  readonly analysisWorker?: string | URL;
  /** From how many characters a document is analysed in the worker (default `LARGE_DOCUMENT_CHARS`). */
  readonly largeDocumentChars?: number;
}

/** Registers every handler on `connection`. Call `connection.listen()` afterwards. */
export function createServer(connection: Connection, options: ServerOptions = {}): TrialbookServer {
  let settings: ServerSettings = DEFAULT_SERVER_SETTINGS;
  let initialSettings: ServerSettings = DEFAULT_SERVER_SETTINGS;
  const features: ClientFeatures = { configuration: false, dynamicConfiguration: false, snippets: false, snippetEdits: false };
  const logError = (message: string) => connection.console.error(message);
  const largeDocumentChars = options.largeDocumentChars ?? LARGE_DOCUMENT_CHARS;
  const worker =
    options.analysisWorker === undefined
      ? undefined
      : new AnalysisWorker(options.analysisWorker, () => connection.console.log(`${WORKER_STARTED_LOG} (documents of ${largeDocumentChars} characters or more)`));
  const store = new DocumentStore(
    { publish: (uri, version, diagnostics) => void connection.sendDiagnostics({ uri, ...(version !== undefined ? { version } : {}), diagnostics }), logError },
    () => settings,
    worker ? { worker, minChars: largeDocumentChars } : undefined,
  );

  connection.onInitialize((params): InitializeResult => {
    readClientFeatures(params.capabilities, features);
    const options = params.initializationOptions as { settings?: unknown; trialbook?: unknown } | undefined;
    initialSettings = readSettings(options?.trialbook ?? options?.settings, DEFAULT_SERVER_SETTINGS);
    settings = initialSettings;
    return {
      capabilities: {
        textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental },
        hoverProvider: true,
        codeLensProvider: { resolveProvider: false },
        codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix, CodeActionKind.RefactorRewrite] },
        documentFormattingProvider: true,
        documentRangeFormattingProvider: true,
        completionProvider: { triggerCharacters: [" ", ",", "|"] },
        documentSymbolProvider: true,
        foldingRangeProvider: true,
        semanticTokensProvider: { legend: SEMANTIC_TOKENS_LEGEND, full: true, range: true },
        renameProvider: { prepareProvider: true },
        definitionProvider: true,
        referencesProvider: true,
      },
      serverInfo: { name: "trialbook", version: VERSION },
    };
  });

  const pullSettings = async () => {
    if (!features.configuration) return;
    try {
      const raw: unknown = await connection.workspace.getConfiguration(SETTINGS_SECTION);
      settings = readSettings(raw, initialSettings);
      store.reanalyzeAll();
    } catch (error) {
      logError(`reading the ${SETTINGS_SECTION} settings failed: ${describeError(error)}`);
    }
  };
  let warmUp: { cancel(): void } | undefined;
  connection.onInitialized(() => {
    if (features.dynamicConfiguration) void connection.client.register(DidChangeConfigurationNotification.type, { section: SETTINGS_SECTION });
    void pullSettings();
    // Trains the engine's code while the editor starts, so the first keystrokes get optimised code (warm-up.ts).
    const started = warmUpEngine({ busy: () => store.activeWithin(QUIET_MS) });
    warmUp = started;
    // Said in the server log (the editor's output panel); the benchmark waits for this line.
    void started.done.then((s) => connection.console.log(`${WARM_UP_LOG_PREFIX} ${s.analyses} analyses, ${s.ms} ms`));
  });
  connection.onShutdown(() => {
    warmUp?.cancel();
    worker?.dispose();
  });
  connection.onDidChangeConfiguration((change) => {
    if (features.configuration) {
      void pullSettings();
      return;
    }
    const pushed = (change.settings as Record<string, unknown> | null | undefined)?.[SETTINGS_SECTION];
    settings = readSettings(pushed, initialSettings);
    store.reanalyzeAll();
  });

  const handle = <P extends { textDocument: { uri: string } }, R>(name: string, body: (doc: AnalyzedDocument, params: P, token: CancellationToken) => R) =>
    createHandler(name, store, logError, body);

  connection.onHover(handle("hover", (doc, p) => hover(doc, p.position)));
  connection.onCodeLens(fromSummaryOr(store, (s) => s.lenses, handle("codeLens", (doc) => codeLenses(doc))));
  connection.onCodeAction(handle("codeAction", (doc, p) => codeActions(doc, p, { snippetEdits: features.snippetEdits })));
  connection.onDocumentFormatting(handle("formatting", (doc, p) => formatDocument(doc, p.options)));
  connection.onDocumentRangeFormatting(handle("rangeFormatting", (doc, p) => formatRange(doc, p.range, p.options)));
  connection.onCompletion(handle("completion", (doc, p) => completion(doc, p.position, { snippets: features.snippets })));
  connection.onDocumentSymbol(handle("documentSymbol", (doc) => documentSymbols(doc)));
  connection.onFoldingRanges(handle("foldingRange", (doc) => foldingRanges(doc)));
  connection.languages.semanticTokens.on(handle("semanticTokens", (doc) => semanticTokens(doc)));
  connection.languages.semanticTokens.onRange(handle("semanticTokensRange", (doc, p) => semanticTokens(doc, p.range)));
  connection.onPrepareRename(handle("prepareRename", (doc, p) => prepareRename(doc, p.position)));
  connection.onRenameRequest(handle("rename", (doc, p) => rename(doc, p.position, p.newName)));
  connection.onDefinition(handle("definition", (doc, p) => definition(doc, p.position)));
  connection.onReferences(handle("references", (doc, p) => references(doc, p.position, p.context?.includeDeclaration ?? true)));

  store.listen(connection);
  return { store, settings: () => settings };
}

function readClientFeatures(caps: ClientCapabilities, features: ClientFeatures): void {
  features.configuration = caps.workspace?.configuration === true;
  features.dynamicConfiguration = caps.workspace?.didChangeConfiguration?.dynamicRegistration === true;
  features.snippets = caps.textDocument?.completion?.completionItem?.snippetSupport === true;
  features.snippetEdits = (caps.workspace?.workspaceEdit as { snippetEditSupport?: boolean } | undefined)?.snippetEditSupport === true;
}
