import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { dirname, join, relative, resolve, sep } from "node:path";
import ignore, { type Ignore } from "ignore";

/** The `.trial` files found for a command line, and the paths that do not exist. */
export interface FoundTrialFiles {
  /** Paths as shown to the user: given files as written, found files joined onto the directory as written. */
  readonly files: string[];
  readonly missing: string[];
}

/**
 * Expands command-line paths into `.trial` files. A file is taken as given (even when a `.gitignore` lists
 * it: naming a file is a request to check it). A directory is searched recursively, in name order, skipping
 * `.git`, `node_modules`, hidden entries and everything the repository's ignore rules exclude: the
 * `.gitignore` files from the repository root (the nearest ancestor holding `.git`) down to each directory,
 * and `.git/info/exclude`. Rules are matched by the `ignore` package, which implements the gitignore
 * pattern rules (gitignore(5)); a rule in a deeper `.gitignore` overrides one above it, as in git.
 * Missing paths are returned separately so the command can report them as usage errors.
 */
export function findTrialFiles(paths: readonly string[], cwd: string): FoundTrialFiles {
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
    if (isDirectory) walk(full, p, inheritedRules(full), files);
    else files.push(p);
  }
  return { files, missing };
}

/** The rules of one ignore file, matched against paths relative to `base`. */
interface RuleLayer {
  readonly base: string;
  readonly rules: Ignore;
}

/** Ignore layers that apply to `directory` from above it: the repository's exclude file and ancestors' `.gitignore`s. */
function inheritedRules(directory: string): RuleLayer[] {
  const root = repositoryRoot(directory);
  if (root === undefined) return [];
  const layers: RuleLayer[] = [];
  const exclude = readRules(join(root, ".git", "info", "exclude"));
  if (exclude) layers.push({ base: root, rules: exclude });
  // Ancestors strictly above `directory`, root first; `directory`'s own file is read by `walk`.
  const chain: string[] = [];
  for (let d = directory; d !== root && dirname(d) !== d; ) {
    d = dirname(d);
    chain.unshift(d);
  }
  for (const d of chain) {
    const rules = readRules(join(d, ".gitignore"));
    if (rules) layers.push({ base: d, rules });
  }
  return layers;
}

/** The nearest directory at or above `directory` that holds `.git`, or undefined outside a repository. */
function repositoryRoot(directory: string): string | undefined {
  for (let d = directory; ; d = dirname(d)) {
    if (existsSync(join(d, ".git"))) return d;
    if (dirname(d) === d) return undefined;
  }
}

function readRules(file: string): Ignore | undefined {
  let text: string;
  try {
    text = readFileSync(file, "utf8");
  } catch {
    return undefined;
  }
  return ignore().add(text);
}

/** True when the layers, applied shallow to deep, leave `full` ignored (`isDirectory` adds git's trailing slash). */
function isIgnored(layers: readonly RuleLayer[], full: string, isDirectory: boolean): boolean {
  let ignored = false;
  for (const { base, rules } of layers) {
    const rel = relative(base, full).split(sep).join("/");
    if (rel === "" || rel.startsWith("..")) continue;
    const result = rules.test(isDirectory ? rel + "/" : rel);
    if (result.ignored) ignored = true;
    else if (result.unignored) ignored = false;
  }
  return ignored;
}

function walk(full: string, shown: string, inherited: readonly RuleLayer[], out: string[]): void {
  let entries;
  try {
    entries = readdirSync(full, { withFileTypes: true });
  } catch {
    return; // An unreadable directory holds nothing we can check; git would skip it too.
  }
  entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  const own = readRules(join(full, ".gitignore"));
  const layers = own ? [...inherited, { base: full, rules: own }] : inherited;
  for (const entry of entries) {
    if (entry.name.startsWith(".") || entry.name === "node_modules") continue;
    const child = join(full, entry.name);
    if (entry.isDirectory()) {
      if (!isIgnored(layers, child, true)) walk(child, join(shown, entry.name), layers, out);
    } else if (entry.isFile() && entry.name.endsWith(".trial") && !isIgnored(layers, child, false)) {
      out.push(join(shown, entry.name));
    }
  }
}
