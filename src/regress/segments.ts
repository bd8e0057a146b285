// Which segments differ between an old and a new narrow form, for marking them in reports: the
// forms are split into segments (a base letter with its diacritics and length marks; stress marks,
// syllable dots and spaces on their own) and aligned by a longest common subsequence.

/** One piece of an aligned pair: the same in both, or only in the old / only in the new form. */
export interface DiffPart {
  readonly text: string;
  readonly kind: "same" | "old" | "new";
}

// Combining marks (\p{M}) and the IPA's superscript and length modifiers attach to the segment before.
const ATTACHES = /^[\p{M}ʰʱʲʷˠˤⁿˡʼ˞ːˑ͡]$/u;

/** Splits narrow IPA into segments (see the file comment). */
export function segmentsOf(ipa: string): string[] {
  const out: string[] = [];
  let tie = false;
  for (const ch of ipa) {
    if (out.length > 0 && (ATTACHES.test(ch) || tie)) {
      out[out.length - 1] += ch;
      tie = ch === "\u0361" || ch === "\u035C";
      continue;
    }
    tie = false;
    out.push(ch);
  }
  return out;
}

/** The two forms aligned segment by segment: common parts, then what only the old and only the new form has. */
export function diffSegments(oldForm: string, newForm: string): DiffPart[] {
  const a = segmentsOf(oldForm);
  const b = segmentsOf(newForm);
  // Longest common subsequence table (forms are short: a few dozen segments at most).
  const w = b.length + 1;
  const lcs = new Uint16Array((a.length + 1) * w);
  for (let i = a.length - 1; i >= 0; i--) {
    for (let j = b.length - 1; j >= 0; j--) {
      lcs[i * w + j] = a[i] === b[j] ? lcs[(i + 1) * w + j + 1]! + 1 : Math.max(lcs[(i + 1) * w + j]!, lcs[i * w + j + 1]!);
    }
  }
  const parts: DiffPart[] = [];
  const push = (text: string, kind: DiffPart["kind"]): void => {
    const last = parts.at(-1);
    if (last !== undefined && last.kind === kind) parts[parts.length - 1] = { text: last.text + text, kind };
    else parts.push({ text, kind });
  };
  let i = 0;
  let j = 0;
  while (i < a.length || j < b.length) {
    if (i < a.length && j < b.length && a[i] === b[j]) {
      push(a[i]!, "same");
      i++;
      j++;
    } else if (i < a.length && (j >= b.length || lcs[(i + 1) * w + j]! >= lcs[i * w + j + 1]!)) {
      push(a[i]!, "old");
      i++;
    } else {
      push(b[j]!, "new");
      j++;
    }
  }
  return parts;
}
