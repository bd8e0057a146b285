// Reading a grammar's source files into one assembled (unchecked) Grammar: a plain grammar with its
// includes, or a variety resolved against its base, however long the chain. Every file named must
// lie inside the project root (symbolic links resolved); cycles and missing files are positioned errors.

import * as fs from "node:fs";
import * as path from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { isInside, readTextFile, realPath } from "../files.js";
import type { Grammar, Span } from "./ast.js";
import { assembleGrammar, type TopItem } from "./assemble.js";
import { applyVariety, plainOrigins, type DeclarationEdit, type OmittedStep, type StepOrigin } from "./inherit.js";
import { parseFile } from "./parser.js";
import { isVarietyText, parseVarietyFile } from "./parse-variety.js";

/** The file whose presence marks a project root (DEVELOPERS.md, "Varieties"). */
export const ROOT_MARKER = ".strata-root";

let named: string | undefined;

/**
 * Names the project root for every grammar loaded from now on that does not name its own
 * (`--root DIR`; the command line sets it before a command runs and clears it after). undefined: the default.
 */
export function setProjectRoot(dir: string | undefined): void {
  named = dir === undefined ? undefined : realPath(path.resolve(dir));
}

/** The root named by `setProjectRoot`, if any (passed on to worker threads). */
export const namedProjectRoot = (): string | undefined => named;

/** The project root a grammar is confined to: the one given, else the one named, else `defaultRoot`. */
export function projectRoot(mainFile: string, given?: string): string {
  if (given !== undefined) return realPath(path.resolve(given));
  return named ?? defaultRoot(mainFile);
}

/**
 * The project root of a grammar when none is named: the nearest folder at or above the grammar's
 * own folder that holds a `.strata-root` file; without one, the grammar's own folder.
 */
export function defaultRoot(mainFile: string): string {
  const own = realPath(path.dirname(mainFile));
  for (let dir = own; ; ) {
    if (fs.existsSync(path.join(dir, ROOT_MARKER))) return dir;
    const up = path.dirname(dir);
    if (up === dir) return own;
    dir = up;
  }
}

export interface Source {
  readonly grammar: Grammar;
  /** Where each step came from (parallel to `grammar.steps`). */
  readonly origins: readonly StepOrigin[];
  /** Base steps the varieties of the chain left out (the base's own variety first). */
  readonly omitted: readonly OmittedStep[];
  /** Declarations the chain's varieties replaced, added, extended or reduced (the base's own variety first). */
  readonly declarations: readonly DeclarationEdit[];
  /** Where `inventory` and `diacritics` are declared (for errors about those files). */
  readonly declared: { readonly inventory?: Span; readonly diacritics?: Span };
  /** The chain of variety files from the main file down to the plain grammar at its bottom. */
  readonly chain: readonly string[];
  /** A base of the chain could not be read (the error is reported; a missing inventory then says nothing new). */
  readonly failed?: boolean;
}

interface Context {
  readonly root: string;
  readonly limit: number;
  readonly diagnostics: Diagnostic[];
}

function isFolder(p: string): boolean {
  try {
    return fs.statSync(p).isDirectory();
  } catch {
    return false;
  }
}

const shown = (root: string, f: string): string => path.relative(root, f) || path.basename(f);

/** Reads `file` (its text already read) and everything it names; `stack` is the variety chain above it, real paths. */
export function readSource(file: string, text: string, root: string, limit: number, diagnostics: Diagnostic[]): Source {
  return read({ root, limit, diagnostics }, file, text, [realPath(file)]);
}

function read(ctx: Context, file: string, text: string, stack: readonly string[]): Source {
  if (!isVarietyText(text)) return readPlain(ctx, file, text);
  const v = parseVarietyFile(text, file);
  ctx.diagnostics.push(...v.diagnostics);
  const failed = (): Source => {
    const empty = assembleGrammar(file, [], [file]).grammar;
    return { grammar: empty, origins: [], omitted: [], declarations: [], declared: {}, chain: [file], failed: true };
  };
  if (v.base === null) return failed(); // a malformed `base`, reported by the parser
  const { written, span } = v.base;
  // A grammar folder names its grammar.strata, as `-g FOLDER` does.
  const basePath = isFolder(v.base.path) ? path.join(v.base.path, "grammar.strata") : v.base.path;
  if (!isInside(ctx.root, basePath)) {
    ctx.diagnostics.push(diagnostic("error", "grammar/base-outside", `The base '${written}' is outside the project root (${ctx.root}); a grammar may name files inside it only (--root names another).`, span));
    return failed();
  }
  const cycleAt = stack.indexOf(realPath(basePath));
  if (cycleAt >= 0) {
    const chain = [...stack.slice(cycleAt), realPath(basePath)].map((f) => shown(ctx.root, f));
    ctx.diagnostics.push(diagnostic("error", "grammar/base-cycle", `The varieties name each other as base in a cycle: ${chain.join(" → ")}.`, span));
    return failed();
  }
  const baseRead = readTextFile(basePath, { what: "base grammar", limit: ctx.limit, code: "grammar/base-missing", at: span });
  if (!baseRead.ok) {
    ctx.diagnostics.push(baseRead.diagnostic);
    return failed();
  }
  const base = read(ctx, basePath, baseRead.text, [...stack, realPath(basePath)]);
  const files = [file, ...base.grammar.files]; // the main file first, as for includes
  const r = applyVariety(base.grammar, base.origins, v, files);
  ctx.diagnostics.push(...r.diagnostics);
  const declared = { ...base.declared };
  for (const e of v.edits)
    if (e.kind === "declare" && (e.item.kind === "inventory" || e.item.kind === "diacritics")) declared[e.item.kind] = e.item.span;
  return { grammar: r.grammar, origins: r.origins, omitted: [...base.omitted, ...r.omitted], declarations: [...base.declarations, ...r.declarations], declared, chain: [file, ...base.chain], ...(base.failed === true ? { failed: true } : {}) };
}

/** A plain grammar: its includes expanded in place (each file read once), then assembled. */
function readPlain(ctx: Context, main: string, mainText: string): Source {
  const { root, diagnostics } = ctx;
  const files: string[] = [];
  const items: TopItem[] = [];
  const done = new Set<string>();
  const expand = (file: string, text: string, stack: readonly string[]): void => {
    files.push(file);
    done.add(realPath(file));
    const parsed = parseFile(text, file);
    diagnostics.push(...parsed.diagnostics);
    for (const it of parsed.items) {
      if (it.kind !== "include") {
        items.push(it);
        continue;
      }
      const target = it.path;
      if (!isInside(root, target)) {
        diagnostics.push(diagnostic("error", "grammar/include-outside", `'${it.written}' is outside the project root (${root}); includes must stay inside it`, it.span));
        continue;
      }
      const cycleAt = stack.indexOf(realPath(target));
      if (cycleAt >= 0) {
        const chain = [...stack.slice(cycleAt), realPath(target)].map((f) => shown(root, f));
        diagnostics.push(diagnostic("error", "grammar/include-cycle", `include cycle: ${chain.join(" → ")}`, it.span));
        continue;
      }
      if (done.has(realPath(target))) continue; // included already (each file is read once)
      const sub = readTextFile(target, { what: "included file", limit: ctx.limit, code: "grammar/include-missing", at: it.span });
      if (!sub.ok) {
        diagnostics.push(sub.diagnostic);
        continue;
      }
      expand(target, sub.text, [...stack, realPath(target)]);
    }
  };
  expand(main, mainText, [realPath(main)]);
  const assembled = assembleGrammar(main, items, files);
  diagnostics.push(...assembled.diagnostics);
  const declared: { inventory?: Span; diacritics?: Span } = {};
  for (const i of items) if ((i.kind === "inventory" || i.kind === "diacritics") && declared[i.kind] === undefined) declared[i.kind] = i.span;
  return { grammar: assembled.grammar, origins: plainOrigins(assembled.grammar), omitted: [], declarations: [], declared, chain: [main] };
}
