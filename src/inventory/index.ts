// The inventory room's public surface: loading segments and diacritics, reading and writing IPA,
// bundle helpers and the natural-class finder. Other rooms import from here only.

export * from "./types.js";
export { loadInventory, parseInventory, type LoadResult } from "./load.js";
export { tokenise } from "./tokenise.js";
export { realise, type RealiseResult } from "./realise.js";
export { matches, bundleOf, describeBundle, segmentsMatching } from "./bundles.js";
export { naturalClasses, type NaturalClassResult } from "./classes.js";
