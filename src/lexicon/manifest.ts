// The lexicon folder's manifest (varieties.json): which lexicon file to run and through which
// grammars, one output folder per variety. Problems come back as positioned diagnostics.

import { existsSync, readFileSync, statSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";

export const MANIFEST_NAME = "varieties.json";

export interface Variety {
  /** Folder name under build/<lexicon>/ and the name shown in summaries. */
  readonly name: string;
  /** BCP 47 tag written as PLS xml:lang. */
  readonly lang: string;
  /** Absolute path of the variety's grammar file. */
  readonly grammar: string;
}

export interface Manifest {
  /** Absolute path of the manifest file. */
  readonly file: string;
  /** The lexicon's name: the folder's name (build/<name>/...). */
  readonly name: string;
  /** Absolute path of the lexicon CSV. */
  readonly lexicon: string;
  readonly varieties: readonly Variety[];
}

/** Line and column (1-based) of the first occurrence of `needle` in `text`, for messages about JSON values. */
function locate(text: string, needle: string): { line: number; column: number } {
  const at = text.indexOf(needle);
  if (at < 0) return { line: 1, column: 1 };
  const before = text.slice(0, at).split("\n");
  return { line: before.length, column: [...before[before.length - 1]!].length + 1 };
}

const NAME = /^[A-Za-z0-9][A-Za-z0-9._-]*$/;

/** Reads `DIR/varieties.json` (or the manifest file itself). */
export function loadManifest(dirOrFile: string): { manifest?: Manifest; diagnostics: Diagnostic[] } {
  const path = existsSync(dirOrFile) && statSync(dirOrFile).isDirectory() ? join(dirOrFile, MANIFEST_NAME) : dirOrFile;
  const file = resolve(path);
  const at = (line = 1, column = 1, length = 1) => ({ file, line, column, length });
  if (!existsSync(file)) {
    return { diagnostics: [diagnostic("error", "manifest/missing", `no ${MANIFEST_NAME} here: a lexicon folder declares its lexicon and varieties in ${MANIFEST_NAME}`, at())] };
  }
  const text = readFileSync(file, "utf8");
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    const m = /position (\d+)/.exec(String(err));
    const pos = m ? locate(text, text.slice(Number(m[1]), Number(m[1]) + 1)) : { line: 1, column: 1 };
    return { diagnostics: [diagnostic("error", "manifest/json", `not valid JSON: ${(err as Error).message}`, at(pos.line, pos.column))] };
  }
  const ds: Diagnostic[] = [];
  const dir = dirname(file);
  const obj = (raw ?? {}) as Record<string, unknown>;
  if (typeof obj["lexicon"] !== "string" || obj["lexicon"] === "") {
    ds.push(diagnostic("error", "manifest/lexicon", `"lexicon" must name the lexicon CSV file (relative to this folder)`, at()));
  }
  const lexicon = typeof obj["lexicon"] === "string" ? resolve(dir, obj["lexicon"]) : "";
  if (lexicon !== "" && !existsSync(lexicon)) {
    const p = locate(text, JSON.stringify(obj["lexicon"]));
    ds.push(diagnostic("error", "manifest/lexicon-missing", `lexicon file ${lexicon} does not exist`, at(p.line, p.column, String(obj["lexicon"]).length + 2)));
  }
  const varieties: Variety[] = [];
  const list = obj["varieties"];
  if (!Array.isArray(list) || list.length === 0) {
    ds.push(diagnostic("error", "manifest/varieties", `"varieties" must be a non-empty list of { "name", "lang", "grammar" }`, at()));
  } else {
    const seen = new Set<string>();
    list.forEach((v: unknown, i: number) => {
      const o = (v ?? {}) as Record<string, unknown>;
      const name = o["name"];
      const lang = o["lang"];
      const grammar = o["grammar"];
      const where = typeof name === "string" ? locate(text, JSON.stringify(name)) : { line: 1, column: 1 };
      const pos = at(where.line, where.column);
      if (typeof name !== "string" || !NAME.test(name)) {
        ds.push(diagnostic("error", "manifest/variety-name", `variety ${i + 1}: "name" must be a simple folder name (letters, digits, . _ -)`, pos));
        return;
      }
      if (seen.has(name)) ds.push(diagnostic("error", "manifest/duplicate-variety", `variety '${name}' is declared twice`, pos));
      seen.add(name);
      if (typeof lang !== "string" || lang === "") ds.push(diagnostic("error", "manifest/lang", `variety '${name}': "lang" must be a BCP 47 tag such as "en-US"`, pos));
      if (typeof grammar !== "string" || grammar === "") {
        ds.push(diagnostic("error", "manifest/grammar", `variety '${name}': "grammar" must name a .strata file (relative to this folder)`, pos));
        return;
      }
      const g = resolve(dir, grammar);
      if (!existsSync(g)) {
        const gp = locate(text, JSON.stringify(grammar));
        ds.push(diagnostic("error", "manifest/grammar-missing", `variety '${name}': grammar ${g} does not exist`, at(gp.line, gp.column, grammar.length + 2)));
      }
      varieties.push({ name, lang: typeof lang === "string" ? lang : "", grammar: g });
    });
  }
  if (ds.some((d) => d.severity === "error")) return { diagnostics: ds };
  return { manifest: { file, name: basename(dir), lexicon, varieties }, diagnostics: ds };
}
