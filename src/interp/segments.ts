// Segments for the interpreter: which features are segmental, literal comparison, and IPA in and
// out through the inventory room's tokeniser and writer (so every room reads symbols alike).

import type { Bundle, Inventory, PronToken } from "../inventory/types.js";
import { PROSODIC_FEATURES } from "../inventory/types.js";
import { realise, tokenise } from "../inventory/index.js";

/** Number of the inventory's non-prosodic features: the prosodic ones come last (inventory/types.ts). */
export function segmentalWidth(inv: Inventory): number {
  let n = inv.features.length;
  while (n > 0 && (PROSODIC_FEATURES as readonly string[]).includes(inv.features[n - 1] as string)) n--;
  return n;
}

/** True when two bundles agree on every non-prosodic feature (what a literal segment compares). */
export function sameSegment(inv: Inventory, a: Bundle, b: Bundle): boolean {
  const n = segmentalWidth(inv);
  for (let i = 0; i < n; i++) if (a[i] !== b[i]) return false;
  return true;
}

/**
 * The bundle a literal IPA segment of a rule denotes, read by the inventory's own tokeniser
 * (longest symbol, then declared diacritics), so rules, lexicon and writer agree on every symbol.
 * Null unless the text is exactly one segment.
 */
export function resolveSymbol(inv: Inventory, symbol: string): Bundle | null {
  const r = tokenise(inv, symbol);
  if (!r.ok || r.tokens.length !== 1) return null;
  const t = r.tokens[0] as PronToken;
  return t.kind === "segment" ? t.bundle : null;
}

/** Narrow IPA for a bundle (prosodic features ignored) by the inventory's writer; null when it cannot be written. */
export function realiseBundle(inv: Inventory, bundle: Bundle): string | null {
  const r = realise(inv, bundle);
  return r.ok ? r.text : null;
}
