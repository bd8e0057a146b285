// Derivations: a word through the compiled grammar one step at a time — each step's own machine
// (the preferred runner for the preferred form, every output for the variants) — as the table the
// trade writes by hand: underlying form, one row per step (a dash where it did not apply), surface.

import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import type { Diagnostic } from "../diagnostics.js";
import { freeze, type FrozenFst } from "../fst/index.js";
import { compileSteps, JOIN, SYLL, WORD, type Alphabet } from "../compile/index.js";
import { PreferredRunner } from "../compile/cascade.js";
import type { Word } from "../interp/index.js";
import { FormWriter, diff } from "./render.js";

/** One step of one derivation. */
export interface DerivationStep {
  readonly step: string;
  /** The form after the step (symbol ids, '#'-bracketed); null when the step did not change it. */
  readonly form: readonly number[] | null;
}

export interface Derivation {
  /** True for the preferred derivation (optional rules at their preferred setting). */
  readonly preferred: boolean;
  readonly steps: readonly DerivationStep[];
  readonly surface: readonly number[];
}

export interface Explanation {
  /** What was asked for: a spelling from the lexicon or the pronunciation as typed. */
  readonly label: string;
  readonly source?: { readonly file: string; readonly line: number };
  readonly underlying: readonly number[];
  /** The preferred derivation first, then one per other distinct surface form. */
  readonly derivations: readonly Derivation[];
  /** True when some variants were dropped (more than the cap). */
  readonly capped: boolean;
}

/** The grammar's steps compiled one by one, with a runner per step. */
export class Deriver {
  private readonly preferred: (PreferredRunner | null)[];
  private readonly variants: FrozenFst[];
  readonly names: readonly string[];
  readonly writer: FormWriter;

  private constructor(readonly alphabet: Alphabet, inventory: Inventory, steps: { name: string; preferred: PreferredRunner | null; variants: FrozenFst }[]) {
    this.names = steps.map((s) => s.name);
    this.preferred = steps.map((s) => s.preferred);
    this.variants = steps.map((s) => s.variants);
    this.writer = new FormWriter(alphabet, inventory);
  }

  static build(grammar: Grammar, inventory: Inventory): { deriver: Deriver | null; diagnostics: Diagnostic[] } {
    const { result, diagnostics } = compileSteps(grammar, inventory);
    if (result === null) return { deriver: null, diagnostics };
    const steps = result.steps.map((s) => ({
      name: s.step.name,
      preferred: s.preferred === null ? null : new PreferredRunner([{ machine: s.preferred, from: 0, to: 1, states: s.preferred.numStates, arcs: s.preferred.numArcs() }]),
      variants: freeze(s.variants),
    }));
    return { deriver: new Deriver(result.alphabet, inventory, steps), diagnostics };
  }

  /** Symbol ids of a word (segments and '.', no outer '#'); null when a segment is outside the alphabet. */
  encode(word: Word): number[] | null {
    const ids: number[] = [1];
    for (const s of word) {
      if (s.kind === "boundary") { ids.push(s.which === "word" ? WORD : s.which === "join" ? JOIN : SYLL); continue; }
      const id = this.alphabet.byKey.get(s.bundle.join(""));
      if (id === undefined) return null;
      ids.push(id);
    }
    ids.push(1);
    return ids;
  }

  /** Step k's preferred output on `ids` (the input itself for a step that prefers not to apply). */
  runPreferred(k: number, ids: readonly number[]): number[] | null {
    const r = this.preferred[k];
    if (r === null || r === undefined) return [...ids];
    const out: number[] = [];
    return r.run(ids, out) ? out : null;
  }

  /** The preferred form before each step and at the end: forms[k] reaches step k; forms[n] is the surface. */
  preferredForms(ids: readonly number[]): number[][] | null {
    const forms: number[][] = [[...ids]];
    for (let k = 0; k < this.names.length; k++) {
      const next = this.runPreferred(k, forms[k]!);
      if (next === null) return null;
      forms.push(next);
    }
    return forms;
  }

  /** Every derivation of `ids` (the preferred first), at most `cap` distinct surface forms. */
  derive(ids: readonly number[], cap = 16): { derivations: Derivation[]; capped: boolean } | null {
    const pref = this.preferredForms(ids);
    if (pref === null) return null;
    type Live = { form: number[]; history: DerivationStep[]; preferred: boolean };
    let live: Live[] = [{ form: [...ids], history: [], preferred: true }];
    let capped = false;
    for (let k = 0; k < this.names.length; k++) {
      const next = new Map<string, Live>();
      for (const v of live) {
        const outs = v.preferred ? [pref[k + 1]!] : [];
        const all = this.variants[k]!.applyAll(v.form, cap);
        if (all.capped) capped = true;
        for (const o of all.outputs) outs.push(o);
        outs.forEach((o, i) => {
          const key = o.join(",");
          const isPref = v.preferred && i === 0;
          const prior = next.get(key);
          if (prior !== undefined && (prior.preferred || !isPref)) return;
          const changed = key !== v.form.join(",");
          next.set(key, { form: o, history: [...v.history, { step: this.names[k]!, form: changed ? o : null }], preferred: isPref });
        });
      }
      const list = [...next.values()].sort((a, b) => (a.preferred ? -1 : b.preferred ? 1 : a.form.join(",") < b.form.join(",") ? -1 : 1));
      if (list.length > cap) capped = true;
      live = list.slice(0, cap);
    }
    return { derivations: live.map((v) => ({ preferred: v.preferred, steps: v.history, surface: v.form })), capped };
  }
}

/** A word to explain: its label, its symbols (no outer '#') and where it came from. */
export interface ExplainItem {
  readonly label: string;
  readonly word: Word;
  readonly source?: { readonly file: string; readonly line: number };
}

export function explain(deriver: Deriver, item: ExplainItem, cap = 16): Explanation | null {
  const ids = deriver.encode(item.word);
  if (ids === null) return null;
  const d = deriver.derive(ids, cap);
  if (d === null) return null;
  return { label: item.label, ...(item.source !== undefined ? { source: item.source } : {}), underlying: ids, derivations: d.derivations, capped: d.capped };
}

/** Which tokens of the new form were changed, and the changes as "x → y" texts. */
export function changesOf(writer: FormWriter, before: readonly number[], after: readonly number[]): { changed: Set<number>; text: string } {
  const changed = new Set<number>();
  const parts = new Map<string, number>();
  for (const e of diff(before, after)) {
    for (const j of e.to) changed.add(j);
    const from = e.from.length === 0 ? "∅" : e.from.map((i) => writer.symbol(before[i]!)).join("");
    const to = e.to.length === 0 ? "∅" : e.to.map((j) => writer.symbol(after[j]!)).join("");
    const t = `${from} → ${to}`;
    parts.set(t, (parts.get(t) ?? 0) + 1);
  }
  const text = [...parts].map(([t, n]) => (n > 1 ? `${t} (×${n})` : t)).join(", ");
  return { changed, text };
}
