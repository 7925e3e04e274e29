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
//! phoneset declares an unstressed mark.

use std::collections::HashSet;

use thiserror::Error;

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
            self.0.insert(cluster[..len].to_vec());
        }
    }

    fn allows(&self, cluster: &[PhoneId]) -> bool {
        cluster.len() == 1 || self.0.contains(cluster)
    }
}

/// Why a transcription could not be read.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum TranscriptionError {
    /// A stretch of the transcription is the rendering of no phone.
    #[error("{alphabet} {found:?} at character {column} matches no phone of {phoneset}")]
    NoPhone {
        /// The alphabet read (`ipa`, `x-sampa`).
        alphabet: &'static str,
        /// The first unmatched character.
        found: String,
        /// Its 1-based character column.
        column: usize,
        /// The phoneset id.
        phoneset: String,
    },
    /// Phoneset symbols that do not parse.
    #[error(transparent)]
    Symbols(#[from] PronunciationError),
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
                forms.push((p.is_allophone(), Form { text: plain(p).chars().collect(), phone, level: None }));
                for f in &p.by_stress {
                    forms.push((p.is_allophone(), Form { text: stressed(f).chars().collect(), phone, level: Some(f.level) }));
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
        let texts: Vec<Vec<char>> = tokens
            .iter()
            .map(|(_, p, level)| match alphabet {
                Alphabet::XSampa => p.xsampa_at(*level).chars().collect(),
                _ => p.ipa_at(*level).chars().collect(),
            })
            .collect();
        let all: Vec<char> = texts.iter().flatten().copied().collect();
        let mut out = String::new();
        let mut at = 0;
        for (i, text) in texts.iter().enumerate() {
            if let Some(mark) = marks.get(i).copied().flatten() {
                out.push(mark);
            }
            out.extend(text.iter());
            let next_unmarked = i + 1 < texts.len() && marks.get(i + 1).is_some_and(Option::is_none);
            let merges = self.forms.longest(alphabet, &all[at..]).is_some_and(|f| f.text.len() != text.len());
            if next_unmarked && merges {
                out.push('.');
            }
            at += text.len();
        }
        out
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
    /// ```
    pub fn read_transcription(&self, text: &str, alphabet: Alphabet) -> Result<Pronunciation, TranscriptionError> {
        if alphabet == Alphabet::Symbols {
            return Ok(self.parse(text)?);
        }
        let chars: Vec<char> = text.chars().collect();
        let is_boundary = |c: char| c.is_whitespace() || c == '.';
        let declared = |level: StressLevel| self.mark_for(level).is_some().then_some(level);
        let mut phones = Vec::new();
        let mut pending: Option<StressLevel> = None;
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
                return Err(TranscriptionError::NoPhone {
                    alphabet: alphabet.name(),
                    found: c.to_string(),
                    column: i + 1,
                    phoneset: self.id.clone(),
                });
            };
            let nucleus = self.get(form.phone).is_some_and(Phone::is_nucleus);
            let stress = if nucleus {
                pending.take().or(form.level).or(Some(StressLevel::Unstressed)).and_then(declared)
            } else {
                None
            };
            phones.push(PhoneToken { phone: form.phone, stress });
            i += form.text.len();
        }
        Ok(Pronunciation { phones })
    }
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

    #[test]
    fn unknown_characters_are_located() {
        let err = arpa().read_transcription("ˈkʘt", Alphabet::Ipa).unwrap_err();
        assert_eq!(err.to_string(), "ipa \"ʘ\" at character 3 matches no phone of en-arpa");
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
