// A lexicon's output folder (build/<lexicon>/) for the length of one build: checked to belong to
// this lexicon folder, locked against a second build, cleaned after killed runs, and given a run
// record (run.json: timings, machine, workers, the absolute source folder — the one file of a
// build that comparisons never read).

import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, realpathSync } from "node:fs";
import { arch, cpus, hostname, platform, totalmem } from "node:os";
import { join } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { isFsError } from "../tempfile.js";
import { acquireLock, LOCK_NAME } from "./lock.js";
import { MANIFEST_NAME } from "./manifest.js";
import { recoverOutputs, type Recovery } from "./outdir.js";
import { outputError, relativeTo } from "./summary.js";

export const RUN_RECORD = "run.json";

/** One variety's line in run.json. */
export interface VarietyRun {
  readonly name: string;
  /** "written": its folder was replaced by this run; "failed": it keeps the previous run's files. */
  readonly status: "written" | "failed";
  readonly compileMs: number;
  readonly runMs: number;
}

/** run.json. */
export interface RunRecord {
  readonly format: 1;
  readonly runId: string;
  /** The lexicon folder built (absolute, resolved): which folder this output belongs to. */
  readonly source: string;
  readonly started: string;
  readonly finished: string | null;
  readonly machine: { readonly host: string; readonly platform: string; readonly arch: string; readonly cpus: number; readonly cpuModel: string; readonly memoryBytes: number; readonly node: string };
  readonly workers: number;
  readonly varieties: readonly VarietyRun[];
}

export interface BuildOutput {
  /** build/<lexicon>/ (absolute). */
  readonly root: string;
  /** What the clean-up after killed runs did. */
  readonly recovery: Recovery;
  /** Adds a variety's line to the run record. */
  record(v: VarietyRun): void;
  /** Writes the finished run record and releases the lock (call once, also after a failure). */
  close(workers: number): Promise<Diagnostic[]>;
}

const realSource = (dir: string): string => {
  try {
    return realpathSync(dir);
  } catch {
    return dir;
  }
};

/** The source folder named by an existing run.json, if there is a readable one. */
function recordedSource(root: string): string | undefined {
  try {
    const o = JSON.parse(readFileSync(join(root, RUN_RECORD), "utf8")) as { source?: unknown };
    return typeof o.source === "string" ? o.source : undefined;
  } catch {
    return undefined;
  }
}

const pos = (path: string): { file: string; line: number; column: number } => {
  const near = relativeTo(process.cwd(), path);
  return { file: near.startsWith("..") ? path : near, line: 1, column: 1 };
};

/**
 * Opens `root` (build/<lexicon>/ or the `-o` folder's) for a build of the lexicon folder `sourceDir`.
 * Refuses, with one error and nothing written, when the folder cannot be created or written, when
 * another live build holds its lock, or when its run.json says it holds the build of another
 * lexicon folder that still exists (two lexicon folders with the same name). Otherwise takes the lock, puts back or removes
 * what killed runs left (lexicon/outdir.ts) and writes a first run.json naming the source folder.
 */
export async function openBuildOutput(root: string, sourceDir: string): Promise<{ ok: true; output: BuildOutput } | { ok: false; diagnostics: Diagnostic[] }> {
  const source = realSource(sourceDir);
  const fail = (d: Diagnostic): { ok: false; diagnostics: Diagnostic[] } => ({ ok: false, diagnostics: [d] });
  let lock: ReturnType<typeof acquireLock>;
  try {
    mkdirSync(root, { recursive: true });
    lock = acquireLock(root, source);
  } catch (err) {
    if (!isFsError(err)) throw err;
    return fail(outputError(root, err));
  }
  const shown = pos(root).file;
  if (!lock.ok) {
    const h = lock.holder;
    const who = h.pid > 0 ? `another build (process ${h.pid}${h.host !== hostname() ? ` on ${h.host}` : ""}, building ${h.source}, since ${h.started})` : `a lock file Strata cannot read`;
    return fail(diagnostic("error", "output/locked", `The output folder ${shown} is locked by ${who}; wait for it to finish or build elsewhere with -o (remove ${join(shown, LOCK_NAME)} only if no build is running).`, pos(root)));
  }
  // A recorded folder that no longer holds a lexicon (the checkout moved, the folder was renamed)
  // claims nothing: this build takes its place.
  const owner = recordedSource(root);
  if (owner !== undefined && owner !== source && existsSync(join(owner, MANIFEST_NAME))) {
    lock.release();
    return fail(diagnostic("error", "output/other-lexicon", `The output folder ${shown} holds the build of another lexicon folder (${owner}); build this one elsewhere with -o, or remove ${shown}.`, pos(root)));
  }
  const recovery = recoverOutputs(root);
  const varieties: VarietyRun[] = [];
  const c = cpus();
  const base = {
    format: 1 as const,
    runId: randomBytes(8).toString("hex"),
    source,
    started: new Date().toISOString(),
    machine: { host: hostname(), platform: platform(), arch: arch(), cpus: c.length, cpuModel: c[0]?.model ?? "", memoryBytes: totalmem(), node: process.version },
  };
  const write = (finished: string | null, workers: number): Promise<number> => {
    const rec: RunRecord = { ...base, finished, workers, varieties };
    return writeFileAtomic(join(root, RUN_RECORD), JSON.stringify(rec, null, 2) + "\n");
  };
  try {
    await write(null, 0);
  } catch (err) {
    lock.release();
    if (!isFsError(err)) throw err;
    return fail(outputError(join(root, RUN_RECORD), err));
  }
  let closed = false;
  return {
    ok: true,
    output: {
      root,
      recovery,
      record: (v) => void varieties.push(v),
      async close(workers: number): Promise<Diagnostic[]> {
        if (closed) return [];
        closed = true;
        try {
          await write(new Date().toISOString(), workers);
          return [];
        } catch (err) {
          return [outputError(join(root, RUN_RECORD), err)];
        } finally {
          lock.release();
        }
      },
    },
  };
}
