// The per-file cap on diagnostics: thousands of problems in one file used to be rendered one by
// one (each reprinting its source line) until the process ran out of memory.

import { join } from "node:path";
import { describe, expect, test } from "vitest";
import { capPerFile } from "../src/diagnostic-cap.js";
import { diagnostic, type Diagnostic } from "../src/diagnostics.js";
import { loadGrammar } from "../src/grammar/index.js";
import { loadInventory } from "../src/inventory/index.js";
import { tempTree, TOY_DIACRITICS, TOY_SEGMENTS } from "./grammar/helpers.js";

const d = (file: string, line: number, severity: "error" | "warning" = "error"): Diagnostic => diagnostic(severity, "x/y", `problem ${line}`, { file, line, column: 1 });

describe("capPerFile", () => {
  test("under the cap nothing changes", () => {
    const ds = [d("a", 1), d("b", 1), d("a", 2)];
    expect(capPerFile(ds, "x/many", 2)).toEqual(ds);
  });
  test("each file keeps its first diagnostics and one more counting the rest, at the first left out", () => {
    const ds = [d("a", 1), d("a", 2), d("b", 1), d("a", 3, "warning"), d("a", 4), d("b", 2), d("a", 5)];
    const out = capPerFile(ds, "x/many", 2);
    expect(out.map((x) => `${x.file}:${x.line} ${x.code}`)).toEqual(["a:1 x/y", "a:2 x/y", "b:1 x/y", "a:3 x/many", "b:2 x/y"]);
    expect(out[3]!.message).toBe("2 more errors and 1 more warning in this file are not shown (only the first 2 are).");
    expect(out[3]!.severity).toBe("error");
  });
  test("only warnings left out: the count is a warning, in the singular when one", () => {
    const out = capPerFile([d("a", 1), d("a", 2, "warning")], "x/many", 1);
    expect([out[1]!.severity, out[1]!.message]).toEqual(["warning", "1 more warning in this file is not shown (only the first 1 is)."]);
  });
});

describe("loaders cap their diagnostics per file", () => {
  test("a grammar with 3 000 broken rules gives 100 diagnostics and a count of the rest", () => {
    const body = Array.from({ length: 3000 }, (_, i) => `rule r${i}:\n  a -> [+nosuch${i}]`).join("\n");
    const root = tempTree({ "g/segments.csv": TOY_SEGMENTS, "g/diacritics.csv": TOY_DIACRITICS, "g/grammar.strata": `inventory "segments.csv"\n${body}\n` });
    const ds = loadGrammar(join(root, "g")).diagnostics;
    expect(ds).toHaveLength(101);
    const last = ds[100]!;
    expect([last.code, last.line, last.column]).toEqual(["grammar/too-many-problems", 203, 9]);
    expect(last.message).toBe("2,900 more errors in this file are not shown (only the first 100 are).");
    expect(loadGrammar(join(root, "g"), { maxDiagnosticsPerFile: 10 }).diagnostics).toHaveLength(11);
  });
  test("an inventory with thousands of bad rows is capped too", () => {
    const header = TOY_SEGMENTS.split("\n")[0]!;
    const rows = Array.from({ length: 500 }, (_, i) => `x${i},+`).join("\n");
    const root = tempTree({ "segments.csv": `${header}\n${rows}\n` });
    const ds = loadInventory(join(root, "segments.csv")).diagnostics;
    expect(ds.length).toBeLessThanOrEqual(101);
    expect(ds[ds.length - 1]!.code).toBe("inventory/too-many-problems");
  });
});
