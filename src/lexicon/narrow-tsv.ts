// A TSV line written from the composed machines' outputs straight into byte chunks, for the rows
// that allow it (the usual ones): the narrow and broad forms are never made as strings, so neither
// is checked nor encoded character by character (render.ts, `renderIpaUtf8`). Any other row — a
// phrase, a compound, a word that needs checking, a symbol that is not plain, a row the machines
// reject — is left to the caller, which writes it from `narrowForms` as before; the bytes are the
// same either way (tests/lexicon/render-utf8.test.ts).

import { putTsvHead } from "../emit/tsv-batch.js";
import type { ByteChunks } from "../emit/bytes.js";
import { plsTextProblem } from "../emit/pls.js";
import type { Engine } from "./engine.js";
import { MachineEngine } from "./engine-machine.js";
import { isCompound } from "./compound.js";
import type { LexiconRow } from "./read.js";

/**
 * Puts `row`'s TSV line (its `n`th row of its word) into `out` and returns true, or writes nothing
 * and returns false: the caller then takes the row through `narrowForms`.
 */
export function putNarrowTsv(out: ByteChunks, engine: Engine, row: LexiconRow, n: number): boolean {
  if (!(engine instanceof MachineEngine) || isCompound(row)) return false;
  // A word PLS could not hold is a reject (lexicon/writable.ts): narrowForms says so.
  if (plsTextProblem(row.word) !== undefined) return false;
  const outputs = engine.narrowOutputs(row.symbols);
  if (outputs === undefined) return false;
  const key = row.id !== undefined && row.id !== "" ? row.id : row.word;
  if (!out.room(3 * (key.length + row.word.length) + 16 + engine.formsBound(outputs) + 1)) return false;
  const buf = out.target;
  const at = engine.putForms(outputs, buf, putTsvHead(buf, out.position, row.id, n, row.word));
  if (at < 0) return false;
  buf[at] = 10;
  out.moveTo(at + 1);
  return true;
}
