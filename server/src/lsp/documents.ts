/**
 * Open documents and their analyses. Documents are synced incrementally (the `TextDocuments` manager applies
 * the edits); analyses are cached per document version, debounced by `trialbook.analysisDelay`, and
 * abandoned when a newer edit arrives before they finish. Closing a document clears its diagnostics.
 * A version is parsed when first needed and analysed when first read: a request that needs only the parse
 * (completion while typing, semantic tokens, folding, formatting) does not wait for the analysis, which on
 * a 100,000-run file is four times the parse.
 */
import { LineIndex } from "../../../grammar/src/line-index.js";
import { parseTrial } from "../../../grammar/src/parse.js";
import type { AnalysisSettings } from "../analysis/build-design.js";
import { analyzeParsed } from "../analysis/analyze-document.js";
import type { DocumentAnalysis } from "../analysis/results.js";
import type { TrialFile } from "../../../grammar/src/ast.js";
import { type Connection, type Diagnostic as LspDiagnostic, TextDocuments } from "vscode-languageserver/node";
import { TextDocument } from "vscode-languageserver-textdocument";
import { type AnalysisWorker, SupersededError } from "./analysis-worker-client.js";
import type { VersionSummary } from "./analysis-worker-protocol.js";
import { toLspDiagnostics } from "./convert.js";
import { type ServerSettings, toAnalysisDefaults } from "./settings.js";

/** One version of one document with everything the feature handlers read. Immutable. */
export interface AnalyzedDocument {
  readonly uri: string;
  readonly version: number;
  readonly text: string;
  readonly lineIndex: LineIndex;
  /** The parse of this version: all that the syntax features read. The same object as `analysis.file`. */
  readonly file: TrialFile;
  /** The analysis of this version, made on first read and kept. */
  readonly analysis: DocumentAnalysis;
}

/** Parses a text, and analyses it when `analysis` is first read: what the store caches, and what in-process tests call. */
export function analyzeText(uri: string, version: number, text: string, defaults: AnalysisSettings = {}): AnalyzedDocument {
  const file = parseTrial(text);
  return documentVersion(uri, version, text, file, () => analyzeParsed(file, defaults));
}

/**
 * An `AnalyzedDocument` whose `lineIndex` and `analysis` are made on first use: a version that is replaced
 * before any diagnostic or request needs a position never pays for indexing every line of a large file, and
 * one that only syntax requests read is never analysed.
 */
function documentVersion(uri: string, version: number, text: string, file: TrialFile, analyze: () => DocumentAnalysis): AnalyzedDocument {
  let lineIndex: LineIndex | undefined;
  let analysis: DocumentAnalysis | undefined;
  return {
    uri,
    version,
    text,
    get lineIndex(): LineIndex {
      return (lineIndex ??= new LineIndex(text));
    },
    file,
    get analysis(): DocumentAnalysis {
      return (analysis ??= analyze());
    },
  };
}

/** Where the store sends diagnostics and log lines; the server passes the connection's. */
export interface DocumentStoreSinks {
  publish(uri: string, version: number | undefined, diagnostics: LspDiagnostic[]): void;
  logError(message: string): void;
}

/** Counters for tests and the benchmark: how much work was done and how much was abandoned. */
export interface DocumentStoreStats {
  /** Analyses on the server's main thread. */
  analyses: number;
  /** Analyses of large documents in the worker thread. */
  workerAnalyses: number;
  abandoned: number;
}

/**
 * Documents of at least this many characters (about 30,000 runs) are analysed for publishing in the
 * worker thread: their analysis takes a tenth of a second or more, which the main thread then spends
 * answering requests instead.
 */
export const LARGE_DOCUMENT_CHARS = 1_000_000;

/** The analysis worker and the size from which a document goes to it. */
export interface LargeDocuments {
  readonly worker: AnalysisWorker;
  readonly minChars: number;
}

/**
 * The open documents of one server. `get` returns the analysis of a document's current version, computing
 * it on demand when a request arrives before the debounced analysis has run.
 */
export class DocumentStore {
  private readonly documents = new TextDocuments(TextDocument);
  private readonly cache = new Map<string, AnalyzedDocument>();
  private readonly timers = new Map<string, { cancel(): void }>();
  /** Statistics since start; never reset. */
  readonly stats: DocumentStoreStats = { analyses: 0, workerAnalyses: 0, abandoned: 0 };
  /** Per large document, the worker's summary of one version (started or done). */
  private readonly summaries = new Map<string, { readonly version: number; readonly summary: Promise<VersionSummary> }>();
  /** performance.now() of the last change to, or analysis of, an open document. */
  private lastActivity = Number.NEGATIVE_INFINITY;

  constructor(
    private readonly sinks: DocumentStoreSinks,
    private readonly settings: () => ServerSettings,
    private readonly large?: LargeDocuments,
  ) {
    this.documents.onDidChangeContent((e) => this.schedule(e.document.uri));
    this.documents.onDidClose((e) => this.close(e.document.uri));
  }

  /** Starts listening for didOpen/didChange/didClose on the connection. */
  listen(connection: Connection): void {
    this.documents.listen(connection);
  }

  /** The analysed current version of an open document, or undefined when it is not open. */
  get(uri: string): AnalyzedDocument | undefined {
    const doc = this.documents.get(uri);
    if (!doc) return undefined;
    this.lastActivity = performance.now();
    const cached = this.cache.get(uri);
    if (cached && cached.version === doc.version) return cached;
    const fresh = this.parsedVersion(uri, doc.version, doc.getText());
    this.cache.set(uri, fresh);
    return fresh;
  }

  /** A version parsed now and analysed (with the settings of now) when its analysis is first read. */
  private parsedVersion(uri: string, version: number, text: string): AnalyzedDocument {
    const file = parseTrial(text);
    const defaults = toAnalysisDefaults(this.settings());
    return documentVersion(uri, version, text, file, () => {
      this.stats.analyses++;
      return analyzeParsed(file, defaults);
    });
  }

  /**
   * For a large document (see `LARGE_DOCUMENT_CHARS`), the worker's summary of its current version, asked for
   * now if not yet: the diagnostics, code lenses and status without analysing on the main thread. Undefined
   * for a small or closed document, or when the server has no worker.
   */
  summary(uri: string): Promise<VersionSummary> | undefined {
    if (!this.large) return undefined;
    const doc = this.documents.get(uri);
    if (!doc) return undefined;
    const known = this.summaries.get(uri);
    if (known && known.version === doc.version) return known.summary;
    const text = doc.getText();
    if (text.length < this.large.minChars) return undefined;
    this.lastActivity = performance.now();
    const summary = this.large.worker.analyze({ uri, version: doc.version, text, defaults: toAnalysisDefaults(this.settings()) });
    this.summaries.set(uri, { version: doc.version, summary });
    summary.then(
      () => this.stats.workerAnalyses++,
      () => {
        // Forgotten, so that the next request asks again (or the main thread analyses).
        if (this.summaries.get(uri)?.summary === summary) this.summaries.delete(uri);
      },
    );
    return summary;
  }

  /** True when an open document changed or was analysed within the last `ms` milliseconds. */
  activeWithin(ms: number): boolean {
    return performance.now() - this.lastActivity < ms;
  }

  /** The URIs of all open documents. */
  uris(): string[] {
    return this.documents.keys();
  }

  /** Drops every cached analysis and re-analyses every open document (after a settings change). */
  reanalyzeAll(): void {
    this.cache.clear();
    this.summaries.clear();
    for (const uri of this.uris()) this.schedule(uri);
  }

  /**
   * Schedules the analysis of a document's current version after the configured delay. A newer edit
   * restarts the delay; work already started is abandoned at its next checkpoint when the version moved on.
   */
  private schedule(uri: string): void {
    this.lastActivity = performance.now();
    this.timers.get(uri)?.cancel();
    const doc = this.documents.get(uri);
    if (!doc) return;
    const version = doc.version;
    const delay = this.settings().analysisDelay;
    const run = () => {
      this.timers.delete(uri);
      this.runAnalysis(uri, version);
    };
    if (delay <= 0) {
      const handle = setImmediate(run);
      this.timers.set(uri, { cancel: () => clearImmediate(handle) });
    } else {
      const handle = setTimeout(run, delay);
      this.timers.set(uri, { cancel: () => clearTimeout(handle) });
    }
  }

  /** True when `version` is still the document's current version. */
  private isCurrent(uri: string, version: number): boolean {
    return this.documents.get(uri)?.version === version;
  }

  /** The debounced analysis of a version: in the worker for a large document, else on this thread. */
  private runAnalysis(uri: string, version: number): void {
    try {
      const doc = this.documents.get(uri);
      if (!doc || doc.version !== version) return;
      const summary = this.summary(uri);
      if (summary) {
        this.publishFromWorker(uri, version, summary);
        return;
      }
      this.analyzeHere(uri, version, doc.getText());
    } catch (error) {
      this.sinks.logError(`analysis of ${uri} failed: ${describeError(error)}`);
    }
  }

  /** Publishes a large document's diagnostics from the worker; if the worker fails, analyses here. */
  private publishFromWorker(uri: string, version: number, summary: Promise<VersionSummary>): void {
    summary.then(
      (s) => {
        if (!this.isCurrent(uri, version) || s.version !== version) {
          this.stats.abandoned++;
          return;
        }
        this.lastActivity = performance.now();
        this.sinks.publish(uri, version, s.diagnostics);
      },
      (error: unknown) => {
        if (error instanceof SupersededError) {
          this.stats.abandoned++;
          return;
        }
        this.sinks.logError(`the analysis worker failed for ${uri} (${describeError(error)}); analysing in the server instead`);
        const doc = this.documents.get(uri);
        if (doc && doc.version === version) this.analyzeHere(uri, version, doc.getText());
      },
    );
  }

  /**
   * Parses, yields to the event loop (so that edits already waiting are applied first), then analyses
   * and publishes, unless a newer version appeared in between: then the stale work is dropped.
   */
  private analyzeHere(uri: string, version: number, text: string): void {
    try {
      let current = this.cache.get(uri);
      if (!current || current.version !== version) {
        // Parsed now and kept, so that a request arriving before the analysis reuses the parse.
        current = this.parsedVersion(uri, version, text);
        this.cache.set(uri, current);
      }
      const parsed = current;
      const handle = setImmediate(() => {
        this.timers.delete(uri);
        try {
          if (!this.isCurrent(uri, version)) {
            this.stats.abandoned++;
            return;
          }
          void parsed.analysis;
          if (!this.isCurrent(uri, version)) {
            this.stats.abandoned++;
            return;
          }
          this.lastActivity = performance.now();
          this.publish(parsed);
        } catch (error) {
          this.sinks.logError(`analysis of ${uri} failed: ${describeError(error)}`);
        }
      });
      this.timers.set(uri, { cancel: () => clearImmediate(handle) });
    } catch (error) {
      this.sinks.logError(`analysis of ${uri} failed: ${describeError(error)}`);
    }
  }

  private publish(doc: AnalyzedDocument): void {
    const diagnostics = doc.analysis.diagnostics;
    this.sinks.publish(doc.uri, doc.version, diagnostics.length === 0 ? [] : toLspDiagnostics(diagnostics, doc.lineIndex, doc.uri));
  }

  private close(uri: string): void {
    this.summaries.delete(uri);
    this.timers.get(uri)?.cancel();
    this.timers.delete(uri);
    this.cache.delete(uri);
    this.sinks.publish(uri, undefined, []);
  }
}

/** A one-line description of anything thrown, with the stack when there is one. */
export function describeError(error: unknown): string {
  if (error instanceof Error) return error.stack ?? `${error.name}: ${error.message}`;
  return String(error);
}
