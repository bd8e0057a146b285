// Shared types of the segment inventory: features, bundles, segments, diacritics, tokens.
// Every other room reads segments through these types; src/inventory/ implements them.

import type { Diagnostic } from "../diagnostics.js";

/** A feature value: '+', '-' or '0' (unspecified / not applicable). */
export type FeatureValue = "+" | "-" | "0";

/**
 * A fully specified segment: one value per feature of its inventory, in `Inventory.features` order.
 * Bundles are compared and hashed through `bundleKey` (the values joined into one string).
 */
export type Bundle = readonly FeatureValue[];

/** A partial bundle: only the features named are constrained (feature index → value). */
export type PartialBundle = ReadonlyMap<number, FeatureValue>;

/**
 * Prosodic features Strata adds after the inventory's own columns, in this order.
 * They ride on syllable nuclei: [+stress +primary] primary stress, [+stress -primary] secondary,
 * [-stress -primary] unstressed, [0stress 0primary] not yet assigned (and every non-nucleus).
 * They are never written with diacritics: the IPA writer shows them as ˈ ˌ before the syllable.
 */
export const PROSODIC_FEATURES = ["stress", "primary"] as const;

export interface Segment {
  /** The IPA symbol as written in the inventory, NFC. */
  readonly symbol: string;
  /** Full bundle; prosodic features are '0'. */
  readonly bundle: Bundle;
  /** 1-based line of the inventory row (for messages). */
  readonly line: number;
}

/** A declared diacritic: which feature values it expresses when written on a base symbol. */
export interface Diacritic {
  /** The mark itself, NFC (a combining mark such as U+0303, or a modifier letter such as ʰ). */
  readonly mark: string;
  /** Human name, e.g. "aspirated". */
  readonly name: string;
  /** Feature values it sets (feature index → value). */
  readonly sets: PartialBundle;
  /** Alternative spellings read on input (e.g. U+030A ring above for U+0325 ring below). */
  readonly aliases: readonly string[];
  /** Position in the customary order of diacritics after a base symbol (lower is written first). */
  readonly order: number;
}

export interface Inventory {
  /** The file the segments came from (for messages). */
  readonly file: string;
  /** Feature names: the CSV header's features, then any diacritic-only features, then PROSODIC_FEATURES. */
  readonly features: readonly string[];
  readonly featureIndex: ReadonlyMap<string, number>;
  readonly segments: readonly Segment[];
  readonly diacritics: readonly Diacritic[];
}

/** What the tokeniser reads from an IPA pronunciation. */
export type PronToken =
  | { readonly kind: "segment"; readonly bundle: Bundle; readonly text: string; readonly column: number }
  | { readonly kind: "stress"; readonly level: "primary" | "secondary"; readonly column: number }
  | { readonly kind: "syllable"; readonly column: number } // '.'
  | { readonly kind: "word"; readonly column: number } // '#' between words of a phrase or parts of a compound (spaces between segments are ignored)
  | { readonly kind: "join"; readonly column: number }; // '+' a morpheme join inside a word

export type TokeniseResult =
  | { readonly ok: true; readonly tokens: readonly PronToken[] }
  | { readonly ok: false; readonly error: Diagnostic };

export const bundleKey = (b: Bundle): string => b.join("");
