// A new lexicon folder in one step (`strata init`): varieties.json naming one variety, an empty
// lexicon.csv with its header, and a grammar that is a variety of a copy of a shipped one (its base,
// edited by rule name). The copy lives inside the new folder, the project root of a folder without a
// .strata-root, so the base and its inventory are inside it.

import { copyFileSync, existsSync, mkdirSync, readdirSync, renameSync, rmdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { MANIFEST_NAME } from "./manifest.js";

export interface ScaffoldOptions {
  /** The shipped grammar folder to copy (e.g. lexicons/en-us). */
  readonly from: string;
  /** Which of its grammars the new grammar includes (a file name in `from`, e.g. grammar.strata). */
  readonly base: string;
  /** The variety's name in varieties.json (and its output folder). */
  readonly variety: string;
  /** The variety's BCP 47 tag (PLS xml:lang). */
  readonly lang: string;
}

/** The files `scaffoldLexicon` writes, relative to the new folder. */
export const SCAFFOLD_FILES = [MANIFEST_NAME, "lexicon.csv", "grammar.strata"] as const;

/** The lexicon header and a comment showing one row. */
export const EMPTY_LEXICON = "word,pron\n# One row per pronunciation, IPA with stress marks, e.g.:\n# kettle,ˈkɛtəl\n";

/**
 * Creates `dir` (which must not exist, or be an empty folder) holding the new lexicon folder; the
 * files are written into a temporary sibling folder first and renamed into place, so a failure
 * leaves nothing behind. Returns the paths written, or diagnostics.
 */
export function scaffoldLexicon(dir: string, o: ScaffoldOptions): { files: string[]; diagnostics: Diagnostic[] } {
  const at = { file: dir, line: 1, column: 1 };
  const target = resolve(dir);
  if (existsSync(target) && (!statSync(target).isDirectory() || readdirSync(target).length > 0)) {
    return { files: [], diagnostics: [diagnostic("error", "init/not-empty", `'${dir}' already exists and is not an empty folder; choose a new folder.`, at)] };
  }
  const shipped = basename(resolve(o.from));
  const temp = join(dirname(target), `.${basename(target)}.${process.pid}.init.tmp`);
  try {
    mkdirSync(join(temp, shipped), { recursive: true });
    for (const f of readdirSync(o.from)) {
      const src = join(o.from, f);
      if (statSync(src).isFile()) copyFileSync(src, join(temp, shipped, f));
    }
    const grammar =
      `-- The grammar of the variety '${o.variety}': the shipped ${shipped}/${o.base} (a copy in ${shipped}/)\n` +
      `-- as its base, and this voice's edits of it by rule name: omit, replace, adjust, add … before/after.\n` +
      `-- The language is described in the Strata developer guide (DEVELOPERS.md, "The grammar language"\n` +
      `-- and "Varieties"); 'strata compile -g . --explain-variety' lists the steps and where each comes from.\n\n` +
      `base "${shipped}/${o.base}"\n\n` +
      `-- adjust syllabic-l obligatory\n` +
      `-- add rule my-rule after aspiration:\n--   [+syllabic] -> [+long] / _ [+voice -sonorant]\n`;
    const manifest = { lexicon: "lexicon.csv", varieties: [{ name: o.variety, lang: o.lang, grammar: "grammar.strata" }] };
    writeFileSync(join(temp, MANIFEST_NAME), JSON.stringify(manifest, null, 2) + "\n");
    writeFileSync(join(temp, "lexicon.csv"), EMPTY_LEXICON);
    writeFileSync(join(temp, "grammar.strata"), grammar);
    if (existsSync(target)) rmdirSync(target);
    renameSync(temp, target);
  } catch (err) {
    rmSync(temp, { recursive: true, force: true });
    throw err;
  }
  return { files: [...SCAFFOLD_FILES.map((f) => join(target, f)), join(target, shipped)], diagnostics: [] };
}
