// Checker pass: what the rules can do with the inventory, rule by rule in order — bundles that
// match nothing available, rules that can never apply, and changes the inventory cannot write.

import { bundleKey, describeBundle, realise, type Bundle, type FeatureValue } from "../inventory/index.js";
import type { ChangeElement, Element, FeatureSpec, Pattern, Rule } from "./ast.js";
import { flip, type CheckContext } from "./check-context.js";
import { elementText } from "./parse-patterns.js";

/** Most bundles the reachability estimate keeps (it over-approximates; the cap keeps it cheap). */
const MAX_REACHABLE = 20_000;
/** Most "cannot write" errors reported per rule (the first ones show the problem). */
const MAX_UNWRITABLE_PER_RULE = 5;
/** Most variable assignments tried per change when checking what it can write. */
const MAX_ASSIGNMENTS = 256;

type Assignment = ReadonlyMap<string, readonly FeatureValue[]>;

export function checkReachability(c: CheckContext): void {
  new Reachability(c).run();
}

class Reachability {
  constructor(readonly c: CheckContext) {}

  /**
   * Reachable bundles: start from the inventory (nuclei in every stress state) and, rule by rule,
   * add what each change makes of the bundles its target matches. Environments are ignored, so
   * this over-approximates what can occur. Along the way: bundles that match nothing, rules that
   * can never apply, and changes that yield something the inventory cannot write.
   */
  run(): void {
    const reach = new Map<string, Bundle>();
    const add = (b: Bundle): void => {
      if (reach.size < MAX_REACHABLE) reach.set(bundleKey(b), b);
    };
    const base = this.c.baseBundles();
    base.forEach(add);
    const baseKeys = new Set(base.map(bundleKey));
    const unwritable = new Set<string>();
    const reported = new Map<string, number>();
    for (const step of this.c.grammar.steps) {
      if (step.kind !== "rule" || this.c.broken.has(step)) continue;
      const r = step;
      const now = [...reach.values()];
      // Environment bundles that match nothing available at this point.
      for (const env of r.environments) for (const side of [env.left, env.right]) this.matchNothing(side, now);
      if (r.target.length === 0) {
        for (const c of r.change) if (c.kind === "segment") {
          const l = this.c.literal(c.symbol);
          if (l !== null) add(this.inserted(l));
        }
        continue;
      }
      const matched = r.target.map((t) => now.filter((b) => this.c.matches(t, b)));
      const dead = r.target.findIndex((_, k) => matched[k]!.length === 0);
      if (dead >= 0) {
        const t = r.target[dead]!;
        if (t.kind === "bundle") this.matchNothing({ kind: "element", element: t }, now, true);
        else this.c.warn("grammar/never-applies", `rule '${r.name}' can never apply: no segment available at this point matches ${elementText(t)}`, t.span);
        continue;
      }
      if (r.change.length === 0) continue;
      if (r.change.length !== r.target.length) {
        for (const c of r.change) if (c.kind === "segment") {
          const l = this.c.literal(c.symbol);
          if (l !== null) add(l);
        }
        continue;
      }
      r.change.forEach((c, k) => {
        for (const b of matched[k]!) {
          for (const a of this.assignments(r, k, b, now)) {
            const result = this.apply(c, b, a);
            if (result === null) continue;
            const key = bundleKey(result);
            if (!reach.has(key)) {
              const w = realise(this.c.inv, result);
              const from = w.ok ? null : realise(this.c.inv, b);
              const fromText = from === null ? "" : from.ok ? from.text : describeBundle(this.c.inv, b);
              // One report per rule, source segment and change (its stress variants say nothing new).
              const id = `${r.name}\u0000${fromText}\u0000${this.difference(b, result)}`;
              const perRule = reported.get(r.name) ?? 0;
              if (!w.ok && !unwritable.has(id) && perRule < MAX_UNWRITABLE_PER_RULE) {
                unwritable.add(id);
                reported.set(r.name, perRule + 1);
                const message = `rule '${r.name}' turns ${fromText} into ${fromText} with ${this.difference(b, result)}, which the inventory and its diacritics cannot write`;
                if (baseKeys.has(bundleKey(b))) this.c.error("grammar/unwritable", message, c.span);
                else this.c.warn("grammar/unwritable", `${message} (${fromText} comes from an earlier rule)`, c.span);
              }
            }
            add(result);
          }
        }
      });
    }
    const all = [...reach.values()];
    for (const c of this.c.grammar.classes) for (const m of c.members) this.matchNothing({ kind: "element", element: m }, all);
  }

  /** Warns for each bundle in the pattern that matches none of `available`. */
  matchNothing(p: Pattern, available: readonly Bundle[], isTarget = false): void {
    switch (p.kind) {
      case "element": {
        const e = p.element;
        if (e.kind !== "bundle" || e.specs.length === 0) return;
        if (available.some((b) => this.c.matches(e, b))) return;
        const shown = `[${e.specs.map((s) => (s.kind === "value" ? `${s.value === "-" ? "−" : s.value}${s.feature}` : `${s.negated ? "−" : ""}${s.variable}${s.feature}`)).join(" ")}]`;
        if (isTarget) this.c.warn("grammar/never-applies", `the rule can never apply: its target ${shown} matches no segment available at this point`, e.span);
        else this.c.warn("grammar/matches-nothing", `the bundle ${shown} matches no segment`, e.span);
        return;
      }
      case "sequence":
        p.items.forEach((i) => this.matchNothing(i, available));
        return;
      case "optional":
      case "repeat":
        this.matchNothing(p.body, available);
        return;
      case "choice":
        p.options.forEach((o) => this.matchNothing(o, available));
        return;
    }
  }

  /** Inserted segments: consonants [0stress 0primary], nuclei [-stress -primary] (DEVELOPERS.md). */
  inserted(l: Bundle): Bundle {
    const b = [...l];
    if (this.c.stress >= 0 && this.c.primary >= 0 && this.c.syllabic >= 0) {
      const v: FeatureValue = b[this.c.syllabic] === "+" ? "-" : "0";
      b[this.c.stress] = v;
      b[this.c.primary] = v;
    }
    return b;
  }

  /**
   * Variable assignments for applying the change at target position k to bundle b: variables
   * written in target element k take b's values; the others range over every value (feature: + −;
   * node: every combination found in the inventory). Capped at MAX_ASSIGNMENTS.
   */
  assignments(r: Rule, k: number, b: Bundle, available: readonly Bundle[]): Assignment[] {
    const vars = new Map<string, { node: string | null }>();
    for (const c of r.change)
      if (c.kind === "bundle")
        for (const s of c.specs) if (s.kind === "variable") vars.set(s.variable, { node: this.c.nodes.has(s.feature) ? s.feature : null });
    if (vars.size === 0) return [new Map()];
    const fixed = new Map<string, FeatureValue[]>();
    const t = r.target[k]!;
    if (t.kind === "bundle")
      for (const s of t.specs) {
        if (s.kind !== "variable") continue;
        const idxs = this.c.nodeIndices(s.feature) ?? [this.c.inv.featureIndex.get(s.feature) ?? -1];
        if (idxs.some((i) => i < 0)) continue;
        fixed.set(s.variable, idxs.map((i) => flip(b[i]!, s.negated)));
      }
    let out: Map<string, readonly FeatureValue[]>[] = [new Map(fixed)];
    for (const [v, { node }] of vars) {
      if (fixed.has(v)) continue;
      // Values the variable can take: those of the available bundles matching the element that binds it.
      const binder = this.binder(r, v, k);
      const idxs = node !== null ? (this.c.nodeIndices(node) ?? []) : [];
      const options: FeatureValue[][] = [];
      const seen = new Set<string>();
      for (const s of available) {
        if (binder !== null && !this.c.matches(binder.element, s)) continue;
        const feature = binder?.spec.feature;
        const is = node !== null ? idxs : [feature !== undefined ? (this.c.inv.featureIndex.get(feature) ?? -1) : -1];
        if (is.some((i) => i < 0)) continue;
        const vals = is.map((i) => flip(s[i]!, binder?.spec.negated ?? false));
        if (node === null && vals[0] === "0") continue;
        const key = vals.join("");
        if (!seen.has(key)) {
          seen.add(key);
          options.push(vals);
        }
      }
      if (options.length === 0 && node === null) options.push(["+"], ["-"]);
      const next: Map<string, readonly FeatureValue[]>[] = [];
      for (const a of out) for (const o of options) if (next.length < MAX_ASSIGNMENTS) next.push(new Map(a).set(v, o));
      out = next;
    }
    return out;
  }

  /** The first bundle element (other than target element k) that writes variable v, and its spec. */
  binder(r: Rule, v: string, k: number): { element: Element; spec: FeatureSpec & { kind: "variable" } } | null {
    const inElement = (e: Element): { element: Element; spec: FeatureSpec & { kind: "variable" } } | null => {
      if (e.kind !== "bundle") return null;
      for (const s of e.specs) if (s.kind === "variable" && s.variable === v) return { element: e, spec: s };
      return null;
    };
    const inPattern = (p: Pattern): { element: Element; spec: FeatureSpec & { kind: "variable" } } | null => {
      switch (p.kind) {
        case "element":
          return inElement(p.element);
        case "sequence":
          for (const i of p.items) {
            const f = inPattern(i);
            if (f !== null) return f;
          }
          return null;
        case "optional":
        case "repeat":
          return inPattern(p.body);
        case "choice":
          for (const o of p.options) {
            const f = inPattern(o);
            if (f !== null) return f;
          }
          return null;
      }
    };
    for (let j = 0; j < r.target.length; j++) {
      if (j === k) continue;
      const f = inElement(r.target[j]!);
      if (f !== null) return f;
    }
    for (const env of r.environments) {
      const f = inPattern(env.left) ?? inPattern(env.right);
      if (f !== null) return f;
    }
    return null;
  }

  /** The values that differ between two bundles, as "[+labial −coronal]". */
  difference(from: Bundle, to: Bundle): string {
    const parts: string[] = [];
    to.forEach((v, i) => {
      if (from[i] !== v) parts.push(`${v === "-" ? "−" : v}${this.c.inv.features[i]}`);
    });
    return `[${parts.join(" ")}]`;
  }

  /** The change applied to one bundle: a bundle sets what it names; a literal keeps prosodic values. */
  apply(c: ChangeElement, b: Bundle, a: Assignment): Bundle | null {
    const out = [...b];
    if (c.kind === "segment") {
      const l = this.c.literal(c.symbol);
      if (l === null) return null;
      const n = l.length - this.c.nProsodic;
      for (let i = 0; i < n; i++) out[i] = l[i]!;
      return out;
    }
    for (const s of c.specs) {
      const node = this.c.nodeIndices(s.feature);
      const idxs = node ?? [this.c.inv.featureIndex.get(s.feature) ?? -1];
      if (idxs.some((i) => i < 0)) return null;
      if (s.kind === "value") for (const i of idxs) out[i] = s.value;
      else {
        const v = a.get(s.variable);
        if (v === undefined) return null;
        if (node !== null) {
          if (v.length !== idxs.length) return null;
          idxs.forEach((i, j) => (out[i] = flip(v[j]!, s.negated)));
        } else out[idxs[0]!] = flip(v[0]!, s.negated);
      }
    }
    return out;
  }
}
