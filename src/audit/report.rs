//! The audit report: findings with a summary, rendered as text for people (grouped by check, each
//! finding as `file:line` with its fix) or serialised as one JSON object `{summary, findings}`.
//!
//! Findings are ordered by check (in the order checks were given), then by line. This module
//! formats; it judges nothing.

use super::{Check, Finding, Severity};
use std::collections::BTreeMap;

/// Per-check figures of a report.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct CheckSummary {
    /// The check's id.
    pub id: String,
    /// The check's (highest) severity.
    pub severity: Severity,
    /// What it looks for.
    pub description: String,
    /// How many findings it made.
    pub findings: usize,
}

/// The figures of a report.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct Summary {
    /// The lexicon audited, as given.
    pub file: Option<String>,
    /// Entries audited.
    pub entries: usize,
    /// Findings by severity name (`error`, `warning`, `info`; zero counts included).
    pub by_severity: BTreeMap<String, usize>,
    /// Every check that ran, in report order.
    pub checks: Vec<CheckSummary>,
}

/// A finished audit.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Report {
    /// The figures.
    pub summary: Summary,
    /// Every finding, by check then line.
    pub findings: Vec<Finding>,
}

impl Report {
    /// Gathers the findings of `checks` (the `i`-th list of `per_check` belongs to `checks[i]`), each
    /// list moved in as it comes, so a lazy `per_check` runs one check at a time.
    pub fn new(file: Option<&str>, entries: usize, checks: &[Box<dyn Check>], per_check: impl IntoIterator<Item = Vec<Finding>>) -> Report {
        let mut summaries = Vec::with_capacity(checks.len());
        let mut findings = Vec::new();
        for (check, mut found) in checks.iter().zip(per_check) {
            found.sort_by(|a, b| (a.line, a.entry, &a.message).cmp(&(b.line, b.entry, &b.message)));
            summaries.push(CheckSummary {
                id: check.id().to_string(),
                severity: check.severity(),
                description: check.description().to_string(),
                findings: found.len(),
            });
            findings.append(&mut found);
        }
        let mut by_severity: BTreeMap<String, usize> =
            [Severity::Error, Severity::Warning, Severity::Info].iter().map(|s| (s.to_string(), 0)).collect();
        for f in &findings {
            *by_severity.entry(f.severity.to_string()).or_insert(0) += 1;
        }
        Report { summary: Summary { file: file.map(str::to_string), entries, by_severity, checks: summaries }, findings }
    }

    /// Number of findings at `severity` or above.
    pub fn count_at_least(&self, severity: Severity) -> usize {
        self.findings.iter().filter(|f| f.severity >= severity).count()
    }

    /// The report for people: a summary line, then each check with findings and its findings as
    /// `file:line: word [pronunciation]: message` with the fix on the next line.
    ///
    /// ```
    /// use orthoepy::audit::{self, Context};
    /// use orthoepy::lexicon::{Entry, HeadwordPolicy};
    /// use orthoepy::phoneset::Phoneset;
    /// let mut entry = Entry::new("pier", "P IH1 XR");
    /// entry.line = 7;
    /// let entries = [entry];
    /// let set = Phoneset::shipped("en-arpa").unwrap();
    /// let stress = Default::default();
    /// let context = Context::new(&entries, HeadwordPolicy::default(), &set, &stress);
    /// let text = audit::run(&context, &audit::select_checks(&["unknown-phone"]).unwrap(), Some("lexicon.csv")).to_text();
    /// assert!(text.contains("lexicon.csv:7: pier [P IH1 XR]: `XR`"));
    /// ```
    pub fn to_text(&self) -> String {
        let mut out = Vec::new();
        // Writing into a Vec cannot fail, and every piece written is text.
        let _ = self.write_text(&mut out);
        String::from_utf8(out).unwrap_or_else(|err| String::from_utf8_lossy(err.as_bytes()).into_owned())
    }

    /// Writes [`to_text`](Self::to_text)'s text to `out` as it goes, so a report of many findings
    /// is never held twice.
    pub fn write_text(&self, out: &mut impl std::io::Write) -> std::io::Result<()> {
        let file = self.summary.file.as_deref().unwrap_or("(lexicon)");
        let count = |s: &str| self.summary.by_severity.get(s).copied().unwrap_or(0);
        writeln!(
            out,
            "{file}: {} entries, {} checks: {} errors, {} warnings, {} notes",
            self.summary.entries,
            self.summary.checks.len(),
            count("error"),
            count("warning"),
            count("info")
        )?;
        let mut rest = self.findings.as_slice();
        for check in &self.summary.checks {
            let (mine, later) = rest.split_at(check.findings.min(rest.len()));
            rest = later;
            if mine.is_empty() {
                continue;
            }
            writeln!(out, "\n{} ({}, {}): {}", check.id, check.severity, mine.len(), check.description)?;
            for f in mine {
                let severity = if f.severity == check.severity { String::new() } else { format!(" ({})", f.severity) };
                writeln!(out, "  {file}:{}: {} [{}]: {}{severity}", f.line, f.word, f.pronunciation, f.message)?;
                if let Some(s) = &f.suggestion {
                    writeln!(out, "      fix: {s}")?;
                }
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::audit::context::tests::{entries, with};

    #[test]
    fn text_groups_by_check_and_json_has_summary_and_findings() {
        let rows = entries(&[("quay", "K IY1"), ("quay", "K IY1"), ("a", "AH0"), ("pier", "P IH1 XR")]);
        let report = with(&rows, |c| crate::audit::run(c, &crate::audit::all_checks(), Some("l.csv")));
        let text = report.to_text();
        assert!(text.starts_with("l.csv: 4 entries, "), "{text}");
        let dup = text.find("\nduplicate-entry (error, 1)").expect("a duplicate-entry section");
        let unknown = text.find("\nunknown-phone (error, 1)").expect("an unknown-phone section");
        assert!(unknown < dup);
        assert!(text.contains("  l.csv:3: quay [K IY1]: repeats line 2"));
        assert!(text.contains("(info)"), "{text}"); // the weak form "a" is a note under a warning check
        let json = serde_json::to_value(&report).unwrap();
        assert_eq!(json["summary"]["by_severity"]["error"], 2);
        let first = &json["findings"][0];
        for key in ["check", "severity", "entry", "word", "line", "pronunciation", "message", "suggestion"] {
            assert!(first.get(key).is_some(), "missing {key} in {first}");
        }
        let back: Report = serde_json::from_value(json).unwrap();
        assert_eq!(back, report);
        assert_eq!(report.count_at_least(Severity::Warning), 2);
        assert_eq!(report.count_at_least(Severity::Info), 3);
    }
}
