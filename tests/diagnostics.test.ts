// Tests of diagnostic rendering and capping: a line is the same line for positions and for the
// source line shown (CR LF, LF, lone CR), a leading BOM is not shown.

import { describe, expect, it } from "vitest";
import { diagnostic, renderDiagnostic } from "../src/diagnostics.js";
import { lineCount, positionAt, splitLines } from "../src/lines.js";

const d = (line: number, column: number, file = "g.strata") => diagnostic("error", "test/x", "Something.", { file, line, column });

describe("renderDiagnostic", () => {
  it("shows the source line and caret for files with LF, CR LF and CR-only line ends alike", () => {
    for (const eol of ["\n", "\r\n", "\r"]) {
      const text = ["one", "two x", "three"].join(eol) + eol;
      expect(renderDiagnostic(d(2, 5), text).split("\n").slice(1)).toEqual(["    2 | two x", "      |     ^"]);
    }
  });

  it("does not show a leading byte-order mark", () => {
    expect(renderDiagnostic(d(1, 1), "\ufeffabc\n").split("\n")[1]).toBe("    1 | abc");
  });
});

describe("positions", () => {
  it("agree with the lines shown", () => {
    const text = "\ufeffa\r\nbc\rd𝔸e\nf";
    expect(splitLines(text)).toEqual(["a", "bc", "d𝔸e", "f"]);
    expect(lineCount(text)).toBe(4);
    expect(positionAt(text, text.indexOf("e"))).toEqual({ line: 3, column: 3 });
    expect(positionAt(text, text.indexOf("f"))).toEqual({ line: 4, column: 1 });
    expect(positionAt(text, text.indexOf("c"))).toEqual({ line: 2, column: 2 });
  });
});

describe("every reader counts lines the same way", () => {
  it("an inventory with CR-only line ends gets its errors on the lines rendering shows", async () => {
    const { parseInventory } = await import("../src/inventory/load.js");
    const text = "# c\rsymbol,syllabic\rp,-\rb,x\r";
    const r = parseInventory(text, "segments.csv");
    const d = r.diagnostics.find((x) => x.severity === "error")!;
    expect([d.line, d.column]).toEqual([4, 3]);
    expect(renderDiagnostic(d, text).split("\n")[1]).toBe("    4 | b,x");
  });
});
