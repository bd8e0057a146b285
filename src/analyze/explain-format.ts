// Derivation tables as text (one column per derivation, the preferred one marked, changed
// segments marked with carets or, on a terminal, underlined) and as JSON.

import { changesOf, type Deriver, type Explanation } from "./explain.js";
import { displayWidth, type FormWriter } from "./render.js";

export interface TableOptions {
  /** Underline changed segments (ANSI) instead of writing a caret line under them. */
  readonly color?: boolean;
}

const DASH = "—";
const UNDERLINE = (s: string): string => `\u001b[4m${s}\u001b[24m`;

/** A cell: the text to print, its display width, and (without colour) the caret line under it. */
interface Cell {
  readonly text: string;
  readonly width: number;
  readonly carets: string;
}

function formCell(w: FormWriter, ids: readonly number[], changed: ReadonlySet<number>, color: boolean, open = "", close = ""): Cell {
  let text = open;
  let carets = " ".repeat(displayWidth(open));
  for (const t of w.tokens(ids)) {
    const mark = t.at >= 0 && changed.has(t.at);
    text += mark && color ? UNDERLINE(t.text) : t.text;
    carets += (mark ? "^" : " ").repeat(displayWidth(t.text));
  }
  return { text: text + close, width: carets.length + displayWidth(close), carets: color ? "" : carets.trimEnd() };
}

const pad = (c: Cell, width: number): string => c.text + " ".repeat(Math.max(0, width - c.width));

/** The derivation table of one word. */
export function explanationTable(deriver: Deriver, e: Explanation, opts: TableOptions = {}): string {
  const w = deriver.writer;
  const color = opts.color ?? false;
  const ds = e.derivations;
  const header = `${e.label}${e.source !== undefined ? `  (${e.source.file}:${e.source.line})` : ""}`;
  const stepNames = deriver.names;
  const labelWidth = Math.max("underlying".length, "surface".length, ...stepNames.map((n) => n.length)) + 2;
  const columns: Cell[][] = ds.map((d) => {
    const cells: Cell[] = [formCell(w, e.underlying, new Set(), color, "/", "/")];
    let cur = e.underlying;
    for (const s of d.steps) {
      if (s.form === null) { cells.push({ text: DASH, width: 1, carets: "" }); continue; }
      cells.push(formCell(w, s.form, changesOf(w, cur, s.form).changed, color));
      cur = s.form;
    }
    cells.push(formCell(w, d.surface, new Set(), color, "[", "]"));
    return cells;
  });
  const titles: Cell[] = ds.map((d, i) => {
    const t = ds.length === 1 ? "" : d.preferred ? "preferred *" : `variant ${i + 1}`;
    return { text: t, width: displayWidth(t), carets: "" };
  });
  const widths = columns.map((col, i) => Math.max(titles[i]!.width, ...col.map((c) => c.width)) + 3);
  const lines: string[] = [header];
  if (ds.length > 1) lines.push(" ".repeat(labelWidth) + titles.map((t, i) => pad(t, widths[i]!)).join("").trimEnd());
  const labels = ["underlying", ...stepNames, "surface"];
  labels.forEach((label, r) => {
    lines.push((label.padEnd(labelWidth) + columns.map((col, i) => pad(col[r]!, widths[i]!)).join("")).trimEnd());
    if (!color && columns.some((col) => col[r]!.carets.trim() !== "")) {
      lines.push((" ".repeat(labelWidth) + columns.map((col, i) => col[r]!.carets.padEnd(widths[i]!)).join("")).trimEnd());
    }
  });
  if (e.capped) lines.push(`(more variants than shown)`);
  return lines.join("\n") + "\n";
}

/** One explanation as plain data for JSON. */
export function explanationJson(deriver: Deriver, e: Explanation): unknown {
  const w = deriver.writer;
  return {
    word: e.label,
    ...(e.source !== undefined ? { source: e.source } : {}),
    underlying: w.text(e.underlying),
    derivations: e.derivations.map((d) => {
      let cur = e.underlying;
      return {
        preferred: d.preferred,
        surface: w.text(d.surface),
        steps: d.steps.map((s) => {
          if (s.form === null) return { step: s.step, applied: false };
          const tokens = w.tokens(s.form);
          const { changed, text } = changesOf(w, cur, s.form);
          cur = s.form;
          return {
            step: s.step, applied: true, form: tokens.map((t) => t.text).join(""),
            segments: tokens.map((t) => t.text), changed: tokens.flatMap((t, i) => (t.at >= 0 && changed.has(t.at) ? [i] : [])), changes: text,
          };
        }),
      };
    }),
    capped: e.capped,
  };
}
