//! The inline phone editor: a one-line text field holding a pronunciation, with live validation
//! of every token and Tab completion of the token under the cursor.
//!
//! Pure state and editing operations; drawing is in the view, keys are mapped in `update`.

use super::phones::{check_all, PhoneCheck, TokenVerdict};

/// What saving the editor's text decides.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub enum EditPurpose {
    /// Accept the text for the item on screen.
    #[default]
    Item,
    /// Replace the pronunciation `from` of the lexicon entry `word`.
    ChangeEntry {
        /// The headword.
        word: String,
        /// Its pronunciation now.
        from: String,
    },
    /// Add the text as a further pronunciation of the headword `word`.
    AddVariant {
        /// The headword.
        word: String,
    },
}

/// The editor's state.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Editor {
    /// The text being edited.
    pub text: String,
    /// Cursor position in characters.
    pub cursor: usize,
    /// Completions offered by the last Tab (shown under the field), empty otherwise.
    pub offers: Vec<String>,
    /// The pronunciation the edit started from.
    pub original: String,
    /// What saving decides.
    pub purpose: EditPurpose,
    /// The text whose audit warnings were shown on the last Enter (a second Enter saves it).
    pub warned: Option<String>,
}

impl Editor {
    /// Start editing `text` with the cursor at its end.
    pub fn new(text: &str) -> Editor {
        Editor::for_purpose(text, EditPurpose::Item)
    }

    /// Start editing `text` for a lexicon entry (or the item on screen).
    pub fn for_purpose(text: &str, purpose: EditPurpose) -> Editor {
        Editor {
            text: text.to_string(),
            cursor: text.chars().count(),
            offers: Vec::new(),
            original: text.to_string(),
            purpose,
            warned: None,
        }
    }

    fn byte_at(&self, char_pos: usize) -> usize {
        self.text.char_indices().nth(char_pos).map_or(self.text.len(), |(b, _)| b)
    }

    /// Insert a character at the cursor.
    pub fn insert(&mut self, c: char) {
        let at = self.byte_at(self.cursor);
        self.text.insert(at, c);
        self.cursor += 1;
        self.offers.clear();
    }

    /// Delete the character before the cursor.
    pub fn backspace(&mut self) {
        if self.cursor > 0 {
            let at = self.byte_at(self.cursor - 1);
            self.text.remove(at);
            self.cursor -= 1;
        }
        self.offers.clear();
    }

    /// Delete the character under the cursor.
    pub fn delete(&mut self) {
        if self.cursor < self.text.chars().count() {
            let at = self.byte_at(self.cursor);
            self.text.remove(at);
        }
        self.offers.clear();
    }

    /// Move the cursor by `delta` characters, staying inside the text.
    pub fn move_by(&mut self, delta: isize) {
        let len = self.text.chars().count() as isize;
        self.cursor = (self.cursor as isize + delta).clamp(0, len) as usize;
    }

    /// Put the cursor at the start (`false`) or end (`true`).
    pub fn jump(&mut self, end: bool) {
        self.cursor = if end { self.text.chars().count() } else { 0 };
    }

    /// Complete the token that ends at the cursor: a single completion is inserted (followed by
    /// a space), several extend the token to their common prefix and are offered.
    ///
    /// ```
    /// use orthoepy::tui::{Editor, SymbolList};
    /// let set = SymbolList::new("t", &["SH", "S"], &["AO"], &["1"]);
    /// let mut ed = Editor::new("S");
    /// ed.complete(&set);
    /// assert_eq!(ed.offers, vec!["S", "SH"]);
    /// let mut ed = Editor::new("K A");
    /// ed.complete(&set);
    /// assert_eq!(ed.text, "K AO1 ");
    /// ```
    pub fn complete(&mut self, checker: &dyn PhoneCheck) {
        let before: String = self.text.chars().take(self.cursor).collect();
        let start = before.rfind(' ').map_or(0, |i| i + 1);
        let prefix = &before[start..];
        let options = checker.complete(prefix);
        let fill = match options.as_slice() {
            [] => {
                self.offers.clear();
                return;
            }
            [one] => format!("{one} "),
            many => common_prefix(many),
        };
        let rest: String = fill.chars().skip(prefix.chars().count()).collect();
        for c in rest.chars() {
            self.insert(c);
        }
        self.offers = if options.len() > 1 { options } else { Vec::new() };
    }

    /// Every token with its verdict.
    pub fn verdicts(&self, checker: &dyn PhoneCheck) -> Vec<(String, TokenVerdict)> {
        check_all(checker, &self.text)
    }

    /// The text as a pronunciation (tokens joined by single spaces), if it is non-empty and
    /// every token is a known phone.
    pub fn valid_pronunciation(&self, checker: &dyn PhoneCheck) -> Option<String> {
        let verdicts = self.verdicts(checker);
        let ok = !verdicts.is_empty() && verdicts.iter().all(|(_, v)| *v == TokenVerdict::Known);
        ok.then(|| verdicts.into_iter().map(|(t, _)| t).collect::<Vec<_>>().join(" "))
    }
}

fn common_prefix(words: &[String]) -> String {
    let mut prefix = words.first().cloned().unwrap_or_default();
    for w in words {
        while !w.starts_with(&prefix) {
            prefix.pop();
        }
    }
    prefix
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::tui::SymbolList;

    fn set() -> SymbolList {
        SymbolList::new("t", &["K", "T", "S", "SH"], &["AE", "IY"], &["0", "1", "2"])
    }

    #[test]
    fn editing_moves_and_deletes_by_characters() {
        let mut ed = Editor::new("KÆ");
        ed.move_by(-1);
        ed.insert('x');
        assert_eq!(ed.text, "KxÆ");
        ed.backspace();
        ed.delete();
        assert_eq!(ed.text, "K");
        ed.move_by(-5);
        assert_eq!(ed.cursor, 0);
    }

    #[test]
    fn validation_marks_unknown_tokens() {
        let ed = Editor::new("K AE1 TT");
        let v = ed.verdicts(&set());
        assert_eq!(v[1].1, TokenVerdict::Known);
        assert!(matches!(&v[2].1, TokenVerdict::Unknown(s) if s.contains(&"T".to_string())));
        assert!(ed.valid_pronunciation(&set()).is_none());
        assert_eq!(Editor::new(" K  AE1 T ").valid_pronunciation(&set()).as_deref(), Some("K AE1 T"));
        assert!(Editor::new("  ").valid_pronunciation(&set()).is_none());
    }

    #[test]
    fn completion_in_the_middle_of_the_text() {
        let mut ed = Editor::new("K IY1");
        ed.cursor = 1;
        ed.insert(' ');
        ed.insert('A');
        ed.complete(&set());
        // The common prefix of AE0/AE1/AE2 is "AE": extended and offered.
        assert_eq!(ed.text, "K AE IY1");
        assert_eq!(ed.offers.len(), 3);
    }
}
