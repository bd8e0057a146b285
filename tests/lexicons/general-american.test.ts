// The shipped General American grammar (lexicons/en-us/grammar.strata) on real English words:
// broad forms from the CMU Pronouncing Dictionary, expected narrow IPA with its source beside each.

import { describe, expect, test } from "vitest";
import { cmu, derive, variety } from "./harness.js";

const general = () => variety("grammar.strata");

/** Runs a CMU headword (its first pronunciation) through the casual variety. */
const narrow = (word: string): string => derive(general(), cmu(word)).preferred;
/** Every variant (sorted) of a CMU headword. */
const variants = (word: string): readonly string[] => derive(general(), cmu(word)).all;

describe("the grammar loads", () => {
  test("without errors or warnings", () => {
    expect(general().diagnostics).toEqual([]);
  });
  test("its steps, in the documented order (DEVELOPERS.md; lexicons/en-us/common.strata)", () => {
    expect(general().grammar.steps.map((s) => s.name)).toEqual([
      "syllabify",
      "stress",
      "pre-voiced-lengthening",
      "dental-place",
      "dark-l",
      "syllabic-n",
      "syllabic-l",
      "schwa-deletion",
      "flapping",
      "glottal-stop",
      "aspiration",
      "approximant-devoicing",
      "nasalisation",
      "nasal-flap",
      "nasal-flap-merger",
    ]);
  });
});

describe("aspiration", () => {
  test("at the start of a stressed syllable", () => {
    // Kahn 1976; Ladefoged & Johnson, A Course in Phonetics, ch. 3 (from memory): p t k are aspirated at the start of a stressed syllable
    expect(narrow("attack")).toBe("əˈtʰæk");
    // same source: word-initial stressed /p/ and /k/
    expect(narrow("pin")).toBe("ˈpʰɪ̃n");
    expect(narrow("kit")).toBe("ˈkʰɪt");
    // same source: word-medial stressed syllable
    expect(narrow("appear")).toBe("əˈpʰɪɹ");
  });
  test("word-initially also before an unstressed vowel", () => {
    // Kahn 1976 (from memory): "potato" pʰəˈtʰeɪɾoʊ — the broad form is the usual dictionary one with an
    // unstressed last syllable (the CMU entry marks it with secondary stress, which would aspirate it)
    expect(derive(general(), "pəˈteɪtoʊ").preferred).toBe("pʰəˈtʰeɪ.ɾoʊ");
  });
  test("not after /s/ in the same onset", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): stops after s are unaspirated ("spin", "stop", "skill")
    expect(narrow("spin")).toBe("ˈspɪ̃n");
    expect(narrow("stop")).toBe("ˈstɑp");
    expect(narrow("skill")).toBe("ˈskɪɫ");
  });
  test("not at the start of an unstressed syllable inside a word", () => {
    // Kahn 1976 (from memory): "happy" has an unaspirated p before the unstressed vowel
    expect(narrow("happy")).toBe("ˈhæ.pi");
  });
});

describe("flapping", () => {
  test("t and d between a vowel and an unstressed vowel", () => {
    // Kahn 1976; Hayes 2009 ch. on rule ordering (from memory): "water", "butter", "city" have ɾ
    expect(narrow("water")).toBe("ˈwɔ.ɾɚ");
    expect(narrow("butter")).toBe("ˈbʌ.ɾɚ");
    expect(narrow("city")).toBe("ˈsɪ.ɾi");
    // same sources: /d/ flaps too ("rider"; its vowel keeps the length the /d/ gave it, below)
    expect(narrow("rider")).toBe("ˈɹaːɪ.ɾɚ");
  });
  test("after an r-coloured vowel or ɹ", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "party" pʰɑɹɾi
    expect(narrow("party")).toBe("ˈpʰɑɹ.ɾi");
  });
  test("rider keeps a longer vowel than writer: lengthening before flapping (counterbleeding)", () => {
    // Joos 1942; Chomsky 1964; Kiparsky 1968 (from memory): "writer" and "rider" both have a flap, and
    // differ in the length of the diphthong, which the /d/ conditioned before it became a flap
    expect(narrow("writer")).toBe("ˈɹaɪ.ɾɚ");
    expect(narrow("rider")).toBe("ˈɹaːɪ.ɾɚ");
    // same sources: the other classic pairs
    expect(narrow("latter")).toBe("ˈlæ.ɾɚ");
    expect(narrow("ladder")).toBe("ˈlæː.ɾɚ");
    expect(narrow("petal")).toBe("ˈpʰɛ.ɾɫ̩");
    expect(narrow("pedal")).toBe("ˈpʰɛː.ɾɫ̩");
  });
  test("not before a stressed vowel", () => {
    // Kahn 1976 (from memory): "attack", "atomic" keep an aspirated t before the stressed vowel
    expect(narrow("attack")).not.toContain("ɾ");
    expect(narrow("atomic")).toBe("əˈtʰɑ.mɪk");
  });
  test("not after a nasal: there n + t become a nasal flap (optional), or stay", () => {
    // Ladefoged & Johnson, ch. 3; Wells 1982 vol. 3 (from memory): "planted" with a nasal flap, or n + t
    expect(variants("planted")).toEqual(["ˈpʰl̥æ̃.ɾ̃ɪd", "ˈpʰl̥æ̃n.tɪd"]);
  });
});

describe("vowel nasalisation", () => {
  test("before a nasal in the same syllable", () => {
    // Ladefoged & Johnson, ch. 4; Cohn 1993 (from memory): "man", "can't", "sing"
    expect(narrow("man")).toBe("ˈmæ̃n");
    expect(narrow("can't")).toBe("ˈkʰæ̃nt");
    expect(narrow("sing")).toBe("ˈsɪ̃ŋ");
  });
  test("not before a nasal that starts the next syllable", () => {
    // same sources (from memory): "many" mɛ.ni has an oral ɛ in this grammar's syllable-bound rule
    expect(narrow("many")).toBe("ˈmɛ.ni");
  });
});

describe("dark l", () => {
  test("velarised in the coda", () => {
    // Giegerich 1992 ch. 9; Ladefoged & Johnson, ch. 3 (from memory): "feel", "milk", "help" have ɫ
    expect(narrow("feel")).toBe("ˈfiɫ");
    expect(narrow("milk")).toBe("ˈmɪɫk");
    expect(narrow("help")).toBe("ˈhɛɫp");
  });
  test("clear in the onset", () => {
    // same sources: "leaf", "yellow" have clear l
    expect(narrow("leaf")).toBe("ˈlif");
    expect(narrow("yellow")).toBe("ˈjɛ.loʊ");
  });
});

describe("approximant devoicing", () => {
  test("after an aspirated stop in the same onset", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "play" pʰl̥eɪ, "try" tʰɹ̥aɪ, "twin" tʰw̥ɪn, "cute" kʰj̊ut (ring above on j: Handbook of the IPA 1999, from memory)
    expect(narrow("play")).toBe("ˈpʰl̥eɪ");
    expect(narrow("try")).toBe("ˈtʰɹ̥aɪ");
    expect(narrow("twin")).toBe("ˈtʰw̥ɪ̃n");
    expect(narrow("cute")).toBe("ˈkʰj̊ut");
    expect(narrow("apply")).toBe("əˈpʰl̥aɪ");
  });
  test("not after an unaspirated stop (s + stop)", () => {
    // same source (from memory): "spray" has a voiced ɹ after the unaspirated p
    expect(narrow("spray")).toBe("ˈspɹeɪ");
  });
});

describe("dental place before θ ð", () => {
  test("t d n take dental place", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "eighth" eɪt̪θ, "tenth" tʰɛ̃n̪θ, "month"; Unicode U+032A COMBINING BRIDGE BELOW marks dental (IPA Handbook 1999)
    expect(narrow("eighth")).toBe("ˈeɪt̪θ");
    expect(narrow("tenth")).toBe("ˈtʰɛ̃n̪θ");
    expect(narrow("month")).toBe("ˈmʌ̃n̪θ");
    // same source: "width" has a dental d
    expect(narrow("width")).toContain("d̪θ");
  });
  test("not before other fricatives", () => {
    // Common practice, no source: t stays alveolar before s ("eights")
    expect(narrow("eights")).toBe("ˈeɪts");
  });
});

describe("glottal stop and syllabic n", () => {
  test("button: ʔn̩ preferred, tn̩ the other variant", () => {
    // Ladefoged & Johnson, ch. 3; Wells 1982 vol. 3 (from memory): "button" bʌʔn̩, also bʌtn̩
    expect(narrow("button")).toBe("ˈbʌ.ʔn̩");
    expect(variants("button")).toEqual(["ˈbʌ.tn̩", "ˈbʌ.ʔn̩"]);
  });
  test("after any sonorant", () => {
    // same sources: "cotton", "mountain" mãʊnʔn̩, "Latin"
    expect(narrow("cotton")).toBe("ˈkʰɑ.ʔn̩");
    expect(narrow("mountain")).toBe("ˈmãʊn.ʔn̩");
    expect(narrow("latin")).toBe("ˈlæ.ʔn̩");
  });
  test("syllabic n after d and s, where no glottal stop is possible", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "sudden" sʌdn̩, "lesson" lɛsn̩
    // (the vowel before the /d/ of "sudden" is lengthened: Peterson & Lehiste 1960, from memory)
    expect(variants("sudden")).toEqual(["ˈsʌː.dn̩"]);
    expect(variants("lesson")).toEqual(["ˈlɛ.sn̩"]);
  });
});

describe("syllabic l", () => {
  test("bottle: flapped t + syllabic ɫ̩ preferred, schwa + ɫ the other variant", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "bottle" bɑɾɫ̩; U+0329 COMBINING VERTICAL LINE BELOW marks syllabic (IPA Handbook 1999)
    expect(narrow("bottle")).toBe("ˈbɑ.ɾɫ̩");
    expect(variants("bottle")).toEqual(["ˈbɑ.ɾəɫ", "ˈbɑ.ɾɫ̩"]);
  });
  test("after d and t", () => {
    // same source: "pedal", "little", "metal"
    expect(narrow("pedal")).toBe("ˈpʰɛː.ɾɫ̩");
    expect(narrow("little")).toBe("ˈlɪ.ɾɫ̩");
    expect(narrow("metal")).toBe("ˈmɛ.ɾɫ̩");
  });
});

describe("pre-voiced lengthening", () => {
  test("longer before a voiced obstruent of the same syllable", () => {
    // Peterson & Lehiste 1960; Ladefoged & Johnson, ch. 4 (from memory): "bead" is longer than "beat"; U+02D0 MODIFIER LETTER TRIANGULAR COLON marks length
    expect(narrow("bead")).toBe("ˈbiːd");
    expect(narrow("beat")).toBe("ˈbit");
    expect(narrow("bad")).toBe("ˈbæːd");
    expect(narrow("bat")).toBe("ˈbæt");
    expect(narrow("rise")).toBe("ˈɹaːɪz");
    expect(narrow("rice")).toBe("ˈɹaɪs");
  });
});

describe("syllabification by the Maximal Onset Principle", () => {
  test("the longest legal onset goes to the next syllable", () => {
    // Kahn 1976; Selkirk 1984 (from memory): "extra" ɛk.stɹə, "astronaut" æ.stɹə.nɑt, "constrain" kən.stɹeɪn
    expect(narrow("extra")).toBe("ˈɛk.stɹə");
    expect(narrow("astronaut")).toBe("ˈæ.stɹəˌnɑt");
    expect(narrow("constrain")).toBe("kʰə̃nˈstɹẽɪn");
  });
  test("tl is not an English onset; ŋ never starts a syllable", () => {
    // Giegerich 1992 ch. 6; Hammond 1999 (from memory): "atlas" æt.ləs, "singer" sɪŋ.ɚ (the t, in the
    // coda, is glottalised in casual speech: the other variant keeps it)
    expect(variants("atlas")).toEqual(["ˈæt.ləs", "ˈæʔ.ləs"]);
    expect(narrow("singer")).toBe("ˈsɪ̃ŋ.ɚ");
  });
});

describe("stress placement", () => {
  test("the mark stands before the whole stressed syllable, onset included", () => {
    // Handbook of the IPA 1999, p. 14 (from memory): the stress mark precedes the stressed syllable
    expect(narrow("attack")).toMatch(/^ə\u02C8tʰæk$/);
    expect(narrow("constrain")).toMatch(/\u02C8stɹ/);
    // same source: secondary stress ˌ (U+02CC) before its syllable
    expect(narrow("astronaut")).toMatch(/\u02CCnɑt$/);
  });
  test("default stress for unmarked entries: penult if heavy, else antepenult", () => {
    // Chomsky & Halle 1968; Hayes 1982 (from memory): "agenda" (closed penult), "aroma" (tense penult), "America", "cinema" (light penult)
    expect(derive(general(), "ədʒɛndə").preferred).toBe("əˈdʒɛ̃ːn.də");
    expect(derive(general(), "əɹoʊmə").preferred).toBe("əˈɹoʊ.mə");
    expect(derive(general(), "əmɛɹɪkə").preferred).toBe("əˈmɛ.ɹɪ.kə");
    expect(derive(general(), "sɪnəmə").preferred).toBe("ˈsɪ.nə.mə");
  });
  test("default stress does not touch marked entries", () => {
    // Common practice, no source: the lexicon's own stress wins ("cigarette" with final stress)
    expect(derive(general(), "ˌsɪɡəˈɹɛt").preferred).toBe("ˌsɪː.ɡəˈɹɛt");
  });
});

describe("phonetician's review fixes (each with its source)", () => {
  test("flapping needs a vowel before the stop: never after a syllabic consonant", () => {
    // Kahn 1976 (from memory): the flapping site is after a vowel (or vowel + r); "penalty" has ɫ̩ then a plain t
    expect(variants("penalty")).toEqual(["ˈpʰɛ.nəɫ.ti", "ˈpʰɛ.nɫ̩.ti"]);
  });
  test("aspiration only where a vowel or a sonorant follows the stop", () => {
    // Common practice, no source: the aspiration of p t k is the voicing lag before a following voiced
    // sound, so the t of "tsetse" and "tsar", and the p of "pshaw", are plain
    expect(narrow("tsetse")).toMatch(/^ˈtsi[tʔ]\.si$/);
    expect(derive(general(), cmu("tsar(2)")).preferred).toBe("ˈtsɑɹ");
    expect(narrow("pshaw")).toBe("ˈpʃaʊ");
    // and still before a vowel or approximant (Kahn 1976, from memory)
    expect(narrow("twin")).toBe("ˈtʰw̥ɪ̃n");
  });
  test("stressed vowels are long before a voiced obstruent that starts the next, unstressed syllable", () => {
    // Peterson & Lehiste 1960; Ladefoged & Johnson ch. 4; Kahn 1976 on ambisyllabic consonants (from
    // memory): as in "bead" and "rider", also before b v ð z ɡ dʒ at the flapping site ("father",
    // "driver", "yoga"), after one sonorant consonant as in "change" ("organization", "changes",
    // "shoulder"), and before an obstruent + glide onset ("figure")
    expect(narrow("father")).toBe("ˈfɑː.ðɚ");
    expect(narrow("driver")).toBe("ˈdɹaːɪ.vɚ");
    expect(narrow("yoga")).toBe("ˈjoːʊ.ɡə");
    expect(narrow("organization")).toMatch(/^ˌɔːɹ\.ɡə/);
    expect(narrow("changes")).toBe("ˈtʃẽːɪn.dʒəz");
    expect(narrow("shoulder")).toBe("ˈʃoːʊɫ.dɚ");
    expect(narrow("figure")).toBe("ˈfɪː.ɡjɚ");
    // not before a voiceless one, not before a stressed syllable
    expect(narrow("offer")).toBe("ˈɔ.fɚ");
    expect(narrow("cigar")).toBe("sɪˈɡɑɹ");
    expect(narrow("winter")).not.toContain("ː");
  });
  test("t glottalised before a consonant that starts the next syllable (casual; optional, glottal stop preferred)", () => {
    // Ladefoged & Johnson ch. 3; Wells 1982 vol. 3 (from memory): "greatly", "atlas", "outside", "football"
    expect(variants("greatly")).toEqual(["ˈɡɹeɪt.li", "ˈɡɹeɪʔ.li"]);
    expect(narrow("outside")).toBe("ˈaʊʔˈsaːɪd"); // the dictionary marks two primary stresses
    expect(narrow("football")).toBe("ˈfʊʔˌbɔɫ");
    // a t in the onset, or after an obstruent, stays ("mattress" tɹ, "after")
    expect(narrow("mattress")).toBe("ˈmæ.tɹəs");
    expect(narrow("after")).toBe("ˈæf.tɚ");
  });
  test("t glottalised before a nasal that starts the next syllable (optional, glottal stop preferred)", () => {
    // Wells 1982 vol. 3; Ladefoged & Johnson, ch. 3 (from memory): "fitness", "lightning", "partner"
    expect(variants("fitness")).toEqual(["ˈfɪt.nəs", "ˈfɪʔ.nəs"]);
    expect(narrow("fitness")).toBe("ˈfɪʔ.nəs");
    expect(narrow("lightning")).toBe("ˈlaɪʔ.nɪ̃ŋ");
    expect(narrow("partner")).toBe("ˈpʰɑɹʔ.nɚ");
  });
  test("n + t before an unstressed vowel: nasal flap (optional, preferred in casual speech)", () => {
    // Ladefoged & Johnson, ch. 3; Wells 1982 vol. 3 (from memory): "winter" like "winner", "twenty", "center"
    expect(variants("winter")).toEqual(["ˈwɪ̃.ɾ̃ɚ", "ˈwɪ̃n.tɚ"]);
    expect(narrow("twenty")).toBe("ˈtʰw̥ɛ̃.ɾ̃i");
    expect(narrow("center")).toBe("ˈsɛ̃.ɾ̃ɚ");
    // also before a vowel nasalised by a following nasal ("plantain"; same sources), and before ɫ̩ ("gentle")
    expect(derive(general(), "ˈplæntɪn").preferred).toBe("ˈpʰl̥æ̃.ɾ̃ɪ̃n");
    expect(narrow("gentle")).toBe("ˈdʒɛ̃.ɾ̃ɫ̩");
    // but not before a syllabic n̩, where the /t/ is glottalised ("mountain"; Ladefoged & Johnson, ch. 3, from memory)
    expect(narrow("mountain")).toBe("ˈmãʊn.ʔn̩");
    // not before a stressed vowel, where the t is aspirated ("entire"; Kahn 1976, from memory)
    expect(narrow("entire")).toBe("ɪ̃nˈtʰaɪ.ɚ");
  });
  test("w and j devoiced after h", () => {
    // Ladefoged & Johnson, ch. 3 (from memory): "which" for speakers with /hw/, "huge" with a voiceless j
    expect(derive(general(), cmu("which(2)")).preferred).toBe("ˈhw̥ɪtʃ");
    expect(narrow("huge")).toBe("ˈhj̊uːdʒ");
  });
  test("l takes dental place before θ ð, as t d n do (and stays dark in the coda)", () => {
    // Ladefoged & Johnson, ch. 3; Giegerich 1992 ch. 9 (from memory): "wealth", "health"
    expect(narrow("wealth")).toBe("ˈwɛɫ̪θ");
    expect(narrow("health")).toBe("ˈhɛɫ̪θ");
    expect(narrow("tenth")).toBe("ˈtʰɛ̃n̪θ");
  });
  test("no syllabic ɫ̩ right after another l", () => {
    // Common practice, no source: /l ə l/ keeps its schwa ("Kallal"; a syllabic l needs a non-lateral before it)
    expect(variants("kallal")).toEqual(["ˈkʰæ.ləɫ"]);
  });
});
