// The byte form of the functional runner with its packed two-pass tables: read back, it runs
// without packing again, its tables are views of the bytes (copies where they are not aligned),
// and a damaged or inconsistent payload is refused. Also: the CRC-32 Node computes is the one
// the table loop computes.

import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { deserialiseFunctional, freezeFunctional, reverse, serialiseFunctional, type FunctionalRunner, type Label } from "../../src/fst/index.js";
import { crc32, crc32Loop } from "../../src/fst/serialise.js";
import { allStrings, arbSequential } from "./brute.js";

/** Functional runners that are not subsequential: reversed sequential machines. */
const arbRunner: fc.Arbitrary<FunctionalRunner> = arbSequential(4, 3)
  .map((t) => freezeFunctional(reverse(t)))
  .filter((r) => r.ok)
  .map((r) => (r as { runner: FunctionalRunner }).runner);

/** One runner with some arcs in its packed tables (a fixed seed, so the tests below are repeatable). */
const someRunner = (): FunctionalRunner => fc.sample(arbRunner.filter((r) => r.packed()?.step.some((v) => v >= 0) === true), { numRuns: 1, seed: 3 })[0]!;

function outputs(r: FunctionalRunner, search = false): (Label[] | null)[] {
  return allStrings(3, 4).map((w) => {
    const out: Label[] = [];
    return (search ? r.runSearching(w, out) : r.run(w, out)) ? out : null;
  });
}

describe("CRC-32", () => {
  it("is the ISO 3309 check value, from Node and from the table loop alike", () => {
    const nine = new TextEncoder().encode("123456789");
    expect(crc32(nine)).toBe(0xcbf43926);
    expect(crc32Loop(nine)).toBe(0xcbf43926);
  });

  it("gives the same value both ways on any bytes and range", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 300 }), fc.nat(), fc.nat(), (b, x, y) => {
        const from = b.length === 0 ? 0 : x % b.length;
        const to = from + (b.length === from ? 0 : y % (b.length - from + 1));
        expect(crc32(b, from, to)).toBe(crc32Loop(b, from, to));
      }),
      { numRuns: 200 },
    );
  });
});

describe("functional runners with their packed tables", () => {
  it("read back the tables they were written with, byte for byte, and run the same", () => {
    fc.assert(
      fc.property(arbRunner, (r) => {
        const bytes = serialiseFunctional(r);
        const back = deserialiseFunctional(bytes);
        expect(back.ok).toBe(true);
        if (!back.ok) return;
        const p = r.packed();
        const q = back.value.packed();
        expect(q === null).toBe(p === null);
        if (p !== null && q !== null) {
          for (const k of ["rz", "startOk", "step", "strings", "finalAt", "pool"] as const) expect(Array.from(q[k])).toEqual(Array.from(p[k]));
          expect([q.size, q.dead, q.rStart, q.zs, q.start, q.maxOut, q.maxFinal]).toEqual([p.size, p.dead, p.rStart, p.zs, p.start, p.maxOut, p.maxFinal]);
        }
        expect(serialiseFunctional(back.value)).toEqual(bytes);
        expect(outputs(back.value)).toEqual(outputs(r));
        expect(outputs(back.value, true)).toEqual(outputs(r));
      }),
      { numRuns: 100 },
    );
  });

  it("are views of aligned bytes and copies of unaligned ones", () => {
    const r = someRunner();
    const bytes = serialiseFunctional(r);
    const aligned = deserialiseFunctional(bytes);
    expect(aligned.ok && aligned.value.packed()!.step.buffer).toBe(bytes.buffer);
    const shifted = new Uint8Array(bytes.length + 1).subarray(1);
    shifted.set(bytes);
    const copied = deserialiseFunctional(shifted);
    expect(copied.ok).toBe(true);
    if (!copied.ok) return;
    expect(copied.value.packed()!.step.buffer).not.toBe(shifted.buffer);
    expect(outputs(copied.value)).toEqual(outputs(r));
  });

  it("refuse every flipped byte and every truncation", () => {
    fc.assert(
      fc.property(arbRunner, fc.nat(), fc.integer({ min: 1, max: 255 }), (r, at, x) => {
        const bytes = serialiseFunctional(r);
        const k = at % bytes.length;
        const bad = bytes.slice();
        bad[k] = (bad[k] as number) ^ x;
        expect(deserialiseFunctional(bad).ok).toBe(false);
        expect(deserialiseFunctional(bytes.slice(0, k)).ok).toBe(false);
      }),
      { numRuns: 100 },
    );
  });

  it("refuse packed tables whose sizes do not fit the machine, even under a good checksum", () => {
    const r = someRunner();
    const p = r.packed()!;
    (p as { zs: number }).zs = p.zs + 1;
    const back = deserialiseFunctional(serialiseFunctional(r));
    expect(back).toEqual({ ok: false, error: "inconsistent payload: packed table sizes" });
  });
});
