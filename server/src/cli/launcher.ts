/**
 * The `trialbook` command's entry (bundled alone to dist/cli.cjs): runs the CLI bundle (dist/cli-main.cjs)
 * with V8's code cache for it (dist/cli-main.code-cache), made by `npm run build`.
 *
 * Why: a CLI process compiles its code afresh every time, and for a small file that is a large share of the
 * run: `analyze --format text` of a 100-run file took 0.43 s with about 0.1 s of it compiling the bundle
 * and the functions it calls. V8 can save the compiled code of a script and take it back the next time;
 * Node 20 has no switch for that (module.enableCompileCache came in Node 22), so this loader compiles the
 * bundle through `vm.Script` with the cached data, as Node would with its own module wrapper. The cache is
 * written only by the build (`TRIALBOOK_WRITE_CODE_CACHE=1`, after a training run), never by a user's run:
 * the installed files stay as they were installed. V8 checks the cache against its version, its flags and
 * the source, and compiles normally when it does not match (another Node, `--cpu-prof`), so a stale or
 * damaged cache costs only the time it would have saved. `TRIALBOOK_DEBUG_CODE_CACHE=1` says on stderr
 * whether the cache was used.
 */
import { readFileSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { Script } from "node:vm";

/** The CLI bundle and its code cache, beside this launcher. */
export function launchPaths(directory: string): { readonly main: string; readonly cache: string } {
  return { main: join(directory, "cli-main.cjs"), cache: join(directory, "cli-main.code-cache") };
}

/** The cache's bytes, or undefined when there is none or it cannot be read (the bundle then compiles as usual). */
function readCache(path: string): Buffer | undefined {
  try {
    return readFileSync(path);
  } catch {
    return undefined;
  }
}

/** Node's CommonJS wrapper: the bundle sees the same five bindings as a module loaded by `require`. */
const WRAPPER_HEAD = "(function (exports, require, module, __filename, __dirname) { ";
const WRAPPER_TAIL = "\n});";

/** Compiles and runs the CLI bundle in `directory`, with its code cache when there is a usable one. */
export function launch(directory: string, env: NodeJS.ProcessEnv): void {
  const { main, cache } = launchPaths(directory);
  const source = readFileSync(main, "utf8");
  const cachedData = readCache(cache);
  const script = new Script(WRAPPER_HEAD + source + WRAPPER_TAIL, {
    filename: main,
    ...(cachedData ? { cachedData } : {}),
  });
  if (env.TRIALBOOK_DEBUG_CODE_CACHE === "1") {
    process.stderr.write(`code cache: ${cachedData === undefined ? "absent" : script.cachedDataRejected === true ? "rejected" : "used"}\n`);
  }
  if (env.TRIALBOOK_WRITE_CODE_CACHE === "1") {
    // After the run, so that the functions the run compiled are in the cache too (V8 keeps them then).
    process.once("exit", () => writeFileSync(cache, script.createCachedData()));
  }
  const run = script.runInThisContext() as (exports: object, require: NodeJS.Require, module: { exports: object }, filename: string, dirname: string) => void;
  const module = { exports: {} };
  run.call(module.exports, module.exports, createRequire(main), module, main, dirname(main));
}
