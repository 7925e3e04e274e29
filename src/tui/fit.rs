//! Fitting text into cells without hiding anything silently: a line that is too wide ends in
//! "…", a pronunciation is wrapped between phones (or, for IPA with no spaces, between
//! characters) onto indented continuation lines, never cut.
//!
//! Widths are display columns as ratatui counts them (Unicode East Asian width), so wide
//! headwords and combining marks are measured as the terminal draws them.

use ratatui::style::Style;
use ratatui::text::{Line, Span};

/// The mark that ends a shortened text.
pub const ELLIPSIS: &str = "…";

/// Display width of `text`.
pub fn width(text: &str) -> usize {
    Span::raw(text).width()
}

/// `text` shortened to at most `max` columns, ending in "…" when anything was cut.
pub fn ellipsize(text: &str, max: usize) -> String {
    if width(text) <= max {
        return text.to_string();
    }
    if max == 0 {
        return String::new();
    }
    let mut out = String::new();
    let mut used = 0;
    let mut buf = [0u8; 4];
    for c in text.chars() {
        let w = width(c.encode_utf8(&mut buf));
        if used + w + 1 > max {
            break;
        }
        out.push(c);
        used += w;
    }
    out.push_str(ELLIPSIS);
    out
}

/// A line of spans cut to `max` columns, the last kept span ending in "…" when cut.
pub fn fit_line(spans: Vec<Span<'static>>, max: usize) -> Line<'static> {
    let total: usize = spans.iter().map(Span::width).sum();
    if total <= max {
        return Line::from(spans);
    }
    let mut out = Vec::new();
    let mut used = 0;
    for span in spans {
        let w = span.width();
        if used + w < max {
            used += w;
            out.push(span);
            continue;
        }
        let room = max - used;
        if room > 0 {
            out.push(Span::styled(ellipsize(&span.content, room), span.style));
        } else if let Some(last) = out.pop() {
            let keep = last.width().saturating_sub(1);
            out.push(Span::styled(ellipsize(&last.content, keep.max(1)), last.style));
        }
        break;
    }
    Line::from(out)
}

/// Greedy wrap of `pieces` (phones, or any unbreakable units) into lines of at most `first`
/// columns for the first line and `rest` for the others, joined by `sep`. A piece wider than a
/// line is broken between characters (a wrap, never a cut).
pub fn wrap_pieces(pieces: &[&str], sep: &str, first: usize, rest: usize) -> Vec<String> {
    let mut lines: Vec<String> = vec![String::new()];
    let limit = |n: usize| if n == 0 { first.max(1) } else { rest.max(1) };
    for piece in pieces {
        let current = lines.len() - 1;
        let used = width(&lines[current]);
        let need = if used == 0 { width(piece) } else { used + width(sep) + width(piece) };
        if need <= limit(current) {
            if used > 0 {
                lines[current].push_str(sep);
            }
            lines[current].push_str(piece);
            continue;
        }
        if used > 0 {
            lines.push(String::new());
        }
        let mut buf = [0u8; 4];
        for c in piece.chars() {
            let at = lines.len() - 1;
            let w = width(c.encode_utf8(&mut buf));
            if width(&lines[at]) + w > limit(at) && !lines[at].is_empty() {
                lines.push(String::new());
            }
            let at = lines.len() - 1;
            lines[at].push(c);
        }
    }
    lines
}

/// Wrap plain text between words into lines of at most `max` columns, at most `max_lines`
/// of them; the last line ends in "…" when text is left over.
pub fn wrap_text(text: &str, max: usize, max_lines: usize, style: Style) -> Vec<Line<'static>> {
    let words: Vec<&str> = text.split_whitespace().collect();
    let mut lines = wrap_pieces(&words, " ", max, max);
    if lines.len() > max_lines {
        lines.truncate(max_lines.max(1));
        if let Some(last) = lines.last_mut() {
            *last = format!("{}{ELLIPSIS}", ellipsize(last, max.saturating_sub(1)).trim_end_matches(ELLIPSIS));
        }
    }
    lines.into_iter().map(|l| Line::from(Span::styled(l, style))).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ellipsis_marks_every_cut() {
        assert_eq!(ellipsize("saltmarsh-coast", 6), "saltm…");
        assert_eq!(ellipsize("quay", 4), "quay");
        // A wide character counts two columns (UAX #11 East Asian Width).
        assert_eq!(width(&ellipsize("港口港口", 5)), 5);
        let line = fit_line(vec![Span::raw("variants:"), Span::raw("saltmarsh-coast")], 14);
        assert_eq!(line.to_string(), "variants:salt…");
        assert_eq!(line.width(), 14);
    }

    #[test]
    fn pronunciations_wrap_between_phones() {
        let phones = ["AH0", "K", "R", "EH1", "D", "IH0", "T", "IH0", "D"];
        let lines = wrap_pieces(&phones, " ", 12, 12);
        assert_eq!(lines, vec!["AH0 K R EH1", "D IH0 T IH0", "D"]);
        assert_eq!(lines.join(" "), phones.join(" "), "nothing lost");
        let ipa = wrap_pieces(&["əˈkɹɛdɪtɪd"], " ", 4, 4);
        assert_eq!(ipa.concat(), "əˈkɹɛdɪtɪd");
        assert!(ipa.iter().all(|l| width(l) <= 4));
    }

    #[test]
    fn text_wraps_and_marks_what_is_left() {
        let lines = wrap_text("Next sailing from Kelport leaves at ten past nine.", 20, 2, Style::default());
        assert_eq!(lines.len(), 2);
        assert!(lines[1].to_string().ends_with('…'), "{:?}", lines[1].to_string());
    }
}
