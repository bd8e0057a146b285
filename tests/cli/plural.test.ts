// Counts in messages: `plural` writes whole numbers with commas as toLocaleString("en-US") does,
// without loading the locale data. fast-check's seed is the run's (tests/support/fc-setup.ts).

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { plural } from "../../src/cli/exit.js";

describe("plural", () => {
  it("groups digits as toLocaleString('en-US') does, for every safe integer", () => {
    fc.assert(fc.property(fc.oneof(fc.integer(), fc.maxSafeInteger(), fc.integer({ min: Number.MIN_SAFE_INTEGER, max: 0 }), fc.nat({ max: 10_000 })), (n) => {
      expect(plural(n, "row")).toBe(`${n.toLocaleString("en-US")} ${n === 1 ? "row" : "rows"}`);
    }));
    expect(plural(135155, "entry", "entries")).toBe("135,155 entries");
    expect(plural(1, "entry", "entries")).toBe("1 entry");
    expect(plural(1.5, "row")).toBe("1.5 rows");
  });
});
