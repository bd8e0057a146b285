// Public surface of the grammar front end: parse, load (includes, inventory, checking), desugar.
// Other rooms import from here only; types live in ast.ts.

export type * from "./ast.js";
export { parseGrammarText, STATEMENT_KEYWORDS, PROSODIC_CONDITIONS, elementText, specText, patternSpan } from "./parser.js";
export { loadGrammar, splitLiterals, GRAMMAR_FILE, type LoadedGrammar } from "./load.js";
export { checkGrammar } from "./check.js";
export { loadGrammarCached } from "./cache.js";
export { defaultRoot, namedProjectRoot, projectRoot, setProjectRoot, ROOT_MARKER } from "./source.js";
export type { StepOrigin, OmittedStep, Where } from "./inherit.js";
export type { VarietyOrigins, LoadOptions } from "./load.js";
export { expandEnvironments, hasEnvironmentNotation, mirrorImages, parenthesisExpansions, MAX_EXPANSIONS, TooManyExpansions } from "./expand.js";
export { namesJoin, environmentNamesJoin } from "./joins.js";
export { desugar, insertedBundlesAsSegments, isBoundaryBlind, conditionsSatisfiable, type DesugarContext } from "./desugar.js";
