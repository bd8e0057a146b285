// The prosodic steps as transducers, built directly as acceptors of correct input:output
// alignments: the syllabifier (delete every '.', then insert boundaries by the Maximal Onset
// Principle within the declared onsets and codas) and default stress (fixed or weight-sensitive).
// Both follow exactly the interpreter's documented procedure (src/interp/prosody.ts).

import type { Grammar, StressStep } from "../grammar/ast.js";
import type { Bundle } from "../inventory/types.js";
import { cutCluster, resolveClusters } from "../interp/index.js";
import { type Alphabet, EPSILON, FIRST_SEGMENT, JOIN, SYLL, WORD } from "./alphabet.js";
import { anySet, dfaFromRx, type Rx } from "./context.js";
import type { SymbolLowering } from "./cases.js";
import { lowerError, type Lowering } from "./lower.js";
import type { PairNfa } from "./rule.js";

/** Builds a PairNfa from explicit states, arcs and finals. */
class PairBuilder {
  states = 0;
  readonly arcs: number[] = [];
  readonly finals: number[] = [];
  add(): number { return this.states++; }
  arc(from: number, i: number, o: number, to: number): void { this.arcs.push(from, i, o, to); }
  done(start: number): PairNfa {
    return { states: this.states, start, finals: this.finals, arcs: Int32Array.from(this.arcs) };
  }
}

// ---- syllabification ------------------------------------------------------------------------

/**
 * The syllabifier as a pair acceptor: output = input without its '.', with '.' inserted between
 * nuclei where the interpreter's `syllabify` cuts each cluster.
 *
 * Construction. The language of correctly syllabified strings is recognised deterministically:
 * after a nucleus, the cluster X read so far is abstracted by a signature that is a right
 * congruence for the cut (X itself while it is a proper prefix of a legal coda; the suffixes Z of X
 * whose remainder is a legal coda and that begin a legal onset; the longest suffix of X that is a
 * proper prefix of a legal onset — the Aho–Corasick state). At the inserted '.', the signature
 * fixes the set of onsets Y for which cut(X·Y) = |X|, computed on a representative by the same
 * procedure as the interpreter; the following consonants must spell one of them before the next
 * nucleus. Since legal clusters are finite, the signatures are finitely many.
 *
 * Joins (`+`, the grammar's `joins` mode). A cluster state also carries `lo`, the lowest cut the
 * joins read so far allow (0 without a closing join); the signature then looks only at the part of
 * X after `lo` (the suffixes and the onset-prefix state inside it) plus whether X is a prefix of a
 * legal coda, which is all the cut can depend on (see `cutCluster`). "through": a join is copied
 * and changes nothing. "closed": a join sets lo = |X|, and an onset never holds one.
 * "closed-before-consonant": a join is pending until the next symbol — a consonant closes it (lo
 * = |X|), a nucleus leaves it open; inside an onset a join may stand only right before the nucleus.
 * A '.' at a join is written after it (the interpreter's order), so an onset never starts with '+'.
 */
export function buildSyllabifier(grammar: Grammar, low: Lowering, alphabet: Alphabet, domain: Uint8Array): PairNfa {
  const inv = low.inventory;
  const read = (list: Grammar["onsets"], what: string): (readonly Bundle[])[] | null => {
    const r = resolveClusters(list, inv);
    if (r.unknown.length > 0) {
      const u = r.unknown[0]!;
      throw lowerError("compile/unknown-segment", `${what}: '${u.symbol}' is not a segment of the inventory.`, u.cluster.span);
    }
    return r.list === null ? null : r.list.map((c) => [...c]);
  };
  const onsetList = read(grammar.onsets, "onsets");
  const codaList = read(grammar.codas, "codas");
  const segKey = (b: Bundle): string => low.segmental.map((i) => b[i]).join("");
  // Consonant classes: non-nucleus symbols grouped by their non-prosodic features.
  const classOf = new Int32Array(alphabet.size).fill(-1);
  const classKeys: string[] = [];
  const classIndex = new Map<string, number>();
  const nucleus = new Uint8Array(alphabet.size);
  for (const s of alphabet.segments) {
    if (low.isNucleus(s.bundle)) { nucleus[s.id] = 1; continue; }
    const k = segKey(s.bundle);
    let c = classIndex.get(k);
    if (c === undefined) { c = classKeys.length; classKeys.push(k); classIndex.set(k, c); }
    classOf[s.id] = c;
  }
  const toStrings = (list: (readonly Bundle[])[] | null): Set<string> | null => {
    if (list === null) return null;
    const out = new Set<string>();
    for (const c of list) {
      const ids = c.map((b) => classIndex.get(segKey(b)));
      if (ids.every((x) => x !== undefined)) out.add(ids.join(","));
    }
    return out;
  };
  const O = toStrings(onsetList);
  const K = toStrings(codaList);
  const key = (xs: readonly number[]): string => xs.join(",");
  const legalO = (xs: readonly number[]): boolean => xs.length === 0 || O === null || O.has(key(xs));
  const legalK = (xs: readonly number[]): boolean => xs.length === 0 || K === null || K.has(key(xs));
  /** The interpreter's cut of an inter-nucleus cluster (src/interp/prosody.ts, cutCluster), at or after `lo`. */
  const cut = (c: readonly number[], lo = 0): number => cutCluster(c, lo, legalO, legalK).cut;
  const mode = grammar.joins ?? "through";
  const prefixesOf = (set: Set<string> | null): Set<string> => {
    const out = new Set<string>([""]);
    if (set) for (const s of set) { const p = s.split(","); for (let i = 1; i <= p.length; i++) out.add(p.slice(0, i).join(",")); }
    return out;
  };
  const oPrefixes = prefixesOf(O);
  const kPrefixes = prefixesOf(K);
  const oProper = new Set<string>([""]);
  if (O) for (const s of O) { const p = s.split(","); for (let i = 1; i < p.length; i++) oProper.add(p.slice(0, i).join(",")); }
  const maxO = O ? Math.max(0, ...[...O].map((s) => s.split(",").length)) : 0;
  const consonants: number[] = classKeys.map((_, i) => i);
  /** Candidate onsets after a cut: the legal onsets, ε, and every single consonant (fallback). */
  const candidates: number[][] = [[]];
  const candSeen = new Set<string>([""]);
  if (O) for (const s of O) if (!candSeen.has(s)) { candSeen.add(s); candidates.push(s.split(",").map(Number)); }
  for (const c of consonants) if (!candSeen.has(String(c))) { candSeen.add(String(c)); candidates.push([c]); }

  /** Signature of a cluster (see the method note): a right congruence that fixes the valid onsets. */
  const sigOf = (x: readonly number[], lo = 0): string => {
    const xk = key(x);
    const trie = K === null ? "U" : kPrefixes.has(xk) ? `T${xk}` : "N";
    const flag = lo === x.length ? "J" : "";
    if (O === null) {
      // Every onset is legal: the cut is the first j ≥ lo whose coda is legal (else lo).
      if (lo === 0) return x.length === 0 ? "e" : "n"; // every cut is at 0
      let hit = false;
      for (let j = lo; j < x.length && !hit; j++) hit = legalK(x.slice(0, j));
      return `o|${trie}|${flag}|${hit ? 1 : 0}`;
    }
    const room = x.length - lo;
    const zs: string[] = [];
    for (let l = 1; l <= Math.min(maxO, room); l++) {
      const z = key(x.slice(x.length - l));
      if (oPrefixes.has(z) && legalK(x.slice(0, x.length - l))) zs.push(z);
    }
    let star = "";
    for (let l = Math.min(maxO, room); l >= 1; l--) {
      const z = key(x.slice(x.length - l));
      if (oProper.has(z)) { star = z; break; }
    }
    return `${trie}|${zs.join(";")}|${star}${lo > 0 ? `|${flag}` : ""}`;
  };
  /** The onsets y for which the cut of x·y (no onset before `lo`) falls at |x|; `open`: a join pending at |x| that a nucleus leaves open. */
  const validOnsets = (x: readonly number[], lo = 0, open = false): string[] | "any" => {
    if (O === null && lo === 0) return x.length === 0 ? "any" : [];
    const out: string[] = [];
    for (const y of candidates) {
      const l = open && y.length > 0 ? x.length : lo;
      if (cut([...x, ...y], l) === x.length) out.push(key(y));
    }
    if (O === null) {
      // Candidates hold the single consonants only; with every onset legal, longer onsets follow the same cut.
      const any = out.includes("") && consonants.every((c) => out.includes(String(c)));
      if (any) return "any";
    }
    return out;
  };

  const b = new PairBuilder();
  const R = b.add();
  b.finals.push(R);
  // X states: a cluster after a nucleus, with the lowest cut its joins allow and (mode
  // closed-before-consonant) whether a join was just read.
  const xState = new Map<string, number>();
  const xWork: { rep: number[]; lo: number; pending: boolean; id: number }[] = [];
  const internX = (x: number[], lo = 0, pending = false): number => {
    const s = `${pending ? "P" : ""}${sigOf(x, lo)}`;
    let id = xState.get(s);
    if (id === undefined) {
      id = b.add();
      xState.set(s, id);
      xWork.push({ rep: x, lo, pending, id });
      b.finals.push(id);
    }
    return id;
  };
  // Y states: (valid-onset set, onset prefix read so far, whether a consonant was read, whether a
  // join was just read). "any+": every non-empty onset.
  type YSet = Set<string> | "any" | "any+";
  const yState = new Map<string, number>();
  const yWork: { set: YSet; setKey: string; y: number[]; started: boolean; joined: boolean; id: number }[] = [];
  const yPrefixSets = new Map<string, Set<string>>();
  const internY = (set: YSet, setKey: string, y: number[], started: boolean, joined: boolean): number => {
    // Only what can matter is kept apart: `started` where y does not show it (an "any" set), and
    // `joined` only in mode closed-before-consonant (elsewhere a join inside an onset changes nothing).
    if (mode !== "closed-before-consonant") joined = false;
    if (typeof set !== "string") started = y.length > 0;
    const k = `${setKey}#${key(y)}#${started ? 1 : 0}${joined ? 1 : 0}`;
    let id = yState.get(k);
    if (id === undefined) {
      id = b.add();
      yState.set(k, id);
      yWork.push({ set, setKey, y, started, joined, id });
    }
    return id;
  };
  const ids = (pred: (id: number) => boolean): number[] => {
    const out: number[] = [];
    for (let x = FIRST_SEGMENT; x < alphabet.size; x++) if (domain[x] && pred(x)) out.push(x);
    return out;
  };
  const nucleusIds = ids((x) => nucleus[x] === 1);
  const consIds = ids((x) => nucleus[x] === 0);
  const x0 = internX([]);
  // R: the region's initial cluster (no boundary), until the first nucleus; joins change nothing there.
  for (const c of consIds) b.arc(R, c, c, R);
  for (const v of nucleusIds) b.arc(R, v, v, x0);
  b.arc(R, WORD, WORD, R);
  b.arc(R, JOIN, JOIN, R);
  for (let i = 0; i < xWork.length; i++) {
    const { rep, lo, pending, id } = xWork[i]!;
    // A pending join closes when a consonant follows it.
    const loOn = pending ? rep.length : lo;
    for (const c of consIds) b.arc(id, c, c, internX([...rep, classOf[c]!], loOn));
    b.arc(id, WORD, WORD, R);
    if (mode === "through") b.arc(id, JOIN, JOIN, id);
    else if (mode === "closed") b.arc(id, JOIN, JOIN, internX(rep, rep.length));
    else b.arc(id, JOIN, JOIN, internX(rep, lo, true));
    const valid = validOnsets(rep, lo, pending);
    if (valid !== "any" && valid.length === 0) continue;
    let setKey: string = valid === "any" ? "any" : valid.join(";");
    let set: YSet = "any";
    if (valid !== "any") {
      if (O === null) { set = "any+"; setKey = "any+"; } // every non-empty onset (validOnsets tried the single consonants)
      else {
        set = new Set(valid);
        if (!yPrefixSets.has(setKey)) yPrefixSets.set(setKey, prefixesOf(set));
      }
    }
    b.arc(id, EPSILON, SYLL, internY(set, setKey, [], false, false));
  }
  for (let i = 0; i < yWork.length; i++) {
    const { set, setKey, y, started, joined, id } = yWork[i]!;
    const prefixes = typeof set === "string" ? null : yPrefixSets.get(setKey)!;
    // After a join inside an onset (closed-before-consonant), only the nucleus may follow.
    if (!(joined && mode === "closed-before-consonant")) {
      for (const c of consIds) {
        // With every onset legal ("any"), what was read does not matter: stay in one state.
        const ny = prefixes ? [...y, classOf[c]!] : [];
        if (prefixes && !prefixes.has(key(ny))) continue;
        b.arc(id, c, c, internY(set, setKey, ny, true, false));
      }
    }
    // A join inside an onset: never first (a '.' at a join follows it), never in mode "closed".
    if (started && mode === "through") b.arc(id, JOIN, JOIN, id);
    else if (started && mode === "closed-before-consonant") b.arc(id, JOIN, JOIN, internY(set, setKey, y, true, true));
    const ok = set === "any" || (set === "any+" ? started : set.has(key(y)));
    if (ok) for (const v of nucleusIds) b.arc(id, v, v, x0);
  }
  // Every '.' of the input is deleted, wherever it stands.
  for (let s = 0; s < b.states; s++) b.arc(s, SYLL, EPSILON, s);
  return b.done(R);
}

// ---- default stress ---------------------------------------------------------------------------

/**
 * Default stress as a pair acceptor. Per word (stretch between '#'), either the word keeps its
 * nuclei as they are (it has a nucleus that is not [0stress 0primary], or none at all), or every
 * nucleus is [0stress 0primary] and is written [+stress +primary] at the chosen syllable and
 * [-stress -primary] elsewhere. The acceptor guesses the mode at the word's first nucleus and
 * checks it at the word's end, with the chosen syllable computed as the interpreter does:
 * position N from the edge, clamped to the syllables there are; weight-sensitive: N if heavy,
 * else M (clamped). It remembers the count of nuclei (capped), the heaviness and stress of the
 * first (from left) or last (from right) max(N, M) syllables, and the heavy-rhyme recogniser's
 * state for the current rhyme (nucleus up to the next '.', '#' or nucleus).
 */
export function buildStress(step: StressStep, grammar: Grammar, sl: SymbolLowering, domain: Uint8Array): PairNfa {
  const { low, alphabet } = sl;
  const size = alphabet.size;
  if (low.stressIdx < 0 || low.primaryIdx < 0 || low.syllabicIdx < 0) {
    // Without prosodic features the interpreter leaves words unchanged: the identity.
    const b = new PairBuilder();
    const s = b.add();
    b.finals.push(s);
    for (let x = 1; x < size; x++) if (domain[x]) b.arc(s, x, x, s);
    return b.done(s);
  }
  const Kmax = Math.max(step.position, step.otherwise ?? 0, 1);
  // Heavy rhymes: some heavy pattern matches a prefix of the rhyme, i.e. rhyme ∈ H·Σ*.
  const heavyRx: Rx = { k: "seq", items: [{ k: "alt", options: grammar.heavy.map((h) => sl.pattern(h, new Map())) }, { k: "star", body: { k: "set", set: anySet(size) } }] };
  const heavy = step.otherwise !== null && grammar.heavy.length > 0 ? dfaFromRx(heavyRx, size) : null;
  const stressed = new Int32Array(size).fill(-1);
  const unstressed = new Int32Array(size).fill(-1);
  for (const s of alphabet.segments) {
    if (!low.isNucleus(s.bundle)) continue;
    for (const v of ["+", "-"] as const) {
      const bnd = [...s.bundle];
      bnd[low.stressIdx] = v;
      bnd[low.primaryIdx] = v;
      (v === "+" ? stressed : unstressed)[s.id] = sl.idOf(bnd);
    }
  }
  const withStress = (x: number, v: "+" | "-"): number => (v === "+" ? stressed : unstressed)[x]!;
  const isNuc = new Uint8Array(size);
  const isZero = new Uint8Array(size);
  for (const s of alphabet.segments) {
    if (!low.isNucleus(s.bundle)) continue;
    isNuc[s.id] = 1;
    if (s.bundle[low.stressIdx] === "0" && s.bundle[low.primaryIdx] === "0") isZero[s.id] = 1;
  }

  // State: mode (0 no nucleus yet, 1 keep, 2 assign), sawNonZero (keep mode), count (capped at
  // Kmax+1), syllable records [heavy, primary] for the relevant syllables, current rhyme state
  // (-1 closed), current syllable is primary, and (from right) whether a primary fell out of the window.
  interface St { mode: number; nz: number; count: number; recs: [number, number][]; rh: number; cur: number; lost: number }
  const keyOf = (s: St): string => `${s.mode}|${s.nz}|${s.count}|${s.recs.map((r) => r.join("")).join(",")}|${s.rh}|${s.cur}|${s.lost}`;
  const b = new PairBuilder();
  const index = new Map<string, number>();
  const work: St[] = [];
  const intern = (s: St): number => {
    const k = keyOf(s);
    let id = index.get(k);
    if (id === undefined) { id = b.add(); index.set(k, id); work.push(s); }
    return id;
  };
  // Rhyme state: ≥ 0 an open rhyme (recogniser state), -2 closed light, -3 closed heavy, -1 none.
  const heavyBit = (rh: number): number => (rh === -3 ? 1 : heavy !== null && rh >= 0 && heavy.accept[rh] === 1 ? 1 : 0);
  const closeRhyme = (rh: number): number => (rh >= 0 ? (heavyBit(rh) ? -3 : -2) : rh);
  /** The record list after the current syllable is finished with heaviness h and primary flag p. */
  // A primary outside the first/last max(N, M) syllables can never be the chosen one: such
  // records make the path fail at once (lost = 1), which keeps the state space small.
  const pushRecord = (s: St, h: number, p: number): { recs: [number, number][]; lost: number } => {
    const recs = [...s.recs];
    let lost = s.lost;
    if (step.edge === "left") {
      if (recs.length < Kmax) recs.push([h, p]);
      else if (p) lost = 1;
    } else {
      recs.push([h, p]);
      if (recs.length > Kmax) { const dropped = recs.shift()!; if (dropped[1]) lost = 1; }
    }
    return { recs, lost };
  };
  const primaries = (recs: [number, number][], cur: number): number => recs.reduce((n, r) => n + r[1], cur);
  /** Checks a finished word in assign mode: exactly the chosen syllable is primary. */
  const chosenOk = (recs: [number, number][], count: number, lost: number): boolean => {
    if (lost) return false;
    // count is capped at Kmax+1; clamping only matters when count <= Kmax, when it is exact.
    const idx = (pos: number): number => {
      const p = Math.min(Math.max(pos, 1), count);
      return step.edge === "left" ? p - 1 : recs.length - p; // index into recs
    };
    let chosen = idx(step.position);
    if (step.otherwise !== null && !(recs[chosen]?.[0] === 1)) chosen = idx(step.otherwise);
    return recs.every((r, i) => (r[1] === 1) === (i === chosen));
  };
  const finish = (s: St): boolean => {
    if (s.mode === 0) return true;
    if (s.mode === 1) return s.nz === 1;
    const { recs, lost } = pushRecord(s, heavyBit(s.rh), s.cur);
    return chosenOk(recs, s.count, lost);
  };
  intern({ mode: 0, nz: 0, count: 0, recs: [], rh: -1, cur: 0, lost: 0 });
  const fresh: St = { mode: 0, nz: 0, count: 0, recs: [], rh: -1, cur: 0, lost: 0 };
  for (let i = 0; i < work.length; i++) {
    const s = work[i]!;
    const id = i;
    if (finish(s)) b.finals.push(id);
    for (let x = 1; x < size; x++) {
      if (!domain[x]) continue;
      if (x === WORD) {
        if (finish(s)) b.arc(id, WORD, WORD, intern(fresh));
        continue;
      }
      if (x === SYLL) {
        b.arc(id, x, x, intern({ ...s, rh: s.mode === 2 ? closeRhyme(s.rh) : -1 }));
        continue;
      }
      // A join neither closes a rhyme nor counts in its shape (interp/prosody.ts, assignStress).
      if (x === JOIN) {
        b.arc(id, x, x, id);
        continue;
      }
      if (!isNuc[x]) {
        const rh = s.rh >= 0 && heavy ? heavy.next[s.rh * size + x]! : s.rh;
        b.arc(id, x, x, intern({ ...s, rh: s.mode === 2 ? rh : -1 }));
        continue;
      }
      // A nucleus: finish the previous syllable, start a new one.
      const zero = isZero[x] === 1;
      const count = Math.min(s.count + 1, Kmax + 1);
      const rhStart = heavy ? heavy.next[heavy.start * size + x]! : -1;
      if (s.mode === 0 || s.mode === 1) {
        // keep mode (chosen at the first nucleus, or continuing)
        b.arc(id, x, x, intern({ mode: 1, nz: s.nz | (zero ? 0 : 1), count: 0, recs: [], rh: -1, cur: 0, lost: 0 }));
      }
      if ((s.mode === 0 || s.mode === 2) && zero) {
        let recs: [number, number][] = [];
        let lost = 0;
        if (s.mode === 2) {
          ({ recs, lost } = pushRecord(s, heavyBit(s.rh), s.cur));
        }
        if (lost) continue;
        for (const v of ["+", "-"] as const) {
          const y = withStress(x, v);
          if (y < 0) continue;
          const cur = v === "+" ? 1 : 0;
          if (primaries(recs, cur) > 1) continue; // one primary per word
          b.arc(id, x, y, intern({ mode: 2, nz: 0, count, recs, rh: heavy ? rhStart : -1, cur, lost }));
        }
      }
    }
  }
  return b.done(0);
}
