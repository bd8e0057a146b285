// Loading a segment inventory (segments.csv) and its declared diacritics (diacritics.csv) into an
// Inventory, collecting every problem as a positioned Diagnostic (several at once, never a throw).

import { existsSync } from "node:fs";
import { dirname, join } from "node:path";
import { diagnostic, hasErrors, type Diagnostic, type SourcePos } from "../diagnostics.js";
import { capPerFile, MAX_DIAGNOSTICS_PER_FILE } from "../diagnostic-cap.js";
import { FILE_LIMITS, readTextFile } from "../files.js";
import { PROSODIC_FEATURES, type Diacritic, type FeatureValue, type Inventory, type Segment } from "./types.js";
import { readCsv } from "./csv.js";
import { canonicalSymbol, codePointName, cpLength, decodeMark, editDistance, isCombining, matchKey, RESERVED } from "./ipa.js";

const FEATURE_NAME = /^[a-z][a-z0-9_]*$/;
const VALUES: ReadonlySet<string> = new Set(["+", "-", "0"]);

export interface LoadResult {
  readonly inventory?: Inventory;
  readonly diagnostics: Diagnostic[];
}

/** What is wrong with a symbol or mark as a piece of IPA text, or undefined when it is usable. */
function symbolProblem(sym: string): string | undefined {
  if (sym === "") return "is empty";
  const cps = Array.from(sym);
  if (cps.some((c) => /\s/u.test(c))) return "contains a space";
  const reserved = cps.find((c) => RESERVED.has(c));
  if (reserved !== undefined) return `contains '${reserved}', which marks stress, a syllable break or a word break`;
  return undefined;
}

interface HeaderInfo {
  readonly features: string[];
  readonly columns: number[];
  readonly line: number;
}

function readHeader(cells: readonly string[], columns: readonly number[], line: number, file: string, out: Diagnostic[]): HeaderInfo {
  const features: string[] = [];
  const cols: number[] = [];
  const seen = new Map<string, number>();
  for (let k = 1; k < cells.length; k++) {
    const name = cells[k]!;
    const pos = { file, line, column: columns[k]!, length: Math.max(1, cpLength(name)) };
    if (!FEATURE_NAME.test(name)) {
      out.push(diagnostic("error", "inventory/bad-feature-name", `Feature name '${name}' must be lower-case ASCII letters, digits and '_', starting with a letter.`, pos));
    } else if ((PROSODIC_FEATURES as readonly string[]).includes(name)) {
      out.push(diagnostic("error", "inventory/reserved-feature", `Feature '${name}' is prosodic: Strata adds it itself and it cannot be an inventory column.`, pos));
    } else if (seen.has(name)) {
      out.push(diagnostic("error", "inventory/duplicate-feature", `Feature '${name}' already names column ${seen.get(name)! + 1}.`, pos));
    } else {
      seen.set(name, k);
    }
    features.push(name);
    cols.push(columns[k]!);
  }
  if (features.length === 0) {
    out.push(diagnostic("error", "inventory/no-features", "The header names no features: it needs the symbol column, then one column per feature.", { file, line, column: 1 }));
  }
  return { features, columns: cols, line };
}

interface RawSegment {
  readonly symbol: string;
  readonly key: string;
  readonly values: FeatureValue[];
  readonly line: number;
  readonly column: number;
}

interface ParsedDiacritic {
  readonly mark: string;
  readonly name: string;
  readonly sets: [string, FeatureValue][];
  readonly aliases: string[];
  readonly line: number;
  readonly column: number;
}

function parseDiacritics(text: string, file: string, knownFeatures: readonly string[], out: Diagnostic[]): ParsedDiacritic[] {
  const { rows, diagnostics } = readCsv(text, file, "diacritics");
  out.push(...diagnostics);
  if (rows.length === 0) return [];
  const [header, ...body] = rows;
  const want = ["mark", "name", "sets", "aliases"];
  const names = header!.cells.map((c) => c.toLowerCase());
  const idx = (n: string): number => names.indexOf(n);
  for (const n of ["mark", "name", "sets"]) {
    if (idx(n) < 0) {
      out.push(diagnostic("error", "diacritics/bad-header", `The header needs a '${n}' column (columns: ${want.join(", ")}; 'aliases' is optional).`, { file, line: header!.line, column: 1 }));
    }
  }
  if (hasErrors(out.filter((d) => d.file === file))) return [];
  const result: ParsedDiacritic[] = [];
  const known = new Set(knownFeatures);
  for (const row of body) {
    const at = (n: string): { text: string; column: number } => {
      const k = idx(n);
      return { text: k >= 0 ? (row.cells[k] ?? "") : "", column: k >= 0 ? (row.columns[k] ?? row.columns[row.columns.length - 1]!) : 1 };
    };
    if (row.cells.length > header!.cells.length) {
      const k = header!.cells.length;
      out.push(diagnostic("error", "diacritics/ragged-row", `This row has ${row.cells.length} cells but the header has ${header!.cells.length}.`, { file, line: row.line, column: row.columns[k]! }));
      continue;
    }
    const markCell = at("mark");
    const mark = decodeMark(markCell.text);
    const markPos = { file, line: row.line, column: markCell.column, length: Math.max(1, cpLength(markCell.text)) };
    if (mark === undefined) {
      out.push(diagnostic("error", "diacritics/bad-mark", `'${markCell.text}' is not a Unicode code point.`, markPos));
      continue;
    }
    const problem = symbolProblem(mark);
    if (problem !== undefined) {
      out.push(diagnostic("error", "diacritics/bad-mark", `Diacritic '${markCell.text}' ${problem}.`, markPos));
      continue;
    }
    const name = at("name").text;
    if (name === "") {
      out.push(diagnostic("error", "diacritics/no-name", `Diacritic ${codePointName(mark)} needs a name (e.g. "aspirated").`, { file, line: row.line, column: at("name").column }));
    }
    const setsCell = at("sets");
    const sets: [string, FeatureValue][] = [];
    let col = setsCell.column;
    const seenFeatures = new Set<string>();
    for (const part of setsCell.text.split(/(\s+)/)) {
      if (part.trim() === "") {
        col += cpLength(part);
        continue;
      }
      const pos = { file, line: row.line, column: col, length: cpLength(part) };
      col += cpLength(part);
      const m = /^([+\-0])([a-z][a-z0-9_]*)$/.exec(part);
      if (!m) {
        out.push(diagnostic("error", "diacritics/bad-value", `'${part}' should be a value and a feature, like +spread_glottis or -voice.`, pos));
        continue;
      }
      const value = m[1] as FeatureValue;
      const feature = m[2]!;
      if ((PROSODIC_FEATURES as readonly string[]).includes(feature)) {
        out.push(diagnostic("error", "diacritics/prosodic-feature", `Feature '${feature}' is prosodic and is never written with a diacritic.`, pos));
        continue;
      }
      if (seenFeatures.has(feature)) {
        out.push(diagnostic("error", "diacritics/duplicate-feature", `Feature '${feature}' is set twice by this diacritic.`, pos));
        continue;
      }
      seenFeatures.add(feature);
      if (!known.has(feature)) {
        if (value !== "+") {
          out.push(diagnostic("error", "diacritics/diacritic-only-value", `Feature '${feature}' is not an inventory column, so it is diacritic-only: '-' on every listed segment, and a diacritic can only set it to '+'.`, pos));
          continue;
        }
        const near = knownFeatures.filter((f) => {
          const d = editDistance(f, feature);
          return d <= 1 || (d <= 2 && f.length >= 6 && feature.length >= 6);
        });
        if (near.length > 0) {
          out.push(diagnostic("warning", "diacritics/new-feature", `Feature '${feature}' is not an inventory column and becomes a diacritic-only feature; did you mean ${near.map((f) => `'${f}'`).join(" or ")}?`, pos));
        }
      }
      sets.push([feature, value]);
    }
    if (sets.length === 0 && setsCell.text.trim() === "") {
      out.push(diagnostic("error", "diacritics/no-sets", `Diacritic '${name || codePointName(mark)}' sets no feature.`, { file, line: row.line, column: setsCell.column }));
      continue;
    }
    const aliasCell = at("aliases");
    const aliases: string[] = [];
    let acol = aliasCell.column;
    for (const part of aliasCell.text.split(/(\s+)/)) {
      const len = cpLength(part);
      if (part.trim() !== "") {
        const a = decodeMark(part);
        const pos = { file, line: row.line, column: acol, length: len };
        const p = a === undefined ? "is not a Unicode code point" : symbolProblem(a);
        if (p !== undefined || a === undefined) out.push(diagnostic("error", "diacritics/bad-alias", `Alias '${part}' ${p}.`, pos));
        else aliases.push(a);
      }
      acol += len;
    }
    result.push({ mark, name, sets, aliases, line: row.line, column: markCell.column });
  }
  return result;
}

/**
 * Parses an inventory from text. `file` and `diacriticsFile` name the sources in diagnostics.
 * The inventory is returned only when there is no error (warnings are allowed).
 */
export function parseInventory(text: string, file: string, diacriticsText?: string, diacriticsFile = "diacritics.csv"): LoadResult {
  const out: Diagnostic[] = [];
  const { rows, diagnostics } = readCsv(text, file, "inventory");
  out.push(...diagnostics);
  if (rows.length === 0) {
    if (!hasErrors(out)) out.push(diagnostic("error", "inventory/empty", "The inventory is empty: it needs a header (symbol, then feature names) and one row per segment.", { file, line: 1, column: 1 }));
    return { diagnostics: out };
  }
  const [headerRow, ...body] = rows;
  const header = readHeader(headerRow!.cells, headerRow!.columns, headerRow!.line, file, out);
  const width = header.features.length + 1;

  const segs: RawSegment[] = [];
  const byKey = new Map<string, RawSegment>();
  for (const row of body) {
    if (row.cells.length !== width) {
      const column = row.cells.length > width ? row.columns[width]! : (row.columns[row.cells.length - 1] ?? 1) + cpLength(row.cells[row.cells.length - 1] ?? "");
      const missing = row.cells.length < width ? ` (no value for '${header.features[row.cells.length - 1]}' onwards)` : "";
      out.push(diagnostic("error", "inventory/ragged-row", `This row has ${row.cells.length} cells but the header has ${width}${missing}.`, { file, line: row.line, column }));
      continue;
    }
    const symbol = canonicalSymbol(row.cells[0]!);
    const symPos = { file, line: row.line, column: row.columns[0]!, length: Math.max(1, cpLength(row.cells[0]!)) };
    const problem = symbolProblem(symbol) ?? (isCombining(Array.from(symbol)[0]!) ? `starts with the combining mark ${codePointName(Array.from(symbol)[0]!)}` : undefined);
    let ok = true;
    if (problem !== undefined) {
      out.push(diagnostic("error", "inventory/bad-symbol", `Symbol '${row.cells[0]}' ${problem}.`, symPos));
      ok = false;
    }
    const values: FeatureValue[] = [];
    for (let k = 1; k < width; k++) {
      const v = row.cells[k]!;
      if (VALUES.has(v)) values.push(v as FeatureValue);
      else {
        const hint = v === "\u2212" || v === "\u2013" ? " (type the ASCII hyphen-minus for '-')" : "";
        out.push(diagnostic("error", "inventory/bad-value", `Value '${v}' for feature '${header.features[k - 1]}' of '${symbol}' must be +, - or 0${hint}.`, { file, line: row.line, column: row.columns[k]!, length: Math.max(1, cpLength(v)) }));
        ok = false;
      }
    }
    if (!ok) continue;
    const key = matchKey(symbol);
    const prior = byKey.get(key);
    if (prior) {
      out.push(diagnostic("error", "inventory/duplicate-symbol", `Segment '${symbol}' is already listed on line ${prior.line}.`, symPos));
      continue;
    }
    const seg: RawSegment = { symbol, key, values, line: row.line, column: row.columns[0]! };
    byKey.set(key, seg);
    segs.push(seg);
  }

  const byValues = new Map<string, RawSegment>();
  for (const s of segs) {
    const k = s.values.join("");
    const prior = byValues.get(k);
    if (prior) {
      out.push(diagnostic("error", "inventory/identical-segments", `Segment '${s.symbol}' has the same feature values as '${prior.symbol}' (line ${prior.line}); no feature tells them apart.`, { file, line: s.line, column: s.column, length: cpLength(s.symbol) }));
    } else byValues.set(k, s);
  }

  if (segs.length >= 2) {
    header.features.forEach((f, k) => {
      const v = segs[0]!.values[k];
      if (segs.every((s) => s.values[k] === v)) {
        out.push(diagnostic("warning", "inventory/constant-feature", `Feature '${f}' is '${v}' for every segment, so it tells no two segments apart.`, { file, line: header.line, column: header.columns[k]!, length: cpLength(f) }));
      }
    });
  }

  const parsedDia = diacriticsText === undefined ? [] : parseDiacritics(diacriticsText, diacriticsFile, header.features, out);
  const diaOnly: string[] = [];
  for (const d of parsedDia) for (const [f] of d.sets) if (!header.features.includes(f) && !diaOnly.includes(f)) diaOnly.push(f);
  const features = [...header.features, ...diaOnly, ...PROSODIC_FEATURES];
  const featureIndex = new Map(features.map((f, i) => [f, i] as const));

  const diacritics: Diacritic[] = [];
  const markKeys = new Map<string, ParsedDiacritic>();
  for (const d of parsedDia) {
    let ok = true;
    for (const m of [d.mark, ...d.aliases]) {
      const k = matchKey(m);
      const pos = { file: diacriticsFile, line: d.line, column: d.column };
      const prior = markKeys.get(k);
      if (prior) {
        out.push(diagnostic("error", "diacritics/duplicate-mark", `${codePointName(m)} '${m}' is already declared on line ${prior.line}.`, pos));
        ok = false;
      } else if (byKey.has(k)) {
        out.push(diagnostic("error", "diacritics/mark-is-segment", `${codePointName(m)} '${m}' is also a segment of the inventory (line ${byKey.get(k)!.line}).`, pos));
        ok = false;
      } else markKeys.set(k, d);
    }
    if (!ok) continue;
    diacritics.push({
      mark: d.mark,
      name: d.name,
      sets: new Map(d.sets.map(([f, v]) => [featureIndex.get(f)!, v] as const)),
      aliases: d.aliases,
      order: diacritics.length,
    });
  }

  if (hasErrors(out)) return { diagnostics: out };
  const segments: Segment[] = segs.map((s) => ({
    symbol: s.symbol,
    line: s.line,
    bundle: [...s.values, ...diaOnly.map((): FeatureValue => "-"), ...PROSODIC_FEATURES.map((): FeatureValue => "0")],
  }));
  const inventory: Inventory = { file, features, featureIndex, segments, diacritics };
  return { inventory, diagnostics: out };
}

export interface InventoryReadOptions {
  /** Most bytes of either file (default FILE_LIMITS.inventory). */
  readonly limit?: number;
  /** Where a failure to read each file is reported (e.g. the grammar statement naming it); default its 1:1. */
  readonly inventoryAt?: SourcePos;
  readonly diacriticsAt?: SourcePos;
}

/**
 * Reads `csvPath` and the diacritics file (by default `diacritics.csv` beside it, when present).
 * Only regular files within the size limit are read (see files.ts); a file that cannot be read is
 * an error diagnostic at `inventoryAt`/`diacriticsAt`, else on its line 1.
 */
export function loadInventory(csvPath: string, diacriticsPath?: string, opts: InventoryReadOptions = {}): LoadResult {
  const r = loadUncapped(csvPath, diacriticsPath, opts);
  return r.diagnostics.length <= MAX_DIAGNOSTICS_PER_FILE ? r : { ...r, diagnostics: capPerFile(r.diagnostics, "inventory/too-many-problems") };
}

function loadUncapped(csvPath: string, diacriticsPath: string | undefined, opts: InventoryReadOptions): LoadResult {
  const limit = opts.limit ?? FILE_LIMITS.inventory;
  const read = (path: string, what: string, code: string, at: SourcePos | undefined): string | Diagnostic => {
    const r = readTextFile(path, { what, limit, code, ...(at !== undefined ? { at } : {}) });
    return r.ok ? r.text : r.diagnostic;
  };
  const text = read(csvPath, "inventory", "inventory/unreadable", opts.inventoryAt);
  if (typeof text !== "string") return { diagnostics: [text] };
  const diaPath = diacriticsPath ?? join(dirname(csvPath), "diacritics.csv");
  if (diacriticsPath === undefined && !existsSync(diaPath)) return parseInventory(text, csvPath);
  const diaText = read(diaPath, "diacritics file", "diacritics/unreadable", opts.diacriticsAt ?? (diacriticsPath === undefined ? opts.inventoryAt : undefined));
  if (typeof diaText !== "string") return { diagnostics: [diaText] };
  return parseInventory(text, csvPath, diaText, diaPath);
}
