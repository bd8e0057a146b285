// A small backtracking matcher for rule patterns over symbol arrays, threading alpha-variable
// bindings through (every way a pattern can match is enumerated; nothing is compiled to automata).

import type { Bundle, FeatureValue, Inventory } from "../inventory/types.js";
import { sameSegment } from "./segments.js";
import type { Elem, Pat, Spec } from "./prepare.js";
import { assertNever } from "./prepare.js";
import type { Sym } from "./types.js";

/** What an alpha variable stands for: a value of one feature, or the values of a node's features. */
export type Binding =
  | { readonly kind: "feature"; readonly value: "+" | "-" }
  | { readonly kind: "node"; readonly values: readonly FeatureValue[] };

/** Variable → binding. Never mutated: extending makes a new map. */
export type Bindings = ReadonlyMap<string, Binding>;

export const EMPTY_BINDINGS: Bindings = new Map();

export const flip = (v: FeatureValue): FeatureValue => (v === "+" ? "-" : v === "-" ? "+" : "0");

/** A key equal exactly for equal binding environments. */
export function bindingsKey(b: Bindings): string {
  return [...b.entries()]
    .sort(([x], [y]) => (x < y ? -1 : x > y ? 1 : 0))
    .map(([k, v]) => `${k}=${v.kind === "feature" ? v.value : v.values.join("")}`)
    .join(",");
}

function extend(b: Bindings, name: string, v: Binding): Bindings {
  const m = new Map(b);
  m.set(name, v);
  return m;
}

/**
 * Match feature specs against a bundle. `[αf]` needs f to be + or − (never 0); a bound α must
 * agree (negated: the opposite value). A node variable binds the tuple of the node's values;
 * `[-α node]` stands for that tuple with every + and − swapped. Returns the extended bindings or null.
 */
export function matchSpecs(specs: readonly Spec[], bundle: Bundle, b: Bindings): Bindings | null {
  let env = b;
  for (const s of specs) {
    switch (s.kind) {
      case "value":
        for (const i of s.indices) if (bundle[i] !== s.value) return null;
        break;
      case "fvar": {
        const v = bundle[s.index];
        if (v !== "+" && v !== "-") return null;
        const wanted = s.negated ? flip(v) : v;
        const bound = env.get(s.variable);
        if (bound === undefined) env = extend(env, s.variable, { kind: "feature", value: wanted as "+" | "-" });
        else if (bound.kind !== "feature" || bound.value !== wanted) return null;
        break;
      }
      case "nvar": {
        const vals = s.indices.map((i) => bundle[i] as FeatureValue);
        const wanted = s.negated ? vals.map(flip) : vals;
        const bound = env.get(s.variable);
        if (bound === undefined) env = extend(env, s.variable, { kind: "node", values: wanted });
        else if (bound.kind !== "node" || bound.values.join("") !== wanted.join("")) return null;
        break;
      }
      default:
        return assertNever(s);
    }
  }
  return env;
}

/** Every binding environment under which `e` matches the symbol `s`. */
export function matchElem(inv: Inventory, e: Elem, s: Sym, b: Bindings): Bindings[] {
  switch (e.kind) {
    case "boundary":
      if (s.kind !== "boundary") return [];
      // `$` matches `.` and `#`; `#` matches only `#`; `+` matches only `+`.
      if (e.which === "join" || s.which === "join") return e.which === s.which ? [b] : [];
      return e.which === "syllable" || s.which === "word" ? [b] : [];
    case "specs": {
      if (s.kind !== "segment") return [];
      const r = matchSpecs(e.specs, s.bundle, b);
      return r === null ? [] : [r];
    }
    case "literal":
      return s.kind === "segment" && sameSegment(inv, e.bundle, s.bundle) ? [b] : [];
    case "any":
      return e.options.flatMap((o) => matchElem(inv, o, s, b));
    default:
      return assertNever(e);
  }
}

/**
 * Every (end, bindings) such that `p` matches `arr[pos .. end)`. Repetitions stop when an
 * iteration past the minimum consumes nothing, so unbounded subscripts always terminate.
 */
export function* matchAt(inv: Inventory, p: Pat, arr: readonly Sym[], pos: number, b: Bindings): Generator<[number, Bindings]> {
  switch (p.kind) {
    case "elem": {
      if (pos >= arr.length) return;
      for (const r of matchElem(inv, p.elem, arr[pos] as Sym, b)) yield [pos + 1, r];
      return;
    }
    case "seq":
      yield* matchSeq(inv, p.items, 0, arr, pos, b);
      return;
    case "opt":
      yield [pos, b];
      yield* matchAt(inv, p.body, arr, pos, b);
      return;
    case "alt":
      for (const o of p.options) yield* matchAt(inv, o, arr, pos, b);
      return;
    case "rep":
      yield* matchRep(inv, p.body, p.min, p.max, 0, arr, pos, b);
      return;
    default:
      assertNever(p);
  }
}

function* matchSeq(inv: Inventory, items: readonly Pat[], i: number, arr: readonly Sym[], pos: number, b: Bindings): Generator<[number, Bindings]> {
  if (i === items.length) {
    yield [pos, b];
    return;
  }
  for (const [mid, b2] of matchAt(inv, items[i] as Pat, arr, pos, b)) yield* matchSeq(inv, items, i + 1, arr, mid, b2);
}

function* matchRep(
  inv: Inventory, body: Pat, min: number, max: number | null, count: number, arr: readonly Sym[], pos: number, b: Bindings,
): Generator<[number, Bindings]> {
  if (count >= min) yield [pos, b];
  if (max !== null && count >= max) return;
  for (const [next, b2] of matchAt(inv, body, arr, pos, b)) {
    if (next === pos && count >= min) continue;
    yield* matchRep(inv, body, min, max, count + 1, arr, next, b2);
  }
}

function distinct(list: Iterable<Bindings>): Bindings[] {
  const m = new Map<string, Bindings>();
  for (const b of list) {
    const k = bindingsKey(b);
    if (!m.has(k)) m.set(k, b);
  }
  return [...m.values()];
}

/** Bindings under which `p` matches some suffix of `arr[0 .. end)` (an unanchored left context). */
export function matchSuffix(inv: Inventory, p: Pat, arr: readonly Sym[], end: number, b: Bindings): Bindings[] {
  const out: Bindings[] = [];
  const side = arr.length === end ? arr : arr.slice(0, end);
  for (let start = end; start >= 0; start--) {
    for (const [e, r] of matchAt(inv, p, side, start, b)) if (e === end) out.push(r);
  }
  return distinct(out);
}

/** Bindings under which `p` matches some prefix of `arr[start ..)` (an unanchored right context). */
export function matchPrefix(inv: Inventory, p: Pat, arr: readonly Sym[], start: number, b: Bindings): Bindings[] {
  const out: Bindings[] = [];
  for (const [, r] of matchAt(inv, p, arr, start, b)) out.push(r);
  return distinct(out);
}

/** Bindings under which the elements match `arr[pos .. pos + elems.length)` one to one. */
export function matchElems(inv: Inventory, elems: readonly Elem[], arr: readonly Sym[], pos: number, b: Bindings): Bindings[] {
  if (pos + elems.length > arr.length) return [];
  let envs: Bindings[] = [b];
  elems.forEach((e, j) => {
    envs = distinct(envs.flatMap((env) => matchElem(inv, e, arr[pos + j] as Sym, env)));
  });
  return envs;
}
