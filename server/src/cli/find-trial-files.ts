import { readdirSync, statSync } from "node:fs";
import { join, resolve } from "node:path";

/**
 * Expands command-line paths into `.trial` files: a file is taken as given, a directory is searched
 * recursively (skipping `node_modules` and hidden directories). Missing paths are returned separately so
 * the command can report them as usage errors.
 */
export function findTrialFiles(paths: readonly string[], cwd: string): { files: string[]; missing: string[] } {
  const files: string[] = [];
  const missing: string[] = [];
  for (const p of paths) {
    const full = resolve(cwd, p);
    let isDirectory: boolean;
    try {
      isDirectory = statSync(full).isDirectory();
    } catch {
      missing.push(p);
      continue;
    }
    if (isDirectory) walk(full, p, files);
    else files.push(p);
  }
  return { files, missing };
}

function walk(full: string, shown: string, out: string[]): void {
  const entries = readdirSync(full, { withFileTypes: true }).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  for (const entry of entries) {
    if (entry.name.startsWith(".") || entry.name === "node_modules") continue;
    if (entry.isDirectory()) walk(join(full, entry.name), join(shown, entry.name), out);
    else if (entry.isFile() && entry.name.endsWith(".trial")) out.push(join(shown, entry.name));
  }
}
