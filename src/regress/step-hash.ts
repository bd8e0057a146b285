// A fingerprint of each step of a grammar as it runs (build.json's `stepHashes`): two varieties'
// steps with the same name and fingerprint do the same thing, so a comparison of varieties can tell
// a rule left out, added, edited or moved from one merely shared. Where the files lie is left out.

import { createHash } from "node:crypto";
import type { Grammar, Step } from "../grammar/ast.js";

/** Hex digits kept of each SHA-256 (64 bits: enough to tell the steps of two grammars apart). */
const KEEP = 16;

/** JSON without source positions and file names (a moved checkout or an included file keeps its hashes). */
const placeless = (k: string, v: unknown): unknown => (k === "span" || k === "file" ? undefined : v);

/** Class and node names a piece of the grammar mentions (class elements; feature names of variables, which may be nodes). */
function mentioned(value: unknown, classes: Set<string>, features: Set<string>): void {
  if (Array.isArray(value)) {
    for (const v of value) mentioned(v, classes, features);
    return;
  }
  if (value === null || typeof value !== "object") return;
  const o = value as Record<string, unknown>;
  if (o["kind"] === "class" && typeof o["name"] === "string") classes.add(o["name"]);
  if (o["kind"] === "variable" && typeof o["feature"] === "string") features.add(o["feature"]);
  if (o["kind"] === "value" && typeof o["feature"] === "string") features.add(o["feature"]);
  for (const k of Object.keys(o)) if (k !== "span") mentioned(o[k], classes, features);
}

/**
 * The step's fingerprint: its definition as parsed (options, target, change, environments,
 * exceptions) together with the definitions of every class it names (and the classes those name)
 * and of every geometry node it names; for `syllabify` the onset and coda lists, for `stress` the
 * heavy rhymes. The inventory is recorded apart (build.json's `inventory.sha256`).
 */
export function stepHash(grammar: Grammar, step: Step): string {
  const classes = new Set<string>();
  const features = new Set<string>();
  const parts: unknown[] = [step];
  if (step.kind === "syllabify") parts.push(grammar.onsets, grammar.codas);
  if (step.kind === "stress") parts.push(grammar.heavy);
  mentioned(parts, classes, features);
  // Classes named by the classes found, to a fixed point.
  const byName = new Map(grammar.classes.map((c) => [c.name, c]));
  const todo = [...classes];
  while (todo.length > 0) {
    const c = byName.get(todo.pop()!);
    if (c === undefined) continue;
    const inner = new Set<string>();
    mentioned(c.members, inner, features);
    for (const n of inner) if (!classes.has(n)) (classes.add(n), todo.push(n));
  }
  const defs = [...classes].sort().map((n) => byName.get(n)?.members ?? null);
  const nodes = grammar.nodes.filter((n) => features.has(n.name)).sort((x, y) => (x.name < y.name ? -1 : 1));
  const text = JSON.stringify({ parts, classes: [...classes].sort(), defs, nodes }, placeless);
  return createHash("sha256").update(text).digest("hex").slice(0, KEEP);
}

/** Every step's fingerprint, in step order. */
export const stepHashes = (grammar: Grammar): string[] => grammar.steps.map((s) => stepHash(grammar, s));
