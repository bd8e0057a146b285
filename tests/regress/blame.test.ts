// Blame on hand-made derivations (every kind of divergence), the segment diff the reports mark,
// the colour decision (NO_COLOR, terminals), and the compare / accept commands as registered.

import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Command } from "commander";
import { afterEach, describe, expect, it, vi } from "vitest";
import { blameDerivations, StepOrder } from "../../src/regress/blame.js";
import { diffSegments, segmentsOf } from "../../src/regress/segments.js";
import { registerCompare, useColor } from "../../src/cli/compare.js";
import { registerAccept } from "../../src/cli/accept.js";
import { ROOT } from "./support.js";

const d = (...pairs: [string, string][]) => pairs.map(([step, form]) => ({ step, form }));
const STEPS = ["syllabify", "flapping", "aspiration", "nasalisation"];

describe("blame at the first divergence of two derivations", () => {
  const order = new StepOrder(STEPS, STEPS);
  it("a step that no longer applies, or now applies", () => {
    expect(blameDerivations(d(["syllabify", "a.ta"], ["flapping", "a.ɾa"]), d(["syllabify", "a.ta"]), order)).toMatchObject({ rule: "flapping", how: "no longer applies", text: "flapping no longer applies" });
    expect(blameDerivations(d(["syllabify", "a.ta"]), d(["syllabify", "a.ta"], ["flapping", "a.ɾa"]), order)).toMatchObject({ rule: "flapping", how: "now applies" });
    // Old applied flapping then nasalisation; new skips flapping: flapping (earlier in the order) is blamed.
    expect(blameDerivations(d(["flapping", "x"], ["nasalisation", "y"]), d(["nasalisation", "z"]), order)).toMatchObject({ rule: "flapping", how: "no longer applies" });
    expect(blameDerivations(d(["nasalisation", "z"]), d(["flapping", "x"], ["nasalisation", "y"]), order)).toMatchObject({ rule: "flapping", how: "now applies" });
  });

  it("the same step with another result", () => {
    expect(blameDerivations(d(["flapping", "a.ɾa"]), d(["flapping", "a.ʔa"]), order)).toMatchObject({ rule: "flapping", how: "applies differently" });
  });

  it("a new step and a removed one", () => {
    const added = new StepOrder(STEPS, [...STEPS.slice(0, 3), "syllabic-r", "nasalisation"]);
    expect(blameDerivations(d(["aspiration", "x"]), d(["aspiration", "x"], ["syllabic-r", "y"]), added)).toMatchObject({ rule: "syllabic-r", how: "new step", text: "new step syllabic-r" });
    const removed = new StepOrder(STEPS, STEPS.filter((s) => s !== "flapping"));
    expect(blameDerivations(d(["flapping", "x"], ["nasalisation", "y"]), d(["nasalisation", "z"]), removed)).toMatchObject({ rule: "flapping", how: "step removed", text: "step flapping removed" });
  });

  it("two steps reordered", () => {
    const swapped = new StepOrder(STEPS, ["syllabify", "aspiration", "flapping", "nasalisation"]);
    expect(blameDerivations(d(["flapping", "x"], ["aspiration", "y"]), d(["aspiration", "p"], ["flapping", "q"]), swapped)).toMatchObject({ rule: "aspiration", how: "moved" });
  });

  it("identical derivations blame nothing", () => {
    expect(blameDerivations(d(["flapping", "x"]), d(["flapping", "x"]), order)).toBeUndefined();
  });
});

describe("segments and their differences", () => {
  it("keeps diacritics, length and tie bars with their base letter", () => {
    expect(segmentsOf("ˈtʰɹ̥eɪ̃ːn")).toEqual(["ˈ", "tʰ", "ɹ̥", "e", "ɪ̃ː", "n"]);
    expect(segmentsOf("t͡ʃa")).toEqual(["t͡ʃ", "a"]);
  });
  it("marks what only the old and only the new form has", () => {
    expect(diffSegments("ˈθɝ.ɾi", "ˈθɝ.ti")).toEqual([{ text: "ˈθɝ.", kind: "same" }, { text: "ɾ", kind: "old" }, { text: "t", kind: "new" }, { text: "i", kind: "same" }]);
    expect(diffSegments("ab", "ab")).toEqual([{ text: "ab", kind: "same" }]);
  });
});

describe("colour", () => {
  afterEach(() => vi.unstubAllEnvs());
  const tty = { isTTY: true } as NodeJS.WriteStream;
  const pipe = { isTTY: false } as NodeJS.WriteStream;
  it("only on a terminal and when NO_COLOR is unset or empty; the flags win", () => {
    vi.stubEnv("NO_COLOR", "");
    expect(useColor(undefined, tty)).toBe(true);
    expect(useColor(undefined, pipe)).toBe(false);
    vi.stubEnv("NO_COLOR", "1");
    expect(useColor(undefined, tty)).toBe(false);
    expect(useColor(true, pipe)).toBe(true);
    expect(useColor(false, tty)).toBe(false);
  });
});

describe("the commands as registered", () => {
  it("compare the shipped baseline with itself: exit 0, JSON on stdout; accept it elsewhere", async () => {
    const baseline = join(ROOT, "lexicons", "demo", "baseline");
    const out: string[] = [];
    const spy = vi.spyOn(process.stdout, "write").mockImplementation((c: unknown) => (out.push(String(c)), true));
    try {
      const program = new Command().exitOverride();
      registerCompare(program);
      registerAccept(program);
      await program.parseAsync(["node", "strata", "compare", baseline, baseline, "--json", "-d", "general"]);
      expect(process.exitCode).toBe(0);
      const doc = JSON.parse(out.join(""));
      expect(doc.varieties.map((v: { name: string; counts: { unchanged: number } }) => [v.name, v.counts.unchanged])).toEqual([["general", 391]]);
      const target = join(mkdtempSync(join(tmpdir(), "strata-accept-")), "baseline");
      await program.parseAsync(["node", "strata", "accept", baseline, "-o", target]);
      expect(process.exitCode).toBe(0);
      expect(readFileSync(join(target, "build.json"), "utf8")).toBe(readFileSync(join(baseline, "build.json"), "utf8"));
    } finally {
      spy.mockRestore();
      process.exitCode = 0;
    }
  });
});
