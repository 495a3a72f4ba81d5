// Bundles the three entry points into dist/. The root package is ESM ("type": "module"), so the
// bundles are CommonJS files with a .cjs extension: VS Code's extension host loads them with require().
import { build } from "esbuild";

const common = {
  bundle: true,
  platform: "node",
  target: "node20",
  format: "cjs",
  sourcemap: true,
  logLevel: "warning",
};

await Promise.all([
  build({ ...common, entryPoints: ["extension/src/extension.ts"], outfile: "dist/extension.cjs", external: ["vscode"] }),
  build({ ...common, entryPoints: ["server/src/lsp/main.ts"], outfile: "dist/server.cjs" }),
  build({ ...common, entryPoints: ["server/src/cli/main.ts"], outfile: "dist/cli.cjs", banner: { js: "#!/usr/bin/env node" } }),
]);
