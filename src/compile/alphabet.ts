// The alphabet a grammar compiles over: symbol 0 = ε, 1 = '#', 2 = '.', 3 = '+', then every segment the
// inventory lists (with each prosodic variant lexicon input can carry) and every segment a rule
// can produce from them, each with its feature bundle and its narrow IPA.

import type { Grammar, Pattern, Rule } from "../grammar/ast.js";
import { bundleKey, type Bundle, type FeatureValue, type Inventory } from "../inventory/types.js";
import { realise } from "../inventory/index.js";
import { Lowering, lowerError, type Assignment } from "./lower.js";

export const EPSILON = 0;
export const WORD = 1;
export const SYLL = 2;
/** A morpheme join '+' inside a word. */
export const JOIN = 3;
export const FIRST_SEGMENT = 4;

/** Prosodic variants a nucleus can carry: primary, secondary, unstressed, not yet assigned. */
export const NUCLEUS_PROSODY: readonly (readonly [FeatureValue, FeatureValue])[] = [
  ["+", "+"], ["+", "-"], ["-", "-"], ["0", "0"],
];

export interface AlphabetSymbol {
  readonly id: number;
  readonly bundle: Bundle;
  readonly key: string;
  /** Narrow IPA of the segment (prosodic features are not written). */
  readonly text: string;
}

export interface Alphabet {
  /** Number of symbol ids, ε, '#', '.' and '+' included. */
  readonly size: number;
  /** Segment symbols; `segments[i].id === i + FIRST_SEGMENT`. */
  readonly segments: readonly AlphabetSymbol[];
  readonly byKey: ReadonlyMap<string, number>;
  /**
   * For each step of the grammar (desugared order), the symbol ids that can reach it (membership
   * by id): '#', '.', the inventory's segments and those produced by earlier steps. A step's
   * machine is exact on words over its domain.
   */
  readonly domains: readonly Uint8Array[];
}

export const MAX_ALPHABET = 4000;

/** Display text of a symbol id. */
export function symbolText(a: Alphabet, id: number): string {
  if (id === EPSILON) return "ε";
  if (id === WORD) return "#";
  if (id === SYLL) return ".";
  if (id === JOIN) return "+";
  return a.segments[id - FIRST_SEGMENT]?.text ?? `?${id}`;
}

/** Language of a pattern non-empty over the given bundles (plus '#', '.')? Used to prune impossible cases. */
export function patternPossible(low: Lowering, p: Pattern, asg: Assignment, bundles: readonly Bundle[]): boolean {
  switch (p.kind) {
    case "element": {
      const m = low.element(p.element, asg);
      return m.word || m.syll || m.join === true || bundles.some(m.seg);
    }
    case "sequence": return p.items.every((q) => patternPossible(low, q, asg, bundles));
    case "optional": return true;
    case "choice": return p.options.some((q) => patternPossible(low, q, asg, bundles));
    case "repeat": return p.min === 0 || patternPossible(low, p.body, asg, bundles);
    default: { const never: never = p; throw new Error(String(never)); }
  }
}

/** The assignments of a rule that can hold somewhere: target elements and some environment possible. */
export function liveAssignments(low: Lowering, rule: Rule, bundles: readonly Bundle[]): Assignment[] {
  return low.assignments(rule, bundles).filter((asg) => {
    for (const e of rule.target) {
      const m = low.element(e, asg);
      if (!m.word && !m.syll && !bundles.some(m.seg)) return false;
    }
    if (rule.environments.length === 0) return true;
    return rule.environments.some((env) => patternPossible(low, env.left, asg, bundles) && patternPossible(low, env.right, asg, bundles));
  });
}

/** Options of `computeAlphabet`. */
export interface AlphabetOptions {
  /**
   * Also close the alphabet under every step applied in any order, as often as it takes (the
   * analyses run a step on strings another order of the steps would give it). The symbols this
   * adds come after all the others, in bundle-key order, so the alphabet of the grammar as written
   * is a prefix of this one (same ids); they reach no step (`domains`), and one no symbol can write
   * is shown as '?' instead of failing the grammar.
   */
  readonly everyOrder?: boolean;
}

/**
 * Computes the alphabet. `steps` are the grammar's steps after desugaring, in order.
 * Closure: one pass in step order — a step's target can only meet symbols of the inventory or
 * produced by earlier steps (a rule reads its targets from its input), so applying each rule's
 * change, for every live assignment, to every bundle its target element matches, in order, reaches
 * every symbol any word can carry. Throws LowerError (with the rule's position) for an
 * unwritable produced bundle or when the alphabet exceeds MAX_ALPHABET.
 */
export function computeAlphabet(inv: Inventory, low: Lowering, steps: readonly Grammar["steps"][number][], extra: readonly Bundle[] = [], opts: AlphabetOptions = {}): Alphabet {
  const bundles: Bundle[] = [];
  const keys = new Set<string>();
  const add = (b: Bundle): boolean => {
    const k = bundleKey(b);
    if (keys.has(k)) return false;
    keys.add(k);
    bundles.push(b);
    return true;
  };
  const withProsody = (b: Bundle, s: FeatureValue, p: FeatureValue): Bundle => prosodyOf(low, b, s, p);
  const addSegment = (b: Bundle): void => {
    if (low.isNucleus(b)) for (const [s, p] of NUCLEUS_PROSODY) add(withProsody(b, s, p));
    else add(withProsody(b, "0", "0"));
  };
  for (const seg of inv.segments) addSegment(seg.bundle);
  // Segments input words carry that the inventory does not list (written with diacritics), in key
  // order; they and everything made from them alone are "input-made": when no symbol can write
  // one, it is shown as '?' (as the interpreter shows it) instead of failing the grammar.
  const inventoryCount = bundles.length;
  const extraSorted = [...extra].sort((a, b) => { const ka = bundleKey(a), kb = bundleKey(b); return ka < kb ? -1 : ka > kb ? 1 : 0; });
  for (const b of extraSorted) addSegment(b);
  const inputMade = new Set<string>(bundles.slice(inventoryCount).map(bundleKey));
  const base = bundles.length;
  /** Keeps `inputMade` exact: a bundle is input-made while every way found to make it starts from an input-made one. */
  const track = (from: Bundle | null, nb: Bundle, isNew = false): void => {
    const k = bundleKey(nb);
    if (from !== null && inputMade.has(bundleKey(from))) { if (isNew) inputMade.add(k); }
    else inputMade.delete(k);
  };
  const derived: Bundle[] = [];
  const origin = new Map<string, Rule | Grammar["steps"][number]>();
  const reachCounts: number[] = [];
  const tooLarge = (step: Grammar["steps"][number], how: string): void => {
    if (bundles.length <= MAX_ALPHABET) return;
    throw lowerError("compile/alphabet-too-large", `The rules produce more than ${MAX_ALPHABET} distinct segments${how} (rule '${step.name}' reached ${bundles.length}); check for a change that multiplies segments.`, step.span);
  };
  for (const step of steps) {
    reachCounts.push(bundles.length);
    stepProducts(low, step, bundles.slice(), (nb, from) => {
      const isNew = add(nb);
      if (isNew) { derived.push(nb); origin.set(bundleKey(nb), step); }
      track(from, nb, isNew);
    });
    if (step.kind === "rule") tooLarge(step, "");
  }
  // Closed under the steps in any order: passes over every step until nothing new comes.
  const anyOrder: Bundle[] = [];
  for (let grew = opts.everyOrder === true; grew;) {
    grew = false;
    for (const step of steps) {
      stepProducts(low, step, bundles.slice(), (nb) => { if (add(nb)) { anyOrder.push(nb); grew = true; } });
      tooLarge(step, " when the steps are applied in any order");
    }
  }
  const outOfOrder = new Set(anyOrder.map(bundleKey));
  // Deterministic order: the inventory's symbols as listed, then derived symbols by bundle key.
  const baseBundles = bundles.slice(0, base);
  const byBundleKey = (a: Bundle, b: Bundle): number => { const ka = bundleKey(a), kb = bundleKey(b); return ka < kb ? -1 : ka > kb ? 1 : 0; };
  const ordered = [...baseBundles, ...[...derived].sort(byBundleKey), ...anyOrder.sort(byBundleKey)];
  const byKey = new Map<string, number>();
  const segments: AlphabetSymbol[] = ordered.map((b, i) => {
    const key = bundleKey(b);
    const r = realise(inv, b);
    if (!r.ok && (inputMade.has(key) || outOfOrder.has(key))) {
      byKey.set(key, i + FIRST_SEGMENT);
      return { id: i + FIRST_SEGMENT, bundle: b, key, text: "?" };
    }
    if (!r.ok) {
      const o = origin.get(key);
      const span = o ? o.span : { file: inv.file, line: 1, column: 1, length: 1 };
      const name = o ? o.name : "inventory";
      throw lowerError("compile/unwritable-segment", `Step '${name}' can produce a segment no inventory symbol and declared diacritics can write: ${r.error}`, span);
    }
    byKey.set(key, i + FIRST_SEGMENT);
    return { id: i + FIRST_SEGMENT, bundle: b, key, text: r.text };
  });
  // domains[k]: the ids that can reach step k (existed before it), plus '#', '.' and '+'.
  const createdAt = new Map<string, number>();
  bundles.forEach((b, i) => createdAt.set(bundleKey(b), i));
  const domains = reachCounts.map((count) => {
    const d = new Uint8Array(segments.length + FIRST_SEGMENT);
    d[WORD] = 1;
    d[SYLL] = 1;
    d[JOIN] = 1;
    for (const s of segments) if (createdAt.get(s.key)! < count) d[s.id] = 1;
    return d;
  });
  return { size: segments.length + FIRST_SEGMENT, segments, byKey, domains };
}

function prosodyOf(low: Lowering, b: Bundle, s: FeatureValue, p: FeatureValue): Bundle {
  const out = [...b];
  if (low.stressIdx >= 0) out[low.stressIdx] = s;
  if (low.primaryIdx >= 0) out[low.primaryIdx] = p;
  return out;
}

/**
 * Every bundle one step can write when it reads words over `before`, passed to `produce` with the
 * bundle it was made from (null for an inserted segment): the stress step's prosodic variants of
 * each nucleus; a rule's change, for every live assignment, on every bundle its target element
 * matches, and its inserted segments.
 */
function stepProducts(low: Lowering, step: Grammar["steps"][number], before: readonly Bundle[], produce: (nb: Bundle, from: Bundle | null) => void): void {
  if (step.kind === "syllabify") return;
  if (step.kind === "stress") {
    for (const b of before) {
      if (!low.isNucleus(b)) continue;
      for (const [s, p] of NUCLEUS_PROSODY) produce(prosodyOf(low, b, s, p), b);
    }
    return;
  }
  const rule = step;
  for (const asg of liveAssignments(low, rule, before)) {
    if (rule.target.length === 0) {
      for (const c of rule.change) produce(low.inserted(c), null);
      continue;
    }
    if (rule.change.length === 0) continue;
    rule.target.forEach((e, j) => {
      const m = low.element(e, asg);
      const c = rule.change[j];
      if (!c) return;
      // A literal written over a boundary is an inserted segment (the interpreter's convention).
      if ((m.word || m.syll) && c.kind === "segment") produce(low.inserted(c), null);
      for (const b of before) if (m.seg(b)) produce(low.applyChange(c, asg, b), b);
    });
    // A literal change longer than its target writes the rest as inserted segments.
    for (const c of rule.change.slice(rule.target.length)) produce(low.inserted(c), null);
  }
}
