// Reading a grammar's source files into one assembled (unchecked) Grammar: a plain grammar with its
// includes, or a variety resolved against its base, however long the chain. Every file named must
// lie inside the project root (symbolic links resolved); cycles and missing files are positioned errors.

import * as fs from "node:fs";
import * as path from "node:path";
import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { isInside, readTextFile, realPath } from "../files.js";
import type { Grammar, Span } from "./ast.js";
import { assembleGrammar, type TopItem } from "./assemble.js";
import { applyVariety, plainOrigins, type StepOrigin } from "./inherit.js";
import { parseFile } from "./parser.js";
import { isVarietyText, parseVarietyFile } from "./parse-variety.js";

/** The file whose presence marks a project root (DEVELOPERS.md, "Varieties"). */
export const ROOT_MARKER = ".strata-root";

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

const shown = (root: string, f: string): string => path.relative(root, f) || path.basename(f);

/** Reads `file` (its text already read) and everything it names; `stack` is the variety chain above it, real paths. */
export function readSource(file: string, text: string, root: string, limit: number, diagnostics: Diagnostic[]): Source {
  return read({ root, limit, diagnostics }, file, text, [realPath(file)]);
}

function read(ctx: Context, file: string, text: string, stack: readonly string[]): Source {
  if (!isVarietyText(text)) return readPlain(ctx, file, text);
  const v = parseVarietyFile(text, file);
  ctx.diagnostics.push(...v.diagnostics);
  const b = v.base; // null: a malformed `base`, reported by the parser
  const failed = (): Source => {
    const empty = assembleGrammar(file, [], [file]).grammar;
    return { grammar: empty, origins: [], declared: {}, chain: [file], failed: true };
  };
  if (b === null) return failed();
  if (!isInside(ctx.root, b.path)) {
    ctx.diagnostics.push(diagnostic("error", "grammar/base-outside", `The base '${b.written}' is outside the project root (${ctx.root}); a grammar may name files inside it only (--root names another).`, b.span));
    return failed();
  }
  const cycleAt = stack.indexOf(realPath(b.path));
  if (cycleAt >= 0) {
    const chain = [...stack.slice(cycleAt), realPath(b.path)].map((f) => shown(ctx.root, f));
    ctx.diagnostics.push(diagnostic("error", "grammar/base-cycle", `The varieties name each other as base in a cycle: ${chain.join(" → ")}.`, b.span));
    return failed();
  }
  const baseRead = readTextFile(b.path, { what: "base grammar", limit: ctx.limit, code: "grammar/base-missing", at: b.span });
  if (!baseRead.ok) {
    ctx.diagnostics.push(baseRead.diagnostic);
    return failed();
  }
  const base = read(ctx, b.path, baseRead.text, [...stack, realPath(b.path)]);
  const files = [...base.grammar.files, file];
  const r = applyVariety(base.grammar, base.origins, v, files);
  ctx.diagnostics.push(...r.diagnostics);
  const declared = { ...base.declared };
  for (const e of v.edits)
    if (e.kind === "declare" && (e.item.kind === "inventory" || e.item.kind === "diacritics")) declared[e.item.kind] = e.item.span;
  return { grammar: r.grammar, origins: r.origins, declared, chain: [file, ...base.chain], ...(base.failed === true ? { failed: true } : {}) };
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
  return { grammar: assembled.grammar, origins: plainOrigins(assembled.grammar), declared, chain: [main] };
}
