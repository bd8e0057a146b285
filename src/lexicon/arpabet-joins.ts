// Joins added to an ARPAbet import afterwards: an overrides file (CSV `word,pron`, the lexicon CSV's
// format) gives, for some words, a pronunciation with its joins marked (`+` morpheme join, `#`
// between the parts of a compound). ARPAbet dictionaries carry no joins; the import replaces each
// imported pronunciation that equals an override once the joins (and spaces) are taken out, so an
// override adds joins and nothing else (README, "strata import").

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { MORPHEME_JOIN, WORD_BREAK } from "../inventory/ipa.js";
import { checkQuoting } from "./fields.js";
import { splitRecords } from "./records.js";
import type { ImportedRow } from "./arpabet.js";

/** One override: a word and its pronunciation with joins, where it was written. */
export interface JoinOverride {
  readonly word: string;
  readonly pron: string;
  readonly line: number;
  /** Column of the pronunciation field. */
  readonly column: number;
}

/** The name under which overridden entries are counted in the import's summary. */
export const JOINS_COUNT = "joins";

const JOIN_CHARS = new RegExp(`[\\s${MORPHEME_JOIN}${WORD_BREAK}]`, "gu");
/** A pronunciation without joins and white space, NFC: what an override must equal. */
export const withoutJoins = (pron: string): string => pron.normalize("NFC").replace(JOIN_CHARS, "");
const key = (word: string): string => word.normalize("NFC").toLowerCase();

/**
 * Reads an overrides file: a header naming `word` and `pron` (other columns ignored), then one
 * override per record; `#` first on a line is a comment. Diagnostics: a missing column (error,
 * nothing read), a record whose quoting is broken or whose word or pron is empty (error, that
 * record skipped), a word given twice with the same joins-free pronunciation (error, the second
 * skipped).
 */
export function readJoinOverrides(text: string, file: string): { overrides: JoinOverride[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const overrides: JoinOverride[] = [];
  let wordAt = -1;
  let pronAt = -1;
  let header = false;
  const seen = new Map<string, number>();
  for (const r of splitRecords(text.replace(/^\uFEFF/, ""))) {
    if (r.kind !== "data") continue;
    const q = checkQuoting(r.raw);
    if (!q.ok) {
      diagnostics.push(diagnostic("error", "import/joins-bad-row", `${q.reason}`, { file, line: r.line, column: q.column }));
      continue;
    }
    if (!header) {
      header = true;
      const names = q.fields.map((f) => f.value.trim().toLowerCase());
      wordAt = names.indexOf("word");
      pronAt = names.indexOf("pron");
      if (wordAt < 0 || pronAt < 0) {
        diagnostics.push(diagnostic("error", "import/joins-header", `The overrides file needs the columns 'word' and 'pron'; its header has ${names.map((n) => `'${n}'`).join(", ")}.`, { file, line: r.line, column: 1 }));
        return { overrides: [], diagnostics };
      }
      continue;
    }
    const w = q.fields[wordAt];
    const p = q.fields[pronAt];
    if (w === undefined || p === undefined || w.value.trim() === "" || p.value.trim() === "") {
      diagnostics.push(diagnostic("error", "import/joins-bad-row", "This override has no word or no pronunciation.", { file, line: r.line, column: (p ?? w)?.column ?? 1 }));
      continue;
    }
    const o: JoinOverride = { word: w.value.trim().normalize("NFC"), pron: p.value.trim().normalize("NFC"), line: r.line, column: p.column };
    const k = `${key(o.word)}\u0000${withoutJoins(o.pron)}`;
    const first = seen.get(k);
    if (first !== undefined) {
      diagnostics.push(diagnostic("error", "import/joins-duplicate", `'${o.word}' has an override for this pronunciation already (line ${first}).`, { file, line: r.line, column: 1 }));
      continue;
    }
    seen.set(k, r.line);
    overrides.push(o);
  }
  if (!header) diagnostics.push(diagnostic("error", "import/joins-header", "The overrides file is empty: it needs a header with 'word' and 'pron'.", { file, line: 1, column: 1 }));
  return { overrides, diagnostics };
}

/**
 * The imported rows with the overrides applied: a row whose word matches an override's (letter
 * case aside) and whose pronunciation equals the override's without joins and spaces takes the
 * override's pronunciation as written. Each override that matches no imported pronunciation is a
 * warning at its line (`import/joins-unmatched`: the word is missing, or its pronunciations differ
 * in more than joins). `applied` counts the rows changed.
 */
export function applyJoinOverrides(rows: readonly ImportedRow[], overrides: readonly JoinOverride[], file: string): { rows: ImportedRow[]; applied: number; diagnostics: Diagnostic[] } {
  const byWord = new Map<string, JoinOverride[]>();
  for (const o of overrides) {
    const list = byWord.get(key(o.word)) ?? [];
    list.push(o);
    byWord.set(key(o.word), list);
  }
  const used = new Set<JoinOverride>();
  let applied = 0;
  const out = rows.map((r) => {
    const list = byWord.get(key(r.word));
    if (list === undefined) return r;
    const bare = withoutJoins(r.pron);
    const o = list.find((x) => withoutJoins(x.pron) === bare);
    if (o === undefined) return r;
    used.add(o);
    applied++;
    return { ...r, pron: o.pron };
  });
  const diagnostics: Diagnostic[] = [];
  for (const o of overrides) {
    if (used.has(o)) continue;
    const known = byWordImported(rows, o.word);
    const why = known.length === 0 ? "the dictionary has no such word" : `without its joins it is none of the dictionary's pronunciations (${known.map((p) => withoutJoins(p)).join(", ")})`;
    diagnostics.push(diagnostic("warning", "import/joins-unmatched", `The override for '${o.word}' was not used: ${why}.`, { file, line: o.line, column: o.column }));
  }
  return { rows: out, applied, diagnostics };
}

function byWordImported(rows: readonly ImportedRow[], word: string): string[] {
  const k = key(word);
  return rows.filter((r) => key(r.word) === k).map((r) => r.pron);
}
