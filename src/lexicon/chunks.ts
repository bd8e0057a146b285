// The lexicon through worker threads, a chunk of the file each. The main thread reads the file as
// bytes and cuts it just after line feeds (a line feed always ends a record, records.ts), so every
// chunk starts at a record boundary on a line it knows (it counts the line ends of the chunks
// before). Each worker reads, transcribes and formats whole chunks (worker.ts); what needs the
// whole file in order is resolved here, chunk by chunk in file order: the header (read from the
// first chunk before any other goes out), duplicate ids and the entry keys (`word#2` counts the
// earlier rows of the word: each chunk's words and ids come back first, and the worker is told the
// counts before the chunk and which ids are taken before it formats anything). The chunks' results
// are handed on strictly in file order. Only usable from compiled JavaScript (dist/): under a
// TypeScript test runner the runner stays on one thread.

import { Worker } from "node:worker_threads";
import { workerScript } from "../worker-script.js";
import { namedProjectRoot } from "../grammar/index.js";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { idBook, openFile, type HeaderColumns } from "./read.js";
import { lineEnds } from "./read-chunk.js";
import type { ChunkDone, ChunkWords, FromWorker, ToWorker, WorkerSetup } from "./worker.js";
import type { ChunkLane } from "./chunk-lane.js";

/** Bytes per chunk (cut at the last line feed after this many; the first chunk is smaller, to find the header soon). */
const CHUNK_BYTES = 128 << 10;
const FIRST_CHUNK_BYTES = 16 << 10;
/** Chunks out at once per lane (bounds memory; enough to keep each worker busy between its messages). */
const AHEAD = 3;
/** Chunks a worker has out before the main thread's lane takes one. */
const WORKER_QUEUE = 2;

interface Deferred<T> {
  promise: Promise<T>;
  resolve: (v: T) => void;
  reject: (e: unknown) => void;
}

function deferred<T>(): Deferred<T> {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  promise.catch(() => undefined);
  return { promise, resolve, reject };
}

interface Chunk {
  readonly chunk: number;
  readonly worker: number;
  /** The chunk's words and ids, once its lane has read it. */
  words?: ChunkWords;
  /** Settled once the chunk's keys and ids are resolved (and its lane told to go on). */
  readonly resolved: Deferred<void>;
  readonly done: Deferred<ChunkDone>;
}

/** What a chunked read of the lexicon found besides its rows (as the streaming reader's `diagnostics` and `stats`). */
export interface ChunkedRead {
  readonly diagnostics: Diagnostic[];
  /** Data records after the header (rows + rejects). */
  dataLines: number;
}

/** Where a chunk's messages go: a worker thread, or the main thread's own lane. */
interface Lane {
  post(m: ToWorker, transfer: ArrayBuffer[]): void;
}

export class ChunkPool {
  private readonly lanes: Lane[] = [];
  private readonly workers: Worker[] = [];
  private readonly out: number[] = [];
  private readonly chunks = new Map<number, Chunk>();
  private failure: Error | undefined;
  private closing = false;
  /** Resolves the chunks read so far, in file order (set by `run`). */
  private pump: (() => void) | undefined;

  private constructor() {}

  /** Lanes the chunks are spread over (worker threads, and the main thread when it takes part). */
  get size(): number {
    return this.lanes.length;
  }

  /**
   * The compiled worker script in this file's folder (dist/src/lexicon, or the bundle's dist/bun),
   * or undefined when running from TypeScript sources.
   */
  static script(): string | undefined {
    return workerScript(import.meta.url, "worker.js");
  }

  /**
   * Starts `n` workers loading the run's grammars; returns at once (chunks sent meanwhile wait in
   * the workers' queues, so their start-up overlaps the main thread's work). The main thread takes
   * chunks too, on the lane `main` (between its other work: reading, resolving, writing), so the
   * first chunks are under way before any worker has started.
   */
  static start(n: number, setup: WorkerSetup, main: ChunkLane): ChunkPool {
    const script = ChunkPool.script();
    if (script === undefined) throw new Error("worker threads need the compiled dist/ build");
    const pool = new ChunkPool();
    pool.addLane(localLane(main, (m) => pool.receive(0, m), (e) => pool.fail(e)));
    const root = namedProjectRoot();
    for (let k = 0; k < n; k++) {
      const w = new Worker(script, { workerData: { ...setup, ...(root !== undefined ? { root } : {}) } satisfies WorkerSetup });
      const lane = pool.addLane({ post: (m, transfer) => w.postMessage(m, transfer) });
      pool.workers.push(w);
      w.on("message", (m: FromWorker) => pool.receive(lane, m));
      w.on("error", (e) => pool.fail(e));
      w.on("exit", (code) => {
        if (!pool.closing) pool.fail(new Error(`a worker thread stopped (exit code ${code}) before the run was over`));
      });
    }
    return pool;
  }

  /**
   * The lane for the next chunk: the worker with the fewest chunks out while it has fewer than
   * WORKER_QUEUE; once every worker has that many, the main thread's lane when it has none (it has
   * the reading, resolving and writing to do besides, and its turns hold up the messages).
   */
  private pick(): number {
    let best = -1;
    for (let k = 1; k < this.out.length; k++) if (best < 0 || this.out[k]! < this.out[best]!) best = k;
    if (best < 0) return 0;
    return this.out[best]! >= WORKER_QUEUE && this.out[0] === 0 ? 0 : best;
  }

  private addLane(l: Lane): number {
    this.lanes.push(l);
    this.out.push(0);
    return this.lanes.length - 1;
  }

  private receive(lane: number, m: FromWorker): void {
    if (m.kind === "ready") return;
    if (m.kind === "failed") return this.fail(new Error(m.message));
    const c = this.chunks.get(m.chunk);
    if (c === undefined) return;
    if (m.kind === "read") {
      c.words = m;
      try {
        this.pump?.();
      } catch (e) {
        this.fail(e);
      }
    } else {
      this.out[lane]!--;
      c.done.resolve(m);
    }
  }

  private fail(e: unknown): void {
    this.failure ??= e instanceof Error ? e : new Error(String(e));
    for (const c of this.chunks.values()) {
      c.resolved.reject(this.failure);
      c.done.reject(this.failure);
    }
  }

  /**
   * Reads `source` through the workers; `take` is called with each chunk's results in file order
   * (awaited before the next). Throws when a worker fails.
   */
  async run(source: string, take: (done: ChunkDone) => Promise<void> | void): Promise<ChunkedRead> {
    const result: ChunkedRead = { diagnostics: [], dataLines: 0 };
    const o = await openFile(source);
    if ("why" in o) {
      result.diagnostics.push(diagnostic("error", "lexicon/unreadable", `Cannot read the lexicon: ${o.why}.`, { file: source, line: 1, column: 1 }));
      return result;
    }
    const stream = o.chunks;
    let header: HeaderColumns | undefined;
    let headerFailed = false;
    const ids = idBook();
    const words = new Map<string, number>();
    const queue: Chunk[] = [];
    let resolved = 0;
    this.chunks.clear();
    let line = 1;
    let next = 0;

    /** Resolves the chunks whose words have come back, in file order, and lets their lanes go on. */
    this.pump = (): void => {
      for (;;) {
        const c = this.chunks.get(resolved);
        const w = c?.words;
        if (c === undefined || w === undefined || headerFailed) return;
        resolved++;
        if (w.header !== undefined) header = w.header;
        result.diagnostics.push(...w.diagnostics);
        if (w.headerFailed) headerFailed = true;
        const counts = w.counts;
        const dups: [number, number][] = [];
        w.ids.forEach((id, k) => {
          const first = ids.first(id.id, id.line, id.column);
          if (first !== undefined) {
            dups.push([k, first]);
            if (id.word >= 0) counts[id.word]!--;
          }
        });
        const before: [string, number][] = [];
        if (w.words !== "") {
          let k = 0;
          for (const word of w.words.split("\n")) {
            const n = words.get(word);
            if (n !== undefined && n > 0) before.push([word, n]);
            words.set(word, (n ?? 0) + counts[k++]!);
          }
        }
        if (!headerFailed) this.post(c.worker, { kind: "run", chunk: c.chunk, dups, before });
        c.resolved.resolve();
      }
    };
    /** Hands on the oldest chunk's results. */
    const takeHead = async (): Promise<void> => {
      const c = queue.shift()!;
      await c.resolved.promise;
      if (headerFailed) return;
      const done = await c.done.promise;
      this.chunks.delete(c.chunk);
      result.dataLines += done.stats.dataLines;
      await take(done);
    };
    const send = async (bytes: Uint8Array, last: boolean): Promise<void> => {
      // Until the header is known, a chunk waits for the ones before it (one of them may hold it).
      if (header === undefined && next > 0) await this.chunks.get(next - 1)!.resolved.promise;
      if (headerFailed) return;
      if (this.failure !== undefined) throw this.failure;
      // The header's chunk on this thread: no waiting for a worker to start.
      const worker = header === undefined ? 0 : this.pick();
      const c: Chunk = { chunk: next, worker, resolved: deferred(), done: deferred() };
      this.chunks.set(next, c);
      queue.push(c);
      this.out[worker]!++;
      const ends = last ? 0 : lineEnds(bytes);
      this.post(worker, { kind: "read", chunk: next, bytes, line, first: next === 0, ...(header !== undefined ? { header } : {}) }, [bytes.buffer as ArrayBuffer]);
      next++;
      line += ends;
      while (queue.length >= AHEAD * this.lanes.length) await takeHead();
    };

    let carry: Buffer | undefined;
    /** An error of the run itself (a worker, a writer), not of reading the file. */
    let sending = false;
    try {
      for await (const b of stream) {
        carry = carry === undefined ? b : Buffer.concat([carry, b]);
        const want = next === 0 ? FIRST_CHUNK_BYTES : CHUNK_BYTES;
        if (carry.length < want) continue;
        const cut = carry.lastIndexOf(10);
        if (cut < 0) continue;
        const piece = new Uint8Array(carry.subarray(0, cut + 1));
        carry = cut + 1 < carry.length ? carry.subarray(cut + 1) : undefined;
        sending = true;
        await send(piece, false);
        sending = false;
        if (headerFailed) break;
      }
      sending = true;
      if (carry !== undefined && !headerFailed) await send(new Uint8Array(carry), true);
    } catch (e) {
      if (sending) throw e;
      result.diagnostics.push(diagnostic("error", "lexicon/unreadable", `Reading the lexicon failed after line ${line - 1}: ${(e as Error).message}.`, { file: source, line: Math.max(1, line - 1), column: 1 }));
      return result;
    } finally {
      o.close();
    }
    while (queue.length > 0 && !headerFailed) await takeHead();
    if (header === undefined && !headerFailed) {
      result.diagnostics.push(diagnostic("error", "lexicon/no-header", "The lexicon has no header line (expected at least the columns word and pron).", { file: source, line: 1, column: 1 }));
    }
    return result;
  }

  private post(lane: number, m: ToWorker, transfer: ArrayBuffer[] = []): void {
    this.lanes[lane]!.post(m, transfer);
  }

  async close(): Promise<void> {
    this.closing = true;
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/** The main thread's lane: messages handled one per turn of the event loop, in order. */
function localLane(lane: ChunkLane, reply: (m: FromWorker) => void, fail: (e: unknown) => void): Lane {
  const queue: ToWorker[] = [];
  let scheduled = false;
  const turn = (): void => {
    scheduled = false;
    const m = queue.shift();
    if (m === undefined) return;
    // The next turn first: a reply may post to this lane again.
    if (queue.length > 0) schedule();
    try {
      reply(lane.handle(m)[0]);
    } catch (e) {
      fail(e);
    }
  };
  const schedule = (): void => {
    if (scheduled) return;
    scheduled = true;
    setImmediate(turn);
  };
  return {
    post(m) {
      queue.push(m);
      schedule();
    },
  };
}
