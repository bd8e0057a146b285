// The comparison point: a subset of the en-us rules written by hand as JavaScript regular
// expressions over IPA strings, the way a team without a rule compiler would do it. Input is the
// syllabified, stressed broad form Strata writes ('.' between syllables, ˈ ˌ opening stressed
// ones); output must equal Strata's narrow IPA for the same rules (checked by the bench and tests).

// Characters of the strings (en-us inventory and diacritics, lexicons/en-us/*.csv):
// a syllable opens at the start of the word or after one of . ˈ ˌ (U+02C8, U+02CC).
const B = "[.\u02C8\u02CC]";
const NOT_B = "[^.\u02C8\u02CC]";
/** Last character of every nucleus (i ɪ eɪ ɛ æ ɑ ɔ oʊ ʊ u ʌ ə aɪ aʊ ɔɪ ɚ ɝ): a nucleus ends here. */
const V_END = "[iɪɛæɑɔʊuʌəɚɝ]";
/** First character of every nucleus: a nucleus starts here. */
const V_START = "[iɪeɛæɑɔoʊuʌəaɚɝ]";
/** t and d, but not the first half of the affricates tʃ dʒ (the tokeniser reads those as one segment). */
const T_D = "(?:t(?!ʃ)|d(?!ʒ))";

/**
 * dark-l: `l -> ɫ / _ where coda` — an l after the nucleus of its own syllable: some nucleus
 * earlier in the same syllable (no boundary between).
 */
const DARK_L = new RegExp(`(?<=${V_END}${NOT_B}*)l`, "g");

/**
 * flapping (boundary-blind, so '.' ˈ ˌ between the segments are skipped):
 * `{t d} -> ɾ / V (ɹ) _ [+syllabic -stress -nasal]`. The next nucleus is unstressed when a '.'
 * separates it from t/d, or when no boundary does and the syllable holding both opened with '.'
 * or at the word start (not with ˈ ˌ).
 */
const FLAP = new RegExp(
  `(?<=${V_END}${B}?(?:ɹ${B}?)?)(?:${T_D}(?=\\.${V_START})|(?<![\u02C8\u02CC]${NOT_B}*)${T_D}(?=${V_START}))`,
  "g",
);

/** First character of every sonorant (the nuclei, m n ŋ, l ɫ ɹ w j ɾ). */
const SONORANT_START = "[iɪeɛæɑɔoʊuʌəaɚɝmnŋlɫɹwjɾ]";

/**
 * aspiration: `{p t k} -> [+spread_glottis] / _ [+sonorant] where syllable-initial, stressed`
 * and `/ # _ [+sonorant]` — right after ˈ or ˌ (a stressed syllable's first segment), or first in
 * the word, and followed by a sonorant.
 */
const ASPIRATE = new RegExp(`(?<=^|[\u02C8\u02CC])(?:p|t(?!ʃ)|k)(?=${SONORANT_START})`, "g");

/**
 * approximant devoicing: `[-syllabic +approximant] -> [-voice] / [-sonorant -continuant
 * +spread_glottis] _ where onset` and `/ h _ where onset` — l ɹ w j (and ɫ ɾ, which never follow
 * an aspirated stop) right after pʰ tʰ kʰ or h with a nucleus later in the same syllable.
 */
const DEVOICE = new RegExp(`(?<=[ptk]\u02B0|h)[lɫɹwjɾ](?=${NOT_B}*${V_START})`, "g");
/**
 * Unicode 15: U+0325 COMBINING RING BELOW marks voicelessness (IPA Handbook 1999); on j, which has
 * a descender, our writer puts U+030A COMBINING RING ABOVE instead (Handbook, from memory).
 */
const VOICELESS: Readonly<Record<string, string>> = { l: "l\u0325", ɫ: "ɫ\u0325", ɹ: "ɹ\u0325", w: "w\u0325", j: "j\u030A", ɾ: "ɾ\u0325" };

/**
 * vowel nasalisation: `[+syllabic -consonantal] -> [+nasal] / _ [+nasal -syllabic] where nucleus`
 * — a nucleus right before m n ŋ (no boundary between). U+0303 COMBINING TILDE goes after the
 * nucleus symbol, after a diphthong's first letter (ãɪ, as Strata's writer puts it:
 * src/inventory/diphthong.ts); i, u, a, e, o have precomposed NFC forms (ĩ ũ ã ẽ õ).
 */
const NASALISE = /(eɪ|oʊ|aɪ|aʊ|ɔɪ|[iɪɛæɑɔʊuʌəɚɝ])(?=[mnŋ])/g;
const NASAL: Readonly<Record<string, string>> = Object.fromEntries(
  ["eɪ", "oʊ", "aɪ", "aʊ", "ɔɪ", "i", "ɪ", "ɛ", "æ", "ɑ", "ɔ", "ʊ", "u", "ʌ", "ə", "ɚ", "ɝ"].map((v) => [v, (v.length === 2 ? v[0] + "\u0303" + v[1] : v + "\u0303").normalize("NFC")]),
);

/** The cascade, in the en-us grammar's order: dark-l, flapping, aspiration, approximant devoicing, nasalisation. */
export function regexCascade(broad: string): string {
  return broad
    .replace(DARK_L, "ɫ")
    .replace(FLAP, "ɾ")
    .replace(ASPIRATE, "$&\u02B0")
    .replace(DEVOICE, (c) => VOICELESS[c]!)
    .replace(NASALISE, (v) => NASAL[v]!);
}

/** The form after each rule of the cascade, in its order (the last is `regexCascade(broad)`). */
export function cascadeSteps(broad: string): string[] {
  const dark = broad.replace(DARK_L, "ɫ");
  const flapped = dark.replace(FLAP, "ɾ");
  const aspirated = flapped.replace(ASPIRATE, "$&\u02B0");
  const devoiced = aspirated.replace(DEVOICE, (c) => VOICELESS[c]!);
  return [dark, flapped, aspirated, devoiced, devoiced.replace(NASALISE, (v) => NASAL[v]!)];
}

/** The rule names of the cascade, as the en-us grammar names them (bench/subset.ts cuts the same rules). */
export const REGEX_RULES = ["dark-l", "flapping", "aspiration", "approximant-devoicing", "nasalisation"] as const;
