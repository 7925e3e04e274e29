//! Writing entries as a PLS document: one `<lexeme>` per normalised headword, its phonemes and
//! aliases in store order, the first marked `prefer="true"` when there are several.

use super::{alias_of, Alphabet, PlsError, PLS_NAMESPACE};
use crate::lexicon::{join_phones, Entry, HeadwordGroups, HeadwordPolicy, Status};
use crate::phoneset::{Onsets, PhoneToken, Phoneset, Pronunciation};
use rayon::prelude::*;

/// Writes entries as a PLS document. Deprecated entries and empty pronunciations are left out;
/// lexemes are sorted by normalised headword and keep the order of their pronunciations (the
/// first is the preferred one); entries made from aliases are written as `<alias>`.
///
/// ```
/// use orthoepy::lexicon::{Entry, HeadwordPolicy};
/// use orthoepy::phoneset::Phoneset;
/// use orthoepy::pls::{write_pls, Alphabet};
/// let set = Phoneset::shipped("en-arpa").unwrap();
/// let entries = [Entry::new("astray", "AH0 S T R EY1"), Entry::new("street", "S T R IY1 T")];
/// let xml = write_pls(&entries, &HeadwordPolicy::default(), &set, Alphabet::Ipa, "en-US").unwrap();
/// assert!(xml.contains("<grapheme>astray</grapheme><phoneme>əˈstɹeɪ</phoneme>"));
/// ```
pub fn write_pls(
    entries: &[Entry],
    policy: &HeadwordPolicy,
    set: &Phoneset,
    alphabet: Alphabet,
    lang: &str,
) -> Result<String, PlsError> {
    let onsets = lexicon_onsets(entries, set);
    let groups = HeadwordGroups::new(entries, policy, |e| e.status != Status::Deprecated);
    let mut out = header(set, alphabet, lang);
    // Reserved once, generously (pages never written cost nothing): a document grown by doubling
    // may leave its last smaller copy in the heap, which at 2,000,000 entries is 64 MB.
    out.reserve(groups.iter().flatten().map(|&id| entries[id].word.len() + 2 * entries[id].pronunciation.len() + 64).sum());
    // Lexemes are written in parallel, a wave of pieces at a time, so the pieces waiting to be
    // appended stay a small part of the document; the first error in document order is returned.
    let pieces: Vec<usize> = (0..groups.len()).step_by(LEXEMES_PER_PIECE).collect();
    for wave in pieces.chunks(PIECES_PER_WAVE) {
        let written: Vec<Result<String, PlsError>> = wave
            .par_iter()
            .map(|&first| {
                let mut piece = String::new();
                for n in first..(first + LEXEMES_PER_PIECE).min(groups.len()) {
                    let words: Vec<&Entry> = groups.group(n).iter().map(|&id| &entries[id]).collect();
                    let elements = elements(&words, set, alphabet, &onsets)?;
                    if let Some(first) = words.first().filter(|_| !elements.is_empty()) {
                        write_lexeme(&mut piece, first.word.trim(), &elements);
                    }
                }
                Ok(piece)
            })
            .collect();
        for piece in written {
            out.push_str(&piece?);
        }
    }
    out.push_str("</lexicon>\n");
    Ok(out)
}

/// Lexemes one parallel task writes.
const LEXEMES_PER_PIECE: usize = 2048;

/// Pieces written before they are appended to the document.
const PIECES_PER_WAVE: usize = 32;

fn header(set: &Phoneset, alphabet: Alphabet, lang: &str) -> String {
    let alphabet_name = match alphabet {
        Alphabet::Symbols => format!("x-orthoepy-{}", set.id()),
        other => other.name().to_string(),
    };
    format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<lexicon version=\"1.0\" xmlns=\"{PLS_NAMESPACE}\" alphabet=\"{}\" xml:lang=\"{}\">\n",
        escape(&alphabet_name),
        escape(lang)
    )
}

/// The `(element name, text)` pairs of one headword's entries, in order, each once.
fn elements(entries: &[&Entry], set: &Phoneset, alphabet: Alphabet, onsets: &Onsets) -> Result<Vec<(&'static str, String)>, PlsError> {
    let mut elements: Vec<(&'static str, String)> = Vec::new();
    for entry in entries {
        let element = match alias_of(entry) {
            Some(text) => ("alias", text.to_string()),
            None if entry.pronunciation.trim().is_empty() => continue,
            None if alphabet == Alphabet::Symbols => ("phoneme", join_phones(entry.phones())),
            None => ("phoneme", transcribe(entry, set, alphabet, onsets)?),
        };
        if !elements.contains(&element) {
            elements.push(element);
        }
    }
    Ok(elements)
}

/// One `<lexeme>` line; the first of several pronunciations is the preferred one (section 4.6).
fn write_lexeme(out: &mut String, grapheme: &str, elements: &[(&str, String)]) {
    out.push_str("  <lexeme><grapheme>");
    out.push_str(&escape(grapheme));
    out.push_str("</grapheme>");
    for (n, (name, text)) in elements.iter().enumerate() {
        let prefer = if n == 0 && elements.len() > 1 { " prefer=\"true\"" } else { "" };
        out.push_str(&format!("<{name}{prefer}>{}</{name}>", escape(text)));
    }
    out.push_str("</lexeme>\n");
}

/// The consonant clusters that begin words in `entries`: the legal onsets the PLS export places
/// stress marks by. Pass them to [`Phoneset::render_with`] to show a pronunciation as the export
/// writes it.
pub fn lexicon_onsets(entries: &[Entry], set: &Phoneset) -> Onsets {
    entries
        .par_iter()
        .with_min_len(4096)
        .filter_map(|e| entry_phones(e, set).ok())
        .fold(Onsets::new, |mut onsets, pron| {
            onsets.add_word_start(set, &pron);
            onsets
        })
        .reduce(Onsets::new, |mut all, part| {
            all.merge(part);
            all
        })
}

/// The entry's phones, leniently (stress as written, no phonotactic or stress-rule check), as the
/// PLS export reads them; the first unknown symbol is the error.
pub fn entry_phones(entry: &Entry, set: &Phoneset) -> Result<Pronunciation, String> {
    let phones = entry
        .phones()
        .map(|token| {
            let (base, stress) = set.split_stress(token);
            let phone = set.lookup(base).ok_or_else(|| token.to_string())?;
            Ok(PhoneToken { phone, stress: stress.map(|s| s.level) })
        })
        .collect::<Result<Vec<_>, String>>()?;
    Ok(Pronunciation { phones })
}

fn transcribe(entry: &Entry, set: &Phoneset, alphabet: Alphabet, onsets: &Onsets) -> Result<String, PlsError> {
    let pron = entry_phones(entry, set).map_err(|symbol| PlsError::UnknownPhone {
        word: entry.word.to_string(),
        symbol,
        phoneset: set.id().to_string(),
    })?;
    Ok(set.render_with(&pron, alphabet, onsets))
}

fn escape(text: &str) -> String {
    quick_xml::escape::escape(text).into_owned()
}

#[cfg(test)]
mod tests {
    use super::super::{alias::alias_entry, read_pls};
    use super::*;

    fn arpa() -> Phoneset {
        Phoneset::shipped("en-arpa").unwrap()
    }

    #[test]
    fn stress_goes_before_the_maximal_legal_onset() {
        let set = arpa();
        // "street" supplies the word-initial onset S T R, so "astray" is a.ˈstray (Kahn 1976).
        let entries = [Entry::new("street", "S T R IY1 T"), Entry::new("astray", "AH0 S T R EY1"), Entry::new("atlas", "AE1 T L AH0 S")];
        let onsets = lexicon_onsets(&entries, &set);
        assert_eq!(transcribe(&entries[1], &set, Alphabet::Ipa, &onsets).unwrap(), "əˈstɹeɪ");
        // No English word starts with T L, so the mark in "atlas" stays at the word start.
        assert_eq!(transcribe(&entries[2], &set, Alphabet::Ipa, &onsets).unwrap(), "ˈætləs");
    }

    #[test]
    fn round_trip_through_ipa_x_sampa_and_symbols() {
        let set = arpa();
        let entries = vec![
            Entry::new("drawing", "D R AO1 IH0 NG"),
            Entry::new("courtship", "K AO1 R T SH IH2 P"),
            Entry::new("ferry", "F EH1 R IY0"),
            Entry::new("harbour", "HH AA1 R B ER0"),
            Entry::new("timetable", "T AY1 M T EY2 B AH0 L"),
        ];
        for alphabet in [Alphabet::Ipa, Alphabet::XSampa, Alphabet::Symbols] {
            let xml = write_pls(&entries, &HeadwordPolicy::default(), &set, alphabet, "en-GB").unwrap();
            let back = read_pls(xml.as_bytes(), "t.pls", &set, "pls").unwrap();
            assert!(back.rejected.is_empty(), "{:?}", back.rejected);
            let mut got: Vec<(String, String)> = back.entries.into_iter().map(|e| (e.word.to_string(), e.pronunciation.to_string())).collect();
            got.sort();
            let mut want: Vec<(String, String)> = entries.iter().map(|e| (e.word.to_string(), e.pronunciation.to_string())).collect();
            want.sort();
            assert_eq!(got, want, "{alphabet:?}");
        }
    }

    /// W3C PLS 1.0 section 4.6 (from memory): `prefer="true"` marks the pronunciation to use
    /// when a lexeme has several; aliases (4.7) carry it too.
    #[test]
    fn the_primary_pronunciation_is_preferred_and_aliases_are_written_back() {
        let set = arpa();
        let mut alias = alias_entry("tomato", "tomahto", 0);
        alias.pronunciation = "T AH0 M AA1 T OW2".into();
        let entries = [Entry::new("tomato", "T AH0 M EY1 T OW2"), alias, Entry::new("quay", "K IY1"), Entry::new("void", "")];
        let xml = write_pls(&entries, &HeadwordPolicy::default(), &set, Alphabet::Symbols, "en").unwrap();
        assert!(
            xml.contains("<grapheme>tomato</grapheme><phoneme prefer=\"true\">T AH0 M EY1 T OW2</phoneme><alias>tomahto</alias></lexeme>"),
            "{xml}"
        );
        assert!(xml.contains("<grapheme>quay</grapheme><phoneme>K IY1</phoneme></lexeme>"), "{xml}");
        assert!(!xml.contains("void"), "a word with no pronunciation gives no lexeme: {xml}");
    }
}
