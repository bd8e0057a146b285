// Worker thread of the compiler: composes one cascade (the variants cascade, while the main thread
// composes the preferred one) and sends its blocks back serialised. Started by `parallel.ts`; the
// result is the same as `composeCascade` on the main thread.

import { workerData, type MessagePort } from "node:worker_threads";
import { deserialise, serialise, type Fst } from "../fst/index.js";
import { Budget, CompileLimitError } from "./budget.js";
import { composeCascade } from "./cascade.js";
import type { CascadeJob, CascadeReply } from "./parallel.js";

const job = workerData as CascadeJob & { readonly port: MessagePort; readonly done: Int32Array };

/** `done`: 0 before the worker runs, 1 while it composes, 2 once its reply is on the port. */
function signal(state: number): void {
  Atomics.store(job.done, 0, state);
  Atomics.notify(job.done, 0);
}

function reply(r: CascadeReply): void {
  job.port.postMessage(r, r.kind === "blocks" ? r.blocks.map((b) => b.bytes.buffer as ArrayBuffer) : []);
  signal(2);
}

signal(1);

const budget = new Budget({ deadlineMs: job.deadlineMs, heapBytes: job.heapBytes });
try {
  const machines: (Fst | null)[] = job.machines.map((b) => {
    if (b === null) return null;
    const d = deserialise(b);
    if (!d.ok) throw new Error(`a step machine did not decode: ${d.error}`);
    return d.value;
  });
  const blocks = composeCascade(machines, job.maxStates, budget);
  reply({ kind: "blocks", blocks: blocks.map((b) => ({ from: b.from, to: b.to, bytes: serialise(b.machine) })) });
} catch (e) {
  if (e instanceof CompileLimitError) reply({ kind: "limit", limit: e.kind, part: e.part, value: e.limit, step: budget.step });
  else reply({ kind: "failed", message: e instanceof Error ? e.message : String(e) });
}
