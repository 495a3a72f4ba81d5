/**
 * The analysis worker thread (bundled to dist/analysis-worker.cjs): analyses one version of a large document
 * off the server's main thread and sends back what the server answers most often after an edit, as plain
 * data: the LSP diagnostics, the code lenses and the status. The analysis itself (with its functions and
 * lazily built arrays) stays here; nothing else of it can be posted.
 */
import { parentPort } from "node:worker_threads";
import { codeLenses } from "./code-lens.js";
import { toLspDiagnostics } from "./convert.js";
import { analyzeText, describeError } from "./documents.js";
import type { WorkerJob, WorkerReply } from "./analysis-worker-protocol.js";
import { statusOf } from "./status-of.js";

parentPort?.on("message", (job: WorkerJob) => {
  let reply: WorkerReply;
  try {
    const doc = analyzeText(job.uri, job.version, job.text, job.defaults);
    reply = {
      id: job.id,
      ok: true,
      summary: { version: job.version, diagnostics: toLspDiagnostics(doc.analysis.diagnostics, doc.lineIndex, doc.uri), lenses: codeLenses(doc), status: statusOf(doc) },
    };
  } catch (error) {
    reply = { id: job.id, ok: false, error: describeError(error) };
  }
  parentPort!.postMessage(reply);
});
