// The grammar's abstract syntax: plain data with exact source spans, produced by the parser,
// read by the checker, the reference interpreter and the rule compiler.

/** Where a node came from. Lines and columns count from 1 (code points); `length` in code points. */
export interface Span {
  readonly file: string;
  readonly line: number;
  readonly column: number;
  readonly length: number;
}

/** One feature specification inside `[ ... ]`. `feature` may name a feature or a geometry node. */
export type FeatureSpec =
  | { readonly kind: "value"; readonly feature: string; readonly value: "+" | "-" | "0"; readonly span: Span }
  /** `[αvoice]`, `[-αvoice]`, `[alpha voice]`, `[-alpha voice]`, `[α place]` (node variable). */
  | { readonly kind: "variable"; readonly feature: string; readonly variable: string; readonly negated: boolean; readonly span: Span };

/** One position in a pattern: it matches exactly one symbol of the string. */
export type Element =
  | { readonly kind: "bundle"; readonly specs: readonly FeatureSpec[]; readonly span: Span }
  /** An IPA segment written literally (base symbol plus diacritics), already split into single segments by the parser. */
  | { readonly kind: "segment"; readonly symbol: string; readonly span: Span }
  /** A named class (`C`, `V`, `Stop`): defined by `class NAME = ...`. */
  | { readonly kind: "class"; readonly name: string; readonly span: Span }
  /** `#` word boundary; `$` (or `.`) syllable boundary, which also matches `#`; `+` morpheme join (matches only `+`). */
  | { readonly kind: "boundary"; readonly which: "word" | "syllable" | "join"; readonly span: Span };

/** A regular expression over elements, in SPE notation. */
export type Pattern =
  | { readonly kind: "element"; readonly element: Element }
  | { readonly kind: "sequence"; readonly items: readonly Pattern[]; readonly span: Span }
  /** `( ... )` */
  | { readonly kind: "optional"; readonly body: Pattern; readonly span: Span }
  /** `{ a | b | ... }` */
  | { readonly kind: "choice"; readonly options: readonly Pattern[]; readonly span: Span }
  /** SPE subscripts: `C₀` (min 0, max null = unbounded), `C₁`, `C₀²` (max 2); ASCII `C_0`, `C_1`, `C_0^2`. */
  | { readonly kind: "repeat"; readonly body: Pattern; readonly min: number; readonly max: number | null; readonly span: Span };

/**
 * Prosodic shorthands written after `where` in an environment. They are desugared by
 * `desugar.ts` into ordinary patterns (see DEVELOPERS.md, "Prosodic shorthands").
 */
export type ProsodicCondition =
  | "onset" | "nucleus" | "coda"
  | "syllable-initial" | "syllable-final"
  | "word-initial" | "word-final"
  | "stressed" | "unstressed" | "primary";

/** `left _ right where c1, c2`. A missing side is the empty sequence (always matches). */
export interface Environment {
  readonly left: Pattern;
  readonly right: Pattern;
  readonly conditions: readonly { readonly condition: ProsodicCondition; readonly span: Span }[];
  readonly span: Span;
  /** `… mirrored`: the environment also holds read the other way round (left and right swapped and reversed). */
  readonly mirrored?: boolean;
  /**
   * Made by `desugar` (never by the parser): environments that must not hold at the site for this
   * one to hold — the rule's `unless` environments, and for `longest-first` the longer expansions.
   * They share the target's variables; their other variables are read "for some value".
   */
  readonly except?: readonly Environment[];
}

/** How a rule's environments combine: a plain union (default) or SPE's disjunctive ordering of `( )` expansions. */
export type Expansion = "union" | "longest-first";

export type ApplicationMode = "simultaneous" | "left-to-right" | "right-to-left";

/** A change element: a bundle of new values, a literal segment, or nothing (deletion when the whole change is ∅). */
export type ChangeElement =
  | { readonly kind: "bundle"; readonly specs: readonly FeatureSpec[]; readonly span: Span }
  | { readonly kind: "segment"; readonly symbol: string; readonly span: Span };

export interface Rule {
  readonly kind: "rule";
  readonly name: string;
  readonly span: Span;
  readonly optional: boolean;
  readonly mode: ApplicationMode;
  /** For optional rules: which output is the preferred variant (PLS prefer="true"). */
  readonly prefer: "applied" | "unapplied";
  /** The target: a fixed-length sequence of elements (no repetition or optionality); empty = ∅ (insertion). */
  readonly target: readonly Element[];
  /** The change; empty = ∅ (deletion). Same length as the target for feature changes. */
  readonly change: readonly ChangeElement[];
  /** Several environments: the rule applies where any of them holds. Empty list = everywhere. */
  readonly environments: readonly Environment[];
  /** `unless` environments: the rule does not apply where any of them holds (absent: none). */
  readonly unless?: readonly Environment[];
  /** `longest-first`: parenthesis expansions disjunctively ordered (absent: "union"). */
  readonly expansion?: Expansion;
  /**
   * Set by `desugar` (absent on parsed rules): whether the rule as written was boundary-blind
   * (DEVELOPERS.md, "Boundary transparency"). Read it through `isBoundaryBlind(rule)`, which
   * computes it for rules that have not been desugared.
   */
  readonly boundaryBlind?: boolean;
}

/** `syllabify`: insert syllable boundaries (removing any already there) by the Maximal Onset Principle. */
export interface SyllabifyStep {
  readonly kind: "syllabify";
  readonly name: string;
  readonly span: Span;
}

/** `stress from right 2 [if heavy else 3]`: default stress for words whose nuclei carry no stress yet. */
export interface StressStep {
  readonly kind: "stress";
  readonly name: string;
  readonly span: Span;
  readonly edge: "left" | "right";
  /** 1-based syllable count from the edge. */
  readonly position: number;
  /** Weight-sensitive: stress `position` if that syllable is heavy, else `otherwise`. */
  readonly otherwise: number | null;
}

export type Step = Rule | SyllabifyStep | StressStep;

export interface ClassDef {
  readonly name: string;
  /** A class is one element-alternative per entry: bundles and/or segments (`class Vl = p t k`). */
  readonly members: readonly Element[];
  readonly span: Span;
}

export interface NodeDef {
  readonly name: string;
  readonly features: readonly string[];
  readonly span: Span;
}

/** A legal cluster for syllabification, written as IPA (`spr`) and split into segments by the parser. */
export interface Cluster {
  readonly segments: readonly string[];
  readonly span: Span;
}

/**
 * `joins = through | closed | closed-before-consonant` (DEVELOPERS.md, "Syllabification and its
 * fallback"): "through" — the syllabifier reads through `+` as if it were not there; "closed" —
 * no onset crosses a `+` (the consonants before it stay in the coda, as at `#`);
 * "closed-before-consonant" — an onset crosses a `+` only when a nucleus follows it directly.
 */
export type JoinMode = "through" | "closed" | "closed-before-consonant";
export const JOIN_MODES: readonly JoinMode[] = ["through", "closed", "closed-before-consonant"];

export interface Grammar {
  /** The main grammar file. */
  readonly file: string;
  /** Inventory CSV path, resolved relative to the declaring file. */
  readonly inventory: string | null;
  /** Diacritics CSV path, resolved relative to the declaring file (null: the inventory's default beside it). */
  readonly diacritics: string | null;
  readonly nodes: readonly NodeDef[];
  readonly classes: readonly ClassDef[];
  readonly onsets: readonly Cluster[] | null;
  readonly codas: readonly Cluster[] | null;
  /** Rhyme shapes that make a syllable heavy (for weight-sensitive stress). */
  readonly heavy: readonly Pattern[];
  /** How syllabification treats a morpheme join `+` (the `joins` statement; absent: "through"). */
  readonly joins?: JoinMode;
  /** The ordered steps: rules, syllabification, default stress. */
  readonly steps: readonly Step[];
  /** Every file read (main and included), for cache keys. */
  readonly files: readonly string[];
  /** `language "TAG"`: the language tag the grammar declares (BCP 47, checked where it is used), if any. */
  readonly language?: { readonly tag: string; readonly span: Span };
}
