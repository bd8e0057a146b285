// A worker thread of the batch runner (chunks.ts): loads every variety's compiled grammar (from the
// build/ cache) and runs a chunk lane (chunk-lane.ts) on the chunks of the file it is given,
// messages in the order received.

import { parentPort, workerData } from "node:worker_threads";
import { loadGrammar, loadGrammarCached, setProjectRoot } from "../grammar/index.js";
import type { Inventory } from "../inventory/types.js";
import { machineEngine, type MachineEngine } from "./engine-machine.js";
import type { Needs } from "./engine.js";
import type { Side, SideState } from "./batch-work.js";
import { ChunkLane } from "./chunk-lane.js";
import type { ChunkId, ChunkStats } from "./read-chunk.js";
import type { HeaderColumns } from "./read.js";
import type { OutputFormat } from "./runner.js";
import type { PlsPhonemes } from "./ipa-options.js";
import type { StressSummary } from "./hygiene.js";
import type { Diagnostic } from "../diagnostics.js";

/** One variety as a worker loads it (the options its engine was made with on the main thread). */
export interface WorkerSide {
  readonly grammar: string;
  readonly cacheDir?: string;
  readonly maxStates?: number;
  readonly blame?: boolean;
  readonly syllables: boolean;
  readonly derivations?: boolean;
  readonly ties?: boolean;
  readonly formats: readonly OutputFormat[];
  readonly needs?: Needs;
  readonly assignsStress: boolean;
}

export interface WorkerSetup {
  /** The project root the main thread was given (`--root`); absent: the default. */
  readonly root?: string;
  /** The lexicon file as rows name it. */
  readonly file: string;
  /** File names in JSON Lines and stress.csv relative to this folder; absent: as rows name them. */
  readonly sourceRoot?: string;
  readonly plsPhonemes?: PlsPhonemes;
  readonly sides: readonly WorkerSide[];
}

export type ToWorker =
  | { readonly kind: "read"; readonly chunk: number; readonly bytes: Uint8Array; readonly line: number; readonly first: boolean; readonly header?: HeaderColumns }
  | {
    readonly kind: "run"; readonly chunk: number;
    /** Items rejected as duplicate ids: [index in `ids`, line of the id's first row]. */
    readonly dups: readonly (readonly [number, number])[];
    /** Rows of the chunk's words earlier in the file (words with none left out). */
    readonly before: readonly (readonly [string, number])[];
  };

/** A chunk as read: its distinct words (in first-row order, one per line) and how many rows each has, its ids. */
export interface ChunkWords {
  readonly kind: "read";
  readonly chunk: number;
  readonly words: string;
  readonly counts: Int32Array;
  /** Per id: the index of its row's word in `words`, or -1 when the id's record is a reject. */
  readonly ids: readonly (Omit<ChunkId, "at"> & { readonly word: number })[];
  readonly header?: HeaderColumns;
  readonly headerFailed: boolean;
  readonly diagnostics: readonly Diagnostic[];
}

/** One variety's share of a chunk's outputs. */
export interface SideChunk {
  readonly tsv: Uint8Array[];
  readonly jsonl: Uint8Array[];
  readonly rejects: SideState["rejects"];
  /**
   * The chunk's PLS lexemes (words in first-row order): the words one per line, their phonemes
   * (one line per word, the phonemes apart by NUL, which no field holds) and their first rows'
   * lines; every row of a chunk is from `file`.
   */
  readonly lexemes: { readonly words: string; readonly phonemes: string; readonly lines: Int32Array; readonly file: string };
  readonly counts: SideState["counts"];
  readonly changed: [string, number][];
  readonly stress: StressSummary;
  /** stress.csv's records for the chunk. */
  readonly stressLines: string[];
}

export interface ChunkDone {
  readonly kind: "done";
  readonly chunk: number;
  readonly sides: readonly SideChunk[];
  readonly stats: ChunkStats & { rows: number; rejects: number };
}

export type FromWorker =
  | { readonly kind: "ready" }
  | { readonly kind: "failed"; readonly message: string }
  | ChunkWords
  | ChunkDone;

const setup = workerData as WorkerSetup;
const port = parentPort!;
setProjectRoot(setup.root);

function load(s: WorkerSide): { engine: MachineEngine; inventory: Inventory } | undefined {
  const g = s.cacheDir !== undefined ? loadGrammarCached(s.grammar, s.cacheDir) : loadGrammar(s.grammar);
  if (g.grammar === undefined || g.inventory === undefined) return undefined;
  const { engine } = machineEngine(g.grammar, g.inventory, {
    ...(s.cacheDir !== undefined ? { cacheDir: s.cacheDir } : {}),
    ...(s.maxStates !== undefined ? { maxStates: s.maxStates } : {}),
    ...(s.blame !== undefined ? { blame: s.blame } : {}),
    syllables: s.syllables,
    ...(s.derivations !== undefined ? { derivations: s.derivations } : {}),
    ...(s.ties === true ? { ties: true } : {}),
  });
  return engine !== undefined ? { engine, inventory: g.inventory } : undefined;
}

const loaded = setup.sides.map(load);
if (loaded.some((l) => l === undefined)) {
  port.postMessage({ kind: "failed", message: "a worker thread could not load or compile a grammar" } satisfies FromWorker);
} else {
  const engines = loaded as { engine: MachineEngine; inventory: Inventory }[];
  const sides: Side[] = setup.sides.map((s, i) => ({
    engine: engines[i]!.engine, formats: new Set(s.formats), ...(s.needs !== undefined ? { needs: s.needs } : {}), ...(setup.plsPhonemes !== undefined ? { pls: setup.plsPhonemes } : {}),
  }));
  const lane = new ChunkLane(sides, setup.sides.map((s) => s.assignsStress), engines[0]!.inventory, setup.file, setup.sourceRoot);
  port.postMessage({ kind: "ready" } satisfies FromWorker);
  // Fault injection for the tests (tests/lexicon/chunked-workers.test.ts): the worker dies at its first chunk to run.
  const dieAt = process.env["STRATA_TEST_WORKER_EXIT"] !== undefined;
  port.on("message", (m: ToWorker) => {
    if (dieAt && m.kind === "run") process.exit(3);
    const [reply, transfer] = lane.handle(m);
    port.postMessage(reply, transfer);
  });
}
