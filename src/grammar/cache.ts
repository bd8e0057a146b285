// A cache of loaded, checked grammars beside the machine cache: a hit skips reading includes,
// parsing, splitting literals and checking, when no file the grammar was built from has changed.

import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import * as path from "node:path";
import { fileURLToPath } from "node:url";
import type { Grammar } from "./ast.js";
import { loadGrammar, type LoadedGrammar } from "./load.js";
import { loadInventory } from "../inventory/index.js";
import type { Diagnostic } from "../diagnostics.js";

const FORMAT = "strata-grammar-cache-1";

interface Entry {
  readonly format: string;
  /** Hash of the front end's own code: a changed parser or checker never reads an old entry. */
  readonly code: string;
  /** Every file the result depends on, with the hash of its text ("" for a file that did not exist). */
  readonly files: readonly { readonly path: string; readonly sha: string }[];
  readonly grammar: Grammar;
  readonly diacritics: string | null;
  readonly diagnostics: readonly Diagnostic[];
}

const sha = (text: string): string => createHash("sha256").update(text).digest("hex");
const fileSha = (p: string): string => (existsSync(p) ? sha(readFileSync(p, "utf8")) : "");

let codeHash: string | undefined;
/** Hash of the compiled or source files of src/grammar and src/inventory (this module's siblings). */
function frontEndCode(): string {
  if (codeHash !== undefined) return codeHash;
  const h = createHash("sha256");
  const here = path.dirname(fileURLToPath(import.meta.url));
  for (const dir of [here, path.join(here, "..", "inventory")]) {
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
 * `loadGrammar` with a cache under `cacheDir`. Only a grammar without errors is stored; an entry
 * is used only when every grammar, inventory and diacritics file still has the same text and the
 * front end's code is the same. Anything unreadable in the cache is ignored (the grammar is loaded afresh).
 */
export function loadGrammarCached(p: string, cacheDir: string): LoadedGrammar {
  let main = path.resolve(p);
  if (existsSync(main) && !main.endsWith(".strata")) main = path.join(main, "grammar.strata");
  const index = path.join(cacheDir, `grammar-${sha(main).slice(0, 32)}.json`);
  try {
    const e = JSON.parse(readFileSync(index, "utf8")) as Entry;
    if (e.format === FORMAT && e.code === frontEndCode() && e.files.every((f) => fileSha(f.path) === f.sha) && e.grammar.inventory !== null) {
      const inv = loadInventory(e.grammar.inventory, e.diacritics !== null && existsSync(e.diacritics) ? e.diacritics : undefined);
      if (inv.inventory !== undefined) return { grammar: e.grammar, inventory: inv.inventory, diagnostics: [...e.diagnostics] };
    }
  } catch {
    // No entry, or an unreadable one: load afresh below.
  }
  const loaded = loadGrammar(p);
  const g = loaded.grammar;
  if (g !== undefined && loaded.inventory !== undefined && !loaded.diagnostics.some((d) => d.severity === "error") && g.inventory !== null) {
    const dia = diacriticsOf(g);
    const deps = [...g.files, g.inventory, ...(dia !== null ? [dia] : [])];
    const entry: Entry = { format: FORMAT, code: frontEndCode(), files: deps.map((f) => ({ path: f, sha: fileSha(f) })), grammar: g, diacritics: dia, diagnostics: loaded.diagnostics };
    try {
      mkdirSync(cacheDir, { recursive: true });
      const tmp = `${index}.${process.pid}.tmp`;
      writeFileSync(tmp, JSON.stringify(entry));
      renameSync(tmp, index);
    } catch {
      // A read-only cache folder only costs speed.
    }
  }
  return loaded;
}
