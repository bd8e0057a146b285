// A pool of worker threads for the batch runner. Batches go out round-robin and come back in
// submission order, so output is identical to a single-threaded run. Only usable from compiled
// JavaScript (dist/): under a TypeScript test runner the caller falls back to one thread.

import { Worker } from "node:worker_threads";
import { fileURLToPath } from "node:url";
import { existsSync } from "node:fs";
import { namedProjectRoot } from "../grammar/index.js";
import type { Transcription } from "./engine.js";
import type { WorkerBatch, WorkerReply, WorkerSetup } from "./worker.js";

export class WorkerPool {
  private readonly workers: Worker[] = [];
  private readonly pending = new Map<number, { resolve: (r: (Transcription | null)[]) => void; reject: (e: unknown) => void }>();
  private next = 0;
  private failure: Error | undefined;

  private constructor() {}

  get size(): number {
    return this.workers.length;
  }

  /** The compiled worker script beside this file, or undefined when running from TypeScript sources. */
  static script(): string | undefined {
    const here = fileURLToPath(import.meta.url);
    if (!here.endsWith(".js")) return undefined;
    const w = here.replace(/pool\.js$/, "worker.js");
    return existsSync(w) ? w : undefined;
  }

  /** Starts `n` workers and waits until each has loaded the grammar. */
  static async start(n: number, setup: WorkerSetup): Promise<WorkerPool> {
    const script = WorkerPool.script();
    if (script === undefined) throw new Error("worker threads need the compiled dist/ build");
    const pool = new WorkerPool();
    await Promise.all(
      Array.from({ length: n }, () =>
        new Promise<void>((resolve, reject) => {
          const w = new Worker(script, { workerData: { ...setup, ...(namedProjectRoot() !== undefined ? { root: namedProjectRoot() } : {}) } satisfies WorkerSetup });
          pool.workers.push(w);
          let ready = false;
          w.on("message", (m: WorkerReply) => {
            if (m.kind === "ready") {
              ready = true;
              resolve();
            } else if (m.kind === "failed") reject(new Error(m.message));
            else pool.settle(m.batch, m.results);
          });
          w.on("error", (e) => {
            pool.fail(e);
            if (!ready) reject(e);
          });
          w.on("exit", (code) => {
            if (code !== 0) pool.fail(new Error(`a worker thread exited with code ${code}`));
          });
        }),
      ),
    );
    return pool;
  }

  /** Sends one batch of encoded words; resolves with one transcription (or null) per word. */
  submit(words: readonly { ids: readonly number[]; bids: readonly number[] }[]): Promise<(Transcription | null)[]> {
    if (this.failure !== undefined) return Promise.reject(this.failure);
    let total = 0;
    for (const w of words) total += w.ids.length + w.bids.length;
    const ids = new Int32Array(total);
    const offsets = new Int32Array(words.length + 1);
    const splits = new Int32Array(words.length);
    let at = 0;
    words.forEach((w, i) => {
      offsets[i] = at;
      ids.set(w.ids, at);
      at += w.ids.length;
      splits[i] = at;
      ids.set(w.bids, at);
      at += w.bids.length;
    });
    offsets[words.length] = at;
    const batch = this.next++;
    const msg: WorkerBatch = { batch, ids, offsets, splits };
    const p = new Promise<(Transcription | null)[]>((resolve, reject) => this.pending.set(batch, { resolve, reject }));
    this.workers[batch % this.workers.length]!.postMessage(msg, [ids.buffer, offsets.buffer, splits.buffer]);
    return p;
  }

  private settle(batch: number, results: (Transcription | null)[]): void {
    const p = this.pending.get(batch);
    this.pending.delete(batch);
    p?.resolve(results);
  }

  private fail(e: Error): void {
    this.failure ??= e;
    for (const p of this.pending.values()) p.reject(e);
    this.pending.clear();
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
