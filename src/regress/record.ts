// build.json: what produced a build (hashes of the lexicon, of every grammar file read and of the
// inventory, the compiler's version, the varieties and their steps), written beside the variety
// folders so a comparison can tell what differs between two builds without any source folder.

import { createHash } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import { dirname, join, relative, sep } from "node:path";
import { fileURLToPath } from "node:url";
import { COMPILER_VERSION } from "../compile/index.js";
import type { Grammar } from "../grammar/ast.js";
import type { Manifest, Variety } from "../lexicon/manifest.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { stepHashes } from "./step-hash.js";

/** The build folder format this code writes and reads (older builds lack keys and derivations). */
export const BUILD_FORMAT = 2;
export const BUILD_RECORD = "build.json";

export interface FileHash {
  /** Relative to the lexicon folder, forward slashes. */
  readonly path: string;
  readonly sha256: string;
}

export interface VarietyRecord {
  readonly name: string;
  readonly lang: string;
  /** Every grammar file read (the main file first, then includes in the order they were read). */
  readonly grammar: { readonly files: readonly FileHash[] };
  /** `sha256` over the contents of the inventory CSV and the diacritics CSV (not their paths); `files` lists both. */
  readonly inventory: { readonly sha256: string; readonly files: readonly FileHash[] };
  /** The grammar's steps in order (rules, syllabify, stress): what blame calls new or removed. */
  readonly steps: readonly string[];
  /** Parallel to `steps`: each step's fingerprint (step-hash.ts); absent in builds made before it was recorded. */
  readonly stepHashes?: readonly string[];
  /** The variety's override file (relative to the lexicon folder) and its SHA-256, when it has one. */
  readonly overrides?: FileHash;
}

export interface BuildRecord {
  readonly format: number;
  readonly strata: string;
  readonly compiler: string;
  readonly lexicon: { readonly name: string; readonly file: string; readonly sha256: string };
  readonly varieties: readonly VarietyRecord[];
}

export const sha256File = (path: string): string => createHash("sha256").update(readFileSync(path)).digest("hex");

/** `path` relative to `root`, with forward slashes on every platform. */
export const relativePosix = (root: string, path: string): string => relative(root, path).split(sep).join("/");

/** The package's version, read from the package.json above this file (src/ or dist/src/). */
export function strataVersion(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let i = 0; i < 5; i++) {
    const p = join(dir, "package.json");
    if (existsSync(p)) return String((JSON.parse(readFileSync(p, "utf8")) as { version?: unknown }).version ?? "unknown");
    dir = dirname(dir);
  }
  return "unknown";
}

/** The record of one variety, from its loaded grammar (paths relative to the lexicon folder `root`). */
export function varietyRecord(root: string, variety: Variety, grammar: Grammar): VarietyRecord {
  const files = grammar.files.map((f) => ({ path: relativePosix(root, f), sha256: sha256File(f) }));
  const inv: FileHash[] = [];
  if (grammar.inventory !== null) {
    inv.push({ path: relativePosix(root, grammar.inventory), sha256: sha256File(grammar.inventory) });
    const dia = grammar.diacritics ?? join(dirname(grammar.inventory), "diacritics.csv");
    if (existsSync(dia)) inv.push({ path: relativePosix(root, dia), sha256: sha256File(dia) });
  }
  const all = createHash("sha256");
  for (const f of inv) all.update(`${f.sha256}\n`);
  return {
    name: variety.name,
    lang: variety.lang,
    grammar: { files },
    inventory: { sha256: all.digest("hex"), files: inv },
    steps: grammar.steps.map((s) => s.name),
    stepHashes: stepHashes(grammar),
    ...(variety.overrides !== undefined ? { overrides: { path: relativePosix(root, variety.overrides), sha256: sha256File(variety.overrides) } } : {}),
  };
}

/** The whole record (varieties in manifest order). */
export function buildRecord(manifest: Manifest, varieties: readonly VarietyRecord[]): BuildRecord {
  const root = dirname(manifest.file);
  return {
    format: BUILD_FORMAT,
    strata: strataVersion(),
    compiler: COMPILER_VERSION,
    lexicon: { name: manifest.name, file: relativePosix(root, manifest.lexicon), sha256: sha256File(manifest.lexicon) },
    varieties,
  };
}

/** Writes `<buildDir>/build.json` whole. */
export async function writeBuildRecord(buildDir: string, record: BuildRecord): Promise<string> {
  const path = join(buildDir, BUILD_RECORD);
  await writeFileAtomic(path, JSON.stringify(record, null, 2) + "\n");
  return path;
}
