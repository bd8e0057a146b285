// The compact, versioned byte form of machines and runners for caches under build/: a header with
// a CRC-32 of the payload (so a corrupt or truncated cache is detected), then the payload. A
// machine's arcs are LEB128 varints; a runner's tables are raw 32-bit words, so that reading one
// back makes views of the bytes instead of decoding every entry.

import * as zlib from "node:zlib";
import { packedFinals, PackedBimachine, STRING } from "./bimachine.js";
import { COPY, DeterministicRunner } from "./frozen.js";
import { Fst, FstError, type Label } from "./fst.js";
import { FunctionalRunner } from "./functional.js";

/**
 * Layout (little-endian): bytes 0–3 "STFM"; 4–5 format version; 6 kind (1 machine,
 * 2 deterministic runner, 3 functional runner); 7 zero; 8–11 payload length; 12–15 CRC-32 of the
 * payload; then the payload: unsigned LEB128 varints (signed values zigzag-encoded), and each
 * table of a runner as its length (a varint), zero bytes up to the next multiple of 4 from the
 * start of the bytes, then its entries as little-endian 32-bit words (bytes for a byte table).
 *
 * Version 2 stored a functional runner's packed two-pass tables (bimachine.ts) with it, and
 * runner tables as words instead of varints.
 */
export const FORMAT_VERSION = 2;
const MAGIC = [0x53, 0x54, 0x46, 0x4d];
const HEADER = 16;
type Kind = 1 | 2 | 3;

/** Node's own CRC-32 (from Node 20.15 and 22.2); older releases use the table loop below. */
const nativeCrc32 = (zlib as { crc32?: (data: Uint8Array, value?: number) => number }).crc32;

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
  if (nativeCrc32 !== undefined) return nativeCrc32(bytes.subarray(from, to)) >>> 0;
  return crc32Loop(bytes, from, to);
}

/** The same CRC-32 computed byte by byte (for Node releases without zlib.crc32; tests compare the two). */
export function crc32Loop(bytes: Uint8Array, from = 0, to = bytes.length): number {
  let c = 0xffffffff;
  for (let i = from; i < to; i++) c = (CRC_TABLE[(c ^ (bytes[i] as number)) & 0xff] as number) ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** Whether this machine stores 32-bit words little-endian (then a table is read as a view of the bytes). */
const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;

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
  private room(n: number): void {
    if (this.length + n <= this.buf.length) return;
    const b = new Uint8Array(Math.max(this.buf.length * 2, this.length + n));
    b.set(this.buf);
    this.buf = b;
  }
  /** A table of 32-bit words: its length, padding to a multiple of 4, the words. */
  words(a: Int32Array): void {
    this.uint(a.length);
    this.room(3 + a.length * 4);
    while (this.length % 4 !== 0) this.buf[this.length++] = 0;
    if (LITTLE_ENDIAN) this.buf.set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength), this.length);
    else {
      const view = new DataView(this.buf.buffer);
      for (let i = 0; i < a.length; i++) view.setInt32(this.length + i * 4, a[i] as number, true);
    }
    this.length += a.length * 4;
  }
  /** A table of bytes: its length, the bytes. */
  bytes(a: Uint8Array): void {
    this.uint(a.length);
    this.room(a.length);
    this.buf.set(a, this.length);
    this.length += a.length;
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
  /**
   * A table written by Writer.words: a view of the bytes where they lie on a 4-byte boundary of a
   * little-endian machine (the runner then shares the caller's bytes), else a copy.
   */
  words(): Int32Array {
    const n = this.uint();
    while (this.at % 4 !== 0) {
      if (this.at >= this.bytes.length) throw new FstError("payload ends early");
      if (this.bytes[this.at++] !== 0) throw new FstError("padding is not zero (corrupt)");
    }
    if (n > (this.bytes.length - this.at) / 4) throw new FstError("array longer than the payload");
    const from = this.bytes.byteOffset + this.at;
    this.at += n * 4;
    if (LITTLE_ENDIAN && from % 4 === 0) return new Int32Array(this.bytes.buffer, from, n);
    const view = new DataView(this.bytes.buffer, from, n * 4);
    const a = new Int32Array(n);
    for (let i = 0; i < n; i++) a[i] = view.getInt32(i * 4, true);
    return a;
  }
  /** A table written by Writer.bytes (a view of the bytes). */
  bytes8(): Uint8Array {
    const n = this.count();
    this.at += n;
    return this.bytes.subarray(this.at - n, this.at);
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

/** Above every label and pool entry (a bound for the checks below). */
const LABELS = 2 ** 31;

// The checks of a table read back are plain loops: a callback per entry (`every`) cost ~100 ms
// on the packed tables of one large block, before the engine optimised it.

/** Whether every entry of `a` lies in [lo, hi). */
function within(a: Int32Array, lo: number, hi: number): boolean {
  for (let i = 0; i < a.length; i++) {
    const x = a[i] as number;
    if (x < lo || x >= hi) return false;
  }
  return true;
}

/** Whether `a` is non-negative and never decreases. */
function ascending(a: Int32Array): boolean {
  let prev = 0;
  for (let i = 0; i < a.length; i++) {
    const x = a[i] as number;
    if (x < prev) return false;
    prev = x;
  }
  return true;
}

/** Whether every output code of `a` is nothing, a label, COPY or the offset of a string in a pool of `poolLength`. */
function outputsIn(a: Int32Array, poolLength: number): boolean {
  for (let i = 0; i < a.length; i++) {
    const o = a[i] as number;
    if (o < 0 && o !== COPY && -o - 1 >= poolLength) return false;
  }
  return true;
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
  w.words(d.classOf);
  w.words(d.next);
  w.words(d.out);
  w.words(d.finalAt);
  w.words(d.pool);
  return w.finish(2);
}

export function deserialiseDeterministic(bytes: Uint8Array): Deserialised<DeterministicRunner> {
  return guard(() => {
    const r = open(bytes, 2);
    const start = r.uint();
    const classes = r.uint();
    const classOf = r.words();
    const next = r.words();
    const out = r.words();
    const finalAt = r.words();
    const pool = r.words();
    r.done();
    const n = finalAt.length;
    check(classes > 0 && next.length === n * classes && out.length === next.length, "table sizes");
    check(start < n, "start state");
    check(within(classOf, 0, classes), "input classes");
    check(within(next, -1, n), "targets");
    check(within(pool, 0, LABELS) && within(finalAt, -1, pool.length), "final outputs");
    check(outputsIn(out, pool.length), "arc outputs");
    return new DeterministicRunner(start, classes, classOf, next, out, finalAt, pool);
  });
}

/**
 * A functional runner with its packed two-pass tables (made here if the runner has not made them
 * yet), so that a runner read back runs at once: packing en-us's largest block takes ~60 ms.
 */
export function serialiseFunctional(f: FunctionalRunner): Uint8Array {
  const w = new Writer();
  w.uint(f.classes);
  w.words(f.classOf);
  w.uint(f.start);
  w.words(f.rowFirst);
  w.words(f.arcTarget);
  w.words(f.arcOut);
  w.words(f.finalAt);
  w.words(f.pool);
  w.int(f.rStart);
  w.words(f.rNext);
  w.words(f.rBits);
  w.uint(f.words);
  const p = f.packed();
  w.uint(p === null ? 0 : 1);
  if (p !== null) {
    w.words(p.rz);
    w.bytes(p.startOk);
    w.uint(p.zs);
    w.words(p.step);
    // Most left-to-right entries write no string: only the others are kept, as (index, offset) pairs.
    const at: number[] = [];
    for (let k = 0; k < p.step.length; k++) if (writesString(p.step[k] as number)) at.push(k);
    w.words(Int32Array.from(at));
    w.words(Int32Array.from(at, (k) => p.strings[k] as number));
    w.uint(p.maxOut);
    w.uint(p.maxFinal);
  }
  return w.finish(3);
}

/** Whether a left-to-right entry of the packed tables writes a string (-1, no arc, writes nothing). */
const writesString = (v: number): boolean => v >= 0 && (v & 1023) === STRING;

/** The packed tables stored after a runner's own, checked against them; null when the runner had none (they do not fit). */
function readPacked(r: Reader, f: FunctionalRunner): PackedBimachine | null {
  if (r.uint() === 0) return null;
  const rz = r.words();
  const startOk = r.bytes8();
  const zs = r.uint();
  const step = r.words();
  const stringAt = r.words();
  const stringOffset = r.words();
  const maxOut = r.uint();
  const maxFinal = r.uint();
  const size = f.classOf.length;
  const sets = f.numSets;
  const states = f.numStates;
  const pool = f.pool;
  check(rz.length === (sets + 1) * size && startOk.length === sets + 1 && step.length === states * zs, "packed table sizes");
  // The entries of rz and step are not checked one by one (the checksum covers them; a loop over
  // the ~360 000 entries of en-us's largest block cost ~15 ms of every cached run's start): a
  // wrong entry can only come from a wrong writer, and typed arrays read out of range give wrong
  // outputs, never a crash. The string offsets, which index the pool, are checked.
  check(stringAt.length === stringOffset.length, "packed strings");
  const strings = new Int32Array(step.length);
  for (let j = 0; j < stringAt.length; j++) {
    const k = stringAt[j] as number;
    const o = stringOffset[j] as number;
    check(k >= 0 && k < step.length && writesString(step[k] as number), "packed string entries");
    check(o >= 0 && o < pool.length && o + (pool[o] as number) < pool.length, "packed string offsets");
    strings[k] = o;
  }
  return new PackedBimachine(size, sets, f.rStart, rz, startOk, zs, step, strings, f.start, packedFinals(f.finalAt), pool, maxOut, maxFinal);
}

/**
 * Reads `serialiseFunctional` output back. The runner's tables (and the packed ones) are views of
 * `bytes` where they lie on 4-byte boundaries: the bytes must not be changed afterwards.
 */
export function deserialiseFunctional(bytes: Uint8Array): Deserialised<FunctionalRunner> {
  return guard(() => {
    const r = open(bytes, 3);
    const classes = r.uint();
    const classOf = r.words();
    const start = r.uint();
    const rowFirst = r.words();
    const arcTarget = r.words();
    const arcOut = r.words();
    const finalAt = r.words();
    const pool = r.words();
    const rStart = r.int();
    const rNext = r.words();
    const rBits = r.words();
    const words = r.uint();
    const n = finalAt.length;
    check(classes > 0 && rowFirst.length === n * classes + 1, "row table size");
    check(rowFirst[rowFirst.length - 1] === arcTarget.length && arcOut.length === arcTarget.length, "arc tables");
    check(ascending(rowFirst), "row offsets");
    check(start < Math.max(n, 1) && words === (n + 31) >>> 5, "start state and set width");
    check(within(classOf, 0, classes) && within(arcTarget, 0, n), "classes and targets");
    check(within(pool, 0, LABELS) && within(finalAt, -1, pool.length), "final outputs");
    check(outputsIn(arcOut, pool.length), "arc outputs");
    const sets = words === 0 ? 0 : rBits.length / words;
    check(Number.isInteger(sets) && rNext.length === sets * classes, "right-to-left table");
    check(rStart >= -1 && rStart < sets && within(rNext, -1, sets), "right-to-left targets");
    const runner = new FunctionalRunner(classes, classOf, start, rowFirst, arcTarget, arcOut, finalAt, pool, rStart, rNext, rBits, words);
    runner.adoptPacked(readPacked(r, runner));
    r.done();
    return runner;
  });
}
