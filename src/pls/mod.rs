//! W3C Pronunciation Lexicon Specification (PLS) 1.0 interchange (W3C Recommendation, 14 October
//! 2008): writing a lexicon as a PLS document and reading one back. Section numbers below are
//! the Recommendation's, from memory.
//!
//! This module owns the XML side only. A pronunciation is written in IPA (alphabet `ipa`) or
//! X-SAMPA (`x-sampa`), with stress marks placed before the stressed syllable, or as the
//! phoneset's own symbols under a private alphabet name `x-orthoepy-<phoneset id>` (PLS allows
//! `x-` alphabets). Syllable onsets for the stress marks follow the maximal onset principle (D.
//! Kahn, Syllable-based generalizations in English phonology, 1976) with the legal onsets taken
//! from the consonant clusters that begin words in the lexicon itself. When a word has more than
//! one pronunciation the first (the store's primary) carries `prefer="true"` (4.6).
//!
//! Reading accepts the three alphabets on `<lexicon>` and on a single `<phoneme>` (whose own
//! `alphabet` wins, 4.6), maps IPA and X-SAMPA back to phone symbols through the phoneset's
//! columns (`Phoneset::read_transcription`), puts the preferred phoneme or alias of a lexeme
//! first, and keeps `<alias>` elements (4.7) as entries of their own (see [`ALIAS_SOURCE`]).
//! It refuses oversized or malformed documents with the line and column of the problem: one
//! `<lexicon>` root in the PLS namespace, closed; no DTD (so no entity expansion and no external
//! entity is ever read); graphemes, phonemes and aliases only inside a `<lexeme>`. A grapheme,
//! phoneme or alias that cannot be read is rejected at its line and column (the character
//! within it where known) and the rest of the document is read. Lexemes with several graphemes
//! give one entry per grapheme and pronunciation, bounded per lexeme ([`MAX_LEXEME_ENTRIES`])
//! and per document ([`MAX_PLS_ENTRIES`]). `<example>`, `<meta>` and `<metadata>` are not kept.
//! It never touches the store file itself.

mod alias;
mod lexeme;
mod read;
mod write;

pub use crate::phoneset::Alphabet;
pub use alias::{alias_of, ALIAS_NOTE, ALIAS_SOURCE};
pub use read::{read_pls, read_pls_file};
pub use write::{entry_phones, lexicon_onsets, write_pls};

use crate::lexicon::Entry;
use crate::support::located::Located;
use crate::support::read::{Limit, ReadError, MIB};

/// The PLS namespace.
pub const PLS_NAMESPACE: &str = "http://www.w3.org/2005/01/pronunciation-lexicon";

/// The largest PLS document read.
pub const MAX_PLS: Limit = Limit { bytes: 256 * MIB, what: "PLS document" };

/// The most entries one `<lexeme>` may give (graphemes × phonemes and aliases); real lexemes
/// have a few of each, so a larger product is a mistake or an attack (3,000 × 3,000 would be
/// 9,000,000 entries).
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

/// The result of reading a PLS document.
#[derive(Debug, Default)]
pub struct PlsImport {
    /// Entries in document order (a lexeme's preferred pronunciation first), status `imported`
    /// (aliases: `proposed`, see [`ALIAS_SOURCE`]).
    pub entries: Vec<Entry>,
    /// Graphemes, phonemes and aliases that could not be read, each at its place.
    pub rejected: Vec<Located>,
    /// Aliases kept with an empty pronunciation because no lexeme of the document pronounces
    /// them, each at its place.
    pub notes: Vec<Located>,
}
