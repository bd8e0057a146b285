// The reference interpreter's public surface: rules, syllabification and stress applied directly
// to symbol arrays (no automata), the oracle the compiled transducers are checked against.

export type { Sym, Word, Lint } from "./types.js";
export { toKey, wordKey, sortedDistinct, segment, WORD_EDGE, SYLLABLE_EDGE, JOIN_EDGE, isSegment, isWordEdge, isSyllableEdge, isJoin } from "./types.js";
export type { RuleContext, PreparedRule, PrepareResult } from "./prepare.js";
export { ruleContext, isBoundaryBlind, prepareRule, preparePattern, desugarOnce } from "./prepare.js";
export type { Binding, Bindings } from "./match.js";
export type { RuleOutputs } from "./apply.js";
export { applyRule, applyRuleDetailed, applyPrepared } from "./apply.js";
export type { ClusterList } from "./prosody.js";
export { syllabify, assignStress, resolveClusters, cutCluster, lowestCut } from "./prosody.js";
export type { GrammarOptions, GrammarRun, Variant, PreparedGrammar } from "./grammar.js";
export { applyGrammar, prepareGrammar } from "./grammar.js";
export type { IpaOptions } from "./io.js";
export { wordFromTokens, symsToIpa } from "./io.js";
export { resolveSymbol, realiseBundle, sameSegment, segmentalWidth } from "./segments.js";
