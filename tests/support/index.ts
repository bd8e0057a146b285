// Test support shared by rooms: the tiny fixture inventory, AST builders, word helpers and the
// random grammar / word generators for differential tests (machine vs reference interpreter).

export { tinyInventory, tinyBundle, TINY_FEATURES } from "./tiny-inventory.js";
export * from "./ast.js";
export { symsOf, ipaOf } from "./words.js";
export {
  arbGrammar, arbWord, arbInventory, grammarText, ARB_CLASSES, ARB_NODES, ARB_ONSETS, ARB_CODAS, ARB_HEAVY, ARB_VOWELS, ARB_CONSONANTS,
  type ArbGrammar, type ArbGrammarOptions, type ArbWordOptions,
} from "./arb-grammar.js";
