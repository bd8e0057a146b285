// The finite-state core's bench: compose / determinise / minimise times and sizes on generated
// machines of 10³–10⁵ states, a rule cascade over a 300-symbol alphabet, and the throughput of
// the frozen run loops against a bare table walk over the same input, measured in the same run.

import {
  Fst,
  compose,
  composeAll,
  determinise,
  freezeDeterministic,
  freezeFunctional,
  minimise,
  union,
  acceptorOf,
  type DeterministicRunner,
  type Label,
} from "../src/fst/index.js";

/** A small seeded generator (Park–Miller minimal standard), so every run builds the same machines. */
function rng(seed: number): () => number {
  let s = seed % 2147483647 || 1;
  return () => {
    s = (s * 16807) % 2147483647;
    return (s - 1) / 2147483646;
  };
}

function time<T>(f: () => T): { value: T; ms: number } {
  const t0 = performance.now();
  const value = f();
  return { value, ms: performance.now() - t0 };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1] as number;
}

const fmt = (x: number): string => x.toLocaleString("en-US", { maximumFractionDigits: 1 });

/** A lexicon-like NFA: the union of `words` random strings over `letters` symbols (ε-arcs from a new start). */
function wordListNfa(words: number, letters: number, seed: number): Fst {
  const r = rng(seed);
  const parts: Fst[] = [];
  for (let k = 0; k < words; k++) {
    const len = 3 + Math.floor(r() * 8);
    parts.push(acceptorOf(Array.from({ length: len }, () => 1 + Math.floor(r() * letters))));
  }
  return union(...parts);
}

/** A random complete sequential transducer: every state reads every symbol and writes one label. */
function randomSequential(states: number, symbols: number, seed: number): Fst {
  const r = rng(seed);
  const f = new Fst();
  f.addStates(states);
  for (let s = 0; s < states; s++) {
    for (let x = 1; x <= symbols; x++) f.addArc(s, x, 1 + Math.floor(r() * symbols), Math.floor(r() * states));
    f.setFinal(s);
  }
  return f;
}

/**
 * A rule-like machine over 1 … sigma: "t → r / _ z" applied obligatorily (t is rewritten exactly
 * when the next symbol is z). Identity arcs on every other symbol, as the phonology layer builds.
 * State 0: neutral; 1: rewrote t, must see z; 2: kept t, must not see z.
 */
function contextRule(sigma: number, t: Label, r: Label, z: Label): Fst {
  const f = new Fst();
  f.addStates(3);
  f.setFinal(0);
  f.setFinal(2);
  for (let x = 1; x <= sigma; x++) if (x !== t) f.addArc(0, x, x, 0);
  f.addArc(0, t, r, 1);
  f.addArc(0, t, t, 2);
  f.addArc(1, z, z, 0);
  for (let x = 1; x <= sigma; x++) if (x !== t && x !== z) f.addArc(2, x, x, 0);
  f.addArc(2, t, r, 1);
  f.addArc(2, t, t, 2);
  return f;
}

/** The bare limit: one typed-array lookup per symbol over a raw-symbol table of the same machine. */
function bareTable(run: DeterministicRunner): { table: Int32Array; width: number } {
  const width = run.classOf.length;
  const table = new Int32Array(run.numStates * width);
  for (let s = 0; s < run.numStates; s++) {
    for (let x = 0; x < width; x++) table[s * width + x] = x === 0 ? 0 : (run.next[s * run.classes + (run.classOf[x] as number)] as number);
  }
  return { table, width };
}

function bareWalk(table: Int32Array, width: number, input: Int32Array, at: Int32Array): number {
  let sum = 0;
  for (let e = 0; e + 1 < at.length; e++) {
    let s = 0;
    for (let i = at[e] as number; i < (at[e + 1] as number); i++) s = table[s * width + (input[i] as number)] as number;
    sum += s;
  }
  return sum;
}

/** Random entries of 4–12 symbols over 1 … symbols, concatenated (`at` marks where each starts). */
function entries(count: number, symbols: number, seed: number): { input: Int32Array; at: Int32Array } {
  const r = rng(seed);
  const at = new Int32Array(count + 1);
  const xs: number[] = [];
  for (let e = 0; e < count; e++) {
    const len = 4 + Math.floor(r() * 9);
    for (let k = 0; k < len; k++) xs.push(1 + Math.floor(r() * symbols));
    at[e + 1] = xs.length;
  }
  return { input: Int32Array.from(xs), at };
}

export interface FstBenchResult {
  readonly lines: string[];
  /** Frozen deterministic loop time / bare table walk time, per machine size (same input, same run). */
  readonly ratios: { states: number; ratio: number }[];
}

export function benchFst(): FstBenchResult {
  const lines: string[] = [];
  const say = (s: string): void => {
    lines.push(s);
    console.log(s);
  };
  say("== fst: finite-state core ==");
  say("");
  say("determinise and minimise a word-list NFA (union of random words over 26 letters):");
  say("  words    NFA states  det ms  DFA states  min ms  min states");
  for (const words of [150, 1_500, 15_000]) {
    const nfa = wordListNfa(words, 26, 7 + words);
    const det = time(() => determinise(nfa));
    const min = time(() => minimise(det.value));
    say(`  ${fmt(words).padStart(6)}  ${fmt(nfa.numStates).padStart(10)}  ${fmt(det.ms).padStart(6)}  ${fmt(det.value.numStates).padStart(10)}  ${fmt(min.ms).padStart(6)}  ${fmt(min.value.numStates).padStart(10)}`);
  }
  say("");
  say("compose a random complete sequential transducer (32 symbols) with a 3-state context rule:");
  say("  states    arcs        compose ms  result states  result arcs");
  for (const n of [1_000, 10_000, 100_000]) {
    const a = randomSequential(n, 32, 11 + n);
    const rule = contextRule(32, 5, 6, 7);
    const c = time(() => compose(a, rule));
    say(`  ${fmt(n).padStart(7)}  ${fmt(a.numArcs()).padStart(10)}  ${fmt(c.ms).padStart(10)}  ${fmt(c.value.numStates).padStart(13)}  ${fmt(c.value.numArcs()).padStart(11)}`);
  }
  say("");
  say("a cascade of 20 context rules over a 300-symbol alphabet (explicit identity arcs):");
  {
    const sigma = 300;
    const rules = Array.from({ length: 20 }, (_, k) => contextRule(sigma, 3 + 3 * k, 4 + 3 * k, 5 + 3 * k));
    const c = time(() => composeAll(rules));
    const m = time(() => minimise(c.value));
    const fr = time(() => freezeFunctional(m.value, { check: false }));
    say(`  one rule: ${rules[0]?.numStates} states, ${rules[0]?.numArcs()} arcs`);
    say(`  composed: ${fmt(c.value.numStates)} states, ${fmt(c.value.numArcs())} arcs in ${fmt(c.ms)} ms; minimised: ${fmt(m.value.numStates)} states, ${fmt(m.value.numArcs())} arcs in ${fmt(m.ms)} ms`);
    if (fr.value.ok) {
      const run = fr.value.runner;
      const { input, at } = entries(100_000, sigma, 5);
      const out: Label[] = [];
      const t = time(() => {
        let ok = 0;
        for (let e = 0; e + 1 < at.length; e++) {
          out.length = 0;
          if (run.run(input.subarray(at[e] as number, at[e + 1] as number), out)) ok++;
        }
        return ok;
      });
      say(`  functional runner: ${fmt(fr.ms)} ms to freeze; ${run.classes} input classes for ${sigma} symbols; ${fmt(run.numSets)} right-to-left sets; table ${fmt((run.rowFirst.length + run.rNext.length) * 4 / 1024)} KiB`);
      say(`  runs ${fmt(input.length / (t.ms / 1000) / 1e6)} M symbols/s (${fmt(t.value)} of 100,000 entries accepted)`);
    }
  }
  say("");
  say("frozen deterministic loop vs bare table walk (same machine, same input, same run, alternating;");
  say("fastest of 9 repetitions after a warm-up, and the ratio of the medians):");
  say("  states   symbols  bare ms  frozen ms  ratio   (medians)");
  const ratios: { states: number; ratio: number }[] = [];
  for (const n of [1_000, 10_000, 100_000]) {
    const symbols = 32;
    const run = freezeDeterministic(randomSequential(n, symbols, 3 + n));
    const { table, width } = bareTable(run);
    const { input, at } = entries(200_000, symbols, 17);
    const out = new Int32Array(input.length * run.maxArcOutput + (at.length - 1) * run.maxFinalOutput + 1);
    const outAt = new Int32Array(at.length);
    const ok = new Uint8Array(at.length - 1);
    const bare: number[] = [];
    const frozen: number[] = [];
    let check = 0;
    for (let rep = 0; rep < 10; rep++) {
      const b = time(() => bareWalk(table, width, input, at));
      const f = time(() => run.runBatch(input, at, out, outAt, ok));
      if (f.value !== at.length - 1) throw new Error(`frozen run accepted ${f.value} of ${at.length - 1} entries`);
      check += b.value + f.value;
      if (rep > 0) {
        bare.push(b.ms);
        frozen.push(f.ms);
      }
    }
    const ratio = Math.min(...frozen) / Math.min(...bare);
    ratios.push({ states: n, ratio });
    say(`  ${fmt(n).padStart(7)}  ${String(symbols).padStart(7)}  ${fmt(Math.min(...bare)).padStart(7)}  ${fmt(Math.min(...frozen)).padStart(9)}  ${ratio.toFixed(2)}×   ${(median(frozen) / median(bare)).toFixed(2)}×  (checksum ${check})`);
  }
  say("  (target: frozen loop within 2× of the bare walk; 200,000 entries of 4–12 symbols)");
  return { lines, ratios };
}
