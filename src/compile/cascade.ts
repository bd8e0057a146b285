// The cascade: the steps' machines composed in order into one machine, or — where a composition
// would exceed a size limit — into consecutive blocks applied in sequence (the same relation).
// Also the runners: the preferred cascade frozen for speed, the variants cascade for every output.

import {
  Fst, FstError, FstLimitError, composeTable, determiniseTransducer, freezeFunctional, fstOf, minimiseToTable, type ArcTable,
  FrozenFst, freeze, freezeDeterministic, type DeterministicRunner,
  serialiseDeterministic, deserialiseDeterministic, serialiseFunctional, deserialiseFunctional,
} from "../fst/index.js";
import { unbounded, type Budget } from "./budget.js";

export interface Block {
  readonly machine: Fst;
  /** Steps [from, to) of the cascade composed into this block (indices into the machine list). */
  readonly from: number;
  readonly to: number;
  readonly states: number;
  readonly arcs: number;
}

/**
 * Composes `machines` left to right (Mohri, Pereira & Riley composition, then minimisation). When a
 * composition would pass `maxStates` states, the current block is closed and the next machine
 * starts a new one; applying the blocks in sequence gives the same relation as one machine.
 * `null` entries (identity steps) are skipped. `maxStates` 1 or less: nothing is composed, every
 * machine is a block of its own (per-step blame names a block's changes by its one step; two
 * one-state steps, such as two rules without context, would otherwise compose into one state).
 */
export function composeCascade(machines: readonly (Fst | null)[], maxStates: number, budget: Budget = unbounded()): Block[] {
  const blocks: Block[] = [];
  if (maxStates <= 1) {
    machines.forEach((m, i) => {
      if (m !== null) blocks.push({ machine: m, from: i, to: i + 1, states: m.numStates, arcs: m.numArcs() });
    });
    return blocks;
  }
  // The accumulator stays an arc table between compositions (fst/table.ts); a machine only when a block closes.
  let acc: Fst | ArcTable | null = null;
  let from = 0;
  const close = (to: number): void => {
    if (acc === null) return;
    const machine = acc instanceof Fst ? acc : fstOf(acc);
    blocks.push({ machine, from, to, states: machine.numStates, arcs: machine.numArcs() });
    acc = null;
  };
  machines.forEach((m, i) => {
    if (m === null) return;
    if (acc === null) { acc = m; from = i; return; }
    let next: Fst | ArcTable | null = null;
    budget.step = i;
    budget.part = `composing step ${i + 1} with the steps before it`;
    try {
      const c = composeTable(acc, m, { maxStates, progress: budget.tick });
      next = c.states > maxStates ? null : minimiseToTable(c, { progress: budget.tick });
      if (next !== null && (next instanceof Fst ? next.numStates : next.states) > maxStates) next = null;
    } catch (e) {
      if (!(e instanceof FstLimitError)) throw e;
      next = null;
    }
    if (next === null) {
      close(i);
      acc = m;
      from = i;
    } else acc = next;
  });
  close(machines.length);
  return blocks;
}

/** Runs one functional block: a dense sequential table when the block is subsequential, else the two-pass functional runner (a search only if that cannot be built). */
interface BlockRunner {
  run(input: ArrayLike<number>, out: number[]): boolean;
  readonly kind: "sequential" | "functional" | "search";
  /** Many entries in one call over typed arrays (FunctionalRunner.runBatch); absent for other kinds. */
  readonly batch?: (input: Int32Array, at: Int32Array, out: Int32Array, outAt: Int32Array, ok: Uint8Array, from?: number) => number;
  /** The frozen tables as bytes (fst/serialise), for the cache; absent for a search. */
  readonly bytes?: () => Uint8Array;
}

/** A block runner read back from the cache; null when the bytes do not decode. */
function runnerFromBytes(kind: string, bytes: Uint8Array): BlockRunner | null {
  if (kind === "sequential") {
    const d = deserialiseDeterministic(bytes);
    if (!d.ok) return null;
    const r = d.value;
    return { kind: "sequential", run: (input, out) => r.run(input, out), bytes: () => bytes };
  }
  if (kind === "functional") {
    const d = deserialiseFunctional(bytes);
    if (!d.ok) return null;
    const r = d.value;
    return { kind: "functional", run: (input, out) => r.run(input, out), batch: r.runBatch.bind(r), bytes: () => bytes };
  }
  return null;
}

function blockRunner(m: Fst, tryTable: boolean, budget: Budget, onAmbiguous: () => void): BlockRunner {
  // A subsequential block becomes a dense table; when determinisation does not terminate within a
  // few times the block's size (no bounded delay: right contexts of unbounded length), search.
  let d: ReturnType<typeof determiniseTransducer> | null = null;
  try {
    if (tryTable) d = determiniseTransducer(m, { maxStates: Math.min(Math.max(500, 2 * m.numStates), 50_000), progress: budget.tick });
  } catch (e) {
    if (!(e instanceof FstLimitError)) throw e;
  }
  if (d !== null && d.ok) {
    let r: DeterministicRunner | null = null;
    try {
      r = freezeDeterministic(d.fst);
    } catch (e) {
      if (!(e instanceof FstError)) throw e;
    }
    if (r !== null) { const run = r; return { kind: "sequential", run: (input, out) => run.run(input, out), bytes: () => serialiseDeterministic(run) }; }
  }
  // Not subsequential (a right context of unbounded length): the two-pass runner for functional
  // transducers (a right-to-left DFA, then a left-to-right deterministic choice; src/fst/functional.ts).
  const fr = freezeFunctional(m, { check: false, progress: budget.tick });
  if (fr.ok) {
    const runner = fr.runner;
    return { kind: "functional", run: (input, out) => runner.run(input, out), batch: runner.runBatch.bind(runner), bytes: () => serialiseFunctional(runner) };
  }
  // The last resort: a search for the outputs. Each step's preferred machine is checked functional
  // at compile time, so there is one; should there ever be two, the first in symbol order is taken
  // and the entry is marked ambiguous (never a silent pick).
  const f: FrozenFst = freeze(m);
  return {
    kind: "search",
    run: (input, out) => {
      const res = f.applyAll(input, 2);
      const first = res.outputs[0];
      if (first === undefined) return false;
      if (res.outputs.length > 1) onAmbiguous();
      for (const x of first) out.push(x);
      return true;
    },
  };
}

/** Outputs of a batch: entry e's output is out[outAt[e] .. outAt[e+1]), ok[e] = 0 when it was rejected. */
export interface BatchResult {
  readonly out: Int32Array;
  readonly outAt: Int32Array;
  readonly ok: Uint8Array;
}

/** The preferred cascade: each block functional; runs them in sequence. */
export class PreferredRunner {
  private readonly runners: BlockRunner[];
  /** How many runs met a block with more than one output (a search block; see blockRunner). Callers compare it before and after a run. */
  ambiguities = 0;
  /**
   * `kinds`: how each block ran before (from the cache), so a known non-sequential block skips the
   * determinisation attempt; `frozen`: the runners' tables from the cache (rebuilt when missing or bad).
   */
  constructor(blocks: readonly Block[], kinds?: readonly string[], frozen?: readonly (Uint8Array | null)[], budget: Budget = unbounded()) {
    this.runners = blocks.map((b, i) => {
      budget.step = b.from;
      budget.part = `freezing the block of steps ${b.from + 1}–${b.to}`;
      const bytes = frozen?.[i];
      const cached = bytes && kinds?.[i] !== undefined ? runnerFromBytes(kinds[i]!, bytes) : null;
      // The two-pass functional runner is built first: attempting transducer determinisation on
      // every block cost seconds per grammar (13 s for the one-step blocks of en-us) for a runner
      // that is at most twice as fast; a table is only tried again where the cache says it worked.
      return cached ?? blockRunner(b.machine, kinds !== undefined && kinds[i] === "sequential", budget, () => { this.ambiguities++; });
    });
  }
  /** Each block's frozen tables as bytes (null for a search block). */
  frozenBytes(): (Uint8Array | null)[] {
    return this.runners.map((r) => (r.bytes ? r.bytes() : null));
  }
  /** How each block runs ("sequential": dense table; "functional": two-pass runner; "search": general search for the one output). */
  get kinds(): string[] {
    return this.runners.map((r) => r.kind);
  }
  /** Scratch for the outputs of every block but the last (two, used in turn), kept between batches. */
  private scratch: BatchResult[] = [];

  /**
   * Runs a whole batch: entry e is input[at[e] .. at[e+1]). Returns the outputs packed the same
   * way (`out`, `outAt`) and `ok[e]` (0 when rejected, with an empty output). Blocks with a typed
   * batch loop use it; others run entry by entry. `into`: the result of an earlier call, whose
   * arrays are written again when they are large enough (a caller running batch after batch then
   * allocates nothing; that earlier result is overwritten).
   */
  runBatch(input: Int32Array, at: Int32Array, into?: BatchResult): BatchResult {
    const entries = at.length - 1;
    let cur: BatchResult | null = null;
    if (this.runners.length === 0) return { out: input, outAt: at, ok: new Uint8Array(entries).fill(1) };
    for (let k = 0; k < this.runners.length; k++) {
      const r = this.runners[k]!;
      const src: { out: Int32Array; outAt: Int32Array } = cur ?? { out: input, outAt: at };
      const last = k === this.runners.length - 1;
      const room = last ? into : this.scratch[k & 1];
      const fits = room !== undefined && room.outAt.length === entries + 1;
      const outAt = fits ? room.outAt : new Int32Array(entries + 1);
      const ok = fits ? room.ok : new Uint8Array(entries);
      outAt[0] = 0;
      let out: Int32Array = fits ? room.out : new Int32Array(Math.max(16, src.out.length * 2));
      if (r.batch !== undefined) {
        let done = 0;
        while (done < entries) {
          done = r.batch(src.out, src.outAt, out, outAt, ok, done);
          if (done < entries) {
            const bigger = new Int32Array(out.length * 2);
            bigger.set(out);
            out = bigger;
          }
        }
      } else {
        const buf: number[] = [];
        for (let e = 0; e < entries; e++) {
          const from = buf.length;
          if (!r.run(src.out.subarray(src.outAt[e]!, src.outAt[e + 1]!), buf)) {
            buf.length = from;
            ok[e] = 0;
          } else ok[e] = 1;
          outAt[e + 1] = buf.length;
        }
        if (out.length < buf.length) out = new Int32Array(buf.length);
        out.set(buf);
      }
      if (cur !== null) for (let e = 0; e < entries; e++) ok[e] = ok[e]! & cur.ok[e]!;
      cur = { out, outAt, ok };
      if (!last) this.scratch[k & 1] = cur;
    }
    return cur!;
  }

  /** Runs block `k` alone (for per-step blame when every block is one step). */
  runBlock(k: number, symbols: ArrayLike<number>, out: number[]): boolean {
    return this.runners[k]!.run(symbols, out);
  }
  /** Runs the word (symbol ids, '#'-bracketed); appends the output to `out`; false when rejected. */
  run(symbols: ArrayLike<number>, out: number[]): boolean {
    if (this.runners.length === 0) { for (let i = 0; i < symbols.length; i++) out.push(symbols[i]!); return true; }
    let cur: ArrayLike<number> = symbols;
    for (let k = 0; k < this.runners.length; k++) {
      const buf: number[] = k === this.runners.length - 1 ? out : [];
      if (!this.runners[k]!.run(cur, buf)) return false;
      cur = buf;
    }
    return true;
  }
}

/** Every output of the variants cascade (sorted, distinct), at most `cap`; `capped` when some were dropped. */
export class VariantsRunner {
  private frozen: FrozenFst[] | undefined;
  /** Frozen on first use: a cache hit that never asks for variants does not pay for freezing. */
  constructor(private readonly blocks: readonly Block[]) {}
  run(symbols: ArrayLike<number>, cap = 16): { outputs: number[][]; capped: boolean } {
    this.frozen ??= this.blocks.map((b) => freeze(b.machine));
    let cur: number[][] = [Array.from(symbols)];
    let capped = false;
    for (const f of this.frozen) {
      const next = new Map<string, number[]>();
      for (const w of cur) {
        const r = f.applyAll(w, cap);
        if (r.capped) capped = true;
        for (const o of r.outputs) next.set(o.join(","), o);
        // Past the cap the rest cannot be kept anyway: stop multiplying variants.
        if (next.size > cap) { capped = true; break; }
      }
      const keys = [...next.keys()].sort();
      if (keys.length > cap) capped = true;
      cur = keys.slice(0, cap).map((k) => next.get(k)!);
    }
    return { outputs: cur, capped };
  }
}
