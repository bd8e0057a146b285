// `-g PATH -d NAME` → one grammar file, the same way in every command. A variety is named as in
// varieties.json; the rules, in order:
//   -g a lexicon folder (holding varieties.json) or that file: the variety NAME there (default: the first);
//   -g a grammar folder: NAME.strata there; `general` (or no -d) is grammar.strata when there is no general.strata;
//   -g a .strata file: that file (a -d must be its own name, or `general`);
//   no -g: the current folder, when it holds varieties.json or grammar.strata; else `fallback` if given.

import { existsSync, readdirSync, statSync } from "node:fs";
import { basename, join, resolve } from "node:path";
import type { Diagnostic } from "../diagnostics.js";
import { GRAMMAR_FILE } from "../grammar/index.js";
import { loadManifest, MANIFEST_NAME } from "../lexicon/manifest.js";
import { commandLineError } from "./cmdline.js";

/** The name `grammar.strata` answers to as a variety (as in the shipped varieties.json files). */
export const DEFAULT_VARIETY = "general";

export interface ResolvedGrammar {
  /** Absolute path of the grammar file. */
  readonly path: string;
  /** The variety's name (from the manifest, -d, or the file's name). */
  readonly variety: string;
  /** The variety's language tag, when a manifest gives it. */
  readonly lang?: string;
}

const G_FLAGS = ["-g", "--grammar"] as const;
const D_FLAGS = ["-d", "--variety"] as const;

/** Resolves `-g`/`-d`; every problem is a diagnostic at the offending argument. */
export function resolveGrammar(g: string | undefined, d: string | undefined, fallback?: string): ResolvedGrammar | { readonly diagnostics: readonly Diagnostic[] } {
  const fail = (code: string, message: string, value: string | undefined, flags: readonly string[]) => ({ diagnostics: [commandLineError(code, message, value, flags)] });
  let path: string;
  if (g === undefined) {
    const here = process.cwd();
    if (existsSync(join(here, MANIFEST_NAME)) || existsSync(join(here, GRAMMAR_FILE))) path = here;
    else if (fallback !== undefined) path = fallback;
    else return fail("cli/no-grammar", `Give a grammar with -g (a grammar folder, a .strata file or a lexicon folder); the current folder holds neither ${MANIFEST_NAME} nor ${GRAMMAR_FILE}.`, undefined, []);
  } else path = resolve(g);
  if (!existsSync(path)) return fail("cli/no-such-path", `'${g}' does not exist: give a grammar folder, a .strata file or a lexicon folder.`, g, G_FLAGS);
  const isDir = statSync(path).isDirectory();
  if (isDir ? existsSync(join(path, MANIFEST_NAME)) : basename(path) === MANIFEST_NAME) {
    const { manifest, diagnostics } = loadManifest(path);
    if (manifest === undefined) return { diagnostics };
    const v = d === undefined ? manifest.varieties[0]! : manifest.varieties.find((x) => x.name === d);
    if (v === undefined) {
      return fail("cli/unknown-variety", `There is no variety '${d}' in ${MANIFEST_NAME}; its varieties are ${manifest.varieties.map((x) => x.name).join(", ")}.`, d, D_FLAGS);
    }
    return { path: v.grammar, variety: v.name, lang: v.lang };
  }
  if (isDir) {
    const named = d === undefined ? undefined : join(path, `${d}.strata`);
    if (named !== undefined && d !== "grammar" && existsSync(named)) return { path: named, variety: d! };
    const main = join(path, GRAMMAR_FILE);
    if ((d === undefined || d === DEFAULT_VARIETY) && existsSync(main)) return { path: main, variety: DEFAULT_VARIETY };
    const here = readdirSync(path).filter((f) => f.endsWith(".strata")).map((f) => (f === GRAMMAR_FILE ? `${DEFAULT_VARIETY} (${GRAMMAR_FILE})` : f.slice(0, -".strata".length))).sort();
    if (d === undefined) return fail("cli/no-grammar", `'${g ?? path}' holds neither ${GRAMMAR_FILE} nor ${MANIFEST_NAME}${here.length > 0 ? `; name a variety with -d (${here.join(", ")})` : ""}.`, g, G_FLAGS);
    return fail("cli/unknown-variety", `There is no variety '${d}' in '${g ?? path}'${here.length > 0 ? `; its grammars are ${here.join(", ")}` : ""}.`, d, D_FLAGS);
  }
  if (!path.endsWith(".strata")) return fail("cli/bad-grammar-path", `'${g}' is neither a grammar folder, a .strata file nor a lexicon folder.`, g, G_FLAGS);
  const own = basename(path, ".strata");
  if (d !== undefined && d !== own && !(d === DEFAULT_VARIETY && basename(path) === GRAMMAR_FILE)) {
    return fail("cli/variety-with-file", `-d names a variety of a folder, but -g names one grammar file ('${own}'); give -g the folder instead.`, d, D_FLAGS);
  }
  return { path, variety: basename(path) === GRAMMAR_FILE ? DEFAULT_VARIETY : own };
}
