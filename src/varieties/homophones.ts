// Mergers and splits between two varieties over the whole lexicon: entries with different broad
// forms that are homophonous (same normalised narrow form) in one variety and not all so in the
// other. Found by hashing (one map from form to entries per variety), never by comparing all pairs.

import type { VarietyEntry } from "./load.js";

/*
 * Normalisation (what "the same narrow form" means here), on NFC text:
 * - kept: every segment and diacritic (length, nasalisation, aspiration, …), stress marks ˈ ˌ
 *   (stress is contrastive: ˈɪnsaɪt against ɪnˈsaɪt), and the space between the words of a phrase;
 * - dropped: the syllable break `.` (where a break falls is not heard apart from the segments and
 *   stress around it, and two grammars' syllabifications may differ), the joins `+` and `#` that
 *   mark morpheme and compound boundaries inside an entry, the linking tie ‿, and the tie bars
 *   U+0361 and U+035C (t͡ʃ and tʃ are one affricate written two ways).
 * "Different broad forms" uses the same normalisation on the broad forms of the variety in which the
 * entries are homophonous, so two rows of one pronunciation (a noun and a verb) are no merger.
 */
const DROPPED = /[.+#\u203f\u0361\u035c]/g;

/** The normalised form homophony is decided on. */
export const normalForm = (ipa: string): string => ipa.normalize("NFC").replace(DROPPED, "");

/** One entry of a homophone set, as both varieties have it. */
export interface SetEntry {
  readonly key: string;
  readonly word: string;
  readonly broad: string;
  /** Narrow form in the variety where the set is homophonous. */
  readonly merged: string;
  /** Narrow form in the variety that keeps the entries apart. */
  readonly distinct: string;
}

/**
 * A set of entries homophonous in one variety (`form`) and not all homophonous in the other:
 * `groups` are the entries by their (normalised) form in the other variety, in first-seen order.
 */
export interface HomophoneSet {
  /** The shared normalised narrow form in the variety that merges them. */
  readonly form: string;
  readonly groups: readonly { readonly form: string; readonly entries: readonly SetEntry[] }[];
}

/**
 * The sets homophonous in `here` and told apart in `there`, over `keys` (entries present in both,
 * in the order given). Linear in the number of keys: one map from form to keys, then each class of
 * two or more keys split by its form in `there`.
 */
export function homophonesHereOnly(keys: readonly string[], here: ReadonlyMap<string, VarietyEntry>, there: ReadonlyMap<string, VarietyEntry>): HomophoneSet[] {
  const classes = new Map<string, string[]>();
  for (const k of keys) {
    const f = normalForm(here.get(k)!.narrow);
    const c = classes.get(f);
    if (c === undefined) classes.set(f, [k]);
    else c.push(k);
  }
  const sets: HomophoneSet[] = [];
  for (const [form, members] of classes) {
    if (members.length < 2) continue;
    if (new Set(members.map((k) => normalForm(here.get(k)!.broad))).size < 2) continue;
    const groups = new Map<string, SetEntry[]>();
    for (const k of members) {
      const h = here.get(k)!, t = there.get(k)!;
      const g = normalForm(t.narrow);
      const entry: SetEntry = { key: k, word: h.word, broad: h.broad, merged: h.narrow, distinct: t.narrow };
      const list = groups.get(g);
      if (list === undefined) groups.set(g, [entry]);
      else list.push(entry);
    }
    if (groups.size < 2) continue;
    sets.push({ form, groups: [...groups].map(([f, entries]) => ({ form: f, entries })) });
  }
  return sets;
}
