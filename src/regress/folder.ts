// Reading a build folder for a comparison: build.json checked against the format this version
// writes, and each variety's lexicon.jsonl streamed record by record (never held whole), with a
// positioned message naming the file for anything missing, truncated or from an older format.

import { Utf8Decoder } from "../files.js";
import { createReadStream, existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import type { JsonlEntry } from "../emit/jsonl.js";
import { BUILD_FORMAT, BUILD_RECORD, type BuildRecord, type VarietyRecord } from "./record.js";

/**
 * One entry of a build's lexicon.jsonl, as a comparison reads it: the record the writer writes
 * (emit/jsonl.ts), with the fields a build always writes required.
 */
export type BuildEntry = Required<Pick<JsonlEntry, "key" | "word" | "narrow" | "broad" | "variants" | "rules" | "derivation" | "variantSteps">> &
  Pick<JsonlEntry, "id" | "input">;

/** A problem with a build folder: carries the diagnostic; caught by the library's entry points. */
export class BuildFolderError extends Error {
  constructor(readonly diagnostic: Diagnostic) {
    super(diagnostic.message);
  }
}

const fail = (code: string, message: string, file: string, line = 1, column = 1): never => {
  throw new BuildFolderError(diagnostic("error", `regress/${code}`, message, { file, line, column }));
};

export interface BuildFolder {
  /** The folder as given. */
  readonly dir: string;
  readonly record: BuildRecord;
}

/**
 * Opens a build folder: `dir` itself holding build.json (build/<lexicon>/), or a folder holding
 * exactly one such lexicon folder (build/).
 */
export function openBuild(dir: string): BuildFolder {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) fail("no-folder", `No build folder here (the path does not exist or is not a folder).`, dir);
  const file = join(dir, BUILD_RECORD);
  if (!existsSync(file)) {
    // build/ itself: take its one lexicon folder.
    const inner = readdirSync(dir).filter((n) => existsSync(join(dir, n, BUILD_RECORD)));
    if (inner.length === 1) return openBuild(join(dir, inner[0]!));
    if (inner.length > 1) fail("several-builds", `This folder holds builds of several lexicons (${inner.join(", ")}); name one of them.`, dir);
    fail("no-record", `Not a build folder: there is no ${BUILD_RECORD} (a build from an older Strata has none; rebuild it with strata build).`, file);
  }
  let text: string;
  try {
    text = readFileSync(file, "utf8");
  } catch (e) {
    return fail("unreadable", `Cannot read this file: ${(e as Error).message}.`, file);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    return fail("bad-record", `Not valid JSON (${(e as Error).message}); the file may be truncated.`, file);
  }
  const r = raw as Partial<BuildRecord>;
  if (typeof r.format !== "number" || r.format < BUILD_FORMAT) {
    fail("old-format", `This build is in an older output format (format ${String(r.format ?? 1)}, this Strata reads format ${BUILD_FORMAT}); rebuild it with strata build.`, file);
  }
  if (r.format! > BUILD_FORMAT) fail("new-format", `This build is in a newer output format (format ${r.format}) than this Strata reads (format ${BUILD_FORMAT}).`, file);
  if (typeof r.lexicon?.name !== "string" || !Array.isArray(r.varieties) || r.varieties.some((v) => typeof v?.name !== "string" || !Array.isArray(v.steps))) {
    fail("bad-record", `The build record lacks "lexicon" or "varieties" (with names and steps).`, file);
  }
  return { dir, record: r as BuildRecord };
}

/** The variety's record, or undefined. */
export const varietyOf = (b: BuildFolder, name: string): VarietyRecord | undefined => b.record.varieties.find((v) => v.name === name);

/** Path of a variety's JSON Lines output. */
export const entriesFile = (b: BuildFolder, variety: string): string => join(b.dir, variety, "lexicon.jsonl");

/** Lines of a file as they stream (LF-terminated; CR before LF dropped), with 1-based numbers; throws when the last line lacks its newline. */
async function* lines(file: string): AsyncGenerator<{ text: string; line: number }> {
  const decoder = new Utf8Decoder();
  let rest = "";
  let line = 0;
  for await (const chunk of createReadStream(file, { highWaterMark: 1 << 20 })) {
    const text = rest + decoder.write(chunk as Buffer);
    let from = 0;
    for (let nl = text.indexOf("\n", from); nl >= 0; nl = text.indexOf("\n", from)) {
      line++;
      yield { text: text.charCodeAt(nl - 1) === 13 ? text.slice(from, nl - 1) : text.slice(from, nl), line };
      from = nl + 1;
    }
    rest = text.slice(from);
  }
  rest += decoder.end();
  if (rest !== "") fail("truncated", `The last line has no newline: the file is truncated (an interrupted build?); rebuild it.`, file, line + 1, [...rest].length + 1);
}

/**
 * Streams a variety's entries in file order. Every record must parse and carry a key, the
 * narrow form, its variants and its derivation; a record without them is an older format.
 */
export async function* readEntries(b: BuildFolder, variety: string): AsyncGenerator<BuildEntry> {
  const file = entriesFile(b, variety);
  if (!existsSync(file)) fail("missing-file", `The build has no entries for variety '${variety}' (this file is missing).`, file);
  for await (const { text, line } of lines(file)) {
    let e: Partial<BuildEntry>;
    try {
      e = JSON.parse(text) as Partial<BuildEntry>;
    } catch (err) {
      return fail("bad-line", `Not a JSON record (${(err as Error).message}); the file may be damaged.`, file, line);
    }
    if (typeof e.key !== "string" || !Array.isArray(e.derivation) || !Array.isArray(e.variantSteps)) {
      fail("old-format", `This record has no entry key or derivation: the build is in an older output format; rebuild it with strata build.`, file, line);
    }
    if (typeof e.word !== "string" || typeof e.narrow !== "string" || !Array.isArray(e.variants)) {
      fail("bad-line", `This record lacks "word", "narrow" or "variants".`, file, line);
    }
    yield e as BuildEntry;
  }
}

/** The entry count a variety's summary.json states, when it states one (a cross-check for truncation). */
export function summaryCount(b: BuildFolder, variety: string): number | undefined {
  const file = join(b.dir, variety, "summary.json");
  try {
    const s = JSON.parse(readFileSync(file, "utf8")) as { entriesWritten?: unknown };
    return typeof s.entriesWritten === "number" ? s.entriesWritten : undefined;
  } catch {
    return undefined;
  }
}
