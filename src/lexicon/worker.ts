// A worker thread of the batch runner: loads the same compiled grammar (from the build/ cache the
// main thread has just filled) and transcribes batches of encoded words, in the order received.

import { parentPort, workerData } from "node:worker_threads";
import { loadGrammar, loadGrammarCached, setProjectRoot } from "../grammar/index.js";
import { machineEngine } from "./engine-machine.js";
import type { Transcription } from "./engine.js";

export interface WorkerSetup {
  readonly grammar: string;
  readonly cacheDir?: string;
  /** The project root the main thread was given (`--root`); absent: the default. */
  readonly root?: string;
  readonly maxStates?: number;
  readonly blame: boolean;
  readonly syllables: boolean;
  readonly derivations?: boolean;
  readonly ties?: boolean;
}

export interface WorkerBatch {
  readonly batch: number;
  /** Per word: full-machine ids then prosody-machine ids, split at `split[i]`. */
  readonly ids: Int32Array;
  readonly offsets: Int32Array;
  readonly splits: Int32Array;
}

export type WorkerReply =
  | { readonly kind: "ready" }
  | { readonly kind: "failed"; readonly message: string }
  | { readonly kind: "done"; readonly batch: number; readonly results: (Transcription | null)[] };

const setup = workerData as WorkerSetup;
const port = parentPort!;
setProjectRoot(setup.root);
const g = setup.cacheDir !== undefined ? loadGrammarCached(setup.grammar, setup.cacheDir) : loadGrammar(setup.grammar);
const built = g.grammar !== undefined && g.inventory !== undefined
  ? machineEngine(g.grammar, g.inventory, {
    ...(setup.cacheDir !== undefined ? { cacheDir: setup.cacheDir } : {}),
    ...(setup.maxStates !== undefined ? { maxStates: setup.maxStates } : {}),
    blame: setup.blame,
    syllables: setup.syllables,
    ...(setup.derivations !== undefined ? { derivations: setup.derivations } : {}),
    ...(setup.ties === true ? { ties: true } : {}),
  })
  : undefined;
const engine = built?.engine;
if (engine === undefined) {
  port.postMessage({ kind: "failed", message: "the worker could not load or compile the grammar" } satisfies WorkerReply);
} else {
  port.postMessage({ kind: "ready" } satisfies WorkerReply);
  port.on("message", (m: WorkerBatch) => {
    const results: (Transcription | null)[] = [];
    for (let w = 0; w + 1 < m.offsets.length; w++) {
      const from = m.offsets[w]!;
      const split = m.splits[w]!;
      const to = m.offsets[w + 1]!;
      const ids = Array.from(m.ids.subarray(from, split));
      const bids = Array.from(m.ids.subarray(split, to));
      results.push(engine.transcribeIds(ids, bids) ?? null);
    }
    port.postMessage({ kind: "done", batch: m.batch, results } satisfies WorkerReply);
  });
}
