//! Writing a pronunciation in IPA or X-SAMPA and reading such a transcription back: the one
//! place that decides which symbol a phone gets at a stress level (its `by_stress` form, else
//! its plain `ipa` / `xsampa`), where stress marks go, and how a transcription is segmented.
//! PLS export and import, the `show` command and conversion reports all go through here.
//!
//! Stress marks are written before the stressed syllable: IPA ˈ and ˌ (IPA Handbook 1999, §2),
//! X-SAMPA `"` and `%` (J. C. Wells, "Computer-coding the IPA: a proposed extension of SAMPA",
//! 1995). The syllable starts at the longest consonant cluster before the nucleus that is a
//! legal onset — the maximal onset principle (D. Kahn, "Syllable-based generalizations in
//! English phonology", 1976) — with the legal onsets given by [`Onsets`]. A `.` (the syllable
//! break of both alphabets) is written between two phones wherever a reader would otherwise
//! take them as one longer phone (t + ʃ read as the affricate t͡ʃ, ɔ + ɪ as the diphthong ɔɪ).
//!
//! Reading segments by longest match over the phones' renderings, phonemes before allophones
//! of the same length; a mark gives the next nucleus its level, a stress-dependent rendering
//! gives its own level (ə → `AH` unstressed), and other nuclei are unstressed when the
//! phoneset declares an unstressed mark. Renderings and the text read are compared in Unicode
//! canonical decomposition (NFD, UAX #15), so a precomposed ĩ matches i + U+0303 COMBINING
//! TILDE; a diacritic (ː, ˑ, ̃, ̩ ...) is read only as part of a phone the phoneset lists with
//! it, and one that follows a phone without forming a listed phone is an error naming the
//! symbol, the phone it follows and the phoneset.

use std::collections::HashSet;

use thiserror::Error;
use unicode_normalization::char::{canonical_combining_class, decompose_canonical};
use unicode_normalization::UnicodeNormalization;

use super::phone::Phone;
use super::pronunciation::{PhoneToken, Pronunciation, PronunciationError};
use super::stress::StressLevel;
use super::{PhoneId, Phoneset};

/// A way of writing pronunciations.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Alphabet {
    /// The phoneset's own symbols with their stress marks, separated by spaces.
    Symbols,
    /// IPA, stress marks ˈ ˌ before the stressed syllable.
    Ipa,
    /// X-SAMPA, stress marks `"` `%` before the stressed syllable.
    XSampa,
}

impl Alphabet {
    /// The name used on the command line and in PLS `alphabet` attributes (`symbols`, `ipa`,
    /// `x-sampa`).
    pub fn name(self) -> &'static str {
        match self {
            Alphabet::Symbols => "symbols",
            Alphabet::Ipa => "ipa",
            Alphabet::XSampa => "x-sampa",
        }
    }

    /// Reads a name given by [`Alphabet::name`].
    ///
    /// ```
    /// use orthoepy::phoneset::Alphabet;
    /// assert_eq!(Alphabet::from_name("x-sampa"), Some(Alphabet::XSampa));
    /// assert_eq!(Alphabet::from_name("sampa"), None);
    /// ```
    pub fn from_name(name: &str) -> Option<Alphabet> {
        [Alphabet::Symbols, Alphabet::Ipa, Alphabet::XSampa].into_iter().find(|a| a.name() == name)
    }

    /// The mark written before a syllable of `level` (none for unstressed).
    fn mark(self, level: StressLevel) -> Option<char> {
        match (self, level) {
            (Alphabet::Ipa, StressLevel::Primary) => Some('ˈ'),
            (Alphabet::Ipa, StressLevel::Secondary) => Some('ˌ'),
            (Alphabet::XSampa, StressLevel::Primary) => Some('"'),
            (Alphabet::XSampa, StressLevel::Secondary) => Some('%'),
            _ => None,
        }
    }

    /// Whether `c` is a diacritic of this alphabet: a mark that modifies the phone before it and
    /// never starts one. IPA: combining marks, and the spacing modifier letters, superscripts and
    /// phonetic-extension modifiers (ː ˑ ʰ ʷ ʲ ⁿ ...; IPA chart 2020, diacritics and
    /// suprasegmentals); X-SAMPA: `: = ~ _ ` ' \` (Wells 1995).
    fn is_diacritic(self, c: char) -> bool {
        match self {
            Alphabet::Ipa => {
                unicode_normalization::char::is_combining_mark(c)
                    || ('\u{02B0}'..='\u{02FF}').contains(&c)
                    || ('\u{1D2C}'..='\u{1DBF}').contains(&c)
                    || ('\u{2070}'..='\u{209F}').contains(&c)
            }
            Alphabet::XSampa => matches!(c, ':' | '=' | '~' | '_' | '`' | '\'' | '\\'),
            Alphabet::Symbols => false,
        }
    }

    /// The level a mark character announces when reading.
    fn level_of_mark(self, ch: char) -> Option<StressLevel> {
        match (self, ch) {
            (Alphabet::Ipa, 'ˈ' | '\'') | (Alphabet::XSampa, '"') => Some(StressLevel::Primary),
            (Alphabet::Ipa, 'ˌ') | (Alphabet::XSampa, '%') => Some(StressLevel::Secondary),
            _ => None,
        }
    }
}

/// The consonant clusters taken as legal syllable onsets when placing stress marks. A cluster
/// at the start of a word and a single consonant are always legal; others only when added.
///
/// ```
/// use orthoepy::phoneset::{Alphabet, Onsets, Phoneset};
/// let set = Phoneset::shipped("en-arpa").unwrap();
/// let street = set.parse("S T R IY1 T").unwrap();
/// let astray = set.parse("AH0 S T R EY1").unwrap();
/// assert_eq!(set.render(&astray, Alphabet::Ipa), "əstˈɹeɪ"); // only single consonants known
/// let onsets = Onsets::from_pronunciations(&set, [&street]);
/// assert_eq!(set.render_with(&astray, Alphabet::Ipa, &onsets), "əˈstɹeɪ");
/// assert_eq!(set.render_with(&astray, Alphabet::XSampa, &onsets), "@\"str\\eI");
/// ```
#[derive(Debug, Clone, Default)]
pub struct Onsets(HashSet<Vec<PhoneId>>);

impl Onsets {
    /// No clusters beyond the always-legal ones.
    pub fn new() -> Onsets {
        Onsets::default()
    }

    /// The word-initial consonant clusters of `pronunciations` (and their prefixes), as a lexicon
    /// shows which onsets its language allows.
    pub fn from_pronunciations<'a>(set: &Phoneset, pronunciations: impl IntoIterator<Item = &'a Pronunciation>) -> Onsets {
        let mut onsets = Onsets::new();
        for pron in pronunciations {
            onsets.add_word_start(set, pron);
        }
        onsets
    }

    /// Adds the word-initial consonant cluster of `pron` and its prefixes.
    pub fn add_word_start(&mut self, set: &Phoneset, pron: &Pronunciation) {
        let cluster: Vec<PhoneId> = pron
            .phones
            .iter()
            .map(|t| t.phone)
            .take_while(|&id| set.get(id).is_some_and(|p| !p.is_nucleus()))
            .collect();
        for len in 1..=cluster.len() {
            if !self.0.contains(&cluster[..len]) {
                self.0.insert(cluster[..len].to_vec());
            }
        }
    }

    /// Adds every cluster of `other`: the onsets of two parts of a lexicon are those of the whole.
    pub fn merge(&mut self, other: Onsets) {
        self.0.extend(other.0);
    }

    fn allows(&self, cluster: &[PhoneId]) -> bool {
        cluster.len() == 1 || self.0.contains(cluster)
    }
}

/// Why a transcription could not be read.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum TranscriptionError {
    /// A stretch of the transcription is the rendering of no phone.
    #[error("{}", no_phone_message(.alphabet, .found, .after.as_deref(), *.column, .phoneset))]
    NoPhone {
        /// The alphabet read (`ipa`, `x-sampa`).
        alphabet: &'static str,
        /// The unmatched characters (up to where a phone or a break starts again), in NFD.
        found: String,
        /// The rendering of the phone read just before, when `found` is a diacritic that follows
        /// it directly (ː after i): the phoneset has no phone written as the two together.
        after: Option<String>,
        /// The 1-based character column of `found` in the text as given.
        column: usize,
        /// The phoneset id.
        phoneset: String,
    },
    /// Phoneset symbols that do not parse.
    #[error(transparent)]
    Symbols(#[from] PronunciationError),
}

/// The message of [`TranscriptionError::NoPhone`]: the characters with their code points, and
/// the phone they follow when they follow one.
fn no_phone_message(alphabet: &str, found: &str, after: Option<&str>, column: usize, phoneset: &str) -> String {
    let points: Vec<String> = found.chars().map(|c| format!("U+{:04X}", c as u32)).collect();
    let points = points.join(" ");
    match after {
        Some(before) => format!(
            "{alphabet} {found:?} ({points}) after {before:?} at character {column}: {phoneset} has no phone written {:?}; \
             use a phoneset that lists it, or write the phone as {phoneset} does",
            format!("{before}{found}")
        ),
        None => format!("{alphabet} {found:?} ({points}) at character {column} matches no phone of {phoneset}"),
    }
}

/// `text` in canonical decomposition (NFD, UAX #15), each character paired with the index of
/// the character of `text` it comes from (so errors name the column the writer sees).
fn decomposed(text: &str) -> Vec<(char, usize)> {
    let mut out: Vec<(char, usize)> = Vec::with_capacity(text.len());
    for (i, c) in text.chars().enumerate() {
        decompose_canonical(c, |d| out.push((d, i)));
    }
    // Canonical ordering: each run of combining marks sorted (stably) by combining class.
    let mut start = 0;
    while start < out.len() {
        let run = out[start..].iter().take_while(|(c, _)| canonical_combining_class(*c) != 0).count();
        out[start..start + run].sort_by_key(|(c, _)| canonical_combining_class(*c));
        start += run.max(1);
    }
    out
}

/// One rendering a reader may meet: its characters, the phone, the level it implies.
#[derive(Debug, Clone)]
pub(crate) struct Form {
    text: Vec<char>,
    phone: PhoneId,
    level: Option<StressLevel>,
}

/// The reading tables of a phoneset: every rendering, longest first, phonemes before
/// allophones, plain before stress-dependent.
#[derive(Debug, Clone, Default)]
pub(crate) struct Forms {
    ipa: Vec<Form>,
    xsampa: Vec<Form>,
}

impl Forms {
    /// Builds both tables from checked phones.
    pub fn build(phones: &[Phone]) -> Forms {
        let table = |plain: fn(&Phone) -> &str, stressed: fn(&super::StressedForm) -> &str| {
            let mut forms: Vec<(bool, Form)> = Vec::new();
            for (i, p) in phones.iter().enumerate() {
                let phone = i as PhoneId;
                forms.push((p.is_allophone(), Form { text: plain(p).nfd().collect(), phone, level: None }));
                for f in &p.by_stress {
                    forms.push((p.is_allophone(), Form { text: stressed(f).nfd().collect(), phone, level: Some(f.level) }));
                }
            }
            forms.retain(|(_, f)| !f.text.is_empty());
            forms.sort_by(|(a_allo, a), (b_allo, b)| {
                b.text.len().cmp(&a.text.len()).then(a_allo.cmp(b_allo)).then(a.level.is_some().cmp(&b.level.is_some()))
            });
            forms.into_iter().map(|(_, f)| f).collect()
        };
        Forms { ipa: table(|p| &p.ipa, |f| &f.ipa), xsampa: table(|p| &p.xsampa, |f| &f.xsampa) }
    }

    fn table(&self, alphabet: Alphabet) -> &[Form] {
        match alphabet {
            Alphabet::XSampa => &self.xsampa,
            _ => &self.ipa,
        }
    }

    /// The longest rendering at the start of `text`.
    fn longest(&self, alphabet: Alphabet, text: &[char]) -> Option<&Form> {
        self.table(alphabet).iter().find(|f| text.starts_with(&f.text))
    }
}

impl Phoneset {
    /// `pron` written in `alphabet`, stress marks before the stressed syllable with only
    /// word-initial clusters and single consonants as onsets. For the placement the PLS export
    /// uses (onsets learnt from a whole lexicon) call [`Phoneset::render_with`].
    ///
    /// ```
    /// use orthoepy::phoneset::{Alphabet, Phoneset};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let sofa = set.parse("S OW1 F AH0").unwrap();
    /// assert_eq!(set.render(&sofa, Alphabet::Ipa), "ˈsoʊfə");
    /// assert_eq!(set.render(&sofa, Alphabet::XSampa), "\"soUf@");
    /// assert_eq!(set.render(&sofa, Alphabet::Symbols), "S OW1 F AH0");
    /// ```
    pub fn render(&self, pron: &Pronunciation, alphabet: Alphabet) -> String {
        self.render_with(pron, alphabet, &Onsets::new())
    }

    /// `pron` written in `alphabet`, stress marks placed by the maximal onset principle over
    /// `onsets` (see [`Onsets`]). Ids that are not phones of this set are left out.
    pub fn render_with(&self, pron: &Pronunciation, alphabet: Alphabet, onsets: &Onsets) -> String {
        if alphabet == Alphabet::Symbols {
            return pron.render(self);
        }
        let tokens: Vec<(PhoneId, &Phone, Option<StressLevel>)> =
            pron.phones.iter().filter_map(|t| self.get(t.phone).map(|p| (t.phone, p, t.stress))).collect();
        let marks = mark_positions(&tokens, alphabet, onsets);
        let texts: Vec<&str> = tokens
            .iter()
            .map(|(_, p, level)| match alphabet {
                Alphabet::XSampa => p.xsampa_at(*level),
                _ => p.ipa_at(*level),
            })
            .collect();
        let breaks = self.breaks(&texts, &marks, alphabet);
        let mut out = String::new();
        for (i, text) in texts.iter().enumerate() {
            if let Some(mark) = marks.get(i).copied().flatten() {
                out.push(mark);
            }
            out.push_str(text);
            if breaks.get(i).copied().unwrap_or(false) {
                out.push('.');
            }
        }
        out
    }

    /// After which rendered tokens a `.` goes: where the next token has no stress mark before it
    /// and a reader would take this token and what follows as one longer phone.
    fn breaks(&self, texts: &[&str], marks: &[Option<char>], alphabet: Alphabet) -> Vec<bool> {
        let nfd: Vec<Vec<char>> = texts.iter().map(|t| t.nfd().collect()).collect();
        let all: Vec<char> = nfd.iter().flatten().copied().collect();
        let mut at = 0;
        nfd.iter()
            .enumerate()
            .map(|(i, text)| {
                let next_unmarked = i + 1 < nfd.len() && marks.get(i + 1).is_some_and(Option::is_none);
                let merges = self.forms.longest(alphabet, &all[at..]).is_some_and(|f| f.text.len() != text.len());
                at += text.len();
                next_unmarked && merges
            })
            .collect()
    }

    /// Reads a transcription written in `alphabet` back into phones of this set (see the module
    /// documentation for the rules). [`Alphabet::Symbols`] is parsed strictly.
    ///
    /// ```
    /// use orthoepy::phoneset::{Alphabet, Phoneset};
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let butter = set.read_transcription("ˈbʌtɚ", Alphabet::Ipa).unwrap();
    /// assert_eq!(butter.render(&set), "B AH1 T ER0");
    /// let about = set.read_transcription("@\"baUt", Alphabet::XSampa).unwrap();
    /// assert_eq!(about.render(&set), "AH0 B AW1 T");
    /// assert!(set.read_transcription("ʘ", Alphabet::Ipa).is_err());
    /// let long = set.read_transcription("ˈsiːt", Alphabet::Ipa).unwrap_err().to_string();
    /// assert!(long.contains("after \"i\" at character 4: en-arpa has no phone written \"iː\""), "{long}");
    /// ```
    pub fn read_transcription(&self, text: &str, alphabet: Alphabet) -> Result<Pronunciation, TranscriptionError> {
        if alphabet == Alphabet::Symbols {
            return Ok(self.parse(text)?);
        }
        let (chars, origin): (Vec<char>, Vec<usize>) = decomposed(text).into_iter().unzip();
        let mut phones = Vec::new();
        let mut pending: Option<StressLevel> = None;
        // The form read last and the index just after it.
        let mut previous: Option<(usize, &Form)> = None;
        let mut i = 0;
        while let Some(&c) = chars.get(i) {
            if let Some(level) = alphabet.level_of_mark(c) {
                pending = Some(level);
                i += 1;
                continue;
            }
            if is_boundary(c) {
                i += 1;
                continue;
            }
            // A phone never spans a syllable break or a space.
            let end = chars[i..].iter().position(|&c| is_boundary(c)).map_or(chars.len(), |n| i + n);
            let Some(form) = self.forms.longest(alphabet, &chars[i..end]) else {
                let found: String = chars[i..self.unmatched_end(alphabet, &chars[..end], i)].iter().collect();
                let after = previous.filter(|(e, _)| *e == i && alphabet.is_diacritic(c)).map(|(_, f)| f.text.iter().collect());
                let column = origin.get(i).map_or(i, |&o| o) + 1;
                return Err(TranscriptionError::NoPhone { alphabet: alphabet.name(), found, after, column, phoneset: self.id.clone() });
            };
            phones.push(PhoneToken { phone: form.phone, stress: self.stress_read(form, &mut pending) });
            i += form.text.len();
            previous = Some((i, form));
        }
        Ok(Pronunciation { phones })
    }

    /// The stress a form read gets: a nucleus takes the pending mark, else its form's own level,
    /// else unstressed; levels the phoneset declares no mark for are dropped.
    fn stress_read(&self, form: &Form, pending: &mut Option<StressLevel>) -> Option<StressLevel> {
        if !self.get(form.phone).is_some_and(Phone::is_nucleus) {
            return None;
        }
        let level = pending.take().or(form.level).unwrap_or(StressLevel::Unstressed);
        self.mark_for(level).is_some().then_some(level)
    }

    /// Where a stretch that no rendering starts at, from `start`, ends: at the next character a
    /// rendering or a stress mark starts at, or the end of `chars`.
    fn unmatched_end(&self, alphabet: Alphabet, chars: &[char], start: usize) -> usize {
        (start + 1..chars.len())
            .find(|&k| alphabet.level_of_mark(chars[k]).is_some() || self.forms.longest(alphabet, &chars[k..]).is_some())
            .unwrap_or(chars.len())
    }
}

/// A syllable break or a space: never inside a phone.
fn is_boundary(c: char) -> bool {
    c.is_whitespace() || c == '.'
}

/// For each token, the stress mark written before it: before the longest legal onset that
/// precedes a stressed nucleus.
fn mark_positions(tokens: &[(PhoneId, &Phone, Option<StressLevel>)], alphabet: Alphabet, onsets: &Onsets) -> Vec<Option<char>> {
    let mut marks = vec![None; tokens.len()];
    let ids: Vec<PhoneId> = tokens.iter().map(|t| t.0).collect();
    let mut previous_nucleus: Option<usize> = None;
    for (v, (_, phone, level)) in tokens.iter().enumerate() {
        if !phone.is_nucleus() {
            continue;
        }
        if let Some(mark) = level.and_then(|l| alphabet.mark(l)) {
            let first_consonant = previous_nucleus.map_or(0, |u| u + 1);
            let start = (first_consonant..v)
                .find(|&s| (s == 0 && previous_nucleus.is_none()) || onsets.allows(&ids[s..v]))
                .unwrap_or(v);
            if let Some(slot) = marks.get_mut(start) {
                *slot = Some(mark);
            }
        }
        previous_nucleus = Some(v);
    }
    marks
}

#[cfg(test)]
mod tests {
    use super::*;

    fn arpa() -> Phoneset {
        Phoneset::shipped("en-arpa").unwrap()
    }

    /// The reduced vowels of American English are ə and ɚ, the stressed ones ʌ and ɝ (IPA
    /// Handbook 1999, illustration of American English; from memory).
    #[test]
    fn reduced_vowels_are_written_by_stress() {
        let set = arpa();
        let cases = [
            ("S OW1 F AH0", "ˈsoʊfə", "\"soUf@"),
            ("AH0 B AW1 T", "əˈbaʊt", "@\"baUt"),
            ("B AH1 T ER0", "ˈbʌtɚ", "\"bVt@`"),
            ("B ER1 D", "ˈbɝd", "\"b3`d"),
            ("AH2 N D ER0 T EY1 K", "ˌʌndɚˈteɪk", "%Vnd@`\"teIk"),
        ];
        for (symbols, ipa, xsampa) in cases {
            let pron = set.parse(symbols).unwrap();
            assert_eq!(set.render(&pron, Alphabet::Ipa), ipa, "{symbols}");
            assert_eq!(set.render(&pron, Alphabet::XSampa), xsampa, "{symbols}");
            for (text, alphabet) in [(ipa, Alphabet::Ipa), (xsampa, Alphabet::XSampa)] {
                assert_eq!(set.read_transcription(text, alphabet).unwrap().render(&set), symbols, "{text}");
            }
        }
    }

    /// A syllable break keeps t + ʃ apart from the affricate t͡ʃ (common practice).
    #[test]
    fn a_break_separates_phones_that_would_merge() {
        let set = arpa();
        let courtship = set.parse("K AO1 R T SH IH2 P").unwrap();
        let ipa = set.render(&courtship, Alphabet::Ipa);
        assert_eq!(ipa, "ˈkɔɹtˌʃɪp");
        let drawing = set.parse("D R AO1 IH0 NG").unwrap();
        let ipa = set.render(&drawing, Alphabet::Ipa);
        assert_eq!(ipa, "ˈdɹɔ.ɪŋ");
        assert_eq!(set.read_transcription(&ipa, Alphabet::Ipa).unwrap(), drawing);
        let xsampa = set.render(&drawing, Alphabet::XSampa);
        assert_eq!(xsampa, "\"dr\\O.IN");
        assert_eq!(set.read_transcription(&xsampa, Alphabet::XSampa).unwrap(), drawing);
    }

    /// `decomposed` gives NFD (UAX #15: canonical decomposition, then canonical ordering of
    /// combining marks), each character with the index of the one it came from.
    #[test]
    fn decomposition_is_nfd_and_keeps_origins() {
        for text in ["ĩː", "ç", "q\u{303}\u{323}", "ạ̃", "l̩", "t͡ʃ", "ǖ"] {
            let got: String = decomposed(text).into_iter().map(|(c, _)| c).collect();
            assert_eq!(got, text.nfd().collect::<String>(), "{text}");
        }
        assert_eq!(decomposed("ĩx"), [('i', 0), ('\u{303}', 0), ('x', 1)]);
    }

    #[test]
    fn unknown_characters_are_located() {
        let err = arpa().read_transcription("ˈkʘt", Alphabet::Ipa).unwrap_err();
        assert_eq!(err.to_string(), "ipa \"ʘ\" (U+0298) at character 3 matches no phone of en-arpa");
        // A diacritic the phoneset has no phone for is named with the phone it follows: the
        // nasalisation tilde U+0303 and the X-SAMPA length mark `:` (IPA chart 2020; Wells 1995).
        let err = arpa().read_transcription("ˈkɑ\u{303}t", Alphabet::Ipa).unwrap_err().to_string();
        // (Debug quoting shows a lone combining mark as an escape.)
        assert!(err.starts_with("ipa \"\\u{303}\" (U+0303) after \"ɑ\" at character 4: en-arpa has no phone written \"ɑ\\u{303}\""), "{err}");
        let err = arpa().read_transcription("\"si:t", Alphabet::XSampa).unwrap_err().to_string();
        assert!(err.starts_with("x-sampa \":\" (U+003A) after \"i\" at character 4: en-arpa has no phone written \"i:\""), "{err}");
    }

    #[test]
    fn bad_stressed_forms_are_refused() {
        let text = r#"
id = "t"
name = "T"
schema = "ipa-chart"
[[phone]]
symbol = "p"
ipa = "p"
xsampa = "p"
class = "consonant"
features = { place = "bilabial", manner = "stop", voicing = "voiceless" }
by_stress = [ { level = "unstressed", ipa = "b", xsampa = "b" } ]
[[phone]]
symbol = "a"
ipa = "a"
xsampa = "a"
class = "vowel"
features = { height = "open", backness = "front", rounding = "unrounded" }
by_stress = [ { level = "loud", ipa = "A", xsampa = "A" } ]
"#;
        let err = Phoneset::from_toml_str(text, "t.toml").unwrap_err().to_string();
        assert!(err.contains("2 problem(s)"), "{err}");
        assert!(err.contains("only a phone that can carry stress"), "{err}");
        assert!(err.contains("unknown level `loud`"), "{err}");
    }
}
