// Proving cheaply that an entry has exactly one variant, so the variants cascade (a general search
// over every output) runs only for the few entries that can have several (about 5% of the CMU
// dictionary under en-us). Exact: when the screen cannot prove it, the full enumeration runs.
//
// Method. The variants of a word are the image of the input under the steps' relations in order.
// A step whose variants machine is its preferred machine is a function. For a step that can branch
// (an optional rule, or alpha ambiguity), if every accepting path of its variants machine over the
// string that reaches it writes that string back unchanged (only identity arcs, no insertions,
// deletions or final output), its image is that one string. So if every branching step is
// identity-only on the preferred derivation's string before it, the whole image is the preferred
// output alone. "Identity-only" is decided by a lazily built subset automaton over configurations
// (state, changed-flag) of the step's machine: one table look-up per symbol once warm. Per-step
// blame uses the same screen on steps that are functions, to skip runs that would copy the word.

import { EPSILON, freeze, type FrozenFst } from "../fst/index.js";
import type { Compiled } from "../compile/index.js";

/** Most subset states per step before the screen gives up on that step (then: full enumeration). */
const MAX_SUBSETS = 20_000;

/** Identity-only decision for one machine over inputs of an alphabet of `size` symbols. */
export class IdentityScreen {
  private readonly m: FrozenFst;
  private readonly size: number;
  /**
   * The subset states, one row of `size` entries each, created lazily in one flat table grown by
   * doubling. Entry x ≥ 1 of a row: the transition on symbol x, as the target's row offset (the
   * state's number times `size`, so a step is one addition and one look-up), -1 unknown, -2 none
   * alive. Entry 0 (ε, never read as input): the state's verdict, 1 when a changed configuration
   * accepts (or a clean one with final output), 2 when only clean ones accept, 0 none. A walk is a
   * chain of dependent look-ups; without the multiplication per symbol it took 3.9 ns a symbol
   * instead of 4.8 (the en-us screens over the CMU dictionary, in process).
   */
  private next = new Int32Array(0);
  private readonly configs: Int32Array[] = [];
  private readonly byKey = new Map<string, number>();
  private readonly start: number;
  private full = false;

  constructor(m: FrozenFst, size: number) {
    this.m = m;
    this.size = size;
    this.start = this.state(this.closure([m.start * 2]));
  }

  /** ε-closure of configurations c = 2·state + changed. */
  private closure(seed: number[]): number[] {
    const m = this.m;
    const seen = new Set<number>(seed);
    const stack = [...seed];
    while (stack.length > 0) {
      const c = stack.pop()!;
      const s = c >> 1;
      const end = m.first[s + 1]!;
      for (let k = m.first[s]!; k < end && m.input[k] === EPSILON; k++) {
        const d = m.target[k]! * 2 + ((c & 1) | (m.output[k] !== EPSILON ? 1 : 0));
        if (!seen.has(d)) {
          seen.add(d);
          stack.push(d);
        }
      }
    }
    return [...seen].sort((a, b) => a - b);
  }

  private state(configs: number[]): number {
    const key = configs.join(",");
    let d = this.byKey.get(key);
    if (d !== undefined) return d;
    d = this.configs.length;
    if (d >= MAX_SUBSETS) {
      this.full = true;
      return -1;
    }
    this.byKey.set(key, d);
    this.configs.push(Int32Array.from(configs));
    if (this.next.length < (d + 1) * this.size) {
      const grown = new Int32Array(Math.max(16, 2 * (d + 1)) * this.size).fill(-1);
      grown.set(this.next);
      this.next = grown;
    }
    const m = this.m;
    let v = 0;
    for (const c of configs) {
      const s = c >> 1;
      if (m.isFinal[s] !== 1) continue;
      if ((c & 1) === 1 || m.finalFirst[s + 1]! > m.finalFirst[s]!) v = 1;
      else if (v === 0) v = 2;
    }
    this.next[d * this.size] = v;
    return d;
  }

  private step(d: number, x: number): number {
    const m = this.m;
    const seed: number[] = [];
    for (const c of this.configs[d]!) {
      const s = c >> 1;
      const end = m.first[s + 1]!;
      for (let k = m.first[s]!; k < end; k++) {
        const i = m.input[k]!;
        if (i < x) continue;
        if (i > x) break;
        seed.push(m.target[k]! * 2 + ((c & 1) | (m.output[k] !== x ? 1 : 0)));
      }
    }
    const t = seed.length === 0 ? -2 : this.state(this.closure(seed));
    if (t !== -1) this.next[d * this.size + x] = t < 0 ? t : t * this.size;
    return t;
  }

  /** True when the machine accepts `input` and every accepting path writes it back unchanged. */
  identityOnly(input: ArrayLike<number>): boolean {
    if (this.start < 0) return false;
    const size = this.size;
    // The row offset of the current state.
    let d = this.start * size;
    for (let i = 0; i < input.length; i++) {
      const x = input[i]!;
      if (x <= EPSILON || x >= size) return false;
      let t = this.next[d + x]!;
      if (t < 0) {
        if (t === -2 || this.full) return false;
        const s = this.step(d / size, x);
        if (s < 0) return false;
        t = s * size;
      }
      d = t;
    }
    return this.next[d] === 2;
  }
}

/** For each step of a one-block-per-step compilation: null (a function) or the screen of its variants machine. */
export class VariantScreen {
  private constructor(
    private readonly screens: readonly (IdentityScreen | null)[],
    /** branchingBefore[s] = number of branching steps among 0 … s-1. */
    private readonly branchingBefore: Int32Array,
  ) {}

  /**
   * The screen of a stepwise compilation, or null when its variant blocks are not one step each
   * (then nothing can be proven and the caller always enumerates).
   */
  static of(stepwise: Compiled): VariantScreen | null {
    const n = stepwise.steps.length;
    const byStep: ({ readonly from: number; readonly to: number; readonly machine: import("../fst/index.js").Fst } | undefined)[] = new Array(n);
    for (const b of stepwise.variantBlocks) {
      if (b.to !== b.from + 1) return null;
      byStep[b.from] = b;
    }
    const fn = functionSteps(stepwise);
    const screens: (IdentityScreen | null)[] = [];
    const before = new Int32Array(n + 1);
    for (let s = 0; s < n; s++) {
      const v = byStep[s];
      const branching = !fn[s];
      screens.push(branching && v !== undefined ? new IdentityScreen(freeze(v.machine), stepwise.alphabet.size) : null);
      before[s + 1] = before[s]! + (branching ? 1 : 0);
      if (branching && v === undefined) return null;
    }
    return new VariantScreen(screens, before);
  }

  /** True when steps [from, to) hold a step that can branch. */
  branchingIn(from: number, to: number): boolean {
    const n = this.screens.length;
    const a = Math.min(Math.max(from, 0), n);
    const b = Math.min(Math.max(to, a), n);
    return this.branchingBefore[b]! > this.branchingBefore[a]!;
  }

  /**
   * True when step `s` can branch and its variants machine writes `input` back unchanged on every
   * accepting path (and accepts it): then `input` is its one output. False when it cannot tell.
   */
  identityAt(s: number, input: ArrayLike<number>): boolean {
    const sc = this.screens[s];
    return sc !== null && sc !== undefined && sc.identityOnly(input);
  }

  /** True when every branching step among [from, to) is identity-only on `input` (the string entering each of them). */
  identity(from: number, to: number, input: ArrayLike<number>): boolean {
    const n = this.screens.length;
    for (let s = Math.max(from, 0); s < Math.min(to, n); s++) {
      const sc = this.screens[s];
      if (sc !== null && sc !== undefined && !sc.identityOnly(input)) return false;
    }
    return true;
  }
}

/**
 * For each step of a one-block-per-step compilation: true when it is a function — not optional, and
 * its variants block is its preferred block (the same machine, or one of the same shape).
 */
export function functionSteps(stepwise: Compiled): boolean[] {
  const n = stepwise.steps.length;
  const variantOf = new Map(stepwise.variantBlocks.filter((b) => b.to === b.from + 1).map((b) => [b.from, b.machine]));
  const prefOf = new Map(stepwise.preferredBlocks.filter((b) => b.to === b.from + 1).map((b) => [b.from, b.machine]));
  const out: boolean[] = [];
  for (let s = 0; s < n; s++) {
    const v = variantOf.get(s);
    const p = prefOf.get(s);
    out.push(v !== undefined && !stepwise.steps[s]!.optional && (p === v || sameShape(p, v)));
  }
  return out;
}

/** Structural equality of two machines (same states, finals, final outputs and arcs in order). */
function sameShape(a: import("../fst/index.js").Fst | undefined, b: import("../fst/index.js").Fst): boolean {
  if (a === undefined) return false;
  if (a.numStates !== b.numStates || a.start !== b.start) return false;
  for (let s = 0; s < a.numStates; s++) {
    const fa = a.finalOutput(s), fb = b.finalOutput(s);
    if ((fa === undefined) !== (fb === undefined) || (fa !== undefined && fb !== undefined && fa.join(",") !== fb.join(","))) return false;
    const x = a.arcs(s), y = b.arcs(s);
    if (x.length !== y.length) return false;
    for (let k = 0; k < x.length; k++) if (x[k]!.input !== y[k]!.input || x[k]!.output !== y[k]!.output || x[k]!.target !== y[k]!.target) return false;
  }
  return true;
}
