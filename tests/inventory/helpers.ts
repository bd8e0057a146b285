// Shared test helpers for the inventory tests: the shipped en-us inventory, loaded once, and small
// constructors for hand-made inventories.

import { fileURLToPath } from "node:url";
import { dirname, join } from "node:path";
import { loadInventory, parseInventory, type Bundle, type Inventory, type PronToken } from "../../src/inventory/index.js";

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), "..", "..");
export const EN_US = join(ROOT, "lexicons", "en-us");

let cached: Inventory | undefined;
export function enUs(): Inventory {
  if (cached) return cached;
  const r = loadInventory(join(EN_US, "segments.csv"));
  if (!r.inventory) throw new Error(r.diagnostics.map((d) => `${d.file}:${d.line}:${d.column} ${d.message}`).join("\n"));
  cached = r.inventory;
  return cached;
}

/** Parses an inventory that must load without errors. */
export function inventoryOf(csv: string, diacritics?: string): Inventory {
  const r = parseInventory(csv, "test.csv", diacritics, "test-diacritics.csv");
  if (!r.inventory) throw new Error(r.diagnostics.map((d) => `${d.file}:${d.line}:${d.column} ${d.message}`).join("\n"));
  return r.inventory;
}

export const segmentsOf = (tokens: readonly PronToken[]): Bundle[] =>
  tokens.flatMap((t) => (t.kind === "segment" ? [t.bundle] : []));

export const featureValue = (inv: Inventory, b: Bundle, feature: string): string => {
  const i = inv.featureIndex.get(feature);
  if (i === undefined) throw new Error(`no feature ${feature}`);
  return b[i]!;
};
