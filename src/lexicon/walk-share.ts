// Sharing the walk through a grammar's steps between varieties (a build of several varieties reads
// the lexicon once, runner.ts). The walk runs every step's own machine on an entry, in order: it
// gives the steps that changed the entry, the derivation's forms and the variant screen
// (engine-machine.ts, `blame`). Two varieties whose first steps are the same (same step, same
// classes, onsets, codas and stress settings, same inventory) produce the same strings through
// them, so a follower resumes from the leader's string after the shared steps — translated from
// the leader's symbol ids to its own — instead of running them again.

import type { Grammar } from "../grammar/ast.js";
import type { DerivationStep } from "./derivation.js";

/** Where a walk stood before a step: everything a follower needs to go on from there. */
export interface WalkSnapshot {
  /** The engine that walked (its symbol ids). */
  readonly engine: object;
  /** Steps before this one have run. */
  readonly step: number;
  readonly ids: readonly number[];
  readonly changed: readonly string[];
  readonly derivation: readonly DerivationStep[];
  /** Whether the walk ran the variant screen; then `single` and `unchecked` are its state. */
  readonly screened: boolean;
  readonly single: boolean;
  readonly unchecked: number;
}

/** What one call of the walk shares: snapshots to record (a leader) or one to resume from (a follower). */
export interface WalkShare {
  /** Steps before which to record a snapshot (each boundary the leader's and a follower's blocks agree on). */
  readonly snapAt?: readonly number[];
  readonly give?: (s: WalkSnapshot) => void;
  /** The leader's snapshot for this entry, when it recorded one. */
  readonly resume?: WalkSnapshot;
  /** The leader it must come from, and leader id → this engine's id (-1: none). */
  readonly leader?: object;
  readonly translate?: Int32Array;
}

/** What the walk-sharing needs of an engine. */
export interface WalkingEngine {
  /** One identity per step (walk-share.ts `stepKeys`); empty when the engine has no per-step machines. */
  readonly stepKeys: readonly string[];
  /** The per-step blocks' step ranges, in order. */
  readonly walkBlocks: readonly { readonly from: number; readonly to: number }[];
  /** Alphabet keys of the walk's symbol ids (index = id; "" for ε, '#', '.'). */
  readonly symbolKeys: readonly string[];
}

/**
 * One identity per step of a grammar: the step with everything of the grammar it can depend on
 * (nodes, classes, onsets, codas, heavy rhymes), without source positions and file names. Equal
 * identities at equal positions mean equal steps (the inventory is checked by the caller).
 */
export function stepKeys(grammar: Grammar): string[] {
  const placeless = (k: string, v: unknown): unknown => (k === "span" || k === "file" || k === "files" || k === "inventory" || k === "diacritics" ? undefined : v);
  const context = JSON.stringify({ nodes: grammar.nodes, classes: grammar.classes, onsets: grammar.onsets, codas: grammar.codas, heavy: grammar.heavy }, placeless);
  return grammar.steps.map((s) => context + "\u0000" + JSON.stringify(s, placeless));
}

/** A follower's plan: resume before step `step` from the leader's snapshot. */
export interface FollowerPlan {
  readonly step: number;
  readonly translate: Int32Array;
}

/**
 * The step before which `follower` can take over `leader`'s walk: the end of their common prefix
 * of steps, moved back to a boundary where both have the same blocks before it and none across it;
 * undefined when nothing is shared.
 */
export function followerPlan(leader: WalkingEngine, follower: WalkingEngine): FollowerPlan | undefined {
  const a = leader.stepKeys;
  const b = follower.stepKeys;
  let common = 0;
  while (common < a.length && common < b.length && a[common] === b[common]) common++;
  const la = leader.walkBlocks;
  const lb = follower.walkBlocks;
  let step = 0;
  for (let k = 0; k < la.length && k < lb.length; k++) {
    const x = la[k]!;
    const y = lb[k]!;
    if (x.from !== y.from || x.to !== y.to || x.to > common) break;
    step = x.to;
  }
  if (step === 0) return undefined;
  // Ids of the leader's alphabet in the follower's (same segment, same prosodic features).
  const byKey = new Map<string, number>();
  follower.symbolKeys.forEach((k, id) => {
    if (k !== "") byKey.set(k, id);
  });
  const translate = Int32Array.from(leader.symbolKeys, (k, id) => (id <= 2 ? id : byKey.get(k) ?? -1));
  return { step, translate };
}

/** The leader's ids in the follower's alphabet; null when one has no symbol there. */
export function translateIds(ids: readonly number[], table: Int32Array): number[] | null {
  const out = new Array<number>(ids.length);
  for (let i = 0; i < ids.length; i++) {
    const t = table[ids[i]!] ?? -1;
    if (t < 0) return null;
    out[i] = t;
  }
  return out;
}
