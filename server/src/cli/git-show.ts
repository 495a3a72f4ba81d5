import { execFile } from "node:child_process";
import { basename, dirname, resolve } from "node:path";

/** The text of a file at a git revision, or why it could not be read. */
export type GitShowResult = { readonly ok: true; readonly text: string } | { readonly ok: false; readonly reason: string };

/** Largest file text accepted from git (bytes); larger revisions are refused rather than exhausting memory. */
const MAX_BUFFER = 1 << 30;

/**
 * Reads `file` (a path relative to `cwd`, or absolute) as it was at revision `rev`, with `git show
 * REV:./NAME` run in the file's directory, so the path is resolved relative to that directory whatever the
 * repository's layout. The only module of the CLI that runs git. Never throws: a missing git, a path outside
 * a repository, an unknown revision or a file absent at that revision all give `{ ok: false, reason }`.
 */
export function readFileAtRevision(cwd: string, file: string, rev: string): Promise<GitShowResult> {
  // A revision starting with '-' would be read by git as an option.
  if (rev === "" || rev.startsWith("-") || /[\u0000-\u001f]/.test(rev)) {
    return Promise.resolve({ ok: false, reason: `'${rev}' is not a revision name.` });
  }
  const full = resolve(cwd, file);
  return new Promise((done) => {
    execFile(
      "git",
      ["show", `${rev}:./${basename(full)}`],
      { cwd: dirname(full), encoding: "utf8", maxBuffer: MAX_BUFFER, windowsHide: true, env: { ...process.env, GIT_PAGER: "cat", LC_ALL: "C" } },
      (error, stdout, stderr) => {
        if (!error) {
          done({ ok: true, text: stdout });
          return;
        }
        const code = (error as NodeJS.ErrnoException).code;
        if (code === "ENOENT") done({ ok: false, reason: "git is not installed or not on the PATH." });
        else done({ ok: false, reason: (stderr || error.message).trim().split("\n")[0] ?? "git show failed." });
      },
    );
  });
}
