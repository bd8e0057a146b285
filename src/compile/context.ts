// Context recognisers for the rule compiler: small regular expressions over symbol sets, turned
// into complete DFAs over the alphabet's symbol ids (Thompson construction, then subset construction).
//
// These DFAs are not machines of the cascade: they are the left- and right-context checkers the
// rule construction (rule.ts) runs while it explores the annotated-alignment language, the way
// Kaplan & Kay 1994 and Mohri & Sproat 1996 use context acceptors (Σ*·λ and ρ·Σ*) as filters.

/** A regular expression over symbol sets. `set` is a membership array indexed by symbol id. */
export type Rx =
  | { readonly k: "set"; readonly set: Uint8Array }
  | { readonly k: "seq"; readonly items: readonly Rx[] }
  | { readonly k: "alt"; readonly options: readonly Rx[] }
  | { readonly k: "star"; readonly body: Rx }
  | { readonly k: "rep"; readonly body: Rx; readonly min: number; readonly max: number | null };

export const EPS_RX: Rx = { k: "seq", items: [] };

/**
 * A complete DFA over symbols 1..size-1 (0 is ε and never read). `next[q * size + s]` is the
 * successor; every state has a successor on every symbol (a dead state when needed).
 * `sink[q]` is 1 when every string from q is accepted (universal), -1 when none is (dead), else 0.
 */
export interface Dfa {
  readonly size: number;
  readonly states: number;
  readonly start: number;
  readonly next: Int32Array;
  readonly accept: Uint8Array;
  readonly sink: Int8Array;
}

interface Nfa {
  count: number;
  eps: number[][];
  arcs: { set: Uint8Array; to: number }[][];
}

/** Most NFA states one context expression may need (repetitions written out); more is ContextTooLargeError. */
const MAX_NFA_STATES = 1_000_000;

function newState(n: Nfa): number {
  if (n.count >= MAX_NFA_STATES) throw new ContextTooLargeError(MAX_NFA_STATES);
  n.eps.push([]);
  n.arcs.push([]);
  return n.count++;
}

/** Thompson construction: returns [start, end] states of a fragment for `rx`. */
function build(n: Nfa, rx: Rx): [number, number] {
  switch (rx.k) {
    case "set": {
      const a = newState(n), b = newState(n);
      n.arcs[a]!.push({ set: rx.set, to: b });
      return [a, b];
    }
    case "seq": {
      const a = newState(n);
      let cur = a;
      for (const item of rx.items) {
        const [s, e] = build(n, item);
        n.eps[cur]!.push(s);
        cur = e;
      }
      return [a, cur];
    }
    case "alt": {
      const a = newState(n), b = newState(n);
      for (const o of rx.options) {
        const [s, e] = build(n, o);
        n.eps[a]!.push(s);
        n.eps[e]!.push(b);
      }
      return [a, b];
    }
    case "star": {
      const a = newState(n), b = newState(n);
      const [s, e] = build(n, rx.body);
      n.eps[a]!.push(s, b);
      n.eps[e]!.push(s, b);
      return [a, b];
    }
    case "rep": {
      // Each copy needs at least one state: a bound past the limit fails before anything is built.
      if (Math.max(rx.min, rx.max ?? 0) > MAX_NFA_STATES) throw new ContextTooLargeError(MAX_NFA_STATES);
      const items: Rx[] = [];
      for (let i = 0; i < rx.min; i++) items.push(rx.body);
      if (rx.max === null) items.push({ k: "star", body: rx.body });
      else for (let i = rx.min; i < rx.max; i++) items.push({ k: "alt", options: [rx.body, EPS_RX] });
      return build(n, { k: "seq", items });
    }
    default: {
      const never: never = rx;
      throw new Error(`unknown regex node ${String(never)}`);
    }
  }
}

function closure(n: Nfa, states: Iterable<number>): number[] {
  const seen = new Set<number>();
  const stack = [...states];
  for (const s of stack) seen.add(s);
  while (stack.length > 0) {
    const s = stack.pop()!;
    for (const t of n.eps[s]!) if (!seen.has(t)) { seen.add(t); stack.push(t); }
  }
  return [...seen].sort((a, b) => a - b);
}

/** A limit on context-DFA size; exceeding it is reported by the caller with the rule's name. */
export class ContextTooLargeError extends Error {
  constructor(readonly states: number) {
    super(`a context recogniser grew past ${states} states`);
  }
}

/** Subset construction of `rx` over symbols 1..size-1, then sink analysis; `progress` is called per state made (it may throw to abandon). */
export function dfaFromRx(rx: Rx, size: number, limit = 20000, progress?: () => void): Dfa {
  const n: Nfa = { count: 0, eps: [], arcs: [] };
  const [s0, f] = build(n, rx);
  const keyOf = (set: number[]): string => set.join(",");
  const start = closure(n, [s0]);
  const index = new Map<string, number>([[keyOf(start), 0]]);
  const sets: number[][] = [start];
  const table: number[] = [];
  const accept: number[] = [];
  for (let q = 0; q < sets.length; q++) {
    const cur = sets[q]!;
    accept.push(cur.includes(f) ? 1 : 0);
    const row = new Array<number>(size).fill(-1);
    // Group successor computation by symbol: collect for each symbol the set of targets.
    const targets: number[][] = Array.from({ length: size }, () => []);
    for (const st of cur) {
      for (const arc of n.arcs[st]!) {
        const set = arc.set;
        for (let sym = 1; sym < size; sym++) if (set[sym]) targets[sym]!.push(arc.to);
      }
    }
    for (let sym = 1; sym < size; sym++) {
      const t = closure(n, targets[sym]!);
      const k = keyOf(t);
      let id = index.get(k);
      if (id === undefined) {
        id = sets.length;
        if (id >= limit) throw new ContextTooLargeError(limit);
        progress?.();
        index.set(k, id);
        sets.push(t);
      }
      row[sym] = id;
    }
    row[0] = q;
    table.push(...row);
  }
  return finish(size, 0, Int32Array.from(table), Uint8Array.from(accept));
}

/** Computes the universal/dead sink marks by backward reachability. */
function finish(size: number, start: number, next: Int32Array, accept: Uint8Array): Dfa {
  const states = accept.length;
  // canReachAccept / canReachReject via reverse graph.
  const rev: number[][] = Array.from({ length: states }, () => []);
  for (let q = 0; q < states; q++) {
    for (let s = 1; s < size; s++) rev[next[q * size + s]!]!.push(q);
  }
  const reach = (good: (q: number) => boolean): Uint8Array => {
    const mark = new Uint8Array(states);
    const stack: number[] = [];
    for (let q = 0; q < states; q++) if (good(q)) { mark[q] = 1; stack.push(q); }
    while (stack.length > 0) {
      const q = stack.pop()!;
      for (const p of rev[q]!) if (!mark[p]) { mark[p] = 1; stack.push(p); }
    }
    return mark;
  };
  const toAccept = reach((q) => accept[q] === 1);
  const toReject = reach((q) => accept[q] === 0);
  const sink = new Int8Array(states);
  for (let q = 0; q < states; q++) sink[q] = !toAccept[q] ? -1 : !toReject[q] ? 1 : 0;
  return { size, states, start, next, accept, sink };
}

/** Product of two DFAs over the same alphabet, accepting by `op` ("and" / "and-not"). */
export function dfaProduct(a: Dfa, b: Dfa, op: "and" | "and-not"): Dfa {
  const size = a.size;
  const index = new Map<number, number>();
  const pairs: [number, number][] = [];
  const id = (p: number, q: number): number => {
    const k = p * b.states + q;
    let v = index.get(k);
    if (v === undefined) { v = pairs.length; index.set(k, v); pairs.push([p, q]); }
    return v;
  };
  id(a.start, b.start);
  const table: number[] = [];
  const accept: number[] = [];
  for (let i = 0; i < pairs.length; i++) {
    const [p, q] = pairs[i]!;
    const acc = op === "and" ? a.accept[p]! & b.accept[q]! : a.accept[p]! & (1 - b.accept[q]!);
    accept.push(acc);
    table.push(i);
    for (let s = 1; s < size; s++) table.push(id(a.next[p * size + s]!, b.next[q * size + s]!));
  }
  return finish(size, 0, Int32Array.from(table), Uint8Array.from(accept));
}

/** Membership array of the given symbol ids. */
export function symbolSet(size: number, ids: Iterable<number>): Uint8Array {
  const s = new Uint8Array(size);
  for (const i of ids) s[i] = 1;
  return s;
}

/** Σ (every symbol except ε) as a set. */
export function anySet(size: number): Uint8Array {
  const s = new Uint8Array(size).fill(1);
  s[0] = 0;
  return s;
}

/** Reverses a regular expression (the mirror image of its language). */
export function reverseRx(rx: Rx): Rx {
  switch (rx.k) {
    case "set": return rx;
    case "seq": return { k: "seq", items: [...rx.items].reverse().map(reverseRx) };
    case "alt": return { k: "alt", options: rx.options.map(reverseRx) };
    case "star": return { k: "star", body: reverseRx(rx.body) };
    case "rep": return { k: "rep", body: reverseRx(rx.body), min: rx.min, max: rx.max };
    default: {
      const never: never = rx;
      throw new Error(`unknown regex node ${String(never)}`);
    }
  }
}

/** Is the language of `rx` empty? (Some set on every path is empty.) */
export function rxIsEmpty(rx: Rx): boolean {
  switch (rx.k) {
    case "set": return !rx.set.some((v) => v === 1);
    case "seq": return rx.items.some(rxIsEmpty);
    case "alt": return rx.options.every(rxIsEmpty);
    case "star": return false;
    case "rep": return rx.min > 0 && rxIsEmpty(rx.body);
    default: {
      const never: never = rx;
      throw new Error(`unknown regex node ${String(never)}`);
    }
  }
}

/**
 * Symbols whose columns agree in every DFA of `dfas` act alike: `cols` holds one representative
 * of each class (enough to explore products and refine partitions), `rep[s]` the one of s.
 */
function symbolColumns(dfas: readonly Dfa[], size: number): { cols: number[]; rep: Int32Array } {
  const cols: number[] = [];
  const rep = new Int32Array(size);
  const seen = new Map<string, number>();
  for (let s = 1; s < size; s++) {
    let key = "";
    for (const d of dfas) {
      for (let q = 0; q < d.states; q++) key += `${d.next[q * size + s]},`;
      key += "|";
    }
    const r = seen.get(key);
    if (r === undefined) { seen.set(key, s); cols.push(s); }
    rep[s] = r ?? s;
  }
  return { cols, rep };
}

/**
 * The minimal DFA of `d` (Moore's partition refinement over the reachable states; symbols whose
 * columns agree are refined once). Complete DFAs stay complete; sink marks are recomputed.
 */
export function minimiseDfa(d: Dfa): Dfa {
  const { size, next } = d;
  // Reachable states, in breadth-first order from the start.
  const order: number[] = [d.start];
  const seen = new Uint8Array(d.states);
  seen[d.start] = 1;
  for (let i = 0; i < order.length; i++) {
    const q = order[i]!;
    for (let s = 1; s < size; s++) {
      const t = next[q * size + s]!;
      if (!seen[t]) { seen[t] = 1; order.push(t); }
    }
  }
  const { cols } = symbolColumns([d], size);
  let cls = new Int32Array(d.states).fill(-1);
  for (const q of order) cls[q] = d.accept[q]!;
  let count = new Set(order.map((q) => cls[q]!)).size;
  for (;;) {
    const index = new Map<string, number>();
    const nc = new Int32Array(d.states).fill(-1);
    for (const q of order) {
      let key = `${cls[q]}`;
      for (const s of cols) key += `,${cls[next[q * size + s]!]}`;
      let c = index.get(key);
      if (c === undefined) { c = index.size; index.set(key, c); }
      nc[q] = c;
    }
    cls = nc;
    if (index.size === count) break;
    count = index.size;
  }
  const table = new Int32Array(count * size);
  const accept = new Uint8Array(count);
  for (const q of order) {
    const c = cls[q]!;
    accept[c] = d.accept[q]!;
    table[c * size] = c;
    for (let s = 1; s < size; s++) table[c * size + s] = cls[next[q * size + s]!]!;
  }
  return finish(size, cls[d.start]!, table, accept);
}

/**
 * A boolean combination of DFAs over one alphabet, minimised: the product of `dfas` (reachable
 * tuples only) accepting where `f` holds of the members' acceptance (`acc[i]` for `dfas[i]`).
 * `limit` bounds the product's states (ContextTooLargeError); `progress` is called per state made.
 */
export function dfaBoolean(dfas: readonly Dfa[], f: (acc: readonly boolean[]) => boolean, limit = 20000, progress?: () => void): Dfa {
  const size = dfas[0]!.size;
  const k = dfas.length;
  const { cols, rep } = symbolColumns(dfas, size);
  const tuples: Int32Array[] = [Int32Array.from(dfas.map((d) => d.start))];
  const index = new Map<string, number>([[tuples[0]!.join(","), 0]]);
  const rows: Int32Array[] = [];
  const accept: number[] = [];
  const acc: boolean[] = new Array<boolean>(k).fill(false);
  for (let i = 0; i < tuples.length; i++) {
    const t = tuples[i]!;
    for (let j = 0; j < k; j++) acc[j] = dfas[j]!.accept[t[j]!] === 1;
    accept.push(f(acc) ? 1 : 0);
    const row = new Int32Array(size);
    row[0] = i;
    for (const s of cols) {
      const u = new Int32Array(k);
      for (let j = 0; j < k; j++) u[j] = dfas[j]!.next[t[j]! * size + s]!;
      const key = u.join(",");
      let id = index.get(key);
      if (id === undefined) {
        id = tuples.length;
        if (id >= limit) throw new ContextTooLargeError(limit);
        progress?.();
        index.set(key, id);
        tuples.push(u);
      }
      row[s] = id;
    }
    rows.push(row);
  }
  // Symbols outside `cols` behave like their representative in every member.
  const table = new Int32Array(tuples.length * size);
  for (let i = 0; i < rows.length; i++) {
    const row = rows[i]!;
    table[i * size] = i;
    for (let s = 1; s < size; s++) table[i * size + s] = row[rep[s]!]!;
  }
  return minimiseDfa(finish(size, 0, table, Uint8Array.from(accept)));
}
