// The delay between two outputs written in step with one input: which side is ahead and by what,
// or a mismatch (neither is a prefix of the other). Shared by the change domain and the
// comparison of two machines.

import type { Label } from "../fst/index.js";

/** Longest stretch by which one output may run ahead of its input or of another output in a search. */
export const MAX_DELAY = 12;

export type Delay = { readonly side: "first" | "second" | "even"; readonly rest: readonly Label[] } | "mismatch";

export const EVEN: Delay = { side: "even", rest: [] };

/** The delay after the first side writes `xs` and the second `ys`. */
export function advance(d: Delay, xs: readonly Label[], ys: readonly Label[]): Delay {
  if (d === "mismatch") return d;
  if (xs.length === 0 && ys.length === 0) return d;
  const u = d.side === "first" ? [...d.rest, ...xs] : xs;
  const v = d.side === "second" ? [...d.rest, ...ys] : ys;
  let k = 0;
  while (k < u.length && k < v.length) {
    if (u[k] !== v[k]) return "mismatch";
    k++;
  }
  if (k < u.length) return { side: "first", rest: u.slice(k) };
  if (k < v.length) return { side: "second", rest: v.slice(k) };
  return EVEN;
}

export const delayKey = (d: Delay): string => (d === "mismatch" ? "x" : `${d.side[0]}${d.rest.join(",")}`);

export const delayLength = (d: Delay): number => (d === "mismatch" ? 0 : d.rest.length);
