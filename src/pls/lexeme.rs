//! One `<lexeme>` as the reader collects it — its graphemes, phonemes and aliases with their
//! attributes and places — and the entries it gives (W3C PLS 1.0 sections 4.4 to 4.7, from
//! memory). The preferred pronunciation (the first phoneme or alias with `prefer="true"` in
//! document order) becomes the word's first entry, the others follow in document order; a
//! phoneme's own `alphabet` overrides the lexicon's. An element that cannot be read is rejected
//! at its line and column (for an IPA or X-SAMPA phoneme, at the character that matches no
//! phone), the others are kept.

use super::alias::alias_entry;
use crate::lexicon::{find_control, Entry, Status};
use crate::phoneset::{Alphabet, Phoneset, TranscriptionError};
use crate::support::located::{Located, Position};

/// The text of one element as read, with what is needed to place a character of it.
#[derive(Debug, Clone)]
pub(super) struct Text {
    /// Where the element's start tag is.
    element: Position,
    /// The unescaped text, all its pieces.
    text: String,
    /// Where the first piece starts and its raw (escaped) form; `None` when the first piece was
    /// a CDATA section or nothing was read yet.
    first: Option<(Position, String)>,
}

impl Text {
    /// An element starting at `element`, no text yet.
    pub fn new(element: Position) -> Text {
        Text { element, text: String::new(), first: None }
    }

    /// Adds a piece of text; `raw` is its place and escaped form (`None` for CDATA).
    pub fn push(&mut self, text: &str, raw: Option<(Position, &str)>) {
        if self.text.is_empty() {
            self.first = raw.map(|(at, raw)| (at, raw.to_string()));
        }
        self.text.push_str(text);
    }

    /// The line the text starts on (the element's when empty): the entry's `line`.
    fn line(&self) -> usize {
        self.first.as_ref().map_or(self.element, |(at, _)| *at).line
    }

    /// The place of the 0-based character `index` of the text: counted through the first
    /// piece's raw form (an entity or character reference is one character), else the element.
    fn place(&self, index: Option<usize>) -> Position {
        let (Some((start, raw)), Some(index)) = (&self.first, index) else { return self.element };
        let (mut line, mut column) = (start.line, start.column.unwrap_or(1));
        let mut chars = raw.chars();
        for _ in 0..index {
            match chars.next() {
                None => return *start,
                Some('\n') => (line, column) = (line + 1, 1),
                Some('&') => column += 1 + chars.by_ref().take_while(|&c| c != ';').count() + 1,
                Some(_) => column += 1,
            }
        }
        Position::new(line, column)
    }
}

/// What a pronunciation element is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Kind {
    /// `<phoneme>`.
    Phoneme,
    /// `<alias>`.
    Alias,
}

impl Kind {
    fn tag(self) -> &'static str {
        match self {
            Kind::Phoneme => "phoneme",
            Kind::Alias => "alias",
        }
    }
}

/// A `<phoneme>` or `<alias>` with its attributes.
#[derive(Debug, Clone)]
pub(super) struct Pron {
    /// Phoneme or alias.
    pub kind: Kind,
    /// The phoneme's own `alphabet`, when it has one.
    pub alphabet: Option<Alphabet>,
    /// `prefer="true"`.
    pub prefer: bool,
    /// The first attribute that could not be read (the element is then rejected).
    pub problem: Option<String>,
    /// Its text.
    pub text: Text,
}

/// Everything one `<lexeme>` held.
#[derive(Debug, Clone)]
pub(super) struct Lexeme {
    /// Byte offset of its start tag.
    pub offset: usize,
    /// Its `<grapheme>`s.
    pub graphemes: Vec<Text>,
    /// Its `<phoneme>`s and `<alias>`es, in document order.
    pub prons: Vec<Pron>,
}

/// What the entries of a lexeme are read with.
pub(super) struct Context<'a> {
    /// The document's name in messages.
    pub origin: &'a str,
    /// The phoneset entries are written in.
    pub set: &'a Phoneset,
    /// The `<lexicon>`'s alphabet.
    pub alphabet: Alphabet,
    /// The `source` of entries made from phonemes.
    pub source: &'a str,
}

/// The entries of a lexeme, what was rejected, and which entries are aliases (index into
/// `entries`, place of the `<alias>`).
#[derive(Debug, Default)]
pub(super) struct LexemeRead {
    pub entries: Vec<Entry>,
    pub rejected: Vec<Located>,
    pub aliases: Vec<(usize, Position)>,
}

/// A pronunciation element that was read.
struct Reading {
    prefer: bool,
    /// Phone symbols for a phoneme, the orthography for an alias.
    value: String,
    kind: Kind,
    line: usize,
    place: Position,
}

impl Lexeme {
    /// A lexeme whose start tag is at byte `offset`.
    pub fn new(offset: usize) -> Lexeme {
        Lexeme { offset, graphemes: Vec::new(), prons: Vec::new() }
    }

    /// The entries it would give at most: graphemes × pronunciations.
    pub fn size(&self) -> usize {
        self.graphemes.len().saturating_mul(self.prons.len())
    }

    /// The text of the element named `name` opened last, if it is one a lexeme keeps.
    pub fn last_text(&mut self, name: &str) -> Option<&mut Text> {
        match name {
            "grapheme" => self.graphemes.last_mut(),
            "phoneme" | "alias" => self.prons.last_mut().map(|p| &mut p.text),
            _ => None,
        }
    }

    /// Its entries: one per readable grapheme and readable pronunciation, the preferred first.
    pub fn read(self, context: &Context<'_>) -> LexemeRead {
        let mut read = LexemeRead::default();
        let mut words = Vec::new();
        for grapheme in &self.graphemes {
            match context.grapheme(grapheme) {
                Ok(word) => words.push(word),
                Err(problem) => read.rejected.push(problem),
            }
        }
        let mut readings = Vec::new();
        for pron in &self.prons {
            match context.reading(pron) {
                Ok(reading) => readings.push(reading),
                Err(problem) => read.rejected.push(problem),
            }
        }
        if let Some(preferred) = readings.iter().position(|r| r.prefer) {
            let reading = readings.remove(preferred);
            readings.insert(0, reading);
        }
        for word in &words {
            for reading in &readings {
                if reading.kind == Kind::Alias {
                    read.aliases.push((read.entries.len(), reading.place));
                }
                read.entries.push(context.entry(word, reading));
            }
        }
        read
    }
}

impl Context<'_> {
    fn at(&self, place: Position, message: String) -> Located {
        Located::new(self.origin, Some(place), message)
    }

    /// A grapheme's word, trimmed; empty ones and ones with control characters are refused.
    fn grapheme(&self, grapheme: &Text) -> Result<String, Located> {
        let word = grapheme.text.trim();
        if word.is_empty() {
            return Err(self.at(grapheme.element, "empty <grapheme>; write the word or remove the element".into()));
        }
        match find_control(word) {
            Some((_, c)) => Err(self.at(
                grapheme.element,
                format!("grapheme {word:?} holds the control character U+{:04X} (a character reference such as &#10; counts); remove it", c as u32),
            )),
            None => Ok(word.to_string()),
        }
    }

    /// A phoneme read into phone symbols, or an alias's orthography (spaces collapsed).
    fn reading(&self, pron: &Pron) -> Result<Reading, Located> {
        let tag = pron.kind.tag();
        if let Some(problem) = &pron.problem {
            return Err(self.at(pron.text.element, format!("<{tag}>: {problem}")));
        }
        if pron.text.text.trim().is_empty() {
            return Err(self.at(pron.text.element, format!("empty <{tag}>; write the pronunciation or remove the element")));
        }
        let value = match pron.kind {
            Kind::Phoneme => read_phoneme(&pron.text.text, pron.alphabet.unwrap_or(self.alphabet), self.set)
                .map_err(|(index, message)| self.at(pron.text.place(index), message))?,
            Kind::Alias => self.alias_text(pron)?,
        };
        Ok(Reading { prefer: pron.prefer, value, kind: pron.kind, line: pron.text.line(), place: pron.text.element })
    }

    fn alias_text(&self, pron: &Pron) -> Result<String, Located> {
        let text = pron.text.text.split_whitespace().collect::<Vec<_>>().join(" ");
        match find_control(&text) {
            Some((_, c)) => Err(self.at(pron.text.element, format!("alias {text:?} holds the control character U+{:04X}; remove it", c as u32))),
            None => Ok(text),
        }
    }

    fn entry(&self, word: &str, reading: &Reading) -> Entry {
        if reading.kind == Kind::Alias {
            return alias_entry(word, &reading.value, reading.line);
        }
        let mut entry = Entry::new(word, &reading.value);
        entry.status = Status::Imported;
        entry.source = self.source.into();
        entry.line = reading.line;
        entry
    }
}

/// A phoneme's text in `alphabet` as phone symbols of `set`; the error names the 0-based
/// character of `text` it is about, when it is about one.
fn read_phoneme(text: &str, alphabet: Alphabet, set: &Phoneset) -> Result<String, (Option<usize>, String)> {
    let symbols = match alphabet {
        Alphabet::Symbols => text.split_whitespace().collect::<Vec<_>>().join(" "),
        Alphabet::Ipa | Alphabet::XSampa => match set.read_transcription(text, alphabet) {
            Ok(pron) => pron.render(set),
            Err(e @ TranscriptionError::NoPhone { column, .. }) => return Err((column.checked_sub(1), format!("phoneme {:?}: {e}", text.trim()))),
            Err(e) => return Err((None, format!("phoneme {:?}: {e}", text.trim()))),
        },
    };
    set.parse(&symbols).map(|p| p.render(set)).map_err(|e| (None, format!("phoneme {:?}: {e}", text.trim())))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn characters_are_placed_through_references_and_lines() {
        let mut text = Text::new(Position::new(3, 5));
        text.push("a&b\nˈsiːt", Some((Position::new(3, 15), "a&amp;b\nˈsiːt")));
        assert_eq!(text.place(Some(0)), Position::new(3, 15));
        assert_eq!(text.place(Some(2)), Position::new(3, 21), "after &amp; (five characters, one of the text)");
        assert_eq!(text.place(Some(7)), Position::new(4, 4));
        assert_eq!(text.place(None), Position::new(3, 5));
        let mut cdata = Text::new(Position::new(2, 1));
        cdata.push("ki", None);
        assert_eq!(cdata.place(Some(1)), Position::new(2, 1));
    }
}
