//! Reading the TOML shape of rule-set and profile files, keeping the position of every value
//! so that later errors can name line and column. Owns the serde structures and the mapping
//! from byte spans to (line, column); must not interpret rules (that is `compile`).

use serde::Deserialize;
use toml::Spanned;

use super::error::VariantsError;

/// A rule file as written, before compilation.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RuleSetFile {
    pub id: String,
    pub title: String,
    pub phoneset: Spanned<String>,
    pub source: String,
    #[serde(default)]
    pub note: String,
    #[serde(default, rename = "rule")]
    pub rules: Vec<RuleEntry>,
}

/// One `[[rule]]` table.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct RuleEntry {
    pub id: Spanned<String>,
    pub rule: Spanned<String>,
    pub mode: Spanned<String>,
    pub weight: Spanned<f64>,
    #[serde(default)]
    pub source: String,
}

/// A profile file as written.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct ProfileFile {
    pub id: String,
    pub title: String,
    pub phoneset: Spanned<String>,
    #[serde(default)]
    pub source: String,
    #[serde(default, rename = "use")]
    pub uses: Vec<Spanned<UseEntry>>,
}

/// One `[[use]]` table of a profile: a shipped rule set (`rules`) or a file (`file`).
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(crate) struct UseEntry {
    pub rules: Option<String>,
    pub file: Option<String>,
    pub weight: f64,
    #[serde(default)]
    pub weights: std::collections::BTreeMap<String, f64>,
}

use crate::support::located::Located;

/// Text of a file with its name, for turning byte offsets into positions.
pub(crate) struct SourceText<'a> {
    pub name: &'a str,
    pub text: &'a str,
}

impl SourceText<'_> {
    /// 1-based (line, character column) of a byte offset.
    pub fn position(&self, byte: usize) -> (usize, usize) {
        crate::support::located::line_column(self.text.as_bytes(), byte)
    }

    /// Position of character `offset` inside a string value spanned by `span`. Exact for a
    /// one-line string without escapes (all shipped rules); otherwise the value's start.
    pub fn position_in_string(&self, span: std::ops::Range<usize>, offset: usize) -> (usize, usize) {
        let raw = self.text.get(span.clone()).unwrap_or("");
        let simple = (raw.starts_with('"') || raw.starts_with('\''))
            && !raw.starts_with("\"\"\"")
            && !raw.starts_with("'''")
            && !raw.contains('\\')
            && !raw.contains('\n');
        let (line, column) = self.position(span.start);
        if simple {
            (line, column + 1 + offset)
        } else {
            (line, column)
        }
    }

    /// Parses the whole file as `T`, turning TOML errors into located errors.
    pub fn parse<T: serde::de::DeserializeOwned>(&self) -> Result<T, VariantsError> {
        toml::from_str(self.text).map_err(|e| VariantsError::Invalid(Located::from_toml(self.name, self.text, &e)))
    }

    /// Located error at a spanned value.
    pub fn error_at<T>(&self, value: &Spanned<T>, message: impl Into<String>) -> VariantsError {
        VariantsError::at(self.name, self.position(value.span().start), message)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn positions_are_one_based_and_count_characters() {
        let s = SourceText { name: "x", text: "a = 1\nrule = \"∅ -> T\"\n" };
        assert_eq!(s.position(0), (1, 1));
        assert_eq!(s.position(6), (2, 1));
        let start = s.text.find('"').unwrap_or(0);
        // character 2 of the string value is `-`, at column 10 of line 2.
        assert_eq!(s.position_in_string(start..s.text.len() - 1, 2), (2, 11));
    }

    #[test]
    fn toml_errors_are_located() {
        let s = SourceText { name: "bad.toml", text: "id = \"x\"\ntitle = \n" };
        let err = s.parse::<RuleSetFile>().unwrap_err();
        assert!(err.to_string().starts_with("bad.toml:2:"), "{err}");
    }
}
