// Paths named on the command line, checked before any work: an input that is missing or a folder,
// an output under a file or onto a folder, an output that would overwrite an input. Also turns a
// file-system error that escapes a library call into one positioned line.

import { existsSync, realpathSync, statSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { commandLineError } from "./cmdline.js";

/** An input file given as `value` of `flags` (or as a positional argument when `flags` is empty); `-` is standard input. */
export function checkInputFile(value: string, flags: readonly string[] = [], what = "file"): Diagnostic | undefined {
  if (value === "-") return undefined;
  let st;
  try {
    st = statSync(value);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === "ENOTDIR" ? "part of the path is a file, not a folder" : code === "EACCES" ? "permission is denied" : "there is no such file";
    return commandLineError("cli/no-such-file", `Cannot read the ${what} '${value}': ${why}.`, value, flags);
  }
  if (st.isDirectory()) return commandLineError("cli/is-a-folder", `The ${what} '${value}' is a folder; give a file.`, value, flags);
  return undefined;
}

/** An input folder (e.g. a lexicon folder). */
export function checkInputFolder(value: string, flags: readonly string[] = [], what = "folder"): Diagnostic | undefined {
  if (!existsSync(value)) return commandLineError("cli/no-such-folder", `The ${what} '${value}' does not exist.`, value, flags);
  if (!statSync(value).isDirectory()) return commandLineError("cli/not-a-folder", `The ${what} '${value}' is a file; give a folder.`, value, flags);
  return undefined;
}

/** The nearest existing ancestor of a path (the path itself when it exists). */
function nearestExisting(p: string): string {
  let cur = resolve(p);
  while (!existsSync(cur)) {
    const up = dirname(cur);
    if (up === cur) break;
    cur = up;
  }
  return cur;
}

/** An output path: a file (`kind` "file") or a folder (`kind` "folder") that can be created there. */
export function checkOutputPath(value: string, flags: readonly string[], kind: "file" | "folder"): Diagnostic | undefined {
  if (value === "-" && kind === "file") return undefined;
  const p = resolve(value);
  if (existsSync(p)) {
    const dir = statSync(p).isDirectory();
    if (kind === "file" && dir) return commandLineError("cli/output-is-folder", `The output '${value}' is a folder; give a file name.`, value, flags);
    if (kind === "folder" && !dir) return commandLineError("cli/output-is-file", `The output '${value}' is a file; give a folder.`, value, flags);
    return undefined;
  }
  const above = nearestExisting(dirname(p));
  if (!statSync(above).isDirectory()) {
    return commandLineError("cli/output-under-file", `Cannot write '${value}': '${above}' is a file, not a folder.`, value, flags);
  }
  return undefined;
}

/** True when two paths name the same file (symbolic links resolved); a missing path equals only itself. */
export function sameFile(a: string, b: string): boolean {
  const real = (p: string): string => {
    try {
      return realpathSync(p);
    } catch {
      return resolve(p);
    }
  };
  return real(a) === real(b);
}

/** An output that would overwrite one of the inputs: refused before anything is written. */
export function checkNotAnInput(out: { value: string; flags: readonly string[] }, inputs: readonly string[]): Diagnostic | undefined {
  if (out.value === "-") return undefined;
  const hit = inputs.find((i) => i !== "-" && sameFile(out.value, i));
  if (hit === undefined) return undefined;
  return commandLineError("cli/output-is-input", `The output '${out.value}' is the input '${hit}'; writing it would destroy the input. Choose another path.`, out.value, out.flags);
}

const ERRNO_REASONS: Record<string, string> = {
  ENOENT: "there is no such file or folder",
  EISDIR: "it is a folder, not a file",
  ENOTDIR: "part of the path is a file, not a folder",
  EACCES: "permission is denied",
  EPERM: "the operation is not permitted",
  EEXIST: "it already exists",
  ENOSPC: "the disk is full",
  EROFS: "the file system is read-only",
  EMFILE: "too many files are open",
  ENAMETOOLONG: "the name is too long",
  ELOOP: "symbolic links loop",
};

/** A file-system error (with a path) as one positioned line; undefined for any other error. */
export function fileSystemDiagnostic(err: unknown): Diagnostic | undefined {
  const e = err as NodeJS.ErrnoException;
  if (e === null || typeof e !== "object" || typeof e.code !== "string" || typeof e.path !== "string") return undefined;
  const why = ERRNO_REASONS[e.code];
  if (why === undefined) return undefined;
  const verb = e.syscall === "open" || e.syscall === "read" || e.syscall === "scandir" || e.syscall === "stat" || e.syscall === "lstat" ? "use" : e.syscall === "mkdir" ? "create the folder" : e.syscall === "rename" || e.syscall === "write" ? "write" : "use";
  return diagnostic("error", `cli/${e.code.toLowerCase()}`, `Cannot ${verb} '${e.path}': ${why}.`, { file: e.path, line: 1, column: 1 });
}
