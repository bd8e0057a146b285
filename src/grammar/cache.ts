// A cache of loaded, checked grammars beside the machine cache: a hit skips reading includes,
// parsing, splitting literals and checking, and reading the inventory, when no file the grammar
// was built from has changed.
// Each file carries the SHA-256 of its own payload: an edited or damaged file is never used.

import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync } from "node:fs";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import type { Grammar } from "./ast.js";
import { loadGrammar, type LoadedGrammar } from "./load.js";
import { projectRoot } from "./source.js";
import type { Diacritic, FeatureValue, Inventory } from "../inventory/types.js";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { fsReason, writeFileAtomicSync } from "../tempfile.js";

const FORMAT = "strata-grammar-cache-3";

interface Entry {
  readonly format: string;
  /** Hash of the front end's own code: a changed parser or checker never reads an old entry. */
  readonly code: string;
  /** Every file the result depends on, with the hash of its text ("" for a file that did not exist). */
  readonly files: readonly { readonly path: string; readonly sha: string }[];
  readonly grammar: Grammar;
  readonly inventory: StoredInventory;
  readonly diagnostics: readonly Diagnostic[];
}

/** An inventory as JSON: its maps as lists (the feature index is the features' order). */
interface StoredInventory {
  readonly file: string;
  readonly features: readonly string[];
  readonly segments: Inventory["segments"];
  readonly diacritics: readonly (Omit<Diacritic, "sets"> & { readonly sets: readonly (readonly [number, FeatureValue])[] })[];
}

// Stored rather than read again on a hit: parsing the segment and diacritic tables cost ~15 ms
// of a cached run's start (the CSV reader's first use).
const storeInventory = (inv: Inventory): StoredInventory => ({
  file: inv.file, features: inv.features, segments: inv.segments, diacritics: inv.diacritics.map((d) => ({ ...d, sets: [...d.sets] })),
});

const restoreInventory = (s: StoredInventory): Inventory => ({
  file: s.file,
  features: s.features,
  featureIndex: new Map(s.features.map((f, i) => [f, i] as const)),
  segments: s.segments,
  diacritics: s.diacritics.map((d) => ({ ...d, sets: new Map(d.sets) })),
});

const sha = (text: string): string => createHash("sha256").update(text).digest("hex");
const fileSha = (p: string): string => (existsSync(p) ? sha(readFileSync(p, "utf8")) : "");

let codeHash: string | undefined;
/**
 * Hash of the code that reads grammars: the compiled or source files of src/grammar and
 * src/inventory (this module's siblings), or, in the bundle (scripts/bundle.mjs: this module is in
 * one of dist/bun's files), every file of the bundle.
 */
function frontEndCode(): string {
  if (codeHash !== undefined) return codeHash;
  const h = createHash("sha256");
  const here = path.dirname(fileURLToPath(import.meta.url));
  const dirs = path.basename(here) === "grammar" ? [here, path.join(here, "..", "inventory")] : [here];
  for (const dir of dirs) {
    for (const f of readdirSync(dir).filter((n) => /\.(js|ts)$/.test(n)).sort()) {
      h.update(f).update(readFileSync(path.join(dir, f)));
    }
  }
  codeHash = h.digest("hex");
  return codeHash;
}

/** The diacritics file the inventory loader reads for this grammar (declared, or the default beside the inventory). */
function diacriticsOf(g: Grammar): string | null {
  if (g.diacritics !== null) return g.diacritics;
  return g.inventory === null ? null : path.join(path.dirname(g.inventory), "diacritics.csv");
}

/**
 * The file's layout: a first line `strata-grammar-cache-2 <SHA-256 of the rest, hex>`, then the
 * entry as JSON. Returns the entry, "missing", or why the file cannot be trusted.
 */
function readEntry(index: string): Entry | "missing" | { readonly bad: string } {
  let text: string;
  try {
    text = readFileSync(index, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return code === "ENOENT" || code === "ENOTDIR" ? "missing" : { bad: `it cannot be read (${fsReason(e)})` };
  }
  const nl = text.indexOf("\n");
  const head = nl < 0 ? text : text.slice(0, nl);
  const m = /^(\S+) ([0-9a-f]{64})$/.exec(head);
  if (m === null) return { bad: "not a Strata grammar cache file" };
  if (m[1] !== FORMAT) return "missing"; // another cache format: rewritten below, no warning
  const payload = text.slice(nl + 1);
  if (sha(payload) !== m[2]) return { bad: "its checksum does not match its content" };
  try {
    return JSON.parse(payload) as Entry;
  } catch {
    return { bad: "its content is not valid JSON" };
  }
}

const cacheWarning = (file: string, message: string): Diagnostic => diagnostic("warning", "cache/unusable", message, { file, line: 1, column: 1 });

/**
 * `loadGrammar` with a cache under `cacheDir`. Only a grammar without errors is stored; an entry
 * is used only when its checksum holds, every grammar, inventory and diacritics file still has
 * the same text and the front end's code is the same. A damaged entry is loaded afresh and
 * rewritten, with a warning; a cache that cannot be written is a warning too, never an error.
 */
export function loadGrammarCached(p: string, cacheDir: string, opts: { readonly root?: string } = {}): LoadedGrammar {
  let main = path.resolve(p);
  if (existsSync(main) && !main.endsWith(".strata")) main = path.join(main, "grammar.strata");
  // The project root decides which files may be read: a grammar loaded under another root is another entry.
  const root = projectRoot(main, opts.root);
  const index = path.join(cacheDir, `grammar-${sha(`${main}\u0000${root}`).slice(0, 32)}.json`);
  const warnings: Diagnostic[] = [];
  const e = readEntry(index);
  if (e !== "missing" && "bad" in e) {
    warnings.push(cacheWarning(index, `The cached grammar ${index} was not used (${e.bad}); the grammar is loaded again.`));
  } else if (e !== "missing") {
    try {
      if (e.format === FORMAT && e.code === frontEndCode() && e.files.every((f) => fileSha(f.path) === f.sha) && e.grammar.inventory !== null) {
        return { grammar: e.grammar, inventory: restoreInventory(e.inventory), diagnostics: [...e.diagnostics] };
      }
    } catch {
      // A well-formed entry of an unexpected shape: load afresh below.
    }
  }
  const loaded = loadGrammar(p, { root });
  const g = loaded.grammar;
  if (g !== undefined && loaded.inventory !== undefined && !loaded.diagnostics.some((d) => d.severity === "error") && g.inventory !== null) {
    const dia = diacriticsOf(g);
    const deps = [...g.files, g.inventory, ...(dia !== null ? [dia] : [])];
    const entry: Entry = { format: FORMAT, code: frontEndCode(), files: deps.map((f) => ({ path: f, sha: fileSha(f) })), grammar: g, inventory: storeInventory(loaded.inventory), diagnostics: loaded.diagnostics };
    try {
      mkdirSync(cacheDir, { recursive: true });
      const payload = JSON.stringify(entry);
      writeFileAtomicSync(index, `${FORMAT} ${sha(payload)}\n${payload}`);
    } catch (err) {
      // A cache that cannot be written only costs speed.
      warnings.push(cacheWarning(index, `The checked grammar could not be cached in ${cacheDir} (${fsReason(err)}); the next run loads it again.`));
    }
  }
  return warnings.length === 0 ? loaded : { ...loaded, diagnostics: [...loaded.diagnostics, ...warnings] };
}
