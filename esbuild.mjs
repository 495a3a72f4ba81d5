// Bundles the entry points into dist/ and makes the CLI's code cache. The root package is ESM ("type":
// "module"), so the bundles are CommonJS files with a .cjs extension: VS Code's extension host loads them
// with require().
import { spawnSync } from "node:child_process";
import { rmSync } from "node:fs";
import { build } from "esbuild";

/**
 * vega-canvas (pulled in by vega) starts with a top-level `await import('canvas')`, which a CommonJS
 * bundle cannot contain. Trialbook draws plots only as SVG strings (renderer "none"), never on a canvas,
 * so the bundles get this stub instead: no canvas and no image, which Vega handles by estimating text
 * widths from the font size.
 */
const vegaCanvasStub = {
  name: "vega-canvas-stub",
  setup(b) {
    b.onResolve({ filter: /^vega-canvas$/ }, () => ({ path: "vega-canvas", namespace: "vega-canvas-stub" }));
    b.onLoad({ filter: /.*/, namespace: "vega-canvas-stub" }, () => ({
      contents: "export function canvas() { return null; }\nexport function image() { return null; }\n",
      loader: "js",
    }));
  },
};

/**
 * The report renderer pulls in Vega and Vega-Lite (about two thirds of the code). It is bundled on its own
 * as dist/report.cjs and loaded by the CLI and the server only when a report is asked for, so that every
 * other command starts without parsing it (`trialbook --version` 0.40 s -> see docs/performance.md).
 */
const separateReportRenderer = {
  name: "separate-report-renderer",
  setup(b) {
    b.onResolve({ filter: /render-report\.js$/ }, (args) =>
      args.kind === "dynamic-import" ? { path: "./report.cjs", external: true } : undefined,
    );
  },
};

const common = {
  bundle: true,
  platform: "node",
  target: "node20",
  format: "cjs",
  sourcemap: true,
  logLevel: "warning",
  // Read by grammar/src/tokens.ts: the bundles skip Chevrotain's grammar self-checks (the tests run them).
  define: { __TRIALBOOK_BUNDLE__: "true" },
  plugins: [vegaCanvasStub],
};

await Promise.all([
  build({ ...common, entryPoints: ["extension/src/extension.ts"], outfile: "dist/extension.cjs", external: ["vscode"] }),
  build({ ...common, entryPoints: ["server/src/report/render-report.ts"], outfile: "dist/report.cjs" }),
  build({ ...common, entryPoints: ["server/src/lsp/main.ts"], outfile: "dist/server.cjs", plugins: [...common.plugins, separateReportRenderer] }),
  // The server's analysis worker for large documents (server/src/lsp/analysis-worker.ts).
  build({ ...common, entryPoints: ["server/src/lsp/analysis-worker.ts"], outfile: "dist/analysis-worker.cjs", plugins: [...common.plugins, separateReportRenderer] }),
  build({
    ...common,
    entryPoints: ["server/src/cli/main.ts"],
    outfile: "dist/cli-main.cjs",
    plugins: [...common.plugins, separateReportRenderer],
    // import("./report.cjs") becomes a require: the launcher runs this bundle through vm.Script, where
    // Node 20 offers no dynamic-import loader.
    supported: { "dynamic-import": false },
  }),
  // The CLI's helper thread for large files (server/src/cli/helper-worker.ts).
  build({ ...common, entryPoints: ["server/src/cli/helper-worker.ts"], outfile: "dist/helper-worker.cjs" }),
  // The bin: a small loader that runs dist/cli-main.cjs with V8's code cache (server/src/cli/launcher.ts).
  build({ ...common, entryPoints: ["server/src/cli/launch-main.ts"], outfile: "dist/cli.cjs", banner: { js: "#!/usr/bin/env node" } }),
]);

// The code cache of the CLI bundle: one training run on an invented sample compiles the code an analysis
// uses, and the launcher saves it at exit. A failed training leaves no cache (the CLI then compiles as usual).
rmSync("dist/cli-main.code-cache", { force: true });
const training = spawnSync(process.execPath, ["dist/cli.cjs", "analyze", "--format", "text", "samples/two-factor.trial"], {
  env: { ...process.env, TRIALBOOK_WRITE_CODE_CACHE: "1" },
  stdio: ["ignore", "ignore", "inherit"],
});
if (training.status !== 0) {
  rmSync("dist/cli-main.code-cache", { force: true });
  console.warn("esbuild.mjs: the CLI's code-cache training run failed; dist/cli-main.code-cache not written");
}
