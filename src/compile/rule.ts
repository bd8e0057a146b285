// One rewrite rule as a transducer, built from the rule's lowered cases (symbol sets per target
// position, changes per symbol, left/right context recognisers).
//
// Method. Following Kaplan & Kay 1994 and Mohri & Sproat 1996, a rule is the regular relation of
// "annotated alignments": the input is cut into decision chunks — a copied symbol, or a target
// occurrence rewritten by one case — and the chunks are constrained by context filters:
//   * a rewrite by case c needs c's left context (Σ*·λ) to end at the chunk and c's right context
//     (τ·ρ·Σ*) to start there (the marker filters "r/l1" of Mohri & Sproat);
//   * an obligatory rule forbids a copy chunk where some case's site holds (their "l2" filter,
//     the complement of λ·<·ρ in Kaplan & Kay).
// Instead of composing marker transducers, the filters are run together on the fly: the state is
// (chunk position, one state per left-context DFA, the set of pending right-context checks with
// their polarity) — a deterministic subset construction of the intersection of the filters with
// the chunk structure. Left contexts read the input (simultaneous) or the output so far
// (left-to-right, as Mohri & Sproat's l1/l2 placed after the replacement); right-to-left is the
// mirror image (left context Σ*·λ·τ on the input at the chunk's end, right context ρ·Σ* on the
// output after it). Boundary-blind rules project '.' to ε in every context and target check and
// copy it through without a decision (the paper's "ignore" operation); a rule that never names '+'
// treats joins the same way. Exceptions (`unless`,
// `longest-first`) need no new filter: where a case's left context holds, the right check it
// spawns is its right context minus those of the exceptions whose left context holds too. Each decision token then
// maps to its input:output pairs, giving an acceptor over pair-symbols that the cascade
// determinises and minimises (pairs.ts).

import type { ApplicationMode } from "../grammar/ast.js";
import { ContextTooLargeError, dfaBoolean, dfaProduct, type Dfa } from "./context.js";
import { EPSILON, FIRST_SEGMENT, JOIN, SYLL, WORD } from "./alphabet.js";
import { CompileLimitError, unbounded, type Budget } from "./budget.js";

/** One alpha-variable assignment × environment of a rule, over symbol ids. */
export interface RuleCase {
  /** Membership per target position (length n; empty for insertion). */
  readonly target: readonly Uint8Array[];
  /** Per target position: output id for each input id (EPSILON for deletion, -1 where undefined). */
  readonly out: readonly Int32Array[];
  /** Inserted symbols (insertion rules only). */
  readonly insert: readonly number[];
  /** Index into `lefts`: Σ*·λ (simultaneous, left-to-right) or Σ*·λ·τ (right-to-left). */
  readonly left: number;
  /** Index into `rights`: τ·ρ·Σ* (simultaneous, left-to-right) or ρ·Σ* (right-to-left); insertion sites also need "a segment next, or the final #". */
  readonly right: number;
  /** Index into `rights` of ρ·Σ* (simultaneous and left-to-right, preferred variant of 2+ segment targets). */
  readonly rightAfter?: number;
  /** A literal change longer than its target: the extra segments, written after the last target segment. */
  readonly tail?: readonly number[];
  /** A literal change of another length in a rule blind to '.' or '+': the hidden boundaries inside the target go after the change, in order. */
  readonly dotsAfter?: boolean;
  /**
   * Exceptions (`unless`, longer `longest-first` expansions): the case's site does not hold where
   * one of them holds. Indices into `lefts` / `rights`, built like the case's own (rightAfter: ρ·Σ*).
   */
  readonly excepts?: readonly { readonly left: number; readonly right: number; readonly rightAfter?: number }[];
}

export interface LoweredRule {
  readonly name: string;
  readonly mode: ApplicationMode;
  /** False: obligatory (copy forbidden where a site holds). */
  readonly optional: boolean;
  readonly blind: boolean;
  /** The rule never names '+': joins are copied through without a decision, like '.' in a boundary-blind rule (absent: false). */
  readonly joinBlind?: boolean;
  /** Target length (0 = insertion). */
  readonly n: number;
  readonly cases: readonly RuleCase[];
  readonly lefts: readonly Dfa[];
  readonly rights: readonly Dfa[];
  /** Alphabet size (symbol ids 0..size-1). */
  readonly size: number;
  /** Input symbols the machine accepts (the step's domain). */
  readonly domain: Uint8Array;
  /**
   * Keep only the preferred change where alpha cases disagree at one site: the change whose
   * symbols sort first by key (the interpreter's choice). Exact for one-segment targets.
   */
  readonly preferSmallest?: boolean;
  /** Sort key of each symbol id (for `preferSmallest`). */
  readonly keys?: readonly string[];
}

/** A transducer as plain arcs (state 0 is not necessarily the start). Labels: input, output symbol ids, 0 = ε. */
export interface PairNfa {
  readonly states: number;
  readonly start: number;
  readonly finals: readonly number[];
  /** Flattened arcs: from, input, output, to. */
  readonly arcs: Int32Array;
}

interface Pending { b: number; q: number; pos: boolean }

/** No check: the decision has no case to judge. */
const NONE = -1;

/**
 * Builds the rule's relation as an NFA over input:output pairs (ε-free on neither side in general:
 * deletions are x:ε, insertions ε:y). Deterministic in the decision tokens; several tokens may
 * map to the same pairs (a rewrite that changes nothing), which determinising the pair acceptor removes.
 * The budget's `ruleStates` bounds every state made, explored ones and those inside multi-symbol
 * outputs alike; its clock and heap are checked as states are explored.
 */
export function buildRule(r: LoweredRule, budget: Budget = unbounded()): PairNfa {
  const maxStates = budget.limits.ruleStates;
  const tooLarge = (): CompileLimitError => new CompileLimitError("states", budget.part, maxStates);
  const { size, n, cases, lefts, blind, mode } = r;
  /** Boundaries the rule cannot see: '.' when boundary-blind, '+' when it never names '+'. */
  const hidden = new Uint8Array(size);
  if (blind) hidden[SYLL] = 1;
  if (r.joinBlind === true) hidden[JOIN] = 1;
  const anyHidden = blind || r.joinBlind === true;
  /** The rule's right-context checkers, then the exception-reduced ones made on demand (see `eff`). */
  const rights: Dfa[] = [...r.rights];
  const obligatory = !r.optional;
  const rtl = mode === "right-to-left";
  const leftOnOutput = mode === "left-to-right";
  const rightOnOutput = rtl;
  const nl = lefts.length;
  const prefer = r.preferSmallest === true && n === 1;
  const preferLong = r.preferSmallest === true && n > 1;
  const keys = r.keys ?? [];
  /** Advances the comparison list over target position j reading x (see State.cmp). */
  const compareStep = (cmp: readonly number[], c: RuleCase, j: number, x: number): number[] => {
    const out: number[] = [];
    const mine = keys[c.out[j]![x]!]!;
    for (let i = 0; i < cmp.length; i += 3) {
      const d = cases[cmp[i]!]!;
      if (!d.target[j]![x]) continue;
      const o = d.out[j]![x]!;
      if (o < 0) continue;
      let st = cmp[i + 1]!;
      if (st === 0) {
        const theirs = keys[o]!;
        if (theirs > mine) continue;
        if (theirs < mine) st = 1;
      }
      out.push(cmp[i]!, st, cmp[i + 2]!);
    }
    return out;
  };
  const domain: number[] = [];
  for (let x = 1; x < size; x++) if (r.domain[x]) domain.push(x);

  // ---- state store ------------------------------------------------------------------------
  // cmp (preferred variant, targets of 2+ segments): inside a chunk rewritten by case c, the
  // cases d whose left context held at the chunk's start and whose target matches so far, each
  // with how d's change compares with c's so far (0 equal, 1 d sorts first). At the chunk's end
  // every d that sorts first must not hold (its right context is then checked as a negative).
  // d: hidden boundaries held back inside a chunk whose change has another length (written after
  // the change, in order): their symbol ids as base-4 digits, the first held back the most significant.
  type State = { s: number; p: Int32Array; v: Pending[]; cmp: readonly number[]; d: number };
  const keyOf = (st: State): string => {
    let k = `${st.s}|${st.d}|${st.p.join(",")}|${st.cmp.join(",")}|`;
    for (const e of st.v) k += `${e.b}:${e.q}${e.pos ? "+" : "-"},`;
    return k;
  };
  const states: State[] = [];
  const index = new Map<string, number>();
  const intern = (st: State): number => {
    const k = keyOf(st);
    let id = index.get(k);
    if (id === undefined) {
      id = states.length;
      if (id + mids >= maxStates) throw tooLarge();
      index.set(k, id);
      states.push(st);
    }
    return id;
  };

  const project = (sym: number): number => (sym === EPSILON || hidden[sym] === 1 ? EPSILON : sym);

  /** Advances a working state over one pair; returns false if it died. */
  const stepPair = (p: Int32Array, v: Pending[], inp: number, outp: number): Pending[] | null => {
    const l = project(leftOnOutput ? outp : inp);
    if (l !== EPSILON) for (let i = 0; i < nl; i++) p[i] = lefts[i]!.next[p[i]! * size + l]!;
    const rs = project(rightOnOutput ? outp : inp);
    if (rs === EPSILON) return v;
    const nv: Pending[] = [];
    for (const e of v) {
      const d = rights[e.b]!;
      const q = d.next[e.q * size + rs]!;
      const sink = d.sink[q]!;
      if (sink === 1) { if (!e.pos) return null; continue; }
      if (sink === -1) { if (e.pos) return null; continue; }
      nv.push({ b: e.b, q, pos: e.pos });
    }
    return nv;
  };

  /** Adds a right-context check starting here; returns false if it fails at once. */
  const spawn = (v: Pending[], b: number, pos: boolean): boolean => {
    const d = rights[b]!;
    const q = d.start;
    const sink = d.sink[q]!;
    if (sink === 1) return !pos ? false : true;
    if (sink === -1) return pos ? false : true;
    v.push({ b, q, pos });
    return true;
  };

  /** Adds a check that may be NONE (no case: a positive check fails, a negative one holds). */
  const spawnAt = (v: Pending[], b: number, pos: boolean): boolean => (b === NONE ? !pos : spawn(v, b, pos));

  // Combined checks. Where several cases are judged at one decision, their right checks become
  // one DFA (a boolean combination of theirs, minimised; made once per combination), so a state
  // carries at most one new pending check per position instead of one per case.
  const comboIndex = new Map<string, number>();
  const combine = (kind: string, groups: readonly (readonly number[])[], f: (any: readonly boolean[]) => boolean): number => {
    const sorted = groups.map((g) => [...new Set(g)].sort((a, b) => a - b));
    const key = `${kind}|${sorted.map((g) => g.join(",")).join("|")}`;
    let i = comboIndex.get(key);
    if (i === undefined) {
      const members = [...new Set(sorted.flat())].sort((a, b) => a - b);
      const at = sorted.map((g) => g.map((b) => members.indexOf(b)));
      const limit = budget.limits.contextStates;
      let d: Dfa;
      try {
        d = dfaBoolean(members.map((b) => rights[b]!), (acc) => f(at.map((g) => g.some((j) => acc[j]))), limit, budget.tick);
      } catch (e) {
        if (e instanceof ContextTooLargeError) throw new CompileLimitError("states", `the right contexts combined by ${budget.part}`, limit);
        throw e;
      }
      i = rights.length;
      rights.push(d);
      comboIndex.set(key, i);
    }
    return i;
  };
  /** Some of the checks holds. */
  const anyOf = (bs: readonly number[]): number => {
    const u = [...new Set(bs)];
    return u.length === 0 ? NONE : u.length === 1 ? u[0]! : combine("or", [u], (g) => g[0]!);
  };
  /** Some of `bs` holds and none of `not`. */
  const anyBut = (bs: readonly number[], not: readonly number[]): number =>
    not.length === 0 ? anyOf(bs) : combine("but", [bs, not], (g) => g[0]! && !g[1]!);
  /**
   * The negative check of a pair x:x that is both a copy and a rewrite to x: it is written where no
   * case holds (`all`) or where a case with output x holds (`same`) and none sorting first (`better`).
   */
  const keepOrCopy = (all: readonly number[], same: readonly number[], better: readonly number[]): number =>
    combine("keep", [all, same, better], (g) => g[0]! && !(g[1]! && !g[2]!));
  /** The left-context states after reading input symbol x. */
  const advanceLeft = (p: Int32Array, x: number): Int32Array => {
    const q = Int32Array.from(p);
    const l = project(x);
    if (l !== EPSILON) for (let i = 0; i < nl; i++) q[i] = lefts[i]!.next[q[i]! * size + l]!;
    return q;
  };

  const leftHolds = (p: Int32Array, c: RuleCase): boolean => lefts[c.left]!.accept[p[c.left]!] === 1;

  // Exceptions. Where a case's left context holds, its site holds iff its right context does and no
  // exception whose left context also holds has its right context there: one right check, the
  // case's right minus the union of those exceptions' rights (a DFA product, made once per set).
  const effIndex = new Map<string, number>();
  /** The right check of case c at left-context states p (`after`: the ρ·Σ* form). */
  const eff = (c: RuleCase, p: Int32Array, after = false): number => {
    const base = after ? c.rightAfter! : c.right;
    const xs = c.excepts;
    if (xs === undefined || xs.length === 0) return base;
    const hold = [...new Set(xs.filter((x) => lefts[x.left]!.accept[p[x.left]!] === 1).map((x) => (after ? x.rightAfter! : x.right)))].sort((a, b) => a - b);
    if (hold.length === 0) return base;
    const key = `${base}|${hold.join(",")}`;
    let i = effIndex.get(key);
    if (i === undefined) {
      let d = rights[base]!;
      for (const h of hold) d = dfaProduct(d, rights[h]!, "and-not");
      i = rights.length;
      rights.push(d);
      effIndex.set(key, i);
    }
    return i;
  };

  /** The negative check for a copy decision: no case's site may hold here. */
  const forbidSites = (p: Int32Array, v: Pending[]): boolean => spawnAt(v, anyOf(cases.filter((c) => leftHolds(p, c)).map((c) => eff(c, p))), false);

  // Subsumption among pending checks: for negative checks only the largest languages matter (the
  // path fails if any accepts), for positive ones only the smallest (all must accept); a positive
  // check inside a negative one can never be met. Dropping the redundant ones keeps the sets —
  // and so the states — few.
  const inclusion = new Map<number, Uint8Array>();
  /** L(b1 from q1) ⊆ L(b2 from q2)? */
  const sub = (b1: number, q1: number, b2: number, q2: number): boolean => {
    const k = b1 * 1_000_003 + b2;
    let m = inclusion.get(k);
    if (m === undefined) { m = languageInclusion(rights[b1]!, rights[b2]!, budget.tick); inclusion.set(k, m); }
    return m[q1 * rights[b2]!.states + q2] === 1;
  };
  const normalise = (v: Pending[]): Pending[] | null => {
    const seen = new Map<string, Pending>();
    for (const e of v) seen.set(`${e.b}:${e.q}:${e.pos ? 1 : 0}`, e);
    let list = [...seen.values()].sort((a, b) => a.b - b.b || a.q - b.q || Number(a.pos) - Number(b.pos));
    if (list.length > 1) {
      for (const p of list) if (p.pos) for (const q of list) if (!q.pos && sub(p.b, p.q, q.b, q.q)) return null;
      list = list.filter((e, i) => !list.some((f, j) => {
        if (j === i || f.pos !== e.pos) return false;
        const inner = e.pos ? sub(f.b, f.q, e.b, e.q) : sub(e.b, e.q, f.b, f.q);
        if (!inner) return false;
        const equal = e.pos ? sub(e.b, e.q, f.b, f.q) : sub(f.b, f.q, e.b, e.q);
        return !equal || j < i; // equal languages: keep the first
      }));
    }
    return list;
  };

  // ---- output arcs ----------------------------------------------------------------------
  // A token of several pairs becomes a chain through intermediate states ("mids", numbered -1,
  // -2, … until the explored states are known). Chains share their states: an insertion's chain
  // (ε:y … then x:x) shares its prefix with every chain from the same state, a chain that ends in
  // inserted symbols (a longer literal change, held-back dots) shares its suffix with every chain
  // into the same state. Each intermediate state has one role, so the paths — and the relation —
  // are the same as with separate chains, while an insertion before each of |Σ| symbols costs
  // |ins| + |Σ| states instead of |ins|·|Σ|.
  const arcs: number[] = [];
  let mids = 0;
  const midIndex = new Map<string, number>();
  /** The intermediate state of the chain prefix or suffix `key`; made on first use, when `link` adds its arc. */
  const mid = (key: string, link: (m: number) => void): number => {
    let m = midIndex.get(key);
    if (m === undefined) {
      if (states.length + mids >= maxStates) throw tooLarge();
      m = -(++mids);
      midIndex.set(key, m);
      link(m);
    }
    return m;
  };
  const emit = (from: number, pairs: number[], to: number): void => {
    const len = pairs.length / 2;
    if (len === 1) { arcs.push(from, pairs[0]!, pairs[1]!, to); return; }
    if (pairs[0] === EPSILON) {
      let cur = from;
      let key = `>${from}`;
      for (let k = 0; k < len - 1; k++) {
        key += `,${pairs[2 * k]}:${pairs[2 * k + 1]}`;
        const prev = cur;
        cur = mid(key, (m) => arcs.push(prev, pairs[2 * k]!, pairs[2 * k + 1]!, m));
      }
      arcs.push(cur, pairs[2 * len - 2]!, pairs[2 * len - 1]!, to);
      return;
    }
    let cur = to;
    let key = `<${to}`;
    for (let k = len - 1; k >= 1; k--) {
      key += `,${pairs[2 * k]}:${pairs[2 * k + 1]}`;
      const next = cur;
      cur = mid(key, (m) => arcs.push(m, pairs[2 * k]!, pairs[2 * k + 1]!, next));
    }
    arcs.push(from, pairs[0]!, pairs[1]!, cur);
  };

  // ---- exploration --------------------------------------------------------------------------
  const start: State = { s: 0, p: Int32Array.from(lefts.map((d) => d.start)), v: [], cmp: [], d: 0 };
  intern(start);
  const finals: number[] = [];

  for (let id = 0; id < states.length; id++) {
    budget.tick();
    const st = states[id]!;
    if (st.s === 0) {
      let ok = true;
      for (const e of st.v) {
        const acc = rights[e.b]!.accept[e.q] === 1;
        if (acc !== e.pos) { ok = false; break; }
      }
      if (ok) finals.push(id);
    }
    let nextCmp: readonly number[] = [];
    const go = (pairs: number[], events: (phase: number, p: Int32Array, v: Pending[]) => boolean): void => {
      // phase k: before pair k (k = 0..len), events may check lefts and spawn rights.
      const p = Int32Array.from(st.p);
      let v: Pending[] = st.v.slice();
      const len = pairs.length / 2;
      for (let k = 0; k <= len; k++) {
        if (!events(k, p, v)) return;
        if (k === len) break;
        const nv = stepPair(p, v, pairs[2 * k]!, pairs[2 * k + 1]!);
        if (nv === null) return;
        v = nv;
      }
      const ns = nextS;
      const nv = normalise(v);
      if (nv === null) return;
      emit(id, pairs, intern({ s: ns, p, v: nv, cmp: ns === 0 ? [] : nextCmp, d: ns === 0 ? 0 : nextD }));
    };
    let nextS = 0;
    let nextD = 0;
    const none = (): boolean => true;
    /** The pairs of a chunk's last token: the change, any longer literal's extra segments, held-back dots. */
    const lastPairs = (c: RuleCase, x: number, y: number, dots: number): number[] => {
      const out = [x, y];
      for (const t of c.tail ?? []) out.push(EPSILON, t);
      for (const h of heldBack(dots)) out.push(EPSILON, h);
      return out;
    };

    if (st.s === 0 && n === 1) {
      // One-segment targets: one decision per output pair. The cases that could rewrite x here
      // are judged together: rewriting to y needs some case with that output to hold (one
      // positive check, the union of their right contexts) and, in the preferred variant, no
      // case with an output that sorts first; a copy needs no case to hold (one negative check).
      // A rewrite to x itself is the same pair as the copy and is folded into it.
      for (const x of domain) {
        nextS = 0;
        nextD = 0;
        nextCmp = [];
        if (hidden[x] === 1) { go([x, x], none); continue; }
        // Left contexts are judged before x, or after it when they include the target (right-to-left).
        const pl = rtl ? advanceLeft(st.p, x) : st.p;
        const holding = cases.filter((c) => c.target[0]![x] === 1 && leftHolds(pl, c));
        const all = holding.map((c) => eff(c, pl));
        const groups = new Map<string, { pairs: number[]; y: number; rights: number[] }>();
        for (const c of holding) {
          const y = c.out[0]![x]!;
          if (y < 0) continue;
          const pairs = lastPairs(c, x, y, 0);
          const key = pairs.join(",");
          let g = groups.get(key);
          if (g === undefined) { g = { pairs, y, rights: [] }; groups.set(key, g); }
          g.rights.push(eff(c, pl));
        }
        let copyCheck = obligatory ? anyOf(all) : NONE;
        for (const g of groups.values()) {
          const better = prefer
            ? holding.filter((d) => { const o = d.out[0]![x]!; return o >= 0 && keys[o]! < keys[g.y]!; }).map((d) => eff(d, pl))
            : [];
          if (g.pairs.length === 2 && g.y === x) {
            if (obligatory) copyCheck = keepOrCopy(all, g.rights, better);
            continue;
          }
          const check = anyBut(g.rights, better);
          const end = g.pairs.length / 2;
          go(g.pairs, (k, _p, v) => (k === (rtl ? end : 0) ? spawnAt(v, check, true) : true));
        }
        go([x, x], (k, _p, v) => (k === (rtl ? 1 : 0) ? spawnAt(v, copyCheck, false) : true));
      }
    } else if (st.s === 0 && n === 0) {
      // Insertions: a copy needs no case to hold; an insertion needs some case with that string
      // to hold (one check per decision, as above).
      const holding = cases.filter((c) => leftHolds(st.p, c));
      const forbid = obligatory ? anyOf(holding.map((c) => eff(c, st.p))) : NONE;
      for (const x of domain) {
        nextS = 0;
        go([x, x], (k, _p, v) => (k === 0 && hidden[x] === 0 ? spawnAt(v, forbid, false) : true));
      }
      const groups = new Map<string, { ins: number[]; rights: number[] }>();
      for (const c of holding) {
        const key = c.insert.join(",");
        let g = groups.get(key);
        if (g === undefined) { g = { ins: c.insert.flatMap((y) => [EPSILON, y]), rights: [] }; groups.set(key, g); }
        g.rights.push(eff(c, st.p));
      }
      for (const g of groups.values()) {
        const check = anyOf(g.rights);
        const m = g.ins.length / 2;
        for (const x of domain) {
          if (!(x === WORD || x >= FIRST_SEGMENT || ((x === SYLL || x === JOIN) && hidden[x] === 0))) continue;
          nextS = 0;
          go([...g.ins, x, x], (k, _p, v) => (k === (rtl ? m : 0) ? spawnAt(v, check, true) : true));
        }
      }
    } else if (st.s === 0) {
      // Targets of several segments: a copy needs no case to hold; a rewrite starts a chunk of one case.
      for (const x of domain) {
        nextS = 0;
        if (hidden[x] === 1 || !obligatory) { go([x, x], none); continue; }
        go([x, x], (k, p, v) => (k === (rtl ? 1 : 0) ? forbidSites(p, v) : true));
      }
      cases.forEach((c, ci) => {
        if (!rtl && !leftHolds(st.p, c)) return;
        const t0 = c.target[0]!;
        const o0 = c.out[0]!;
        for (const x of domain) {
          if (!t0[x]) continue;
          const y = o0[x]!;
          if (y < 0) continue;
          nextS = 1 + ci * n + 1;
          nextCmp = preferLong ? compareStep(cases.flatMap((d, di) => (d !== c && (rtl || leftHolds(st.p, d)) ? [di, 0, rtl ? -1 : eff(d, st.p, true)] : [])), c, 0, x) : [];
          nextD = 0;
          go([x, y], (k, p, v) => (!rtl && k === 0 ? spawnAt(v, eff(c, p), true) : true));
        }
      });
    } else {
      const ci = Math.floor((st.s - 1) / n);
      const j = (st.s - 1) % n;
      const c = cases[ci]!;
      if (anyHidden) {
        // Hidden boundaries inside the target: copied in place, or held back (at most 8) after a change of another length.
        for (const h of [SYLL, JOIN]) {
          if (hidden[h] === 0) continue;
          nextS = st.s;
          nextCmp = st.cmp;
          if (c.dotsAfter !== true) { nextD = st.d; go([h, h], none); }
          else if (heldBack(st.d).length < 8) { nextD = st.d * 4 + h; go([h, EPSILON], none); }
        }
      }
      const tj = c.target[j]!;
      const oj = c.out[j]!;
      for (const x of domain) {
        if (!tj[x] || hidden[x] === 1) continue;
        const y = oj[x]!;
        if (y < 0) continue;
        nextS = j + 1 === n ? 0 : st.s + 1;
        const last = j + 1 === n;
        const cmp = preferLong ? compareStep(st.cmp, c, j, x) : [];
        nextCmp = cmp;
        nextD = st.d;
        const pairs = last ? lastPairs(c, x, y, st.d) : [x, y];
        const end = pairs.length / 2;
        go(pairs, (k, p, v) => {
          if (rtl && last && k === end && !(leftHolds(p, c) && spawn(v, eff(c, p), true))) return false;
          if (preferLong && last && k === end) {
            for (let i = 0; i < cmp.length; i += 3) {
              if (cmp[i + 1] !== 1) continue;
              const d = cases[cmp[i]!]!;
              if (rtl ? leftHolds(p, d) && !spawn(v, eff(d, p), false) : !spawn(v, cmp[i + 2]!, false)) return false;
            }
          }
          return true;
        });
      }
    }
  }

  // Intermediate states of chains are numbered after the explored ones.
  const base = states.length - 1;
  for (let i = 0; i < arcs.length; i += 4) {
    if (arcs[i]! < 0) arcs[i] = base - arcs[i]!;
    if (arcs[i + 3]! < 0) arcs[i + 3] = base - arcs[i + 3]!;
  }
  return { states: states.length + mids, start: 0, finals, arcs: Int32Array.from(arcs) };
}

/** The boundaries held back in a chunk, in order (the base-4 digits of `d`; see State.d). */
function heldBack(d: number): number[] {
  const out: number[] = [];
  for (let x = d; x > 0; x = Math.floor(x / 4)) out.unshift(x % 4);
  return out;
}

/** The mirror image of a pair NFA (arcs reversed, start and finals swapped through a fresh start). */
export function reversePairNfa(m: PairNfa): PairNfa {
  const arcs: number[] = [];
  const s0 = m.states;
  for (let i = 0; i < m.arcs.length; i += 4) arcs.push(m.arcs[i + 3]!, m.arcs[i + 1]!, m.arcs[i + 2]!, m.arcs[i]!);
  for (const f of m.finals) arcs.push(s0, EPSILON, EPSILON, f);
  return { states: m.states + 1, start: s0, finals: [m.start], arcs: Int32Array.from(arcs) };
}

/**
 * Language inclusion between the states of two complete DFAs over one alphabet:
 * m[p·|b| + q] = 1 iff L(a from p) ⊆ L(b from q). Greatest fixpoint: start from "p accepting
 * implies q accepting", then remove pairs with a successor pair outside the relation, until
 * nothing changes. Symbols whose columns agree in both machines are tried once.
 */
export function languageInclusion(a: Dfa, b: Dfa, progress?: () => void): Uint8Array {
  const na = a.states, nb = b.states, size = a.size;
  const cols: number[] = [];
  const seenCol = new Set<string>();
  for (let s = 1; s < size; s++) {
    let key = "";
    for (let q = 0; q < na; q++) key += `${a.next[q * size + s]},`;
    key += "|";
    for (let q = 0; q < nb; q++) key += `${b.next[q * size + s]},`;
    if (!seenCol.has(key)) { seenCol.add(key); cols.push(s); }
  }
  const m = new Uint8Array(na * nb);
  for (let p = 0; p < na; p++) for (let q = 0; q < nb; q++) m[p * nb + q] = a.accept[p] === 1 && b.accept[q] === 0 ? 0 : 1;
  for (let changed = true; changed;) {
    changed = false;
    for (let p = 0; p < na; p++) {
      progress?.();
      for (let q = 0; q < nb; q++) {
        if (m[p * nb + q] === 0) continue;
        for (const s of cols) {
          if (m[a.next[p * size + s]! * nb + b.next[q * size + s]!] === 0) { m[p * nb + q] = 0; changed = true; break; }
        }
      }
    }
  }
  return m;
}
