// A desugared rule lowered onto the alphabet: one case per (alpha assignment × environment), each
// with its target symbol sets, its change as a symbol map, and its context recognisers (context.ts).

import type { Element, Environment, Pattern, Rule } from "../grammar/ast.js";
import { bundleKey, type Bundle } from "../inventory/types.js";
import { type Alphabet, EPSILON, FIRST_SEGMENT, JOIN, SYLL, WORD } from "./alphabet.js";
import { liveAssignments } from "./alphabet.js";
import { CompileLimitError, unbounded, type Budget } from "./budget.js";
import { anySet, ContextTooLargeError, dfaFromRx, dfaProduct, EPS_RX, type Dfa, type Rx, rxIsEmpty, symbolSet } from "./context.js";
import { lowerError, type Assignment, type Lowering } from "./lower.js";
import type { LoweredRule, RuleCase } from "./rule.js";

/** A canonical text for a regular expression (to share identical context recognisers). */
export function rxKey(rx: Rx): string {
  switch (rx.k) {
    case "set": {
      const ids: number[] = [];
      rx.set.forEach((v, i) => { if (v) ids.push(i); });
      return `[${ids.join(",")}]`;
    }
    case "seq": return `(${rx.items.map(rxKey).join(" ")})`;
    case "alt": return `{${rx.options.map(rxKey).join("|")}}`;
    case "star": return `${rxKey(rx.body)}*`;
    case "rep": return `${rxKey(rx.body)}^${rx.min},${rx.max ?? ""}`;
    default: { const never: never = rx; throw new Error(String(never)); }
  }
}

/** Lowers elements and patterns to symbol sets and regular expressions over one alphabet. */
export class SymbolLowering {
  constructor(readonly low: Lowering, readonly alphabet: Alphabet) {}

  elementSet(e: Element, asg: Assignment): Uint8Array {
    const m = this.low.element(e, asg);
    const set = new Uint8Array(this.alphabet.size);
    if (m.word) set[WORD] = 1;
    if (m.syll) set[SYLL] = 1;
    if (m.join === true) set[JOIN] = 1;
    for (const s of this.alphabet.segments) if (m.seg(s.bundle)) set[s.id] = 1;
    return set;
  }

  pattern(p: Pattern, asg: Assignment): Rx {
    switch (p.kind) {
      case "element": return { k: "set", set: this.elementSet(p.element, asg) };
      case "sequence": return { k: "seq", items: p.items.map((q) => this.pattern(q, asg)) };
      case "optional": return { k: "alt", options: [this.pattern(p.body, asg), EPS_RX] };
      case "choice": return { k: "alt", options: p.options.map((q) => this.pattern(q, asg)) };
      case "repeat": return { k: "rep", body: this.pattern(p.body, asg), min: p.min, max: p.max };
      default: { const never: never = p; throw new Error(String(never)); }
    }
  }

  /**
   * The paths of `p` that pass through elements binding every variable of `need` (null: none).
   * A variable the match leaves unbound takes only the inventory's combinations (the interpreter
   * completes it so); a case giving it another value must therefore bind it on the match path.
   */
  patternBinding(p: Pattern, asg: Assignment, need: readonly string[]): Rx | null {
    if (need.length === 0) return this.pattern(p, asg);
    const alt = (xs: (Rx | null)[]): Rx | null => {
      const ok = xs.filter((x): x is Rx => x !== null);
      return ok.length === 0 ? null : ok.length === 1 ? ok[0]! : { k: "alt", options: ok };
    };
    const subsets = (xs: readonly string[]): string[][] => xs.reduce<string[][]>((acc, x) => acc.flatMap((a) => [a, [...a, x]]), [[]]);
    const minus = (a: readonly string[], b: readonly string[]): string[] => a.filter((x) => !b.includes(x));
    /** Items in order binding `need` between them (each needed variable by some item). */
    const items = (list: readonly Pattern[], want: readonly string[]): Rx | null => {
      if (list.length === 0) return want.length === 0 ? EPS_RX : null;
      const [first, ...rest] = list;
      return alt(subsets(want).map((here) => {
        const a = this.patternBinding(first!, asg, here);
        const b = items(rest, minus(want, here));
        return a === null || b === null ? null : { k: "seq", items: [a, b] };
      }));
    };
    switch (p.kind) {
      case "element": {
        const e = p.element;
        if (e.kind === "class") {
          const def = this.low.classes.get(e.name);
          if (!def) return null;
          return alt(def.members.map((m) => this.patternBinding({ kind: "element", element: m }, asg, need)));
        }
        const binds = e.kind === "bundle" ? e.specs.flatMap((sp) => (sp.kind === "variable" ? [sp.variable] : [])) : [];
        return need.every((v) => binds.includes(v)) ? this.pattern(p, asg) : null;
      }
      case "sequence": return items(p.items, need);
      case "optional": return this.patternBinding(p.body, asg, need);
      case "choice": return alt(p.options.map((o) => this.patternBinding(o, asg, need)));
      case "repeat": {
        // Unrolled: min copies, then (bounded) optional copies or a starred tail; some copy binds.
        const any = this.pattern(p.body, asg);
        const copies: Pattern[] = Array.from({ length: p.min }, () => p.body);
        if (p.max !== null) {
          const opt: Pattern = { kind: "optional", body: p.body, span: p.span };
          for (let i = p.min; i < p.max; i++) copies.push(opt);
          return items(copies, need);
        }
        // body{min,} = body^min · body*; a binding copy in the star part: body* · b · body*.
        const star: Rx = { k: "star", body: any };
        const inFixed = items(copies, need);
        const inStar = alt(subsets(need).filter((h) => h.length > 0).map((here) => {
          const fixed = items(copies, minus(need, here));
          const b = this.patternBinding(p.body, asg, here);
          return fixed === null || b === null ? null : { k: "seq", items: [fixed, star, b, star] };
        }));
        return alt([inFixed === null ? null : { k: "seq", items: [inFixed, star] }, inStar]);
      }
      default: { const never: never = p; throw new Error(String(never)); }
    }
  }

  /** The id of a bundle, or -1 when the alphabet lacks it. */
  idOf(b: Bundle): number {
    return this.alphabet.byKey.get(bundleKey(b)) ?? -1;
  }
}

/** Caches context DFAs by their expression, across the cases of one rule. */
class DfaPool {
  readonly dfas: Dfa[] = [];
  private readonly index = new Map<string, number>();
  constructor(private readonly size: number) {}
  add(key: string, make: () => Dfa): number {
    let i = this.index.get(key);
    if (i === undefined) {
      i = this.dfas.length;
      this.dfas.push(make());
      this.index.set(key, i);
    }
    return i;
  }
  get count(): number { return this.size; }
}

export interface LowerRuleOptions {
  /** Build the obligatory version of an optional rule (its preferred variant, prefer applied). */
  readonly asObligatory?: boolean;
  /** Boundary-blind (from the rule as written). */
  readonly blind: boolean;
  /** The rule never names '+': joins are invisible to it (absent: false). */
  readonly joinBlind?: boolean;
  /** Input symbols that can reach this step. */
  readonly domain: Uint8Array;
  /** Build the preferred variant: obligatory application, and the first change by key where alpha cases disagree. */
  readonly preferred?: boolean;
  /** Limits on contexts and cases, the clock and the heap (default: the default limits, no clock). */
  readonly budget?: Budget;
}

/** Sort keys of symbol ids, as the interpreter orders changes ('#', '.', 'j+' for '+', or the bundle's key). */
export function symbolKeys(a: Alphabet): string[] {
  return ["", "#", ".", "j+", ...a.segments.map((s) => s.key)];
}

/**
 * Lowers one desugared rule. Contexts per case (DEVELOPERS.md, "Application"):
 * simultaneous / left-to-right: left Σ*·λ, right τ·ρ·Σ*; right-to-left: left Σ*·λ·τ, right ρ·Σ*.
 * Insertion sites also need a segment next or the final '#': right ∩ (S·Σ* ∪ {#}).
 */
export function lowerRule(sl: SymbolLowering, rule: Rule, opts: LowerRuleOptions): LoweredRule {
  const { low, alphabet } = sl;
  const size = alphabet.size;
  const budget = opts.budget ?? unbounded();
  /** A context recogniser, its size and time counted against the budget as `part`. */
  const contextDfa = (part: string, rx: Rx): Dfa =>
    budget.within(part, () => {
      try {
        return dfaFromRx(rx, size, budget.limits.contextStates, budget.tick);
      } catch (e) {
        if (e instanceof ContextTooLargeError) throw new CompileLimitError("states", part, budget.limits.contextStates);
        throw e;
      }
    });
  const any: Rx = { k: "star", body: { k: "set", set: anySet(size) } };
  const domainBundles: Bundle[] = alphabet.segments.filter((s) => opts.domain[s.id]).map((s) => s.bundle);
  const n = rule.target.length;
  const m = rule.change.length;
  if (n === 0 && m === 0) throw lowerError("compile/empty-rule", `Rule '${rule.name}' has ∅ as both target and change.`, rule.span);
  if (n > 0 && m > 0 && m !== n && rule.change.some((c) => c.kind === "bundle")) {
    throw lowerError("compile/change-length", `Rule '${rule.name}': a feature change needs one element per target element (target ${n}, change ${m}).`, rule.span);
  }
  const rtl = rule.mode === "right-to-left";
  const lefts = new DfaPool(size);
  const rights = new DfaPool(size);
  const segSet = new Uint8Array(size);
  for (let i = FIRST_SEGMENT; i < size; i++) segSet[i] = 1;
  // Before a segment, before a '.' (rules that see boundaries: a syllable's end), or the final '#'.
  if (!opts.blind) segSet[SYLL] = 1;
  // Before a '+', in a rule that names joins.
  if (opts.joinBlind !== true) segSet[JOIN] = 1;
  const siteRx: Rx = { k: "alt", options: [{ k: "seq", items: [{ k: "set", set: segSet }, any] }, { k: "set", set: symbolSet(size, [WORD]) }] };
  const siteDfa = n === 0 ? contextDfa("the insertion sites", siteRx) : null;

  const cases: RuleCase[] = [];
  const envs = rule.environments.length > 0 ? rule.environments : [null];
  // Node variables the change uses and the target does not bind: values outside the inventory's
  // combinations need a binding element on the match path (see patternBinding).
  const vars = low.variables(rule);
  const targetVars = new Set<string>();
  const visit = (e: Element): void => {
    if (e.kind === "bundle") for (const sp of e.specs) { if (sp.kind === "variable") targetVars.add(sp.variable); }
    else if (e.kind === "class") low.classes.get(e.name)?.members.forEach(visit);
  };
  rule.target.forEach(visit);
  const changeVars = new Set<string>();
  for (const c of rule.change) if (c.kind === "bundle") for (const sp of c.specs) if (sp.kind === "variable") changeVars.add(sp.variable);
  const invTuples = new Map<string, Set<string>>();
  for (const [name, v] of vars) {
    if (!v.node || targetVars.has(name) || !changeVars.has(name)) continue;
    invTuples.set(name, new Set(low.inventory.segments.map((sg) => v.idx.map((i) => sg.bundle[i]).join(""))));
  }
  /**
   * An environment's exceptions for one case, over the alphabet. They share the case's values of
   * the target's variables; each other variable they use takes every value (one exception per
   * assignment: "for some value").
   */
  const exceptsOf = (env: Environment | null, asg: Assignment, targetRx: Rx[]): { left: number; right: number; rightAfter?: number }[] => {
    if (env === null || env.except === undefined || env.except.length === 0) return [];
    const out: { left: number; right: number; rightAfter?: number }[] = [];
    const seen = new Set<string>();
    for (const x of env.except) {
      const plain: Environment = { left: x.left, right: x.right, conditions: [], span: x.span };
      const assignments = low.assignments({ ...rule, change: [], environments: [plain] }, domainBundles)
        .filter((a) => [...targetVars].every((t) => a.get(t)?.join("") === asg.get(t)?.join("")));
      for (const a of assignments) {
        const L = sl.pattern(x.left, a);
        const R = sl.pattern(x.right, a);
        if (rxIsEmpty(L) || rxIsEmpty(R)) continue;
        const leftRx: Rx = rtl ? { k: "seq", items: [any, L, ...targetRx] } : { k: "seq", items: [any, L] };
        const rightRx: Rx = rtl ? { k: "seq", items: [R, any] } : { k: "seq", items: [...targetRx, R, any] };
        const afterRx: Rx = { k: "seq", items: [R, any] };
        const left = lefts.add(rxKey(leftRx), () => contextDfa("the left side of an exception", leftRx));
        const right = rights.add(rxKey(rightRx), () => contextDfa("the right side of an exception", rightRx));
        const rightAfter = opts.preferred === true && n > 1 && !rtl ? rights.add(rxKey(afterRx), () => contextDfa("the right side of an exception", afterRx)) : undefined;
        const key = `${left}|${right}|${rightAfter ?? ""}`;
        if (seen.has(key)) continue;
        seen.add(key);
        out.push({ left, right, ...(rightAfter !== undefined ? { rightAfter } : {}) });
      }
    }
    return out;
  };
  for (const asg of liveAssignments(low, rule, domainBundles)) {
    const need = [...invTuples.entries()].filter(([name, tuples]) => !tuples.has(asg.get(name)!.join(""))).map(([name]) => name);
    const target = rule.target.map((e) => sl.elementSet(e, asg));
    if (target.some((t) => !t.some((v, i) => v === 1 && opts.domain[i] === 1))) continue;
    const out: Int32Array[] = rule.target.map((e, j) => {
      const o = new Int32Array(size).fill(-1);
      const t = target[j]!;
      for (let x = 1; x < size; x++) {
        if (!t[x]) continue;
        // Deletion, or a literal change shorter than the target: the rest of the target goes.
        if (j >= m) { o[x] = EPSILON; continue; }
        const c = rule.change[j]!;
        if (x === WORD || x === SYLL) {
          // A boundary target: a feature change leaves it as it is; a literal writes an inserted segment.
          o[x] = c.kind === "bundle" ? x : sl.idOf(low.inserted(c));
          continue;
        }
        o[x] = sl.idOf(low.applyChange(c, asg, alphabet.segments[x - FIRST_SEGMENT]!.bundle));
        // The alphabet holds every bundle a step can write from the segments that reach it
        // (alphabet.ts), so a changed segment of the step's domain is always there; outside the
        // domain (segments no word brings to this step) a change may have no segment and is unused.
        if (o[x]! < 0 && opts.domain[x] === 1) throw lowerError("compile/internal", `Rule '${rule.name}': a changed segment is missing from the alphabet.`, rule.span);
      }
      return o;
    });
    const insert = n === 0 ? rule.change.map((c) => {
      const id = sl.idOf(low.inserted(c));
      if (id < 0) throw lowerError("compile/internal", `Rule '${rule.name}': an inserted segment is missing from the alphabet.`, c.span);
      return id;
    }) : [];
    // A literal change longer than the target writes its extra segments after the last one.
    const tail = n > 0 && m > n ? rule.change.slice(n).map((c) => sl.idOf(low.inserted(c))) : [];
    if (tail.some((t) => t < 0)) throw lowerError("compile/internal", `Rule '${rule.name}': a written segment is missing from the alphabet.`, rule.span);
    const targetRx: Rx[] = target.map((set) => ({ k: "set", set }));
    const sides: { L: Rx; R: Rx; env: Environment | null; e: number }[] = [];
    for (const [e, env] of envs.entries()) {
      if (need.length === 0) {
        sides.push({ L: env ? sl.pattern(env.left, asg) : EPS_RX, R: env ? sl.pattern(env.right, asg) : EPS_RX, env, e });
        continue;
      }
      if (env === null) continue;
      // Each needed variable is bound on the left or on the right.
      for (let mask = 0; mask < 1 << need.length; mask++) {
        const onLeft = need.filter((_, i) => (mask >> i) & 1);
        const onRight = need.filter((_, i) => !((mask >> i) & 1));
        const L = sl.patternBinding(env.left, asg, onLeft);
        const R = sl.patternBinding(env.right, asg, onRight);
        if (L !== null && R !== null) sides.push({ L, R, env, e });
      }
    }
    for (const { L, R, env, e } of sides) {
      if (rxIsEmpty(L) || rxIsEmpty(R)) continue;
      if (cases.length >= budget.limits.ruleCases) throw new CompileLimitError("cases", `the alpha cases of rule '${rule.name}'`, budget.limits.ruleCases);
      const where = envs.length > 1 ? ` of environment ${e + 1}` : "";
      const leftRx: Rx = rtl ? { k: "seq", items: [any, L, ...targetRx] } : { k: "seq", items: [any, L] };
      const rightRx: Rx = rtl ? { k: "seq", items: [R, any] } : { k: "seq", items: [...targetRx, R, any] };
      const left = lefts.add(rxKey(leftRx), () => contextDfa(`the left context${where}`, leftRx));
      // Keyed apart from the same pattern without the site check: an exception's right side (a
      // longer `longest-first` expansion, an `unless`) may be the same pattern, and the case must
      // not take the exception's unrestricted recogniser (a site before the first '#').
      const right = rights.add(siteDfa ? `site|${rxKey(rightRx)}` : rxKey(rightRx), () => {
        const d = contextDfa(`the right context${where}`, rightRx);
        return siteDfa ? dfaProduct(d, siteDfa, "and") : d;
      });
      const afterRx: Rx = { k: "seq", items: [R, any] };
      const rightAfter = opts.preferred === true && n > 1 && !rtl ? rights.add(rxKey(afterRx), () => contextDfa(`the right context${where}`, afterRx)) : undefined;
      const excepts = exceptsOf(env, asg, targetRx);
      cases.push({
        target, out, insert, left, right,
        ...(excepts.length > 0 ? { excepts } : {}),
        ...(rightAfter !== undefined ? { rightAfter } : {}),
        ...(tail.length > 0 ? { tail } : {}),
        ...(n > 0 && m > 0 && m !== n && (opts.blind || opts.joinBlind === true) ? { dotsAfter: true } : {}),
      });
    }
  }
  return {
    name: rule.name,
    mode: rule.mode,
    optional: rule.optional && !opts.asObligatory && !opts.preferred,
    preferSmallest: opts.preferred === true,
    keys: opts.preferred === true ? symbolKeys(alphabet) : [],
    blind: opts.blind,
    joinBlind: opts.joinBlind === true,
    n,
    cases,
    lefts: lefts.dfas,
    rights: rights.dfas,
    size,
    domain: opts.domain,
  };
}
