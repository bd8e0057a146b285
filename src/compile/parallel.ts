// Composing the variants cascade on a worker thread while the main thread composes the preferred
// cascade (the two are independent). `compileGrammar` stays synchronous: the main thread waits for
// the worker's reply on a shared flag and reads it with `receiveMessageOnPort`. The blocks are the
// ones `composeCascade` makes on one thread (the same machines: the worker runs the same code on
// serialised copies of the step machines). Only from compiled JavaScript (dist/); under a
// TypeScript test runner, with one core, or for a small cascade, everything runs on one thread.

import { availableParallelism, loadavg } from "node:os";
import { MessageChannel, Worker, receiveMessageOnPort } from "node:worker_threads";
import { deserialise, serialise, type Fst } from "../fst/index.js";
import { workerScript } from "../worker-script.js";
import { CompileLimitError, type Budget, type LimitKind } from "./budget.js";
import { composeCascade, type Block } from "./cascade.js";

/** What the worker is given: the step machines serialised (null: identity step), the block limit and the budget left. */
export interface CascadeJob {
  readonly machines: readonly (Uint8Array | null)[];
  readonly maxStates: number;
  readonly deadlineMs: number;
  readonly heapBytes: number;
}

export type CascadeReply =
  | { readonly kind: "blocks"; readonly blocks: readonly { readonly from: number; readonly to: number; readonly bytes: Uint8Array }[] }
  | { readonly kind: "limit"; readonly limit: LimitKind; readonly part: string; readonly value: number; readonly step: number }
  | { readonly kind: "failed"; readonly message: string };

/** Below this many arcs over the step machines the worker's start (≈ 50 ms) costs more than it saves. */
const MIN_ARCS = 5_000;

/**
 * The compiled worker script in this file's folder (dist/src/compile, or the bundle's dist/bun), or
 * undefined when running from TypeScript sources.
 */
function script(): string | undefined {
  return workerScript(import.meta.url, "compose-worker.js");
}

/** A cascade being composed: `blocks()` waits for it (synchronously). */
export interface PendingCascade {
  /** Worker threads used (0: the cascade is composed on the calling thread when `blocks()` is called). */
  readonly threads: number;
  blocks(): Block[];
  /** Stops the worker (when the other cascade failed and these blocks are not wanted). */
  cancel(): void;
}

/**
 * Threads to use when the caller does not say: 2 when a core is idle (the 1-minute load average
 * at most the cores less one), else 1. On a machine whose cores are all busy a second thread only
 * adds its own start and a second warm-up of the compiled code (measured: about 17% more CPU time
 * and no gain in wall time at a load of 6 on 2 cores).
 */
function autoThreads(): number {
  const cores = availableParallelism();
  return cores >= 2 && loadavg()[0]! <= cores - 1 ? 2 : 1;
}

/**
 * Starts composing `machines` on a worker thread when that can pay (compiled code, `threads` — by
 * default `autoThreads()` — at least 2, a cascade of at least MIN_ARCS arcs); otherwise `blocks()`
 * composes on the calling thread. A limit reached on the worker is thrown by `blocks()` as on one
 * thread, with `budget.part` and `budget.step` naming what was being composed.
 */
export function startCascade(machines: readonly (Fst | null)[], maxStates: number, budget: Budget, threads?: number): PendingCascade {
  const local: PendingCascade = { threads: 0, blocks: () => composeCascade(machines, maxStates, budget), cancel: () => {} };
  const file = script();
  const cores = threads ?? autoThreads();
  let arcs = 0;
  for (const m of machines) if (m !== null) arcs += m.numArcs();
  if (file === undefined || cores < 2 || arcs < MIN_ARCS) return local;
  const done = new Int32Array(new SharedArrayBuffer(4));
  const { port1, port2 } = new MessageChannel();
  const job: CascadeJob = {
    machines: machines.map((m) => (m === null ? null : serialise(m))),
    maxStates,
    deadlineMs: Math.max(1, budget.limits.deadlineMs - budget.elapsedMs()),
    heapBytes: budget.limits.heapBytes,
  };
  let worker: Worker;
  try {
    worker = new Worker(file, { workerData: { ...job, port: port2, done }, transferList: [port2], execArgv: workerArgs() });
  } catch {
    port1.close();
    return local;
  }
  worker.unref();
  // Its failures come back as a "failed" reply or as no reply at all (the waits below are bounded).
  worker.on("error", () => {});
  const cancel = (): void => { port1.close(); void worker.terminate(); };
  return {
    threads: 1,
    cancel,
    blocks: () => {
      // The main thread is blocked here, so a worker that fails without replying cannot be seen by
      // its events: the waits are bounded — for its start (`done` 0 → 1) 10 s, for its reply
      // (→ 2) four times the time left and 10 s more — then the cascade is composed here.
      if (Atomics.load(done, 0) === 0) Atomics.wait(done, 0, 0, 10_000);
      if (Atomics.load(done, 0) === 1) Atomics.wait(done, 0, 1, 4 * job.deadlineMs + 10_000);
      const got = Atomics.load(done, 0) === 2 ? (receiveMessageOnPort(port1)?.message as CascadeReply | undefined) : undefined;
      cancel();
      if (got?.kind === "limit") {
        budget.part = got.part;
        budget.step = got.step;
        throw new CompileLimitError(got.limit, got.part, got.value);
      }
      if (got?.kind !== "blocks") return composeCascade(machines, maxStates, budget);
      return got.blocks.map((b) => {
        const d = deserialise(b.bytes);
        if (!d.ok) throw new Error(`a composed block did not decode: ${d.error}`);
        return { machine: d.value, from: b.from, to: b.to, states: d.value.numStates, arcs: d.value.numArcs() };
      });
    },
  };
}

/** The process's Node options for the worker, less those that only make sense for the main script (`-e`, `--input-type`, …). */
function workerArgs(): string[] {
  const out: string[] = [];
  const args = process.execArgv;
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (a === "-e" || a === "--eval" || a === "-p" || a === "--print") { i++; continue; }
    if (a.startsWith("--input-type") || a.startsWith("--eval=") || a.startsWith("--print=")) continue;
    out.push(a);
  }
  return out;
}
