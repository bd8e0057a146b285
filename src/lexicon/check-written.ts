// A variety's reconciliation (reconcile.ts) as one job: the input's records counted (once per file),
// the TSV, JSON Lines, rejects, replaced rows and stress report read back and compared with them.
// The PLS file is not part of it: the job starts before the PLS file is written, and the caller
// counts its lexemes afterwards (`plsMismatch`).
//
// A build hands the jobs to a worker thread (check-worker.ts) when the compiled script is there and
// the machine has a second core: the main thread writes the variety's PLS file, and the next
// variety's files, while the worker reads back what was written before. At the end of a
// four-variety build of the CMU dictionary, reading back and reconciling took about 0.25 s per
// variety on the main thread, after writing its PLS file (about 0.2 s), one variety after another
// (CPU profile). Without the worker the same function runs on the main thread.
//
// With the worker, the TSV and JSON Lines files are also read back while they are written: the
// file writer says after each chunk how many bytes its temporary file holds (emit/atomic.ts), and
// the worker reads up to there (`FollowedFiles`), so that at the end of the rows only the last
// chunk is left to read. The file is renamed, not copied, when it is complete, so the handle opened
// on the temporary file reads the finished file. If anything goes wrong on the way, the finished
// file is read from the start, as without following.

import { open, type FileHandle } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";
import type { Diagnostic } from "../diagnostics.js";
import { workerScript } from "../worker-script.js";
import { countInputRecords, countWritten, reconcile, type InputRecords } from "./reconcile.js";
import { reconcileStressReport } from "./reconcile-stress.js";
import { JsonlReader, LineFeeder, TsvReader, type JsonlBack, type TsvBack } from "./readback.js";

export interface CheckJob {
  /** The lexicon file (the findings are positioned in it). */
  readonly lexicon: string;
  /** The variety's override file, when it has one. */
  readonly overrides?: string;
  /** The lexicon and override files as the outputs name them. */
  readonly relLexicon: string;
  readonly relOverrides?: string;
  /** The staged files to read back. */
  readonly files: { readonly tsv?: string; readonly jsonl?: string; readonly rejects: string; readonly replaced?: string; readonly stress: string };
  /** Stress problems the run counted (the stress report must hold as many). */
  readonly stressTotal: number;
  /** The files read back as they were written (`Checker.follow`), by their keys. */
  readonly followed?: { readonly tsv?: number; readonly jsonl?: number };
}

export interface CheckResult {
  /** Records of the input (lexicon and override file). */
  readonly rowsRead: number;
  /** The reconciliation's errors (none when everything is accounted for). */
  readonly errors: Diagnostic[];
  /** Distinct words of the TSV, when written (the PLS file must hold as many lexemes). */
  readonly tsvWords?: number;
}

/**
 * Runs one job; `inputOf` gives a lexicon file's records (counted once per file by the caller);
 * `followed`: the files read back as they were written (on the worker thread).
 */
export async function checkWritten(job: CheckJob, inputOf: (path: string) => Promise<InputRecords>, followed?: FollowedFiles): Promise<CheckResult> {
  const counted = await inputOf(job.lexicon);
  const { stress, ...files } = job.files;
  const tsvKey = job.followed?.tsv;
  const jsonlKey = job.followed?.jsonl;
  const tsvBack = tsvKey !== undefined ? ((await followed?.finish(tsvKey)) as TsvBack | undefined) : undefined;
  const jsonlBack = jsonlKey !== undefined ? ((await followed?.finish(jsonlKey)) as JsonlBack | undefined) : undefined;
  const written = await countWritten(files, { ...(tsvBack !== undefined ? { tsv: tsvBack } : {}), ...(jsonlBack !== undefined ? { jsonl: jsonlBack } : {}) });
  const overInput = job.overrides !== undefined ? await countInputRecords(job.overrides) : undefined;
  const errors = reconcile(job.lexicon, counted, written, overInput !== undefined ? { lexicon: job.relLexicon, overrides: job.relOverrides!, input: overInput } : undefined);
  const sources = [{ file: job.relLexicon, input: counted }, ...(overInput !== undefined ? [{ file: job.relOverrides!, input: overInput }] : [])];
  const notEntries = [...written.rejectLines.map((line, i) => ({ file: written.rejectFiles[i] ?? "", line })), ...(written.replaced ?? []).map((r) => ({ file: r.file, line: r.line }))];
  errors.push(...(await reconcileStressReport(job.lexicon, stress, job.stressTotal, sources, notEntries)));
  return { rowsRead: counted.count + (overInput?.count ?? 0), errors, ...(written.tsvWords !== undefined ? { tsvWords: written.tsvWords } : {}) };
}

/** A run's input files' records, each file counted once: the first asking starts the count. */
export class InputCounts {
  private readonly counts = new Map<string, Promise<InputRecords>>();

  of(path: string): Promise<InputRecords> {
    let p = this.counts.get(path);
    if (p === undefined) {
      this.counts.set(path, (p = countInputRecords(path)));
      // Counted ahead of the checks (`Checker.begin`): a failure is reported to the first check that awaits it.
      p.catch(() => undefined);
    }
    return p;
  }

  /** Records the caller has counted already. */
  know(path: string, records: Promise<InputRecords>): void {
    this.counts.set(path, records);
  }
}

/** Which read-back a followed file gets. */
export type FollowedKind = "tsv" | "jsonl";

/** The messages that follow a file as it is written (main thread to worker). */
export type FollowMessage =
  | { readonly follow: { readonly key: number; readonly path: string; readonly kind: FollowedKind } }
  | { readonly grown: { readonly key: number; readonly bytes: number } }
  | { readonly drop: number };

/** One file read back as it is written: its handle, its lines so far and their read-back. */
class FollowedFile {
  private handle: FileHandle | undefined;
  private failed = false;
  private chain: Promise<void>;
  private readonly reader: TsvReader | JsonlReader;
  private readonly lines: LineFeeder;

  constructor(path: string, kind: FollowedKind) {
    this.reader = kind === "tsv" ? new TsvReader() : new JsonlReader();
    this.lines = new LineFeeder(this.reader.line);
    this.chain = open(path, "r").then(
      (h) => void (this.handle = h),
      () => void (this.failed = true),
    );
  }

  /** The file holds `bytes` bytes now: they are read (in turn with the reads before). */
  grow(bytes: number): void {
    this.chain = this.chain.then(async () => {
      if (this.failed) return;
      try {
        await this.lines.feed(this.handle!, bytes);
      } catch {
        this.failed = true;
      }
    });
  }

  /** The file is complete: the rest is read, the handle closed; undefined when following failed. */
  async finish(): Promise<TsvBack | JsonlBack | undefined> {
    await this.chain;
    try {
      if (this.failed) return undefined;
      await this.lines.feed(this.handle!);
      this.lines.end();
      return this.reader.result();
    } catch {
      return undefined;
    } finally {
      await this.handle?.close().catch(() => undefined);
    }
  }

  async drop(): Promise<void> {
    await this.chain;
    await this.handle?.close().catch(() => undefined);
  }
}

/** The files a worker follows, by key (`Checker.follow` on the main thread gives the keys). */
export class FollowedFiles {
  private readonly files = new Map<number, FollowedFile>();

  /** `tamper`: for the tests, changes each read-back (to show that a check used it). */
  constructor(private readonly tamper?: (back: TsvBack | JsonlBack) => TsvBack | JsonlBack) {}

  take(m: FollowMessage): void {
    if ("follow" in m) this.files.set(m.follow.key, new FollowedFile(m.follow.path, m.follow.kind));
    else if ("grown" in m) this.files.get(m.grown.key)?.grow(m.grown.bytes);
    else {
      const f = this.files.get(m.drop);
      this.files.delete(m.drop);
      void f?.drop();
    }
  }

  /** The read-back of a followed file once it is complete (undefined: not followed, or following failed: read it afresh). */
  async finish(key: number): Promise<TsvBack | JsonlBack | undefined> {
    const f = this.files.get(key);
    this.files.delete(key);
    const back = await f?.finish();
    return back !== undefined && this.tamper !== undefined ? this.tamper(back) : back;
  }
}

/** What a file writer tells as it writes (emit/atomic.ts `written`), and how to stop following. */
export interface Follow {
  readonly key: number;
  readonly written: (temp: string, bytes: number) => void;
  /** The file will not be checked (its variety failed). */
  readonly drop: () => void;
}

/** A file-system error as it crosses from the worker (code, syscall and path kept, so it is reported as one). */
export interface PassedError {
  readonly message: string;
  readonly code?: string;
  readonly syscall?: string;
  readonly path?: string;
  readonly dest?: string;
}

export type CheckReply = { readonly id: number; readonly result: CheckResult } | { readonly id: number; readonly error: PassedError };

export const passError = (e: unknown): PassedError => {
  const x = e as NodeJS.ErrnoException & { dest?: string };
  return {
    message: x instanceof Error ? x.message : String(e),
    ...(typeof x?.code === "string" ? { code: x.code } : {}),
    ...(typeof x?.syscall === "string" ? { syscall: x.syscall } : {}),
    ...(typeof x?.path === "string" ? { path: x.path } : {}),
    ...(typeof x?.dest === "string" ? { dest: x.dest } : {}),
  };
};

const revive = (p: PassedError): Error => Object.assign(new Error(p.message), p);

/** Runs a run's check jobs: on a worker thread when it can, otherwise on this thread; in the order given either way. */
export class Checker {
  private worker: Worker | undefined;
  private readonly pending = new Map<number, { resolve: (r: CheckResult) => void; reject: (e: unknown) => void }>();
  private next = 0;
  private nextFollow = 0;
  private readonly inputs = new InputCounts();
  private broken: Error | undefined;

  /**
   * `known`: the lexicon's records when the caller has counted them (the main thread then uses
   * them; the worker counts again, on its own thread).
   */
  constructor(private readonly lexicon: string, known: Promise<InputRecords> | undefined) {
    if (known !== undefined) this.inputs.know(lexicon, known);
  }

  /** The compiled worker script in this file's folder (dist/src/lexicon, or the bundle's dist/bun), or undefined from TypeScript sources. */
  static script(): string | undefined {
    return workerScript(import.meta.url, "check-worker.js");
  }

  /**
   * Starts the worker thread now, counting the lexicon's records while the run works on its rows,
   * so that they are ready when the first check comes (on this thread they are counted then).
   */
  begin(): void {
    const script = this.workerScript();
    if (script === undefined || this.broken !== undefined) return;
    (this.worker ??= this.startWorker(script)).postMessage({ count: this.lexicon });
  }

  /**
   * Follows a file as it is written, when the checks run on the worker (undefined otherwise: the
   * file is read back whole when its check comes). The job names it by `key` (`CheckJob.followed`).
   */
  follow(kind: FollowedKind): Follow | undefined {
    const script = this.workerScript();
    if (script === undefined || this.broken !== undefined) return undefined;
    const w = (this.worker ??= this.startWorker(script));
    const key = this.nextFollow++;
    let started = false;
    return {
      key,
      written: (temp, bytes) => {
        if (this.worker !== w) return;
        if (!started) {
          started = true;
          w.postMessage({ follow: { key, path: temp, kind } } satisfies FollowMessage);
        }
        w.postMessage({ grown: { key, bytes } } satisfies FollowMessage);
      },
      drop: () => {
        if (this.worker === w) w.postMessage({ drop: key } satisfies FollowMessage);
      },
    };
  }

  run(job: CheckJob): Promise<CheckResult> {
    const script = this.workerScript();
    if (script === undefined) return checkWritten(job, (p) => this.inputs.of(p));
    if (this.broken !== undefined) return Promise.reject(this.broken);
    const w = (this.worker ??= this.startWorker(script));
    const id = this.next++;
    return new Promise<CheckResult>((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      w.postMessage({ id, job });
    });
  }

  /** Stops the worker (jobs still out fail). */
  async close(): Promise<void> {
    const w = this.worker;
    this.worker = undefined;
    if (w !== undefined) await w.terminate();
  }

  private workerScript(): string | undefined {
    return availableParallelism() >= 2 ? Checker.script() : undefined;
  }

  private startWorker(script: string): Worker {
    const w = new Worker(script);
    w.on("message", (m: CheckReply) => {
      const p = this.pending.get(m.id);
      if (p === undefined) return;
      this.pending.delete(m.id);
      if ("result" in m) p.resolve(m.result);
      else p.reject(revive(m.error));
    });
    const fail = (e: Error): void => {
      this.broken ??= e;
      for (const p of this.pending.values()) p.reject(e);
      this.pending.clear();
    };
    w.on("error", fail);
    w.on("exit", (code) => fail(new Error(`the thread checking the written files stopped (exit code ${code}) before its work was done`)));
    return w;
  }
}
