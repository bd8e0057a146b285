// The IPA writer for one segment: a feature bundle becomes the inventory symbol with exactly those
// values, or else the nearest base symbol plus declared diacritics, in customary order, NFC.

import type { Bundle, Diacritic, Inventory } from "./types.js";
import { baseKey, lookup } from "./lookup.js";
import { describeBundle } from "./bundles.js";
import { tokenise } from "./tokenise.js";
import { isCombining } from "./ipa.js";
import { letters, marksOnFirstLetter, withMarksAfterFirst } from "./diphthong.js";

/**
 * Letters with a descender. Handbook of the IPA (1999), notes to the diacritics chart (from
 * memory): a diacritic normally written below may be written above a symbol with a descender,
 * e.g. ŋ̊ rather than ŋ̥, so the mark stays legible.
 */
const DESCENDERS = new Set(Array.from("gɡjpqyŋɟʝɣɰɥɲɳɖʈʂʐɭɻɽʒβɸçʎ"));

/** Combining marks written below, and their counterpart above (Unicode Combining Diacritical Marks). */
const ABOVE_FORM: ReadonlyMap<string, string> = new Map([
  ["\u0325", "\u030A"], // ring below → ring above (voiceless)
  ["\u0329", "\u030D"], // vertical line below → vertical line above (syllabic)
  ["\u032F", "\u0311"], // inverted breve below → inverted breve above (non-syllabic)
  ["\u032C", "\u030C"], // caron below → caron above (voiced)
]);

/** The mark to write on `base`: its above form when the base ends in a descender and the inventory reads that form back. */
function placedMark(base: string, d: Diacritic): string {
  const above = ABOVE_FORM.get(d.mark);
  const last = Array.from(base.normalize("NFD")).filter((ch) => !isCombining(ch)).pop();
  if (above !== undefined && last !== undefined && DESCENDERS.has(last) && d.aliases.includes(above)) return above;
  return d.mark;
}

export type RealiseResult = { ok: true; text: string } | { ok: false; error: string };

/**
 * The fewest diacritics that turn `base` into `target` (non-prosodic features only), or undefined.
 * A diacritic qualifies only if every value it sets is the target's value, so applying any subset
 * in any order never overshoots; a subset works when its features cover every differing feature.
 * Exhaustive over subsets of the qualifying diacritics by increasing size (there are few).
 */
function cover(base: Bundle, target: Bundle, nBase: number, diacritics: readonly Diacritic[]): Diacritic[] | undefined {
  const differing: number[] = [];
  for (let f = 0; f < nBase; f++) if (base[f] !== target[f]) differing.push(f);
  const useful = diacritics.filter((d) => {
    let touches = false;
    for (const [f, v] of d.sets) {
      if (target[f] !== v) return false;
      if (base[f] !== v) touches = true;
    }
    return touches;
  });
  const covered = new Set<number>();
  for (const d of useful) for (const f of d.sets.keys()) covered.add(f);
  if (!differing.every((f) => covered.has(f))) return undefined;
  const n = useful.length;
  for (let size = 1; size <= n; size++) {
    const pick: number[] = [];
    const search = (from: number): Diacritic[] | undefined => {
      if (pick.length === size) {
        const got = new Set<number>();
        for (const k of pick) for (const f of useful[k]!.sets.keys()) got.add(f);
        return differing.every((f) => got.has(f)) ? pick.map((k) => useful[k]!) : undefined;
      }
      for (let k = from; k < n; k++) {
        pick.push(k);
        const r = search(k + 1);
        pick.pop();
        if (r) return r;
      }
      return undefined;
    };
    const found = search(0);
    if (found) return found;
  }
  return undefined;
}

/**
 * Writes one bundle as narrow IPA. Prosodic features are ignored (stress is written per syllable
 * elsewhere). Choice, deterministic: an inventory segment with exactly these values; otherwise the
 * base segment needing the fewest diacritics, the earliest in the inventory on a tie; combining
 * marks before modifier letters, each group in declared order (the customary order, which agrees
 * with Unicode canonical ordering so NFC keeps it), after the first letter of a diphthong
 * (inventory/diphthong.ts) and after the whole symbol otherwise. Output is NFC (W3C Character Model: NFC for
 * content; never NFKC, which would turn ʰ into h). Memoised per inventory by the bundle's key.
 *
 * Round trip: the text is read back with `tokenise` before it is returned, so
 * tokenise(realise(b)) = b (prosodic features aside) whenever realise succeeds.
 */
export function realise(inv: Inventory, bundle: Bundle): RealiseResult {
  const lk = lookup(inv);
  if (bundle.length !== inv.features.length) {
    return { ok: false, error: `A bundle of ${bundle.length} values cannot be written with an inventory of ${inv.features.length} features.` };
  }
  const key = baseKey(bundle, lk.nBase);
  const memo = lk.realised.get(key);
  if (memo) return memo;
  const result = compute(inv, bundle, key);
  lk.realised.set(key, result);
  return result;
}

function compute(inv: Inventory, bundle: Bundle, key: string): RealiseResult {
  const lk = lookup(inv);
  const exact = lk.segmentByBase.get(key);
  if (exact !== undefined) return { ok: true, text: inv.segments[exact]!.symbol.normalize("NFC") };
  let best: { seg: number; marks: Diacritic[] } | undefined;
  for (let s = 0; s < inv.segments.length; s++) {
    const marks = cover(inv.segments[s]!.bundle, bundle, lk.nBase, inv.diacritics);
    if (marks && (!best || marks.length < best.marks.length)) {
      best = { seg: s, marks };
      if (marks.length === 1) break;
    }
  }
  if (!best) {
    return { ok: false, error: `No inventory symbol and declared diacritics write ${describeBundle(inv, bundle.slice(0, lk.nBase).concat(bundle.slice(lk.nBase).map(() => "0")))}.` };
  }
  // Combining marks first (one written after a modifier letter would sit on that letter), then by declared order.
  const rank = (d: Diacritic): number => (isCombining(Array.from(d.mark)[0]!) ? 0 : 1);
  const base = inv.segments[best.seg]!.symbol;
  // A diphthong's marks go after its first letter (diphthong.ts names the convention).
  const split = marksOnFirstLetter(inv, base, inv.segments[best.seg]!.bundle);
  const marks = [...best.marks].sort((a, b) => rank(a) - rank(b) || a.order - b.order).map((d) => placedMark(split ? letters(base)[0]! : base, d));
  const text = split ? withMarksAfterFirst(base, marks) : (base + marks.join("")).normalize("NFC");
  const back = tokenise(inv, text);
  const t = back.ok && back.tokens.length === 1 ? back.tokens[0]! : undefined;
  if (!t || t.kind !== "segment" || baseKey(t.bundle, lk.nBase) !== key) {
    return { ok: false, error: `'${text}' would be read back as something else, so ${describeBundle(inv, bundle)} cannot be written unambiguously.` };
  }
  return { ok: true, text };
}
