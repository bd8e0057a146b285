// The lexicon folder's manifest (varieties.json): which lexicon file to run and through which
// grammars, one output folder per variety. Problems come back as positioned diagnostics: syntax
// errors at the line and column of the error, value errors at the value.

import { existsSync, readFileSync, statSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { findNodeAtLocation, getNodeValue, parseTree, type Node, type ParseError } from "jsonc-parser";
import { diagnostic, type Diagnostic, type SourcePos } from "../diagnostics.js";
import { positionAt } from "../lines.js";

export const MANIFEST_NAME = "varieties.json";

export interface Variety {
  /** Folder name under build/<lexicon>/ and the name shown in summaries. */
  readonly name: string;
  /** BCP 47 tag written as PLS xml:lang. */
  readonly lang: string;
  /** Absolute path of the variety's grammar file. */
  readonly grammar: string;
  /** Absolute path of the variety's override CSV (rows that replace the lexicon's rows of their words in this variety only), when it has one. */
  readonly overrides?: string;
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

/** What each syntax error of the JSON parser means (jsonc-parser's ParseErrorCode numbers). */
const SYNTAX: Readonly<Record<number, string>> = {
  1: "Unexpected character(s) here",
  2: "This is not a valid JSON number",
  3: "A property name in double quotes is expected here",
  4: "A value is expected here",
  5: "A colon ':' is expected here",
  6: "A comma ',' is expected here",
  7: "A closing brace '}' is expected here",
  8: "A closing bracket ']' is expected here",
  9: "Nothing may follow the end of the JSON value",
  10: "Comments are not allowed in JSON",
  11: "Comments are not allowed in JSON",
  12: "The string is not closed",
  13: "The number is not complete",
  14: "This is not a valid \\u escape",
  15: "This is not a valid escape in a JSON string",
  16: "This character is not allowed in a JSON string (write it as an escape)",
};

/** Syntax errors shown per manifest (the rest are counted). */
const MAX_SYNTAX_ERRORS = 20;

const NAME = /^[A-Za-z0-9][A-Za-z0-9._-]*$/;

/** Whether a string is a well-formed BCP 47 language tag (the built-in Intl check). */
function isLanguageTag(tag: string): boolean {
  try {
    return Intl.getCanonicalLocales(tag).length === 1;
  } catch {
    return false;
  }
}

/**
 * A variety's optional `"overrides"`: a CSV file (relative to the manifest's folder) with the lexicon's
 * columns, other than the lexicon file itself. Problems are pushed onto `ds` at `pos`.
 */
function overridesOf(o: Record<string, unknown>, dir: string, lexicon: string, name: string, pos: SourcePos, ds: Diagnostic[]): string | undefined {
  if (!("overrides" in o)) return undefined;
  const v = o["overrides"];
  if (typeof v !== "string" || v === "") {
    ds.push(diagnostic("error", "manifest/overrides", `Variety '${name}': "overrides" must name a CSV file of override rows (relative to this folder).`, pos));
    return undefined;
  }
  const path = resolve(dir, v);
  if (!existsSync(path) || !statSync(path).isFile()) {
    ds.push(diagnostic("error", "manifest/overrides-missing", `Variety '${name}': the override file ${path} does not exist or is not a file.`, pos));
    return undefined;
  }
  if (path === lexicon) {
    ds.push(diagnostic("error", "manifest/overrides", `Variety '${name}': the override file is the lexicon itself; overrides go in a file of their own.`, pos));
    return undefined;
  }
  return path;
}

/** Reads `DIR/varieties.json` (or the manifest file itself). A BOM at its start is allowed. */
export function loadManifest(dirOrFile: string): { manifest?: Manifest; diagnostics: Diagnostic[] } {
  const path = existsSync(dirOrFile) && statSync(dirOrFile).isDirectory() ? join(dirOrFile, MANIFEST_NAME) : dirOrFile;
  const file = resolve(path);
  const at1 = { file, line: 1, column: 1 };
  if (!existsSync(file)) {
    return { diagnostics: [diagnostic("error", "manifest/missing", `There is no ${MANIFEST_NAME} here: a lexicon folder declares its lexicon and varieties in ${MANIFEST_NAME}.`, at1)] };
  }
  let text: string;
  try {
    if (!statSync(file).isFile()) throw Object.assign(new Error("not a file"), { code: "EISDIR" });
    text = readFileSync(file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === "EISDIR" ? "it is not a regular file" : code === "EACCES" ? "permission denied" : (e as Error).message;
    return { diagnostics: [diagnostic("error", "manifest/unreadable", `Cannot read the manifest: ${why}.`, at1)] };
  }
  // Offsets below are into `json` (the text without its BOM); positions are computed on `text`.
  const bom = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const json = text.slice(bom);
  const where = (offset: number, length = 1) => ({ file, ...positionAt(text, offset + bom), length: Math.max(1, length) });

  const found: ParseError[] = [];
  const tree = parseTree(json, found, { disallowComments: true, allowTrailingComma: false, allowEmptyContent: false });
  // The parser may report a consequence of one error at the same place: one error per place.
  const errors = found.filter((e, i) => i === 0 || e.offset !== found[i - 1]!.offset);
  if (errors.length > 0 || tree === undefined) {
    const ds = errors.slice(0, MAX_SYNTAX_ERRORS).map((e) => diagnostic("error", "manifest/json", `Not valid JSON: ${SYNTAX[e.error] ?? "a syntax error"}.`, where(e.offset, e.length)));
    if (errors.length > MAX_SYNTAX_ERRORS) ds.push(diagnostic("error", "manifest/json", `… and ${errors.length - MAX_SYNTAX_ERRORS} more JSON syntax errors.`, where(errors[MAX_SYNTAX_ERRORS]!.offset)));
    if (ds.length === 0) ds.push(diagnostic("error", "manifest/json", "Not valid JSON: the file is empty.", where(0)));
    return { diagnostics: ds };
  }
  // What this parser accepts and JSON.parse does not would be a difference between two JSON readers: refuse it too.
  try {
    JSON.parse(json);
  } catch (err) {
    const m = /position (\d+)/.exec(String(err));
    return { diagnostics: [diagnostic("error", "manifest/json", `Not valid JSON: ${(err as Error).message}.`, where(m ? Number(m[1]) : 0))] };
  }

  const ds: Diagnostic[] = [];
  const dir = dirname(file);
  const node = (...p: (string | number)[]): Node | undefined => findNodeAtLocation(tree, p);
  const at = (n: Node | undefined) => (n === undefined ? where(tree.offset) : where(n.offset, n.length));
  if (tree.type !== "object") {
    return { diagnostics: [diagnostic("error", "manifest/shape", `The manifest must be a JSON object with "lexicon" and "varieties".`, at(tree))] };
  }
  const obj = getNodeValue(tree) as Record<string, unknown>;
  const lexiconNode = node("lexicon");
  if (typeof obj["lexicon"] !== "string" || obj["lexicon"] === "") {
    ds.push(diagnostic("error", "manifest/lexicon", `"lexicon" must name the lexicon CSV file (relative to this folder).`, at(lexiconNode)));
  }
  const lexicon = typeof obj["lexicon"] === "string" ? resolve(dir, obj["lexicon"]) : "";
  if (lexicon !== "" && !existsSync(lexicon)) {
    ds.push(diagnostic("error", "manifest/lexicon-missing", `The lexicon file ${lexicon} does not exist.`, at(lexiconNode)));
  }
  const varieties: Variety[] = [];
  const list = obj["varieties"];
  if (!Array.isArray(list) || list.length === 0) {
    ds.push(diagnostic("error", "manifest/varieties", `"varieties" must be a non-empty list of { "name", "lang", "grammar" }.`, at(node("varieties"))));
  } else {
    const seen = new Map<string, number>();
    list.forEach((v: unknown, i: number) => {
      const o = (v !== null && typeof v === "object" ? v : {}) as Record<string, unknown>;
      const name = o["name"];
      const lang = o["lang"];
      const grammar = o["grammar"];
      const pos = at(node("varieties", i, "name") ?? node("varieties", i));
      if (typeof name !== "string" || !NAME.test(name)) {
        ds.push(diagnostic("error", "manifest/variety-name", `Variety ${i + 1}: "name" must be a simple folder name (letters, digits, . _ -).`, pos));
        return;
      }
      const before = seen.get(name);
      if (before !== undefined) ds.push(diagnostic("error", "manifest/duplicate-variety", `The variety '${name}' is declared twice (first as variety ${before}).`, pos));
      seen.set(name, i + 1);
      if (typeof lang !== "string" || lang === "" || !isLanguageTag(lang)) {
        ds.push(diagnostic("error", "manifest/lang", `Variety '${name}': "lang" must be a BCP 47 tag such as "en-US".`, at(node("varieties", i, "lang") ?? node("varieties", i))));
      }
      if (typeof grammar !== "string" || grammar === "") {
        ds.push(diagnostic("error", "manifest/grammar", `Variety '${name}': "grammar" must name a .strata file (relative to this folder).`, at(node("varieties", i, "grammar") ?? node("varieties", i))));
        return;
      }
      const g = resolve(dir, grammar);
      if (!existsSync(g)) {
        ds.push(diagnostic("error", "manifest/grammar-missing", `Variety '${name}': the grammar ${g} does not exist.`, at(node("varieties", i, "grammar"))));
      }
      const overrides = overridesOf(o, dir, lexicon, name, at(node("varieties", i, "overrides") ?? node("varieties", i)), ds);
      varieties.push({ name, lang: typeof lang === "string" ? lang : "", grammar: g, ...(overrides !== undefined ? { overrides } : {}) });
    });
  }
  if (ds.some((d) => d.severity === "error")) return { diagnostics: ds };
  return { manifest: { file, name: basename(dir), lexicon, varieties }, diagnostics: ds };
}
