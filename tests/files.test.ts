// The shared file reader (src/files.ts) and its use by the grammar and inventory loaders: only
// regular files, a size limit naming the file, invalid UTF-8 at its place, paths a grammar names
// confined to its folder. Each case reproduces a failure seen before: `inventory "/dev/zero"` read
// forever, an include of a FIFO blocked, an inventory outside the folder was read and quoted.

import { execFileSync } from "node:child_process";
import { chmodSync, symlinkSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { isInside, readTextFile, realPath } from "../src/files.js";
import { loadGrammar } from "../src/grammar/index.js";
import { loadInventory } from "../src/inventory/index.js";
import { at, tempTree, TOY_DIACRITICS, TOY_SEGMENTS } from "./grammar/helpers.js";

const opts = { what: "grammar file", limit: 1000, code: "test/unreadable" };
const failure = (r: ReturnType<typeof readTextFile>) => {
  if (r.ok) throw new Error("expected a failure");
  return r.diagnostic;
};
const errors = (ds: readonly { severity: string; code: string; line: number; column: number }[]) =>
  ds.filter((d) => d.severity === "error").map((d) => [d.code, at(d)]);
const inv = { "g/segments.csv": TOY_SEGMENTS, "g/diacritics.csv": TOY_DIACRITICS };
const fifo = (p: string): void => void execFileSync("mkfifo", [p]);

describe("readTextFile", () => {
  test("reads a regular file, keeping a byte-order mark as readFileSync does", () => {
    const root = tempTree({ "a.txt": "\uFEFFhello\nwörld\n" });
    expect(readTextFile(join(root, "a.txt"), opts)).toEqual({ ok: true, text: "\uFEFFhello\nwörld\n" });
  });
  test("an empty file is empty text", () => {
    const root = tempTree({ "e.txt": "" });
    expect(readTextFile(join(root, "e.txt"), opts)).toEqual({ ok: true, text: "" });
  });
  test("a missing file, a folder, a path through a file: one message each, at the given place", () => {
    const root = tempTree({ "f.txt": "x" });
    const where = { file: "main.strata", line: 3, column: 9 };
    const d1 = failure(readTextFile(join(root, "nope.txt"), { ...opts, at: where }));
    expect([d1.file, d1.line, d1.column, d1.code, d1.message]).toEqual(["main.strata", 3, 9, "test/unreadable", "Cannot read the grammar file 'nope.txt': there is no such file."]);
    expect(failure(readTextFile(root, opts)).message).toMatch(/it is a folder, not a file\.$/);
    expect(failure(readTextFile(join(root, "f.txt", "x"), opts)).message).toMatch(/a part of its path is a file, not a folder\.$/);
  });
  test.skipIf(process.getuid?.() === 0)("a file without read permission", () => {
    const root = tempTree({ "p.txt": "x" });
    chmodSync(join(root, "p.txt"), 0o000);
    expect(failure(readTextFile(join(root, "p.txt"), opts)).message).toMatch(/permission denied\.$/);
  });
  test("a device is refused without reading it (/dev/zero would never end)", () => {
    const d = failure(readTextFile("/dev/zero", opts));
    expect(d.message).toBe("Cannot read the grammar file 'zero': it is not a regular file (a device, pipe or socket).");
    expect([d.file, d.line, d.column]).toEqual(["/dev/zero", 1, 1]);
  });
  test("a FIFO is refused without blocking", () => {
    const root = tempTree({});
    fifo(join(root, "pipe"));
    expect(failure(readTextFile(join(root, "pipe"), opts)).message).toMatch(/not a regular file/);
  });
  test("a file over the limit names the file and the limit", () => {
    const root = tempTree({ "big.txt": "x".repeat(1001), "ok.txt": "x".repeat(1000) });
    expect(failure(readTextFile(join(root, "big.txt"), opts)).message).toBe("The grammar file 'big.txt' is 1001 bytes, more than the limit of 1000 bytes.");
    expect(readTextFile(join(root, "ok.txt"), opts).ok).toBe(true);
  });
  test("invalid UTF-8 is reported at its line and column", () => {
    const root = tempTree({});
    writeFileSync(join(root, "bad.txt"), Buffer.concat([Buffer.from("ab\ncdé"), Buffer.from([0xff]), Buffer.from("x\n")]));
    const d = failure(readTextFile(join(root, "bad.txt"), opts));
    expect([d.file, d.line, d.column, d.message]).toEqual([join(root, "bad.txt"), 2, 4, "The grammar file 'bad.txt' is not valid UTF-8 (byte 0xff)."]);
  });
  test("isInside resolves symbolic links and does not take '..name' for a parent", () => {
    const root = tempTree({ "g/..x.csv": "", "out.csv": "" });
    const g = realPath(join(root, "g"));
    expect(isInside(g, join(root, "g", "..x.csv"))).toBe(true);
    expect(isInside(g, join(root, "out.csv"))).toBe(false);
    symlinkSync(join(root, "out.csv"), join(root, "g", "link.csv"));
    expect(isInside(g, join(root, "g", "link.csv"))).toBe(false);
  });
});

describe("the grammar loader reads only regular files inside the grammar's folder", () => {
  test("inventory \"/dev/zero\" is an error at the statement (outside the folder), promptly", () => {
    const root = tempTree({ "g/grammar.strata": '-- toy\ninventory "/dev/zero"' });
    expect(errors(loadGrammar(join(root, "g")).diagnostics)).toEqual([["grammar/file-outside", "2:11"]]);
  });
  test("an inventory that is a FIFO inside the folder is refused at the statement", () => {
    const root = tempTree({ "g/grammar.strata": 'inventory "inv.csv"' });
    fifo(join(root, "g", "inv.csv"));
    const r = loadGrammar(join(root, "g"));
    expect(errors(r.diagnostics)).toEqual([["inventory/unreadable", "1:11"]]);
    expect(r.diagnostics[0]!.file).toBe(join(root, "g", "grammar.strata"));
  });
  test("an include of a FIFO is an error at the include, without blocking", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\ninclude "pipe.strata"' });
    fifo(join(root, "g", "pipe.strata"));
    const ds = loadGrammar(join(root, "g")).diagnostics;
    expect(errors(ds)).toEqual([["grammar/include-missing", "2:9"]]);
    expect(ds[0]!.message).toMatch(/not a regular file/);
  });
  test("a main grammar file over the limit names the file", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": 'inventory "segments.csv"\n' + "-- padding\n".repeat(20) });
    const r = loadGrammar(join(root, "g"), { maxGrammarBytes: 100 });
    expect(errors(r.diagnostics)).toEqual([["grammar/unreadable", "1:1"]]);
    expect(r.diagnostics[0]!.message).toMatch(/^The grammar file 'grammar.strata' is 245 bytes, more than the limit of 100 bytes\.$/);
  });
  test("an inventory over its limit is an error at the inventory statement", () => {
    const root = tempTree({ ...inv, "g/grammar.strata": '\ninventory "segments.csv"' });
    const r = loadGrammar(join(root, "g"), { maxInventoryBytes: 50 });
    expect(errors(r.diagnostics)).toEqual([["inventory/unreadable", "2:11"]]);
    expect(r.diagnostics[0]!.message).toMatch(/^The inventory 'segments.csv' is .* more than the limit of 50 bytes\.$/);
  });
  test("inventory and diacritics paths are confined like includes (relative, absolute, through a link)", () => {
    const outside = tempTree({ "segments.csv": TOY_SEGMENTS, "diacritics.csv": TOY_DIACRITICS });
    const cases: [string, string][] = [
      ['inventory "../segments.csv"', "1:11"],
      [`inventory "${join(outside, "segments.csv")}"`, "1:11"],
      [`inventory "segments.csv"\ndiacritics "${join(outside, "diacritics.csv")}"`, "2:12"],
      ['inventory "link.csv"', "1:11"],
    ];
    for (const [text, where] of cases) {
      const root = tempTree({ ...inv, "g/grammar.strata": text });
      symlinkSync(join(outside, "segments.csv"), join(root, "g", "link.csv"));
      const r = loadGrammar(join(root, "g"));
      expect(errors(r.diagnostics), text).toEqual([["grammar/file-outside", where]]);
      expect(r.inventory).toBeUndefined();
    }
  });
  test("a default diacritics.csv beside the inventory that links outside is refused too", () => {
    const outside = tempTree({ "diacritics.csv": TOY_DIACRITICS });
    const root = tempTree({ "g/segments.csv": TOY_SEGMENTS, "g/grammar.strata": 'inventory "segments.csv"' });
    symlinkSync(join(outside, "diacritics.csv"), join(root, "g", "diacritics.csv"));
    expect(errors(loadGrammar(join(root, "g")).diagnostics)).toEqual([["grammar/file-outside", "1:11"]]);
  });
  test("an inventory in a subfolder of the grammar's folder is fine", () => {
    const root = tempTree({ "g/inv/segments.csv": TOY_SEGMENTS, "g/inv/diacritics.csv": TOY_DIACRITICS, "g/grammar.strata": 'inventory "inv/segments.csv"' });
    const r = loadGrammar(join(root, "g"));
    expect(r.diagnostics).toEqual([]);
    expect(r.inventory).toBeDefined();
  });
  test("loadInventory on its own refuses a device", () => {
    const r = loadInventory("/dev/zero");
    expect(r.diagnostics.map((d) => [d.code, d.line, d.column])).toEqual([["inventory/unreadable", 1, 1]]);
  });
});
