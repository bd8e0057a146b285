// What every pass of the grammar checker shares: the grammar and inventory, the names declared,
// the diagnostics collected so far, and the small helpers on bundles (literal lookup, matching).
// Each pass lives in its own file beside this one (check-*.ts); check.ts runs them in order.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { bundleOf, describeBundle, PROSODIC_FEATURES, realise, type Bundle, type FeatureValue, type Inventory } from "../inventory/index.js";
import type { ClassDef, Element, Grammar, NodeDef, Rule, Span } from "./ast.js";
import { distance } from "fastest-levenshtein";

/** Variables seen in a rule: each stands for a feature value ("feature") or for a node (its name). */
export type VariableUses = Map<string, { kind: "feature" | string; span: Span }>;

export class CheckContext {
  readonly out: Diagnostic[] = [];
  readonly nodes = new Map<string, NodeDef>();
  readonly classes = new Map<string, ClassDef>();
  /** Rules with errors in their names or shape: later passes (reachability) leave them out. */
  readonly broken = new Set<Rule>();
  readonly nProsodic = PROSODIC_FEATURES.length;
  readonly syllabic: number;
  readonly stress: number;
  readonly primary: number;
  private readonly literals = new Map<string, Bundle | null>();
  private base: Bundle[] | null = null;

  constructor(
    readonly grammar: Grammar,
    readonly inv: Inventory,
  ) {
    this.syllabic = inv.featureIndex.get("syllabic") ?? -1;
    this.stress = inv.featureIndex.get("stress") ?? -1;
    this.primary = inv.featureIndex.get("primary") ?? -1;
    for (const n of grammar.nodes) this.nodes.set(n.name, n);
    for (const c of grammar.classes) this.classes.set(c.name, c);
  }

  private errors = 0;

  error(code: string, message: string, span: Span): void {
    this.errors++;
    this.out.push(diagnostic("error", code, message, span));
  }
  warn(code: string, message: string, span: Span): void {
    this.out.push(diagnostic("warning", code, message, span));
  }
  /** Errors reported so far (counted as they come: a grammar with thousands stays linear). */
  errorCount(): number {
    return this.errors;
  }

  /** " (did you mean 'x'?)" for the nearest feature or node name, or "". */
  suggest(name: string): string {
    let best: string | null = null;
    let bestD = 3;
    for (const f of [...this.inv.features, ...this.nodes.keys()]) {
      const d = distance(name, f);
      if (d < bestD) {
        bestD = d;
        best = f;
      }
    }
    return best === null ? "" : ` (did you mean '${best}'?)`;
  }

  /** The bundle of a literal segment (null when the inventory cannot read it as one segment). */
  literal(symbol: string): Bundle | null {
    let b = this.literals.get(symbol);
    if (b === undefined) {
      b = bundleOf(this.inv, symbol) ?? null;
      this.literals.set(symbol, b);
    }
    return b;
  }

  /** Up to six distinct written forms of the bundles, for messages. */
  names(bs: readonly Bundle[]): string {
    const seen = new Set<string>();
    const parts: string[] = [];
    for (const b of bs) {
      const r = realise(this.inv, b);
      const t = r.ok ? r.text : describeBundle(this.inv, b);
      if (!seen.has(t)) {
        seen.add(t);
        parts.push(t);
      }
    }
    return parts.slice(0, 6).join(" ") + (parts.length > 6 ? " …" : "");
  }

  /** Inventory segments, nuclei in each stress state the lexicon reader and the stress step give. */
  baseBundles(): Bundle[] {
    if (this.base !== null) return this.base;
    const out: Bundle[] = [];
    for (const s of this.inv.segments) {
      out.push(s.bundle);
      if (this.syllabic >= 0 && s.bundle[this.syllabic] === "+" && this.stress >= 0 && this.primary >= 0)
        for (const [st, pr] of [["+", "+"], ["+", "-"], ["-", "-"]] as const) {
          const b = [...s.bundle];
          b[this.stress] = st;
          b[this.primary] = pr;
          out.push(b);
        }
    }
    this.base = out;
    return out;
  }

  /** Does the element match the segment bundle? Variables accept any +/− value (node variables: anything). */
  matches(e: Element, b: Bundle, depth = 0): boolean {
    switch (e.kind) {
      case "boundary":
        return false;
      case "segment": {
        const l = this.literal(e.symbol);
        if (l === null) return false;
        const n = l.length - this.nProsodic;
        for (let i = 0; i < n; i++) if (l[i] !== b[i]) return false;
        return true;
      }
      case "class": {
        const c = this.classes.get(e.name);
        if (c === undefined || depth > 20) return false;
        return c.members.some((m) => this.matches(m, b, depth + 1));
      }
      case "bundle":
        return e.specs.every((s) => {
          const node = this.nodes.get(s.feature);
          const idxs = node !== undefined ? node.features.map((f) => this.inv.featureIndex.get(f) ?? -1) : [this.inv.featureIndex.get(s.feature) ?? -1];
          if (idxs.some((i) => i < 0)) return true; // reported as unknown already
          if (s.kind === "value") return idxs.every((i) => b[i] === s.value);
          return node !== undefined || b[idxs[0]!] !== "0";
        });
    }
  }

  /** The feature indices of a node, or null when no node has that name. */
  nodeIndices(name: string): number[] | null {
    const node = this.nodes.get(name);
    if (node === undefined) return null;
    return node.features.map((f) => this.inv.featureIndex.get(f) ?? -1).filter((i) => i >= 0);
  }
}

export const flip = (v: FeatureValue, negated: boolean): FeatureValue => (!negated || v === "0" ? v : v === "+" ? "-" : "+");
