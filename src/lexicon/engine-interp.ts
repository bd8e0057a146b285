// An Engine backed by the reference interpreter (no automata): slow, but written independently of
// the compiler, so `strata build --check` and the tests can compare the two on whole lexicons.

import type { Grammar } from "../grammar/ast.js";
import type { Inventory } from "../inventory/types.js";
import { applyGrammar, prepareGrammar, realiseBundle, symsToIpa, WORD_EDGE, wordKey, type IpaOptions, type PreparedGrammar, type Word } from "../interp/index.js";
import { withTieBars } from "../inventory/diphthong.js";
import type { Engine, Transcription } from "./engine.js";
import type { DerivationStep } from "./derivation.js";

/** The grammar with only its syllabify and stress steps: what the broad (syllabified) column shows. */
export function prosodyOnly(grammar: Grammar): Grammar {
  return { ...grammar, steps: grammar.steps.filter((s) => s.kind !== "rule") };
}

export class InterpreterEngine implements Engine {
  readonly steps: readonly string[];
  readonly writesSyllables: boolean;
  private readonly full: PreparedGrammar;
  private readonly broadOnly: PreparedGrammar;
  /** How a word is written (with tie bars on request: inventory/diphthong.ts). */
  private readonly ipaOptions: IpaOptions;

  constructor(grammar: Grammar, private readonly inventory: Inventory, private readonly maxVariants = 16, private readonly syllables = true, ties = false) {
    this.steps = grammar.steps.map((s) => s.name);
    this.writesSyllables = syllables;
    this.full = prepareGrammar(grammar, inventory);
    this.broadOnly = prepareGrammar(prosodyOnly(grammar), inventory);
    this.ipaOptions = ties ? { syllables, realise: (b) => { const t = realiseBundle(inventory, b); return t === null ? null : withTieBars(t); } } : { syllables };
  }

  transcribeWord(symbols: Word): Transcription | undefined {
    const word = [WORD_EDGE, ...symbols, WORD_EDGE];
    const run = applyGrammar(this.full, this.inventory, word, { maxVariants: this.maxVariants });
    const broadRun = applyGrammar(this.broadOnly, this.inventory, word);
    const ipa = (w: Word): string => symsToIpa(w, this.inventory, this.ipaOptions);
    const prefKey = wordKey(run.preferred);
    const narrow = ipa(run.preferred);
    const others = run.variants.filter((v) => wordKey(v.word) !== prefKey);
    const variants = [narrow, ...others.map((v) => ipa(v.word))];
    // The preferred variant's steps are its own path's (as the compiled engine's blame gives them).
    const rules = run.preferredChangedBy;
    return { narrow, broad: symsToIpa(broadRun.preferred, this.inventory, { syllables: this.syllables, joins: true }), variants, rules, derivation: this.derivation(word), variantSteps: [rules, ...others.map((v) => v.changedBy)], ...(run.capped ? { capped: true as const } : {}) };
  }

  /** The preferred word step by step: each step of the prepared grammar alone, on the previous step's preferred output. */
  derivation(word: Word): DerivationStep[] {
    const out: DerivationStep[] = [];
    let cur = word;
    for (const step of this.full.steps) {
      const next = applyGrammar({ ...this.full, steps: [step] }, this.inventory, cur, { maxVariants: this.maxVariants }).preferred;
      if (wordKey(next) !== wordKey(cur)) out.push({ step: step.name, form: symsToIpa(next, this.inventory, this.ipaOptions) });
      cur = next;
    }
    return out;
  }
}
