// Writes the bench's latest figures into README.md under "## Performance" (only that section:
// from its heading to the next "## " heading or the end of the file), written whole.

import { readFileSync, renameSync, writeFileSync } from "node:fs";

const HEADING = "## Performance";

/** `text` with the Performance section replaced by `body` (appended at the end when absent). */
export function replaceSection(text: string, body: string): string {
  const section = `${HEADING}\n\n${body.trimEnd()}\n`;
  const lines = text.split("\n");
  const start = lines.findIndex((l) => l.trimEnd() === HEADING);
  if (start < 0) return `${text.trimEnd()}\n\n${section}`;
  let end = lines.length;
  for (let i = start + 1; i < lines.length; i++) {
    if (/^## /.test(lines[i]!)) {
      end = i;
      break;
    }
  }
  const before = lines.slice(0, start).join("\n");
  const after = lines.slice(end).join("\n");
  return `${before}${before === "" ? "" : "\n"}${section}${after === "" ? "" : `\n${after}`}`;
}

/** Re-reads README.md just before writing (other sections may have changed meanwhile); temp file, then rename. */
export function writePerformanceSection(readmePath: string, body: string): void {
  const text = readFileSync(readmePath, "utf8");
  const next = replaceSection(text, body);
  if (next === text) return;
  const tmp = `${readmePath}.${process.pid}.tmp`;
  writeFileSync(tmp, next);
  renameSync(tmp, readmePath);
}
