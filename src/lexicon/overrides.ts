// Per-variety lexicon overrides: a variety's override CSV (same columns as the lexicon, read by the
// same reader) whose rows replace, in that variety only, every row of the lexicon with the same word.
// The runner asks `replaced(row, key)` of each lexicon row as it streams, emits `tail()` at the end and
// writes the replaced rows to the variety's replaced.csv.

import { diagnostic, type Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { csvLine } from "../emit/csv.js";
import type { Inventory } from "../inventory/types.js";
import { checkQuoting, readLexicon, type LexiconRow, type RejectedRow } from "./read.js";

/*
 * The rules (README, "Per-variety entries"):
 * - A word W with at least one row read from the override file is replaced: every row of W the
 *   lexicon's reader read is left out of this variety (recorded as replaced, not as an entry or a
 *   reject), and W's override rows are its entries, in the override file's order, after the
 *   lexicon's own entries. Replacement is decided when the override file is read: a record the
 *   reader rejects replaces nothing; a row read and rejected later (outside the grammar's
 *   alphabet, a duplicate key) has still replaced its word's rows.
 * - The replaced rows are written to the variety's `replaced.csv` (file, line, key, word);
 *   reconcile.ts checks that every lexicon record is one entry, one reject or one replaced row, and
 *   every override record one entry or one reject.
 * - Key of an override entry: its own `id` when it has one, else `W#n`, n its 1-based index among
 *   W's override rows (the lexicon's rule, applied to the override file). So a lexicon without ids
 *   keeps its keys (`tram#1` stays `tram#1`); with ids, give an override row the id of the row it
 *   stands for and the comparison of varieties pairs them.
 * - An override row whose word has no row in the lexicon is rejected (`override/unknown-word`,
 *   also a warning at the word): overrides change words, new words go in the lexicon. One whose key
 *   is the key of a lexicon row that stays, or of an earlier override row, is rejected
 *   (`override/duplicate-key`).
 */

/** Override rows of one variety, read whole (override files are small) before the lexicon streams. */
export class Overrides {
  /** Override rows by word, in file order, with their keys. */
  private readonly byWord = new Map<string, { row: LexiconRow; key: string }[]>();
  /** Words of the lexicon with at least one row replaced. */
  private readonly replacedWords = new Set<string>();
  /** The lexicon rows replaced, in file order. */
  readonly replacedRows: { readonly file: string; readonly line: number; readonly key: string; readonly word: string }[] = [];
  /** Keys of lexicon rows that stay, with their line. */
  private readonly keptKeys = new Map<string, number>();
  private readonly rejects: RejectedRow[] = [];
  /** Warnings (unknown words) and the override file's own problems. */
  readonly diagnostics: Diagnostic[] = [];
  private constructor(readonly file: string) {}

  /** Reads an override file with the lexicon's reader (rows, rejects, file-level problems). */
  static async read(file: string, inventory: Inventory): Promise<Overrides> {
    const o = new Overrides(file);
    const reader = readLexicon(file, { inventory });
    const n = new Map<string, number>();
    for await (const item of reader) {
      if (item.kind === "reject") {
        o.rejects.push(item);
        continue;
      }
      const k = (n.get(item.word) ?? 0) + 1;
      n.set(item.word, k);
      const key = item.id !== undefined && item.id !== "" ? item.id : `${item.word}#${k}`;
      const list = o.byWord.get(item.word) ?? [];
      list.push({ row: item, key });
      o.byWord.set(item.word, list);
    }
    o.diagnostics.push(...reader.diagnostics);
    return o;
  }

  /** Whether the override file itself could not be read (an error that stops the variety). */
  get failed(): boolean {
    return this.diagnostics.some((d) => d.severity === "error");
  }

  /**
   * Called with every row of the lexicon, in file order, and its key: true when the row's word is
   * overridden (the row is then left out of the variety).
   */
  replaced(row: LexiconRow, key: string): boolean {
    if (!this.byWord.has(row.word)) {
      this.keptKeys.set(key, row.line);
      return false;
    }
    this.replacedWords.add(row.word);
    this.replacedRows.push({ file: row.file, line: row.line, key, word: row.word });
    return true;
  }

  /**
   * After the lexicon: the override entries to transcribe (with their keys) and the override rows
   * rejected, in the override file's line order.
   */
  tail(): ({ kind: "row"; row: LexiconRow; key: string } | RejectedRow)[] {
    const out: ({ kind: "row"; row: LexiconRow; key: string; line: number } | RejectedRow)[] = [...this.rejects];
    const taken = new Map<string, number>();
    for (const [word, rows] of this.byWord) {
      for (const { row, key } of rows) {
        if (!this.replacedWords.has(word)) {
          out.push(this.unknownWord(row));
          continue;
        }
        const other = this.keptKeys.get(key);
        const mine = taken.get(key);
        if (other !== undefined || mine !== undefined) {
          const whose = other !== undefined ? `of line ${other} of the lexicon, which this variety keeps` : `of line ${mine} of this file`;
          out.push({ kind: "reject", file: row.file, line: row.line, column: this.wordColumn(row), code: "override/duplicate-key",
            reason: `the key '${key}' is already the key ${whose} (give the override row another id)`, raw: row.raw });
          continue;
        }
        taken.set(key, row.line);
        out.push({ kind: "row", row, key, line: row.line });
      }
    }
    return out.sort((a, b) => a.line - b.line);
  }

  /** An override row whose word the lexicon does not have: a reject, and a warning at the word. */
  private unknownWord(row: LexiconRow): RejectedRow {
    const column = this.wordColumn(row);
    const reason = `the word '${row.word}' has no row in the lexicon; an override replaces a word's rows in one variety (add new words to the lexicon itself)`;
    this.diagnostics.push(diagnostic("warning", "override/unknown-word", `The word '${row.word}' has no row in the lexicon: this override row replaces nothing and is rejected.`, { file: row.file, line: row.line, column, length: [...row.word].length }));
    return { kind: "reject", file: row.file, line: row.line, column, code: "override/unknown-word", reason, raw: row.raw };
  }

  /** The column of the row's word field (the first field holding the word), else 1. */
  private wordColumn(row: LexiconRow): number {
    const q = checkQuoting(row.raw);
    if (!q.ok) return 1;
    return q.fields.find((f) => f.value.trim().normalize("NFC") === row.word)?.column ?? 1;
  }
}

/** replaced.csv's columns: the lexicon row left out of the variety (file relative to the lexicon folder, line, key, word). */
export const REPLACED_COLUMNS = ["file", "line", "key", "word"] as const;

/** Writes a variety's replaced.csv whole (header, then one record per replaced lexicon row). */
export async function writeReplaced(path: string, rows: Overrides["replacedRows"], rel: (file: string) => string): Promise<void> {
  await writeFileAtomic(path, [csvLine([...REPLACED_COLUMNS]), ...rows.map((r) => csvLine([rel(r.file), String(r.line), r.key, r.word]))].join(""));
}
