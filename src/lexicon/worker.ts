// A worker thread of the batch runner (chunks.ts): loads every variety's compiled grammar (from the
// build/ cache) and does the whole work of a run on the chunks of the file it is given, in two
// steps per chunk: `read` (decode, split into records, parse, tokenise; the chunk's words and ids go
// back to the main thread) and `run` (with the keys and duplicate ids the main thread resolved from
// the chunks before: transcribe, check, count and format, the same batch work as on the main
// thread, batch-work.ts). Messages are handled in the order received.

import { parentPort, workerData } from "node:worker_threads";
import { loadGrammar, loadGrammarCached, setProjectRoot } from "../grammar/index.js";
import type { Inventory } from "../inventory/types.js";
import { ByteChunks } from "../emit/bytes.js";
import { machineEngine, type MachineEngine } from "./engine-machine.js";
import type { Needs } from "./engine.js";
import { BatchWork, SideState, type Side } from "./batch-work.js";
import { EntryKeys } from "./keys.js";
import { duplicateId, readChunk, type ChunkId, type ChunkRead, type ChunkStats } from "./read-chunk.js";
import type { HeaderColumns, LexiconItem } from "./read.js";
import type { OutputFormat } from "./runner.js";
import type { PlsPhonemes } from "./ipa-options.js";
import type { StressSummary } from "./hygiene.js";
import type { Diagnostic } from "../diagnostics.js";
import { relativeTo } from "./summary.js";

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

/** A chunk as read: its distinct words (in first-row order) and how many rows each has, its ids. */
export interface ChunkWords {
  readonly kind: "read";
  readonly chunk: number;
  readonly words: readonly string[];
  readonly counts: readonly number[];
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
  readonly lexemes: [string, { phonemes: string[]; source: { file: string; line: number; column: number } }][];
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
  const inventory = engines[0]!.inventory;
  const sides: Side[] = setup.sides.map((s, i) => ({
    engine: engines[i]!.engine, formats: new Set(s.formats), ...(s.needs !== undefined ? { needs: s.needs } : {}), ...(setup.plsPhonemes !== undefined ? { pls: setup.plsPhonemes } : {}),
  }));
  const work = new BatchWork(sides);
  const root = setup.sourceRoot;
  const relFiles = new Map<string, string>();
  const relFile = root === undefined ? (f: string) => f : (f: string): string => {
    let r = relFiles.get(f);
    if (r === undefined) relFiles.set(f, (r = relativeTo(root, f)));
    return r;
  };
  const read = new Map<number, ChunkRead>();
  port.postMessage({ kind: "ready" } satisfies FromWorker);
  port.on("message", (m: ToWorker) => {
    if (m.kind === "read") {
      const c = readChunk(m.bytes, m, m.header, setup.file, inventory);
      read.set(m.chunk, c);
      port.postMessage(chunkWords(m.chunk, c));
      return;
    }
    const c = read.get(m.chunk)!;
    read.delete(m.chunk);
    const [done, transfer] = runChunk(m.chunk, c, m.dups, m.before);
    port.postMessage(done, transfer);
  });

  /** The chunk's words and ids for the main thread. */
  function chunkWords(chunk: number, c: ChunkRead): ChunkWords {
    const index = new Map<string, number>();
    const words: string[] = [];
    const counts: number[] = [];
    const wordOf = (item: LexiconItem): number => {
      if (item.kind !== "row") return -1;
      let k = index.get(item.word);
      if (k === undefined) {
        index.set(item.word, (k = words.length));
        words.push(item.word);
        counts.push(0);
      }
      return k;
    };
    for (const item of c.items) if (item.kind === "row") counts[wordOf(item)]!++;
    return {
      kind: "read", chunk, words, counts, ids: c.ids.map((id) => ({ id: id.id, line: id.line, column: id.column, word: wordOf(c.items[id.at]!) })),
      ...(c.header !== undefined ? { header: c.header } : {}), headerFailed: c.headerFailed, diagnostics: c.diagnostics,
    };
  }

  function runChunk(chunk: number, c: ChunkRead, dups: readonly (readonly [number, number])[], before: readonly (readonly [string, number])[]): [ChunkDone, ArrayBuffer[]] {
    const items = c.items;
    for (const [k, first] of dups) items[c.ids[k]!.at] = duplicateId(items[c.ids[k]!.at]!, c.ids[k]!, first);
    const keys = new EntryKeys(before);
    const rowKeys = items.map((item) => (item.kind === "row" ? keys.next(item.word, item.id) : ""));
    const transfer: ArrayBuffer[] = [];
    const states = sides.map((s, i) => {
      const tsv: Uint8Array[] = [];
      const jsonl: Uint8Array[] = [];
      const state = new SideState({ inventory, assignsStress: setup.sides[i]!.assignsStress }, relFile,
        s.formats.has("tsv") ? new ByteChunks((b) => void tsv.push(b)) : undefined,
        s.formats.has("jsonl") ? new ByteChunks((b) => void jsonl.push(b)) : undefined);
      return { state, tsv, jsonl };
    });
    work.take(items, rowKeys, states.map((s) => s.state));
    let rows = 0;
    for (const item of items) if (item.kind === "row") rows++;
    const out: SideChunk[] = states.map(({ state, tsv, jsonl }) => {
      state.tsv?.flush();
      state.jsonl?.flush();
      for (const b of [...tsv, ...jsonl]) transfer.push(b.buffer as ArrayBuffer);
      const [, ...stressLines] = state.hygiene.report();
      return {
        tsv, jsonl, rejects: state.rejects, lexemes: [...state.lexemes], counts: state.counts, changed: [...state.changed],
        stress: state.hygiene.summary(), stressLines,
      };
    });
    return [{ kind: "done", chunk, sides: out, stats: { ...c.stats, rows, rejects: items.length - rows } }, transfer];
  }
}
