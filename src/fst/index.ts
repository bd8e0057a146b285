// The public surface of the finite-state core: every operation other rooms use is re-exported here.
// See src/fst/README.md for the representation decisions and the measured figures.

export { EPSILON, Fst, FstError, SymbolTable, acceptorOf, emptyFst, expandFinalOutputs, transducerOf } from "./fst.js";
export type { Arc, FstStats, Label, StateId } from "./fst.js";
export {
  accessible,
  canonicalOrder,
  closure,
  coaccessible,
  concat,
  invert,
  isEmpty,
  keepStates,
  mapArcs,
  optional,
  plus,
  project,
  reverse,
  star,
  trim,
  union,
} from "./basic.js";
export { FstLimitError, compose, composeAll, composeTable, intersect, sortedArcs } from "./compose.js";
export { fstOf, rowsOf, sortedRows, tableOf, trimTable } from "./table.js";
export type { ArcTable } from "./table.js";
export type { ComposeOptions, SortedArcs } from "./compose.js";
export { removeEpsilon, removeInputEpsilons } from "./epsilon.js";
export type { InputEpsilonFree, StrArc, StrMachine } from "./epsilon.js";
export { determinise, determiniseTransducer } from "./determinise.js";
export type { DeterminiseFailure, DeterminiseOptions, DeterminiseResult } from "./determinise.js";
export { coarsestPartition, isDeterministic, isSequential, minimise, minimiseTable, minimiseToTable } from "./minimise.js";
export { COPY, DeterministicRunner, FrozenFst, applyAll, freeze, freezeDeterministic, inputClasses, outputCode, outputKey } from "./frozen.js";
export type { ApplyResult } from "./frozen.js";
export { complement, difference, equivalent, isFunctional, shortestDifference } from "./equivalence.js";
export type { Difference, FunctionalityResult } from "./equivalence.js";
export { FunctionalRunner, freezeFunctional } from "./functional.js";
export type { FreezeFunctionalOptions, FreezeFunctionalResult } from "./functional.js";
export {
  FORMAT_VERSION,
  crc32,
  deserialise,
  deserialiseDeterministic,
  deserialiseFunctional,
  serialise,
  serialiseDeterministic,
  serialiseFunctional,
} from "./serialise.js";
export type { Deserialised } from "./serialise.js";
export { toDot } from "./dot.js";
export type { FstDotOptions } from "./dot.js";
