// Tie bars in a machine engine's output: every segment's text with tie bars between its letters
// (t͡ʃ, a͡ɪ; inventory/diphthong.ts), made once per alphabet, so rendering costs nothing more.

import { withTieBars } from "../inventory/diphthong.js";
import type { SymbolView } from "./render.js";

/** `view` with tie bars in its segment texts when `ties` is set; `view` itself otherwise. */
export function tiedView(view: SymbolView, ties: boolean): SymbolView {
  if (!ties) return view;
  return { ...view, texts: view.texts.map((t, id) => (view.kind[id] === 3 ? withTieBars(t) : t)) };
}
