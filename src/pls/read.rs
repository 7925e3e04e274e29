//! Reading a PLS document: the XML events, the document's structure (W3C PLS 1.0 section 4.1:
//! one `<lexicon>` root in the PLS namespace with an `alphabet`; 4.4: graphemes, phonemes and
//! aliases inside lexemes; from memory), the size bounds, and the places of everything read.

use super::alias;
use super::lexeme::{Context, Kind, Lexeme, Pron, Text};
use super::{Alphabet, PlsError, PlsImport, MAX_LEXEME_ENTRIES, MAX_PLS, MAX_PLS_ENTRIES, PLS_NAMESPACE};
use crate::phoneset::Phoneset;
use crate::support::located::{origin_of, Cursor, Located, Position};
use crate::support::read::read_capped;
use quick_xml::events::{BytesStart, Event};
use std::path::Path;

/// Deepest element nesting accepted (a PLS document needs three levels).
const MAX_DEPTH: usize = 16;

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

/// Reads a PLS document into entries of `set`'s symbols. IPA and X-SAMPA phonemes are segmented
/// by longest match over the phoneset's IPA or X-SAMPA column; ˈ and ˌ (`"` and `%`) give the
/// next nucleus primary or secondary stress, and other nuclei get the unstressed mark when the
/// phoneset declares one. `source` goes into the `source` column of entries made from phonemes.
///
/// ```
/// use orthoepy::phoneset::Phoneset;
/// let set = Phoneset::shipped("en-arpa").unwrap();
/// let xml = r#"<lexicon version="1.0" xmlns="http://www.w3.org/2005/01/pronunciation-lexicon"
///   alphabet="ipa" xml:lang="en-US"><lexeme><grapheme>quay</grapheme><phoneme>ˈki</phoneme>
///   <phoneme alphabet="x-sampa" prefer="true">"keI</phoneme></lexeme></lexicon>"#;
/// let import = orthoepy::pls::read_pls(xml.as_bytes(), "quay.pls", &set, "pls").unwrap();
/// assert_eq!(import.entries[0].pronunciation, "K EY1");
/// assert_eq!(import.entries[1].pronunciation, "K IY1");
/// ```
///
/// `origin` names the document in errors and rejected elements (see [`read_pls_file`]).
pub fn read_pls(bytes: &[u8], origin: &str, set: &Phoneset, source: &str) -> Result<PlsImport, PlsError> {
    if bytes.len() as u64 > MAX_PLS.bytes {
        let message = format!("{} bytes is over the {MAX_PLS} accepted for a PLS document; split it", bytes.len());
        return Err(PlsError::TooLarge(Located::whole(origin, message)));
    }
    let mut reader = quick_xml::Reader::from_reader(bytes);
    reader.config_mut().trim_text(true);
    let mut document = Document::new(bytes, origin, set, source);
    let mut buf = Vec::new();
    loop {
        let offset = reader.buffer_position() as usize;
        let event = reader.read_event_into(&mut buf).map_err(|e| document.syntax(offset, format!("malformed XML: {e}")))?;
        // Whitespace before a tag is read with it (text is trimmed); place errors at the `<`.
        let offset = offset + bytes.get(offset..).unwrap_or_default().iter().take_while(|b| b.is_ascii_whitespace()).count();
        if !document.event(event, offset)? {
            break;
        }
        buf.clear();
    }
    document.finish()
}

/// The reader's state between events.
struct Document<'a> {
    bytes: &'a [u8],
    origin: &'a str,
    set: &'a Phoneset,
    source: &'a str,
    cursor: Cursor<'a>,
    /// The `<lexicon>`'s alphabet, once its start tag was read.
    alphabet: Option<Alphabet>,
    /// Names of the open elements.
    stack: Vec<String>,
    root_closed: bool,
    lexeme: Option<Lexeme>,
    import: PlsImport,
    /// Alias entries (index into `import.entries`) and the places of their `<alias>`.
    aliases: Vec<(usize, Position)>,
}

impl<'a> Document<'a> {
    fn new(bytes: &'a [u8], origin: &'a str, set: &'a Phoneset, source: &'a str) -> Document<'a> {
        Document {
            bytes,
            origin,
            set,
            source,
            cursor: Cursor::new(bytes),
            alphabet: None,
            stack: Vec::new(),
            root_closed: false,
            lexeme: None,
            import: PlsImport::default(),
            aliases: Vec::new(),
        }
    }

    fn syntax(&self, offset: usize, message: impl Into<String>) -> PlsError {
        PlsError::Syntax(Located::at_offset(self.origin, self.bytes, offset, message))
    }

    /// Takes one event at byte `offset`; false at the end of the document.
    fn event(&mut self, event: Event<'_>, offset: usize) -> Result<bool, PlsError> {
        match event {
            Event::Start(e) => self.open(&e, offset, false)?,
            Event::Empty(e) => self.open(&e, offset, true)?,
            Event::End(_) => {
                let name = self.stack.pop().unwrap_or_default();
                self.closed(&name)?;
            }
            Event::Text(t) => {
                let text = t.unescape().map_err(|e| self.syntax(offset, format!("bad text: {e}")))?;
                self.text(&text, Some(&String::from_utf8_lossy(&t)), offset);
            }
            Event::CData(t) => {
                let text = std::str::from_utf8(&t).map_err(|_| self.syntax(offset, "a CDATA section that is not UTF-8; save the document as UTF-8"))?;
                self.text(text, None, offset);
            }
            Event::DocType(_) => {
                return Err(self.syntax(offset, "the document has a DOCTYPE; PLS needs no DTD and none is read (no entities, no external files): remove the <!DOCTYPE ...> declaration"));
            }
            Event::Eof => return Ok(false),
            _ => {}
        }
        Ok(true)
    }

    fn open(&mut self, e: &BytesStart<'_>, offset: usize, empty: bool) -> Result<(), PlsError> {
        let name = String::from_utf8_lossy(e.local_name().as_ref()).into_owned();
        if self.stack.len() >= MAX_DEPTH {
            return Err(self.syntax(offset, "elements nested too deeply for a PLS document"));
        }
        if self.stack.is_empty() {
            self.open_root(e, &name, offset)?;
        } else {
            self.open_inner(e, &name, offset)?;
        }
        if empty {
            self.closed(&name)
        } else {
            self.stack.push(name);
            Ok(())
        }
    }

    fn open_root(&mut self, e: &BytesStart<'_>, name: &str, offset: usize) -> Result<(), PlsError> {
        if self.root_closed {
            return Err(self.syntax(offset, format!("a second root element <{name}> after </lexicon>; a PLS document has one <lexicon> root: remove it or merge it into the first")));
        }
        if name != "lexicon" {
            return Err(self.syntax(offset, format!("root element is <{name}>; a PLS document starts with <lexicon>")));
        }
        check_namespace(e).map_err(|m| self.syntax(offset, m))?;
        let alphabet = attribute(e, "alphabet").ok_or("<lexicon> has no alphabet attribute (PLS requires one)".to_string());
        self.alphabet = Some(alphabet.and_then(|a| alphabet_named(&a, self.set)).map_err(|m| self.syntax(offset, m))?);
        Ok(())
    }

    fn open_inner(&mut self, e: &BytesStart<'_>, name: &str, offset: usize) -> Result<(), PlsError> {
        let parent = self.stack.last().map_or("", String::as_str);
        match (name, parent) {
            ("lexeme", "lexicon") if self.stack.len() == 1 => self.lexeme = Some(Lexeme::new(offset)),
            ("lexeme", _) => return Err(self.syntax(offset, format!("<lexeme> inside <{parent}>; lexemes are children of <lexicon>"))),
            ("grapheme" | "phoneme" | "alias", "lexeme") => self.add_element(e, name, offset)?,
            ("grapheme" | "phoneme" | "alias", _) => {
                return Err(self.syntax(offset, format!("<{name}> inside <{parent}>; PLS puts graphemes, phonemes and aliases directly inside a <lexeme>")));
            }
            _ => {}
        }
        Ok(())
    }

    fn add_element(&mut self, e: &BytesStart<'_>, name: &str, offset: usize) -> Result<(), PlsError> {
        let place = self.cursor.position(offset);
        let set = self.set;
        let Some(lexeme) = self.lexeme.as_mut() else { return Ok(()) };
        match name {
            "grapheme" => lexeme.graphemes.push(Text::new(place)),
            "phoneme" => lexeme.prons.push(pron_of(e, Kind::Phoneme, set, place)),
            _ => lexeme.prons.push(pron_of(e, Kind::Alias, set, place)),
        }
        if lexeme.size() > MAX_LEXEME_ENTRIES {
            let message = format!(
                "this <lexeme> has {} graphemes and {} phonemes and aliases so far, over the {MAX_LEXEME_ENTRIES} entries (graphemes × pronunciations) accepted from one lexeme; split it into several lexemes",
                lexeme.graphemes.len(),
                lexeme.prons.len()
            );
            let at = lexeme.offset;
            return Err(self.syntax(at, message));
        }
        Ok(())
    }

    /// Text (`raw` is its escaped form; `None` for CDATA) at byte `offset`, kept when it is
    /// the content of a grapheme, phoneme or alias.
    fn text(&mut self, text: &str, raw: Option<&str>, offset: usize) {
        let Some(name) = self.stack.last().filter(|_| self.stack.len() == 3) else { return };
        let Some(piece) = self.lexeme.as_mut().and_then(|l| l.last_text(name)) else { return };
        let place = raw.map(|raw| (self.cursor.position(offset), raw));
        piece.push(text, place);
    }

    /// After the element `name` closed (the stack no longer holds it).
    fn closed(&mut self, name: &str) -> Result<(), PlsError> {
        if self.stack.is_empty() {
            self.root_closed = true;
        } else if name == "lexeme" && self.stack.len() == 1 {
            self.end_lexeme()?;
        }
        Ok(())
    }

    fn end_lexeme(&mut self) -> Result<(), PlsError> {
        let Some(lexeme) = self.lexeme.take() else { return Ok(()) };
        if self.import.entries.len() + lexeme.size() > MAX_PLS_ENTRIES {
            let message = format!("the document gives more than {MAX_PLS_ENTRIES} entries, the most read from one PLS document; split it into several documents");
            return Err(self.syntax(lexeme.offset, message));
        }
        let context = Context { origin: self.origin, set: self.set, alphabet: self.alphabet.unwrap_or(Alphabet::Ipa), source: self.source };
        let read = lexeme.read(&context);
        let base = self.import.entries.len();
        self.aliases.extend(read.aliases.into_iter().map(|(i, place)| (base + i, place)));
        self.import.entries.extend(read.entries);
        self.import.rejected.extend(read.rejected);
        Ok(())
    }

    fn finish(self) -> Result<PlsImport, PlsError> {
        if let Some(open) = self.stack.last() {
            return Err(self.syntax(self.bytes.len(), format!("the document ends inside <{open}>; add the missing </{open}> (and any closing tags after it)")));
        }
        if self.alphabet.is_none() {
            return Err(self.syntax(0, "no <lexicon> element; this is not a PLS document"));
        }
        let mut import = self.import;
        import.notes = alias::resolve(&mut import.entries, &self.aliases, self.origin);
        Ok(import)
    }
}

/// A `<phoneme>` or `<alias>` start tag's attributes (section 4.6: `alphabet` on a phoneme,
/// `prefer` on both, "true" or "false").
fn pron_of(e: &BytesStart<'_>, kind: Kind, set: &Phoneset, place: Position) -> Pron {
    let mut pron = Pron { kind, alphabet: None, prefer: false, problem: None, text: Text::new(place) };
    if let Some(prefer) = attribute(e, "prefer") {
        match prefer.as_str() {
            "true" => pron.prefer = true,
            "false" => {}
            other => pron.problem = Some(format!("prefer={other:?}; PLS allows \"true\" or \"false\"")),
        }
    }
    if let Some(name) = attribute(e, "alphabet").filter(|_| kind == Kind::Phoneme) {
        match alphabet_named(&name, set) {
            Ok(alphabet) => pron.alphabet = Some(alphabet),
            Err(message) => pron.problem = pron.problem.take().or(Some(message)),
        }
    }
    pron
}

/// The value of the attribute with local name `name`.
fn attribute(e: &BytesStart<'_>, name: &str) -> Option<String> {
    e.attributes()
        .flatten()
        .find(|a| a.key.local_name().as_ref() == name.as_bytes())
        .map(|a| String::from_utf8_lossy(&a.value).into_owned())
}

/// The root must declare the PLS namespace for its own prefix (`xmlns="…"` for `<lexicon>`,
/// `xmlns:p="…"` for `<p:lexicon>`), as W3C PLS 1.0 section 4.1 requires.
fn check_namespace(e: &BytesStart<'_>) -> Result<(), String> {
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

/// An `alphabet` value: `ipa`, `x-sampa` (either in any case) or the phoneset's own
/// `x-orthoepy-<id>`.
fn alphabet_named(value: &str, set: &Phoneset) -> Result<Alphabet, String> {
    let own = format!("x-orthoepy-{}", set.id());
    if value == own {
        return Ok(Alphabet::Symbols);
    }
    [Alphabet::Ipa, Alphabet::XSampa]
        .into_iter()
        .find(|a| a.name().eq_ignore_ascii_case(value))
        .ok_or_else(|| format!("alphabet {value:?} is not readable here; use \"ipa\", \"x-sampa\" or {own:?}"))
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

    /// W3C PLS 1.0 section 4.4 (from memory): graphemes, phonemes and aliases are children of a
    /// lexeme, lexemes children of the lexicon.
    #[test]
    fn pronunciations_outside_a_lexeme_are_refused_at_their_place() {
        let (line, message) = refusal(&format!("<lexicon {NS} alphabet=\"ipa\">\n<phoneme>ki</phoneme></lexicon>"));
        assert_eq!(line, Some(2));
        assert!(message.contains("<phoneme> inside <lexicon>"), "{message}");
        let (_, message) = refusal(&format!("<lexicon {NS} alphabet=\"ipa\"><lexeme><lexeme/></lexeme></lexicon>"));
        assert!(message.contains("<lexeme> inside <lexeme>"), "{message}");
    }

    #[test]
    fn control_characters_in_graphemes_are_rejected() {
        let xml = format!("<lexicon {NS} alphabet=\"ipa\">\n<lexeme><grapheme>new&#10;york</grapheme><grapheme>quay</grapheme><phoneme>ki</phoneme></lexeme>\n</lexicon>");
        let import = read_pls(xml.as_bytes(), "t.pls", &arpa(), "t").unwrap();
        assert_eq!(import.entries.len(), 1);
        assert_eq!(import.entries[0].word, "quay");
        assert_eq!(import.rejected.len(), 1);
        assert!(import.rejected[0].message.contains("U+000A"), "{}", import.rejected[0]);
        assert_eq!((import.rejected[0].line(), import.rejected[0].column()), (Some(2), Some(9)));
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
        let xml = format!("<lexicon version=\"1.0\" {NS} alphabet=\"ipa\">\n<lexeme><grapheme>x</grapheme><phoneme>ʘ</phoneme><phoneme/><phoneme prefer=\"yes\">ki</phoneme></lexeme>\n</lexicon>");
        let import = read_pls(xml.as_bytes(), "t.pls", &set, "t").unwrap();
        assert!(import.entries.is_empty());
        let places: Vec<(Option<usize>, Option<usize>)> = import.rejected.iter().map(|r| (r.line(), r.column())).collect();
        assert_eq!(places, [(Some(2), Some(40)), (Some(2), Some(51)), (Some(2), Some(61))], "{:?}", import.rejected);
        assert!(import.rejected[1].message.contains("empty <phoneme>"), "{}", import.rejected[1]);
        assert!(import.rejected[2].message.contains("prefer=\"yes\""), "{}", import.rejected[2]);
    }

    #[test]
    fn cdata_is_read_as_text() {
        let xml = format!("<lexicon {NS} alphabet=\"x-sampa\"><lexeme><grapheme>quay</grapheme><phoneme><![CDATA[\"ki]]></phoneme></lexeme></lexicon>");
        let import = read_pls(xml.as_bytes(), "t.pls", &arpa(), "t").unwrap();
        assert_eq!(import.entries[0].pronunciation, "K IY1");
    }
}
