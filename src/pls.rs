//! W3C Pronunciation Lexicon Specification (PLS) 1.0 interchange (W3C Recommendation, 14 October
//! 2008): writing a lexicon as a PLS document and reading one back.
//!
//! This module owns the XML side only. A pronunciation is written either in IPA (alphabet `ipa`),
//! with stress marks placed before the stressed syllable, or as the phoneset's own symbols under a
//! private alphabet name `x-orthoepy-<phoneset id>` (PLS allows `x-` alphabets). Syllable onsets
//! for the stress marks follow the maximal onset principle (D. Kahn, Syllable-based
//! generalizations in English phonology, 1976) with the legal onsets taken from the consonant
//! clusters that begin words in the lexicon itself. Reading accepts both alphabets, maps IPA back
//! to phone symbols by longest match, and refuses oversized or malformed documents with the line
//! and column of the problem: one `<lexicon>` root in the PLS namespace, closed; no DTD (so no
//! entity expansion and no external entity is ever read); no control characters in graphemes.
//! Lexemes with several graphemes give one entry per grapheme and phoneme, bounded per lexeme
//! ([`MAX_LEXEME_ENTRIES`]) and per document ([`MAX_PLS_ENTRIES`]).

use crate::lexicon::{find_control, normalize_key, Entry, HeadwordPolicy, Status};
pub use crate::phoneset::Alphabet;
use crate::phoneset::{Onsets, PhoneToken, Phoneset, Pronunciation};
use quick_xml::events::Event;
use crate::support::located::{origin_of, Located};
use crate::support::read::{read_capped, Limit, ReadError, MIB};
use std::path::Path;

/// The PLS namespace.
pub const PLS_NAMESPACE: &str = "http://www.w3.org/2005/01/pronunciation-lexicon";

/// The largest PLS document read.
pub const MAX_PLS: Limit = Limit { bytes: 256 * MIB, what: "PLS document" };

/// Deepest element nesting accepted (a PLS document needs three levels).
const MAX_DEPTH: usize = 16;

/// The most entries one `<lexeme>` may give (graphemes × phonemes); real lexemes have a few of
/// each, so a larger product is a mistake or an attack (3,000 × 3,000 would be 9,000,000 entries).
pub const MAX_LEXEME_ENTRIES: usize = 256;

/// The most entries one document may give: about fifteen times CMUdict (135k entries).
pub const MAX_PLS_ENTRIES: usize = 2_000_000;

/// Errors of reading or writing PLS.
#[derive(Debug, thiserror::Error)]
pub enum PlsError {
    /// The file could not be read, or is larger than [`MAX_PLS`].
    #[error(transparent)]
    Read(#[from] ReadError),
    /// The document is malformed or not PLS, at a known place.
    #[error("{0}")]
    Syntax(Located),
    /// A document held in memory is larger than [`MAX_PLS`].
    #[error("{0}")]
    TooLarge(Located),
    /// A pronunciation cannot be written in IPA.
    #[error("{word}: phone {symbol:?} is not in phoneset {phoneset}; fix it (orthoepy audit) or export with symbols")]
    UnknownPhone {
        /// The headword.
        word: String,
        /// The phone token.
        symbol: String,
        /// The phoneset id.
        phoneset: String,
    },
}

/// Writes entries as a PLS document. Deprecated entries are left out; lexemes are sorted by
/// normalised headword and keep the order of their pronunciations.
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
    let mut rows: Vec<(String, usize, &Entry)> = entries
        .iter()
        .enumerate()
        .filter(|(_, e)| e.status != Status::Deprecated)
        .map(|(i, e)| (normalize_key(e.word.trim(), policy).into_owned(), i, e))
        .collect();
    rows.sort_by(|a, b| (&a.0, a.1).cmp(&(&b.0, b.1)));
    let alphabet_name = match alphabet {
        Alphabet::Symbols => format!("x-orthoepy-{}", set.id()),
        other => other.name().to_string(),
    };
    let mut out = String::new();
    out.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    out.push_str(&format!(
        "<lexicon version=\"1.0\" xmlns=\"{PLS_NAMESPACE}\" alphabet=\"{}\" xml:lang=\"{}\">\n",
        escape(&alphabet_name),
        escape(lang)
    ));
    let mut i = 0;
    while i < rows.len() {
        let key = &rows[i].0;
        out.push_str("  <lexeme><grapheme>");
        out.push_str(&escape(rows[i].2.word.trim()));
        out.push_str("</grapheme>");
        let mut seen: Vec<String> = Vec::new();
        while i < rows.len() && rows[i].0 == *key {
            let entry = rows[i].2;
            let phoneme = match alphabet {
                Alphabet::Symbols => crate::lexicon::join_phones(entry.phones()),
                Alphabet::Ipa | Alphabet::XSampa => transcribe(entry, set, alphabet, &onsets)?,
            };
            if !seen.contains(&phoneme) {
                out.push_str("<phoneme>");
                out.push_str(&escape(&phoneme));
                out.push_str("</phoneme>");
                seen.push(phoneme);
            }
            i += 1;
        }
        out.push_str("</lexeme>\n");
    }
    out.push_str("</lexicon>\n");
    Ok(out)
}

/// The consonant clusters that begin words in `entries`: the legal onsets the PLS export places
/// stress marks by. Pass them to [`Phoneset::render_with`] to show a pronunciation as the export
/// writes it.
pub fn lexicon_onsets(entries: &[Entry], set: &Phoneset) -> Onsets {
    let mut onsets = Onsets::new();
    for pron in entries.iter().filter_map(|e| entry_phones(e, set).ok()) {
        onsets.add_word_start(set, &pron);
    }
    onsets
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
        word: entry.word.clone(),
        symbol,
        phoneset: set.id().to_string(),
    })?;
    Ok(set.render_with(&pron, alphabet, onsets))
}

fn escape(text: &str) -> String {
    quick_xml::escape::escape(text).into_owned()
}

/// The result of reading a PLS document.
#[derive(Debug, Default)]
pub struct PlsImport {
    /// Entries, in document order, status `imported`.
    pub entries: Vec<Entry>,
    /// Phonemes that could not be read, each at its line of the document.
    pub rejected: Vec<Located>,
}

/// Reads the PLS document at `path` (at most [`MAX_PLS`]); see [`read_pls`].
///
/// ```
/// use orthoepy::phoneset::Phoneset;
/// let set = Phoneset::shipped("en-arpa").unwrap();
/// let dir = tempfile::tempdir().unwrap();
/// let path = dir.path().join("words.pls");
/// std::fs::write(&path, "<words/>").unwrap();
/// let err = orthoepy::pls::read_pls_file(&path, &set, "pls").unwrap_err();
/// assert!(err.to_string().starts_with(&format!("{}:1:1: ", path.display())), "{err}");
/// ```
pub fn read_pls_file(path: &Path, set: &Phoneset, source: &str) -> Result<PlsImport, PlsError> {
    let bytes = read_capped(path, MAX_PLS)?;
    read_pls(&bytes, &origin_of(path), set, source)
}

/// Reads a PLS document into entries of `set`'s symbols. IPA phonemes are segmented by longest
/// match over the phoneset's IPA; ˈ and ˌ give the next nucleus primary or secondary stress, and
/// other nuclei get the unstressed mark when the phoneset declares one.
///
/// ```
/// use orthoepy::phoneset::Phoneset;
/// let set = Phoneset::shipped("en-arpa").unwrap();
/// let xml = r#"<lexicon version="1.0" xmlns="http://www.w3.org/2005/01/pronunciation-lexicon"
///   alphabet="ipa" xml:lang="en-US"><lexeme><grapheme>quay</grapheme><phoneme>ˈki</phoneme></lexeme></lexicon>"#;
/// let import = orthoepy::pls::read_pls(xml.as_bytes(), "quay.pls", &set, "pls").unwrap();
/// assert_eq!(import.entries[0].pronunciation, "K IY1");
/// ```
///
/// `origin` names the document in errors and rejected phonemes (see [`read_pls_file`]).
pub fn read_pls(bytes: &[u8], origin: &str, set: &Phoneset, source: &str) -> Result<PlsImport, PlsError> {
    if bytes.len() as u64 > MAX_PLS.bytes {
        let message = format!("{} bytes is over the {MAX_PLS} accepted for a PLS document; split it", bytes.len());
        return Err(PlsError::TooLarge(Located::whole(origin, message)));
    }
    let mut reader = quick_xml::Reader::from_reader(bytes);
    reader.config_mut().trim_text(true);
    let at = |offset: usize, message: String| PlsError::Syntax(Located::at_offset(origin, bytes, offset, message));
    let mut import = PlsImport::default();
    let mut alphabet: Option<Alphabet> = None;
    let mut root_closed = false;
    let mut lexeme_at = 0usize;
    let mut stack: Vec<String> = Vec::new();
    // Text of each <grapheme> / <phoneme> of the open lexeme, with the line it starts on.
    let mut graphemes: Vec<(String, usize)> = Vec::new();
    let mut phonemes: Vec<(String, usize)> = Vec::new();
    let mut buf = Vec::new();
    // Line numbers are counted incrementally: (offset, line) of the last position asked for.
    let mut counted = (0usize, 1usize);
    let mut line_at = |offset: usize| {
        let offset = offset.min(bytes.len()).max(counted.0);
        counted.1 += bytes[counted.0..offset].iter().filter(|&&b| b == b'\n').count();
        counted.0 = offset;
        counted.1
    };
    loop {
        let offset = reader.buffer_position() as usize;
        let event = reader.read_event_into(&mut buf).map_err(|e| at(offset, format!("malformed XML: {e}")))?;
        // Whitespace before a tag is read with it (text is trimmed); place errors at the `<`.
        let offset = offset + bytes.get(offset..).unwrap_or_default().iter().take_while(|b| b.is_ascii_whitespace()).count();
        match event {
            Event::Start(ref e) | Event::Empty(ref e) => {
                let name = String::from_utf8_lossy(e.local_name().as_ref()).into_owned();
                if stack.len() >= MAX_DEPTH {
                    return Err(at(offset, "elements nested too deeply for a PLS document".into()));
                }
                if root_closed && stack.is_empty() {
                    return Err(at(offset, format!("a second root element <{name}> after </lexicon>; a PLS document has one <lexicon> root: remove it or merge it into the first")));
                }
                if name == "lexicon" && stack.is_empty() {
                    check_namespace(e).map_err(|m| at(offset, m))?;
                    alphabet = Some(read_alphabet(e, set).map_err(|m| at(offset, m))?);
                } else if stack.is_empty() {
                    return Err(at(offset, format!("root element is <{name}>; a PLS document starts with <lexicon>")));
                }
                if matches!(event, Event::Empty(_)) {
                    root_closed |= stack.is_empty();
                } else {
                    if name == "lexeme" {
                        graphemes.clear();
                        phonemes.clear();
                        lexeme_at = offset;
                    }
                    stack.push(name);
                }
            }
            Event::DocType(_) => {
                return Err(at(offset, "the document has a DOCTYPE; PLS needs no DTD and none is read (no entities, no external files): remove the <!DOCTYPE ...> declaration".into()));
            }
            Event::Text(t) => {
                let text = t.unescape().map_err(|e| at(offset, format!("bad text: {e}")))?.into_owned();
                let line = line_at(offset);
                match stack.last().map(String::as_str) {
                    Some("grapheme") => graphemes.push((text, line)),
                    Some("phoneme") => phonemes.push((text, line)),
                    _ => {}
                }
                if graphemes.len().saturating_mul(phonemes.len()) > MAX_LEXEME_ENTRIES {
                    let message = format!(
                        "this <lexeme> has {} graphemes and {} phonemes so far, over the {MAX_LEXEME_ENTRIES} entries (graphemes × phonemes) accepted from one lexeme; split it into several lexemes",
                        graphemes.len(),
                        phonemes.len()
                    );
                    return Err(at(lexeme_at, message));
                }
            }
            // The guard pops the closing element whatever it is; only a lexeme ends an entry.
            Event::End(_) if stack.pop().as_deref() == Some("lexeme") => {
                let alphabet = alphabet.unwrap_or(Alphabet::Ipa);
                if import.entries.len() + graphemes.len() * phonemes.len() > MAX_PLS_ENTRIES {
                    let message = format!("the document gives more than {MAX_PLS_ENTRIES} entries, the most read from one PLS document; split it into several documents");
                    return Err(at(lexeme_at, message));
                }
                let mut usable = Vec::with_capacity(graphemes.len());
                for (g, line) in &graphemes {
                    match find_control(g.trim()) {
                        Some((_, c)) => import.rejected.push(Located::at_line(
                            origin,
                            *line,
                            format!("grapheme {:?} holds the control character U+{:04X} (a character reference such as &#10; counts); remove it", g.trim(), c as u32),
                        )),
                        None => usable.push(g.trim()),
                    }
                }
                for (phoneme, line) in &phonemes {
                    match read_phoneme(phoneme, alphabet, set) {
                        Ok(pron) => {
                            for g in &usable {
                                let mut entry = Entry::new(g, &pron);
                                entry.status = Status::Imported;
                                entry.source = source.to_string();
                                entry.line = *line;
                                import.entries.push(entry);
                            }
                        }
                        Err(message) => import.rejected.push(Located::at_line(origin, *line, message)),
                    }
                }
            }
            Event::End(_) => root_closed |= stack.is_empty(),
            Event::Eof => break,
            _ => {}
        }
        buf.clear();
    }
    if let Some(open) = stack.last() {
        return Err(at(bytes.len(), format!("the document ends inside <{open}>; add the missing </{open}> (and any closing tags after it)")));
    }
    if alphabet.is_none() {
        return Err(at(0, "no <lexicon> element; this is not a PLS document".into()));
    }
    Ok(import)
}

/// The root must declare the PLS namespace for its own prefix (`xmlns="…"` for `<lexicon>`,
/// `xmlns:p="…"` for `<p:lexicon>`), as W3C PLS 1.0 section 4.1 requires.
fn check_namespace(e: &quick_xml::events::BytesStart) -> Result<(), String> {
    let name = e.name();
    let declaration = match name.prefix() {
        Some(prefix) => format!("xmlns:{}", String::from_utf8_lossy(prefix.as_ref())),
        None => "xmlns".to_string(),
    };
    let declared = e
        .attributes()
        .flatten()
        .find(|a| a.key.as_ref() == declaration.as_bytes())
        .map(|a| String::from_utf8_lossy(&a.value).into_owned());
    match declared {
        Some(ns) if ns == PLS_NAMESPACE => Ok(()),
        Some(other) => Err(format!("<lexicon> is in namespace {other:?}, not the PLS namespace; write {declaration}=\"{PLS_NAMESPACE}\"")),
        None => Err(format!("<lexicon> declares no namespace; PLS requires {declaration}=\"{PLS_NAMESPACE}\"")),
    }
}

fn read_alphabet(e: &quick_xml::events::BytesStart, set: &Phoneset) -> Result<Alphabet, String> {
    let own = format!("x-orthoepy-{}", set.id());
    for attr in e.attributes().flatten() {
        if attr.key.local_name().as_ref() == b"alphabet" {
            let value = String::from_utf8_lossy(&attr.value).into_owned();
            return match value.as_str() {
                "ipa" => Ok(Alphabet::Ipa),
                "x-sampa" => Ok(Alphabet::XSampa),
                v if v == own => Ok(Alphabet::Symbols),
                other => Err(format!("alphabet {other:?} is not readable here; use \"ipa\", \"x-sampa\" or {own:?}")),
            };
        }
    }
    Err("<lexicon> has no alphabet attribute (PLS requires one)".into())
}

fn read_phoneme(text: &str, alphabet: Alphabet, set: &Phoneset) -> Result<String, String> {
    let symbols = match alphabet {
        Alphabet::Symbols => text.split_whitespace().collect::<Vec<_>>().join(" "),
        Alphabet::Ipa | Alphabet::XSampa => set.read_transcription(text, alphabet).map_err(|e| e.to_string())?.render(set),
    };
    set.parse(&symbols).map(|p| p.render(set)).map_err(|e| format!("{text:?}: {e}"))
}

#[cfg(test)]
mod tests {
    use super::*;

    const NS: &str = "xmlns=\"http://www.w3.org/2005/01/pronunciation-lexicon\"";

    fn arpa() -> Phoneset {
        Phoneset::shipped("en-arpa").unwrap()
    }

    /// The message of a document refused at a place, with its line.
    fn refusal(xml: &str) -> (Option<usize>, String) {
        match read_pls(xml.as_bytes(), "t.pls", &arpa(), "t") {
            Err(PlsError::Syntax(at)) => (at.line(), at.message),
            other => panic!("expected a refusal, got {other:?}"),
        }
    }

    #[test]
    fn structure_namespace_and_dtd_are_checked() {
        // W3C PLS 1.0 section 4.1: one <lexicon> root in the namespace
        // http://www.w3.org/2005/01/pronunciation-lexicon.
        let lexeme = "<lexeme><grapheme>quay</grapheme><phoneme>ki</phoneme></lexeme>";
        let (line, message) = refusal(&format!("<lexicon {NS} alphabet=\"ipa\">\n{lexeme}\n"));
        assert!(message.contains("missing </lexicon>"), "{message}");
        assert_eq!(line, Some(3));
        let (line, message) = refusal(&format!("<lexicon {NS} alphabet=\"ipa\"></lexicon>\n<lexicon {NS} alphabet=\"ipa\"></lexicon>"));
        assert!(message.contains("second root"), "{message}");
        assert_eq!(line, Some(2));
        assert!(refusal(&format!("<lexicon alphabet=\"ipa\">{lexeme}</lexicon>")).1.contains("declares no namespace"));
        assert!(refusal(&format!("<lexicon xmlns=\"urn:x\" alphabet=\"ipa\">{lexeme}</lexicon>")).1.contains("\"urn:x\""));
        let prefixed = format!("<p:lexicon xmlns:p=\"{PLS_NAMESPACE}\" alphabet=\"ipa\"><p:lexeme><p:grapheme>quay</p:grapheme><p:phoneme>ki</p:phoneme></p:lexeme></p:lexicon>");
        assert_eq!(read_pls(prefixed.as_bytes(), "t.pls", &arpa(), "t").unwrap().entries.len(), 1);
        // The "billion laughs" entity expansion and an external entity: refused before any use.
        let bomb = format!("<?xml version=\"1.0\"?>\n<!DOCTYPE lexicon [<!ENTITY a \"aaaaaaaa\"><!ENTITY b \"&a;&a;&a;&a;\">]>\n<lexicon {NS} alphabet=\"ipa\"><lexeme><grapheme>&b;</grapheme><phoneme>ki</phoneme></lexeme></lexicon>");
        let (line, message) = refusal(&bomb);
        assert!(message.contains("DOCTYPE"), "{message}");
        assert_eq!(line, Some(2));
        assert!(refusal("<!DOCTYPE lexicon SYSTEM \"file:///etc/passwd\"><lexicon/>").1.contains("DOCTYPE"));
    }

    #[test]
    fn control_characters_in_graphemes_are_rejected() {
        let xml = format!("<lexicon {NS} alphabet=\"ipa\">\n<lexeme><grapheme>new&#10;york</grapheme><grapheme>quay</grapheme><phoneme>ki</phoneme></lexeme>\n</lexicon>");
        let import = read_pls(xml.as_bytes(), "t.pls", &arpa(), "t").unwrap();
        assert_eq!(import.entries.len(), 1);
        assert_eq!(import.entries[0].word, "quay");
        assert_eq!(import.rejected.len(), 1);
        assert!(import.rejected[0].message.contains("U+000A"), "{}", import.rejected[0]);
    }

    #[test]
    fn one_lexeme_cannot_multiply_into_millions_of_entries() {
        // The 3,000 graphemes × 3,000 phonemes document would give 9,000,000 entries.
        let mut xml = format!("<lexicon {NS} alphabet=\"ipa\">\n<lexeme>");
        for i in 0..3_000 {
            xml.push_str(&format!("<grapheme>w{i}</grapheme>"));
        }
        for _ in 0..3_000 {
            xml.push_str("<phoneme>ki</phoneme>");
        }
        xml.push_str("</lexeme></lexicon>");
        let (line, message) = refusal(&xml);
        assert_eq!(line, Some(2));
        assert!(message.contains("split it into several lexemes"), "{message}");
        let mut fine = format!("<lexicon {NS} alphabet=\"ipa\"><lexeme>");
        for i in 0..16 {
            fine.push_str(&format!("<grapheme>w{i}</grapheme><phoneme>ki</phoneme>"));
        }
        fine.push_str("</lexeme></lexicon>");
        assert_eq!(read_pls(fine.as_bytes(), "t.pls", &arpa(), "t").unwrap().entries.len(), MAX_LEXEME_ENTRIES);
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
    fn round_trip_through_ipa_and_symbols() {
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
            let mut got: Vec<(String, String)> = back.entries.into_iter().map(|e| (e.word, e.pronunciation)).collect();
            got.sort();
            let mut want: Vec<(String, String)> = entries.iter().map(|e| (e.word.clone(), e.pronunciation.clone())).collect();
            want.sort();
            assert_eq!(got, want, "{alphabet:?}");
        }
    }

    #[test]
    fn malformed_documents_are_located() {
        let set = arpa();
        let bad = format!("<lexicon version=\"1.0\" {NS} alphabet=\"ipa\">\n  <lexeme><grapheme>a</grapheme></lexem>\n</lexicon>");
        match read_pls(bad.as_bytes(), "t.pls", &set, "t") {
            Err(PlsError::Syntax(at)) => assert_eq!((at.origin.as_str(), at.line()), ("t.pls", Some(2))),
            other => panic!("{other:?}"),
        }
        assert!(matches!(read_pls(b"<words/>", "t.pls", &set, "t"), Err(PlsError::Syntax(_))));
        let deep = format!("<lexicon {NS} alphabet=\"ipa\">{}", "<a>".repeat(100));
        assert!(matches!(read_pls(deep.as_bytes(), "t.pls", &set, "t"), Err(PlsError::Syntax(_))));
        let foreign = format!("<lexicon version=\"1.0\" {NS} alphabet=\"x-other\"></lexicon>");
        assert!(matches!(read_pls(foreign.as_bytes(), "t.pls", &set, "t"), Err(PlsError::Syntax(_))));
    }

    #[test]
    fn unreadable_phonemes_are_reported_not_fatal() {
        let set = arpa();
        let xml = format!("<lexicon version=\"1.0\" {NS} alphabet=\"ipa\">\n<lexeme><grapheme>x</grapheme><phoneme>ʘ</phoneme></lexeme>\n</lexicon>");
        let import = read_pls(xml.as_bytes(), "t.pls", &set, "t").unwrap();
        assert!(import.entries.is_empty());
        assert_eq!(import.rejected.len(), 1);
        assert_eq!(import.rejected[0].line(), Some(2));
    }
}
