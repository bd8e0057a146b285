// A small fixture inventory for interpreter and differential tests: 8 segments over 5 features
// (one geometry node, `place = labial coronal`), 4 diacritics, so that every bundle that keeps its segment's
// syllabicity can be written, and written one way only (no syllabic-consonant marks to compete with nasalised vowels).

import type { Bundle, Diacritic, FeatureValue, Inventory, Segment } from "../../src/inventory/types.js";
import { PROSODIC_FEATURES } from "../../src/inventory/types.js";

/** Feature order: the five segmental features, then the prosodic ones Strata adds. */
export const TINY_FEATURES = ["syllabic", "voice", "nasal", "labial", "coronal", ...PROSODIC_FEATURES] as const;

/** Rows as in a segments.csv: symbol, then syllabic voice nasal labial coronal. */
const ROWS: readonly (readonly [string, string])[] = [
  ["p", "---+-"],
  ["t", "----+"],
  ["k", "-----"],
  ["b", "-+-+-"],
  ["d", "-+--+"],
  ["n", "-++-+"],
  ["a", "++---"],
  ["i", "++--+"],
];

function row(values: string): Bundle {
  return [...values.split("") as FeatureValue[], "0", "0"];
}

const segments: Segment[] = ROWS.map(([symbol, values], i) => ({ symbol, bundle: row(values), line: i + 2 }));
const featureIndex = new Map(TINY_FEATURES.map((f, i) => [f, i] as const));
const idx = (f: (typeof TINY_FEATURES)[number]): number => featureIndex.get(f) as number;

const diacritics: Diacritic[] = [
  { mark: "\u0325", name: "voiceless", sets: new Map([[idx("voice"), "-"]]), aliases: ["\u030A"], order: 3 },
  { mark: "\u032C", name: "voiced", sets: new Map([[idx("voice"), "+"]]), aliases: [], order: 4 },
  { mark: "\u0303", name: "nasalised", sets: new Map([[idx("nasal"), "+"]]), aliases: [], order: 5 },
  { mark: "\u02B7", name: "labialised", sets: new Map([[idx("labial"), "+"]]), aliases: [], order: 6 },
];

export const tinyInventory: Inventory = {
  file: "tests/support/tiny-inventory.ts",
  features: TINY_FEATURES,
  featureIndex,
  segments,
  diacritics,
};

/** The bundle of an inventory symbol with the given prosodic values (default [0stress 0primary]). */
export function tinyBundle(symbol: string, stress: FeatureValue = "0", primary: FeatureValue = "0"): Bundle {
  const s = segments.find((x) => x.symbol === symbol);
  if (s === undefined) throw new Error(`no segment '${symbol}' in the tiny inventory`);
  return [...s.bundle.slice(0, 5), stress, primary];
}
