// Small operations on feature bundles: matching a partial bundle, reading one symbol, writing a
// bundle as "[+voice -continuant]", and listing the inventory segments a partial bundle picks out.

import { PROSODIC_FEATURES, type Bundle, type Inventory, type PartialBundle, type Segment } from "./types.js";
import { tokenise } from "./tokenise.js";

/** True when `bundle` has every value `partial` names (an empty partial matches everything). */
export function matches(bundle: Bundle, partial: PartialBundle): boolean {
  for (const [f, v] of partial) if (bundle[f] !== v) return false;
  return true;
}

/**
 * The bundle of one segment written in IPA (an inventory symbol, possibly with declared diacritics),
 * or undefined when `symbol` is not exactly one readable segment.
 */
export function bundleOf(inv: Inventory, symbol: string): Bundle | undefined {
  const r = tokenise(inv, symbol);
  if (!r.ok || r.tokens.length !== 1) return undefined;
  const t = r.tokens[0]!;
  return t.kind === "segment" ? t.bundle : undefined;
}

const isFull = (b: PartialBundle | Bundle): b is Bundle => Array.isArray(b);

/**
 * "[+voice -continuant]": the named values in feature order. A full bundle lists every feature
 * except prosodic ones that are '0'.
 */
export function describeBundle(inv: Inventory, b: PartialBundle | Bundle): string {
  const parts: string[] = [];
  const prosodicFrom = inv.features.length - PROSODIC_FEATURES.length;
  if (isFull(b)) {
    b.forEach((v, f) => {
      if (f >= prosodicFrom && v === "0") return;
      parts.push(`${v}${inv.features[f]}`);
    });
  } else {
    const fs = [...(b as PartialBundle).keys()].sort((x, y) => x - y);
    for (const f of fs) parts.push(`${(b as PartialBundle).get(f)}${inv.features[f] ?? `#${f}`}`);
  }
  return `[${parts.join(" ")}]`;
}

/** The inventory segments (in inventory order) whose bundles match `partial`. */
export function segmentsMatching(inv: Inventory, partial: PartialBundle): Segment[] {
  return inv.segments.filter((s) => matches(s.bundle, partial));
}
