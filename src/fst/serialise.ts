// The compact, versioned byte form of machines and runners for caches under build/: a header with
// a CRC-32 of the payload (so a corrupt or truncated cache is detected), then LEB128 varints.

import { COPY, DeterministicRunner } from "./frozen.js";
import { Fst, FstError, type Label } from "./fst.js";
import { FunctionalRunner } from "./functional.js";

/**
 * Layout (little-endian): bytes 0–3 "STFM"; 4–5 format version; 6 kind (1 machine,
 * 2 deterministic runner, 3 functional runner); 7 zero; 8–11 payload length; 12–15 CRC-32 of the
 * payload; then the payload: unsigned LEB128 varints (signed values zigzag-encoded).
 */
export const FORMAT_VERSION = 1;
const MAGIC = [0x53, 0x54, 0x46, 0x4d];
const HEADER = 16;
type Kind = 1 | 2 | 3;

const CRC_TABLE = (() => {
  const t = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[n] = c >>> 0;
  }
  return t;
})();

/** CRC-32 as in ISO 3309 / ITU-T V.42 (reflected polynomial 0xEDB88320), the one zip and PNG use. */
export function crc32(bytes: Uint8Array, from = 0, to = bytes.length): number {
  let c = 0xffffffff;
  for (let i = from; i < to; i++) c = (CRC_TABLE[(c ^ (bytes[i] as number)) & 0xff] as number) ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

class Writer {
  private buf = new Uint8Array(1024);
  length = HEADER;
  uint(x: number): void {
    if (this.length + 10 > this.buf.length) {
      const b = new Uint8Array(this.buf.length * 2);
      b.set(this.buf);
      this.buf = b;
    }
    let v = x;
    while (v >= 0x80) {
      this.buf[this.length++] = (v % 0x80) | 0x80;
      v = Math.floor(v / 0x80);
    }
    this.buf[this.length++] = v;
  }
  int(x: number): void {
    this.uint(x >= 0 ? x * 2 : -x * 2 - 1);
  }
  uints(a: ArrayLike<number>): void {
    this.uint(a.length);
    for (let i = 0; i < a.length; i++) this.uint(a[i] as number);
  }
  ints(a: ArrayLike<number>): void {
    this.uint(a.length);
    for (let i = 0; i < a.length; i++) this.int(a[i] as number);
  }
  finish(kind: Kind): Uint8Array {
    const out = this.buf.slice(0, this.length);
    out.set(MAGIC, 0);
    const view = new DataView(out.buffer);
    view.setUint16(4, FORMAT_VERSION, true);
    out[6] = kind;
    out[7] = 0;
    view.setUint32(8, this.length - HEADER, true);
    view.setUint32(12, crc32(out, HEADER, out.length), true);
    return out;
  }
}

class Reader {
  constructor(
    private readonly bytes: Uint8Array,
    private at: number,
  ) {}
  uint(): number {
    let v = 0;
    let scale = 1;
    for (;;) {
      if (this.at >= this.bytes.length) throw new FstError("payload ends early");
      const b = this.bytes[this.at++] as number;
      v += (b & 0x7f) * scale;
      if (b < 0x80) break;
      scale *= 0x80;
      if (scale > 2 ** 49) throw new FstError("varint too long");
    }
    return v;
  }
  int(): number {
    const u = this.uint();
    return u % 2 === 0 ? u / 2 : -(u + 1) / 2;
  }
  count(): number {
    const n = this.uint();
    if (n > this.bytes.length - this.at) throw new FstError("array longer than the payload");
    return n;
  }
  uints(): Int32Array {
    const n = this.count();
    const a = new Int32Array(n);
    for (let i = 0; i < n; i++) a[i] = this.uint();
    return a;
  }
  ints(): Int32Array {
    const n = this.count();
    const a = new Int32Array(n);
    for (let i = 0; i < n; i++) a[i] = this.int();
    return a;
  }
  done(): void {
    if (this.at !== this.bytes.length) throw new FstError("bytes left after the payload");
  }
}

export type Deserialised<T> = { readonly ok: true; readonly value: T } | { readonly ok: false; readonly error: string };

function open(bytes: Uint8Array, kind: Kind): Reader {
  if (bytes.length < HEADER) throw new FstError(`too short for a header (${bytes.length} bytes)`);
  for (let k = 0; k < 4; k++) if (bytes[k] !== MAGIC[k]) throw new FstError("not a Strata machine file (bad magic)");
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const version = view.getUint16(4, true);
  if (version !== FORMAT_VERSION) throw new FstError(`format version ${version}, this build reads ${FORMAT_VERSION}`);
  if (bytes[6] !== kind) throw new FstError(`holds kind ${bytes[6]}, expected kind ${kind}`);
  if (bytes[7] !== 0) throw new FstError("reserved header byte is not zero (corrupt)");
  const len = view.getUint32(8, true);
  if (len !== bytes.length - HEADER) throw new FstError(`payload is ${bytes.length - HEADER} bytes, header says ${len} (truncated?)`);
  if (view.getUint32(12, true) !== crc32(bytes, HEADER, bytes.length)) throw new FstError("checksum mismatch (corrupt)");
  return new Reader(bytes, HEADER);
}

function guard<T>(f: () => T): Deserialised<T> {
  try {
    return { ok: true, value: f() };
  } catch (e) {
    if (e instanceof FstError) return { ok: false, error: e.message };
    throw e;
  }
}

function check(cond: boolean, what: string): void {
  if (!cond) throw new FstError(`inconsistent payload: ${what}`);
}

/** The byte form of a machine (state numbering, arc order and final outputs kept exactly). */
export function serialise(fst: Fst): Uint8Array {
  const w = new Writer();
  w.uint(fst.numStates);
  w.uint(fst.numStates === 0 ? 0 : fst.start);
  for (let s = 0; s < fst.numStates; s++) {
    const arcs = fst.arcs(s);
    w.uint(arcs.length);
    for (const a of arcs) {
      w.uint(a.input);
      w.uint(a.output);
      w.uint(a.target);
    }
    const f = fst.finalOutput(s);
    if (f === undefined) w.uint(0);
    else {
      w.uint(f.length + 1);
      for (const l of f) w.uint(l);
    }
  }
  return w.finish(1);
}

/** Reads `serialise` output back; a corrupt, truncated or foreign input gives `ok: false`. */
export function deserialise(bytes: Uint8Array): Deserialised<Fst> {
  return guard(() => {
    const r = open(bytes, 1);
    const n = r.count();
    const start = r.uint();
    const f = new Fst();
    f.addStates(n);
    if (n > 0) f.setStart(start);
    for (let s = 0; s < n; s++) {
      const m = r.count();
      for (let k = 0; k < m; k++) f.addArc(s, r.uint(), r.uint(), r.uint());
      const fl = r.uint();
      if (fl > 0) {
        const out: Label[] = [];
        for (let k = 1; k < fl; k++) out.push(r.uint());
        f.setFinal(s, out);
      }
    }
    r.done();
    return f;
  });
}

export function serialiseDeterministic(d: DeterministicRunner): Uint8Array {
  const w = new Writer();
  w.uint(d.start);
  w.uint(d.classes);
  w.uints(d.classOf);
  w.ints(d.next);
  w.ints(d.out);
  w.ints(d.finalAt);
  w.uints(d.pool);
  return w.finish(2);
}

export function deserialiseDeterministic(bytes: Uint8Array): Deserialised<DeterministicRunner> {
  return guard(() => {
    const r = open(bytes, 2);
    const start = r.uint();
    const classes = r.uint();
    const classOf = r.uints();
    const next = r.ints();
    const out = r.ints();
    const finalAt = r.ints();
    const pool = r.uints();
    r.done();
    const n = finalAt.length;
    check(classes > 0 && next.length === n * classes && out.length === next.length, "table sizes");
    check(start < n, "start state");
    check(classOf.every((c) => c < classes), "input classes");
    check(next.every((t) => t >= -1 && t < n), "targets");
    check(finalAt.every((f) => f < pool.length), "final outputs");
    check(out.every((o) => o >= 0 || o === COPY || -o - 1 < pool.length), "arc outputs");
    return new DeterministicRunner(start, classes, classOf, next, out, finalAt, pool);
  });
}

export function serialiseFunctional(f: FunctionalRunner): Uint8Array {
  const w = new Writer();
  w.uint(f.classes);
  w.uints(f.classOf);
  w.uint(f.start);
  w.uints(f.rowFirst);
  w.uints(f.arcTarget);
  w.ints(f.arcOut);
  w.ints(f.finalAt);
  w.uints(f.pool);
  w.int(f.rStart);
  w.ints(f.rNext);
  w.ints(f.rBits);
  w.uint(f.words);
  return w.finish(3);
}

export function deserialiseFunctional(bytes: Uint8Array): Deserialised<FunctionalRunner> {
  return guard(() => {
    const r = open(bytes, 3);
    const classes = r.uint();
    const classOf = r.uints();
    const start = r.uint();
    const rowFirst = r.uints();
    const arcTarget = r.uints();
    const arcOut = r.ints();
    const finalAt = r.ints();
    const pool = r.uints();
    const rStart = r.int();
    const rNext = r.ints();
    const rBits = r.ints();
    const words = r.uint();
    r.done();
    const n = finalAt.length;
    check(classes > 0 && rowFirst.length === n * classes + 1, "row table size");
    check(rowFirst[rowFirst.length - 1] === arcTarget.length && arcOut.length === arcTarget.length, "arc tables");
    check(start < Math.max(n, 1) && words === (n + 31) >>> 5, "start state and set width");
    check(classOf.every((c) => c < classes) && arcTarget.every((t) => t < n), "classes and targets");
    const sets = words === 0 ? 0 : rBits.length / words;
    check(Number.isInteger(sets) && rNext.length === sets * classes, "right-to-left table");
    check(rStart >= -1 && rStart < sets && rNext.every((t) => t >= -1 && t < sets), "right-to-left targets");
    return new FunctionalRunner(classes, classOf, start, rowFirst, arcTarget, arcOut, finalAt, pool, rStart, rNext, rBits, words);
  });
}
