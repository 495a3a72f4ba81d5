/**
 * Keeps the dependency arrows of ARCHITECTURE.md honest by reading the import lines of every source file.
 */
import assert from "node:assert/strict";
import fs from "node:fs";
import path from "node:path";

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const full = path.join(dir, e.name);
    return e.isDirectory() ? sourceFiles(full) : e.name.endsWith(".ts") ? [full] : [];
  });
}

/** Every module specifier imported (statically or dynamically) by a file, resolved to a repo path when relative. */
function importsOf(file: string): string[] {
  const text = fs.readFileSync(file, "utf8");
  const specs = [...text.matchAll(/(?:^|\n)\s*(?:import|export)[^'"]*?from\s*["']([^"']+)["']|import\(\s*["']([^"']+)["']\s*\)/g)].map((m) => m[1] ?? m[2]!);
  return specs.map((s) => (s.startsWith(".") ? path.relative(".", path.resolve(path.dirname(file), s)) : s));
}

function violations(dir: string, forbidden: (spec: string) => boolean): string[] {
  return sourceFiles(dir).flatMap((f) => importsOf(f).filter(forbidden).map((s) => `${f} imports ${s}`));
}

describe("layering (ARCHITECTURE.md invariants)", () => {
  it("the import scanner sees relative, package and dynamic imports", () => {
    const seen = importsOf("server/src/cli/read-text.ts");
    assert.ok(seen.includes("server/src/analysis/analyze-document.js"), seen.join(", "));
    assert.ok(seen.some((s) => s.startsWith("node:")), seen.join(", "));
    assert.ok(importsOf("server/src/lsp/server.ts").some((s) => s.startsWith("vscode-languageserver")));
  });

  it("stats imports nothing from the rest of the project", () => {
    assert.deepEqual(violations("server/src/stats", (s) => (s.startsWith("server/") || s.startsWith("grammar/")) && !s.startsWith("server/src/stats/")), []);
  });

  it("grammar knows nothing of the server, the editor or LSP", () => {
    assert.deepEqual(violations("grammar/src", (s) => s.startsWith("server/") || s.startsWith("extension/") || s.startsWith("vscode")), []);
  });

  it("the engine (analysis, planning, report, import, export, text) never imports LSP, the CLI or vscode", () => {
    for (const dir of ["analysis", "planning", "report", "import", "export", "text"]) {
      assert.deepEqual(
        violations(`server/src/${dir}`, (s) => s === "vscode" || s.startsWith("vscode-languageserver") || s.startsWith("server/src/lsp") || s.startsWith("server/src/cli")),
        [],
        dir,
      );
    }
  });

  it("only the LSP layer imports vscode-languageserver, and the CLI never imports the LSP layer", () => {
    assert.deepEqual(violations("server/src/cli", (s) => s.startsWith("server/src/lsp") || s.startsWith("vscode-languageserver")), []);
  });

  it("the extension imports nothing of the server but the protocol", () => {
    assert.deepEqual(violations("extension/src", (s) => (s.startsWith("server/") && s !== "server/src/protocol.js") || s.startsWith("grammar/")), []);
  });
});
