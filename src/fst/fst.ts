// The mutable transducer builder (states, arcs with one input and one output label, final states
// with an optional final output string) and the symbol table that names labels. Label 0 is ε.

/** A symbol of a machine's alphabet: a small non-negative integer; 0 is ε (the empty string). */
export type Label = number;
/** A state number, 0 … numStates-1. */
export type StateId = number;

/** The empty-string label. */
export const EPSILON: Label = 0;

/** One transition. A transducer arc reads `input` and writes `output`; either may be ε. */
export interface Arc {
  readonly input: Label;
  readonly output: Label;
  readonly target: StateId;
}

/** Thrown for programming errors against the fst API (bad state number, negative label, …). */
export class FstError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "FstError";
  }
}

/** Size figures of a machine. */
export interface FstStats {
  readonly states: number;
  readonly arcs: number;
  readonly finals: number;
  /** Arcs whose input is ε. */
  readonly inputEpsilons: number;
  /** Arcs whose input and output are both ε. */
  readonly epsilons: number;
  /** Largest label on any arc or final output (0 when none). */
  readonly maxLabel: number;
}

const isLabel = (x: number): boolean => Number.isInteger(x) && x >= 0 && x <= 0x7fffffff;

/**
 * A finite-state transducer under construction. Methods that change the machine are the builder
 * methods below (`addState`, `addArc`, `setFinal`, `setStart`, `sortArcs`, …); every operation in
 * the rest of `fst/` is pure and returns a new machine.
 *
 * Invariants: `start` is -1 exactly when there are no states; every arc target is a valid state;
 * labels are integers in 0 … 2³¹-1. A final state has a final output string (often empty) that is
 * written when a run ends there.
 */
export class Fst {
  private readonly arcLists: Arc[][] = [];
  private readonly finals: (readonly Label[] | undefined)[] = [];
  private startState: StateId = -1;

  get start(): StateId {
    return this.startState;
  }

  get numStates(): number {
    return this.arcLists.length;
  }

  /** Adds a state and returns its number. The first state added becomes the start state. */
  addState(): StateId {
    const s = this.arcLists.length;
    this.arcLists.push([]);
    this.finals.push(undefined);
    if (this.startState < 0) this.startState = s;
    return s;
  }

  /** Adds `n` states and returns the number of the first. */
  addStates(n: number): StateId {
    const first = this.arcLists.length;
    for (let k = 0; k < n; k++) this.addState();
    return first;
  }

  setStart(s: StateId): void {
    this.check(s);
    this.startState = s;
  }

  addArc(from: StateId, input: Label, output: Label, target: StateId): void {
    this.check(from);
    this.check(target);
    if (!isLabel(input) || !isLabel(output)) {
      throw new FstError(`arc labels must be integers in 0…2³¹-1, got ${input}:${output}`);
    }
    (this.arcLists[from] as Arc[]).push({ input, output, target });
  }

  /** Makes `s` final, writing `output` (default: nothing) when a run ends there. */
  setFinal(s: StateId, output: readonly Label[] = []): void {
    this.check(s);
    for (const l of output) {
      if (!isLabel(l) || l === EPSILON) throw new FstError(`final output labels must be positive integers, got ${l}`);
    }
    this.finals[s] = output.slice();
  }

  clearFinal(s: StateId): void {
    this.check(s);
    this.finals[s] = undefined;
  }

  isFinal(s: StateId): boolean {
    return this.finals[s] !== undefined;
  }

  /** The final output of `s`, or undefined when `s` is not final. */
  finalOutput(s: StateId): readonly Label[] | undefined {
    return this.finals[s];
  }

  arcs(s: StateId): readonly Arc[] {
    const a = this.arcLists[s];
    if (a === undefined) throw new FstError(`no state ${s}`);
    return a;
  }

  /** Mutator: sorts every state's arcs by (input, output, target), or by (output, input, target). */
  sortArcs(by: "input" | "output" = "input"): void {
    const cmp =
      by === "input"
        ? (a: Arc, b: Arc) => a.input - b.input || a.output - b.output || a.target - b.target
        : (a: Arc, b: Arc) => a.output - b.output || a.input - b.input || a.target - b.target;
    for (const list of this.arcLists) list.sort(cmp);
  }

  numArcs(): number {
    let n = 0;
    for (const list of this.arcLists) n += list.length;
    return n;
  }

  /** True when every arc has equal input and output and no final state has a final output. */
  isAcceptor(): boolean {
    for (const list of this.arcLists) for (const a of list) if (a.input !== a.output) return false;
    return !this.hasFinalOutputs();
  }

  hasFinalOutputs(): boolean {
    for (const f of this.finals) if (f !== undefined && f.length > 0) return true;
    return false;
  }

  stats(): FstStats {
    let arcs = 0;
    let finals = 0;
    let inputEpsilons = 0;
    let epsilons = 0;
    let maxLabel = 0;
    for (let s = 0; s < this.arcLists.length; s++) {
      for (const a of this.arcLists[s] as Arc[]) {
        arcs++;
        if (a.input === EPSILON) {
          inputEpsilons++;
          if (a.output === EPSILON) epsilons++;
        }
        if (a.input > maxLabel) maxLabel = a.input;
        if (a.output > maxLabel) maxLabel = a.output;
      }
      const f = this.finals[s];
      if (f !== undefined) {
        finals++;
        for (const l of f) if (l > maxLabel) maxLabel = l;
      }
    }
    return { states: this.arcLists.length, arcs, finals, inputEpsilons, epsilons, maxLabel };
  }

  /** A deep copy (arcs are immutable values and are shared). */
  clone(): Fst {
    const c = new Fst();
    c.addStates(this.numStates);
    for (let s = 0; s < this.numStates; s++) {
      (c.arcLists[s] as Arc[]).push(...(this.arcLists[s] as Arc[]));
      c.finals[s] = this.finals[s];
    }
    c.startState = this.startState;
    return c;
  }

  private check(s: StateId): void {
    if (!Number.isInteger(s) || s < 0 || s >= this.arcLists.length) {
      throw new FstError(`no state ${s} (machine has ${this.arcLists.length} states)`);
    }
  }
}

/**
 * Names for labels. Label 0 is always "ε"; `add` hands out the next label in insertion order, so
 * the same sequence of names always gives the same numbering.
 */
export class SymbolTable {
  private readonly names: string[] = ["ε"];
  private readonly byName = new Map<string, Label>([["ε", 0]]);

  /** The label of `name`, adding it when new. */
  add(name: string): Label {
    const known = this.byName.get(name);
    if (known !== undefined) return known;
    const l = this.names.length;
    this.names.push(name);
    this.byName.set(name, l);
    return l;
  }

  label(name: string): Label | undefined {
    return this.byName.get(name);
  }

  name(l: Label): string | undefined {
    return this.names[l];
  }

  /** Number of labels including ε. */
  get size(): number {
    return this.names.length;
  }

  toJSON(): readonly string[] {
    return this.names.slice();
  }

  static fromNames(names: readonly string[]): SymbolTable {
    const t = new SymbolTable();
    names.forEach((n, i) => {
      if (i === 0) return;
      if (t.add(n) !== i) throw new FstError(`symbol name ${JSON.stringify(n)} occurs twice`);
    });
    return t;
  }
}

/** A machine with one non-final state: the empty relation. */
export function emptyFst(): Fst {
  const f = new Fst();
  f.addState();
  return f;
}

/** The acceptor of the single string `labels` (ε labels are skipped). */
export function acceptorOf(labels: ArrayLike<Label>): Fst {
  return transducerOf(labels, labels);
}

/**
 * The transducer of the single pair (input, output): a chain pairing the two strings position by
 * position, padding the shorter side with ε.
 */
export function transducerOf(input: ArrayLike<Label>, output: ArrayLike<Label>): Fst {
  const ins = Array.from(input).filter((l) => l !== EPSILON);
  const outs = Array.from(output).filter((l) => l !== EPSILON);
  const f = new Fst();
  let s = f.addState();
  const n = Math.max(ins.length, outs.length);
  for (let k = 0; k < n; k++) {
    const t = f.addState();
    f.addArc(s, ins[k] ?? EPSILON, outs[k] ?? EPSILON, t);
    s = t;
  }
  f.setFinal(s);
  return f;
}

/**
 * Replaces every non-empty final output by a chain of ε-input arcs to a new final state, so that
 * the machine has only plain final states. Pure; returns the machine itself when nothing changes.
 */
export function expandFinalOutputs(fst: Fst): Fst {
  if (!fst.hasFinalOutputs()) return fst;
  const r = fst.clone();
  let sink = -1;
  for (let s = 0; s < fst.numStates; s++) {
    const out = fst.finalOutput(s);
    if (out === undefined || out.length === 0) continue;
    if (sink < 0) {
      sink = r.addState();
      r.setFinal(sink);
    }
    r.clearFinal(s);
    let p = s;
    for (let k = 0; k < out.length; k++) {
      const q = k === out.length - 1 ? sink : r.addState();
      r.addArc(p, EPSILON, out[k] as Label, q);
      p = q;
    }
  }
  return r;
}
