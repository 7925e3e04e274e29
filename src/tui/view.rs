//! Drawing the review screen with ratatui: a pure function from [`App`] to a frame.
//!
//! Layout, top to bottom: a title bar (project, progress, save state, display, background
//! gauge); the word with its count, kind, state, origin, the decision in force and the example
//! line; candidates (pronunciation, score bar and source tag on the candidate's own line) beside
//! lexicon neighbours (spelling, shared ending, homophones); the feature view of the selected
//! candidate against its closest form; the audit's checks on the selected pronunciation and
//! progress by origin; a key line. Overlays (help, search, lexicon entry, confirmation) are
//! drawn on top.
//!
//! Space is shared out by need: panels grow with the terminal (more candidates, neighbours and
//! feature rows), nothing is cut without a "…" or a "N more" line, pronunciations wrap between
//! phones, and the panel scrolls to keep the selected candidate in view. Neighbours need
//! [`SIDE_BY_SIDE`] columns and the feature panel some height; a panel left out is named in the
//! candidates title. Below [`MIN_WIDTH`]×[`MIN_HEIGHT`] the screen only says it is too small.
//! With `color = false` (NO_COLOR) only bold, reverse and underline are used, and unknown phones
//! are also marked with `?`.

use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::{Color, Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Gauge, Paragraph, Wrap};
use ratatui::Frame;

use super::filter::TERMS;
use super::fit::{ellipsize, fit_line, width, wrap_pieces, wrap_text};
use super::help::KEYS;
use super::phones::{check_all, TokenVerdict};
use super::state::{App, Mode, SaveState, WordPron};
use super::update::describe;
use crate::queue::{entry_key, Candidate, ItemKind};
use crate::variants::{Edit, FeatureView};

/// Narrowest terminal the screen draws in (columns).
pub const MIN_WIDTH: u16 = 40;
/// Lowest terminal the screen draws in (rows).
pub const MIN_HEIGHT: u16 = 12;
/// Width from which the neighbours panel is drawn beside the candidates.
pub const SIDE_BY_SIDE: u16 = 80;

/// Styles used by the view, with or without colour.
#[derive(Debug, Clone, Copy)]
struct Theme {
    color: bool,
}

impl Theme {
    fn fg(self, c: Color) -> Style {
        if self.color {
            Style::default().fg(c)
        } else {
            Style::default()
        }
    }
    fn title(self) -> Style {
        self.fg(Color::Cyan).add_modifier(Modifier::BOLD)
    }
    fn word(self) -> Style {
        self.fg(Color::Yellow).add_modifier(Modifier::BOLD)
    }
    fn dim(self) -> Style {
        self.fg(Color::DarkGray)
    }
    fn selected(self) -> Style {
        Style::default().add_modifier(Modifier::REVERSED)
    }
    fn bad(self) -> Style {
        self.fg(Color::Red).add_modifier(Modifier::UNDERLINED | Modifier::BOLD)
    }
    fn warn(self) -> Style {
        self.fg(Color::Yellow).add_modifier(Modifier::BOLD)
    }
    fn good(self) -> Style {
        self.fg(Color::Green)
    }
    fn differs(self) -> Style {
        self.fg(Color::Magenta).add_modifier(Modifier::BOLD)
    }
}

/// Draw the whole screen. `color = false` honours NO_COLOR.
pub fn draw(frame: &mut Frame, app: &App, color: bool) {
    let t = Theme { color };
    let area = frame.area();
    if area.width < MIN_WIDTH || area.height < MIN_HEIGHT {
        let text = format!(
            "The terminal is {}×{}; the review screen needs at least {MIN_WIDTH}×{MIN_HEIGHT}. Enlarge it (q quits).",
            area.width, area.height
        );
        frame.render_widget(Paragraph::new(text).wrap(Wrap { trim: true }), area);
        return;
    }
    let word_lines = word_panel(app, t, area.width as usize);
    let word_height = (word_lines.len() as u16 + 1).min(area.height / 3);
    let fixed = 1 + word_height + 2 + 1;
    let rest = area.height.saturating_sub(fixed);
    // The middle panels keep what they need up to half the rest; the feature panel gets what it
    // needs of the remainder (at least four rows), and nothing on a short terminal.
    let middle_keeps = middle_height_wanted(app).min(rest / 2).max(6);
    let features_height = if rest >= 12 { feature_height_wanted(app).min(rest - middle_keeps).max(4) } else { 0 };
    let [top, word, middle, features, status, keys] = Layout::vertical([
        Constraint::Length(1),
        Constraint::Length(word_height),
        Constraint::Min(3),
        Constraint::Length(features_height),
        Constraint::Length(2),
        Constraint::Length(1),
    ])
    .areas(area);
    draw_top(frame, app, t, top);
    frame.render_widget(Paragraph::new(word_lines).block(Block::default().borders(Borders::BOTTOM)), word);
    let mut hidden = Vec::new();
    if area.width >= SIDE_BY_SIDE {
        let [left, right] = Layout::horizontal([Constraint::Percentage(56), Constraint::Percentage(44)]).areas(middle);
        draw_neighbours(frame, app, t, right);
        draw_candidates(frame, app, t, left, &hidden);
    } else {
        hidden.push(format!("neighbours (≥{SIDE_BY_SIDE} columns)"));
        if features_height == 0 {
            hidden.push("features (taller)".to_string());
        }
        draw_candidates(frame, app, t, middle, &hidden);
    }
    if features_height > 0 {
        draw_features(frame, app, t, features);
    }
    draw_status(frame, app, t, status);
    draw_keys(frame, app, t, keys);
    match &app.mode {
        Mode::Help => draw_help(frame, t, area),
        Mode::Search(_) => draw_search(frame, app, t, area),
        Mode::Entry(entry) => draw_entry(frame, app, t, area, entry),
        Mode::Confirm(c) => draw_box(frame, t, area, " confirm ", wrap_text(&c.question, 58, 6, Style::default())),
        Mode::ConfirmBatch(c) => draw_box(frame, t, area, " confirm batch ", wrap_text(&c.question, 58, 6, Style::default())),
        _ => {}
    }
}

fn draw_top(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let (done, total) = (app.progress().done, app.progress().total);
    let save = match &app.save {
        SaveState::Saved(0) => Span::styled("nothing decided yet", t.dim()),
        SaveState::Saved(seq) => Span::styled(format!("saved ✓ #{seq}"), t.good()),
        SaveState::Writing => Span::styled("saving…", t.fg(Color::Yellow)),
        SaveState::Failed(_) => Span::styled("NOT SAVED", t.bad()),
    };
    let display = if app.ipa { "IPA".to_string() } else { app.phones.name().to_string() };
    let spans = vec![
        Span::styled(format!("{done}/{total} done"), Style::default().add_modifier(Modifier::BOLD)),
        Span::raw("  "),
        save,
        Span::styled(format!("  [{display}]"), t.dim()),
        Span::raw(format!("  {}", app.title)),
    ];
    let spans = [vec![Span::styled(" review ", t.title().add_modifier(Modifier::REVERSED)), Span::raw(" ")], spans].concat();
    match &app.job {
        Some(job) if area.width >= 80 => {
            let [l, r] = Layout::horizontal([Constraint::Min(10), Constraint::Length(30)]).areas(area);
            frame.render_widget(Paragraph::new(fit_line(spans, l.width as usize)), l);
            let ratio = if job.total == 0 { 0.0 } else { (job.done as f64 / job.total as f64).clamp(0.0, 1.0) };
            let gauge = Gauge::default()
                .gauge_style(t.fg(Color::Blue).add_modifier(Modifier::REVERSED))
                .ratio(ratio)
                .label(ellipsize(&format!("{} {}/{}", job.label, job.done, job.total), 30));
            frame.render_widget(gauge, r);
        }
        _ => frame.render_widget(Paragraph::new(fit_line(spans, area.width as usize)), area),
    }
}

/// The word panel's lines: the headword first (it is never pushed off), the candidates'
/// warnings, the decision in force when there is one, then the example line.
fn word_panel(app: &App, t: Theme, w: usize) -> Vec<Line<'static>> {
    let Some(item) = app.current() else {
        let why = if app.items.is_empty() {
            "The queue is empty. Add words with `orthoepy queue add`.".to_string()
        } else {
            format!("No item matches the filter `{}`: press f to change it.", app.filter.text())
        };
        return wrap_text(&why, w, 2, t.warn());
    };
    let kind = match &item.kind {
        ItemKind::NewWord => "new word".to_string(),
        ItemKind::Variant { canonical, profile } => format!("variant of {} ({profile})", app.shown_pronunciation(canonical)),
        ItemKind::Audit { check, message, .. } => format!("audit {check}: {message}"),
    };
    let state = app.state_of(app.cursor).name();
    let note = app.current_key().and_then(|k| app.notes.get(k)).map(|n| format!("  ✎ {n}")).unwrap_or_default();
    let head = vec![
        Span::styled(format!(" {} ", ellipsize(&item.word, w.saturating_sub(14).max(4))), t.word()),
        Span::styled(format!("[{state}] "), t.warn()),
        Span::raw(format!("×{}  ", item.count)),
        Span::styled(kind, t.fg(Color::Cyan)),
        Span::styled(format!("  {}", item.origin), t.dim()),
        Span::styled(note, t.fg(Color::Yellow)),
    ];
    let mut lines = vec![fit_line(head, w)];
    for warning in item.warnings() {
        lines.extend(wrap_text(&format!("⚠ {warning}"), w, 2, t.warn()));
    }
    if let Some((seq, d)) = app.current_key().and_then(|k| app.ledger().current(k)) {
        let text = format!("decision #{seq}: {} — {}", describe_shown(app, &d.action), if d.note.is_empty() { "no note" } else { &d.note });
        lines.extend(wrap_text(&text, w, 2, t.warn()));
    }
    let context = if item.context.is_empty() { "(no example line)".to_string() } else { format!("“{}”", item.context) };
    lines.extend(wrap_text(&context, w.saturating_sub(3), 2, Style::default().add_modifier(Modifier::ITALIC)));
    lines
}

/// [`describe`] with the pronunciations in the chosen display.
fn describe_shown(app: &App, action: &crate::queue::Action) -> String {
    use crate::queue::Action;
    let shown = |p: &str| app.shown_pronunciation(p);
    match action {
        Action::Accept { pronunciation, edited, .. } => {
            format!("accepted {}/{}/", if *edited { "edited " } else { "" }, shown(pronunciation))
        }
        Action::ChangeEntry { from, pronunciation } => format!("entry /{}/ changed to /{}/", shown(from), shown(pronunciation)),
        Action::AddVariant { pronunciation } => format!("variant /{}/ added", shown(pronunciation)),
        Action::DeprecateEntry { pronunciation } => format!("entry /{}/ deprecated", shown(pronunciation)),
        other => describe(other),
    }
}

/// A pronunciation's wrapped lines in the chosen display, at most `first` columns on the first
/// line and `rest` on the others.
fn pronunciation_lines(app: &App, pronunciation: &str, first: usize, rest: usize) -> Vec<String> {
    let shown = app.shown_pronunciation(pronunciation);
    let pieces: Vec<&str> = shown.split_whitespace().collect();
    wrap_pieces(&pieces, " ", first, rest)
}

fn bar(score: Option<f64>, cells: usize) -> String {
    match score {
        Some(s) => {
            let filled = ((s.clamp(0.0, 1.0)) * cells as f64).round() as usize;
            format!("{}{} {:>4.2}", "█".repeat(filled), "░".repeat(cells - filled.min(cells)), s)
        }
        None => format!("{:<w$} {:>4}", "", "–", w = cells),
    }
}

/// One candidate: number, pronunciation (wrapped between phones), then score bar and source
/// tag on the candidate's first line.
fn candidate_lines(app: &App, i: usize, c: &Candidate, selected: bool, w: usize, source_w: usize, t: Theme) -> Vec<Line<'static>> {
    let marker = if selected { "▶" } else { " " };
    let style = if selected { t.selected() } else { Style::default() };
    let cells = if w >= 60 { 6 } else { 0 };
    let score = if cells == 0 { c.score.map_or("   –".to_string(), |s| format!("{s:>4.2}")) } else { bar(c.score, cells) };
    let source = ellipsize(&c.source, source_w);
    let tail_width = 1 + width(&score) + 1 + source_w;
    let prefix = format!("{}{} ", i + 1, marker);
    let indent = width(&prefix);
    let pron_width = w.saturating_sub(indent + tail_width).max(6);
    let pron = pronunciation_lines(app, &c.pronunciation, pron_width, pron_width);
    let mut out = Vec::new();
    for (k, part) in pron.into_iter().enumerate() {
        if k == 0 {
            out.push(Line::from(vec![
                Span::styled(format!("{prefix}{part:<pron_width$}"), style),
                Span::styled(format!(" {score} "), t.fg(Color::Green)),
                Span::styled(source.clone(), t.dim()),
            ]));
        } else {
            out.push(Line::from(Span::styled(format!("{:indent$}{part}", ""), style)));
        }
    }
    out
}

/// The editor's lines: the field with each token judged, the cursor, completions, and every
/// audit check on the text with its verdict.
fn editor_lines(app: &App, ed: &super::editor::Editor, w: usize, t: Theme) -> Vec<Line<'static>> {
    use super::editor::EditPurpose;
    let what = match &ed.purpose {
        EditPurpose::Item => "editing".to_string(),
        EditPurpose::ChangeEntry { word, .. } => format!("changing the entry {word}"),
        EditPurpose::AddVariant { word } => format!("new variant of {word}"),
    };
    let mut lines = vec![fit_line(vec![Span::styled(format!("{what} (Tab completes, Enter saves, Esc cancels)"), t.dim())], w)];
    let verdicts = ed.verdicts(app.phones.as_ref());
    let mut spans = vec![Span::raw("> ")];
    let mut used = 2;
    let mut hints = Vec::new();
    for (tok, v) in &verdicts {
        let (shown, style) = match v {
            TokenVerdict::Known => (tok.clone(), t.good()),
            TokenVerdict::Unknown(s) => {
                hints.push(format!("{tok}: {}", if s.is_empty() { "?".into() } else { s.join(" ") }));
                (if t.color { tok.clone() } else { format!("{tok}?") }, t.bad())
            }
        };
        if used + width(&shown) + 1 > w && used > 2 {
            lines.push(Line::from(std::mem::replace(&mut spans, vec![Span::raw("  ")])));
            used = 2;
        }
        used += width(&shown) + 1;
        spans.push(Span::styled(shown, style));
        spans.push(Span::raw(" "));
    }
    lines.push(Line::from(spans));
    if verdicts.len() <= 1 || width(&ed.text) + 2 < w {
        let before: String = ed.text.chars().take(ed.cursor).collect();
        lines.push(Line::from(format!("  {}^", " ".repeat(width(&before)))));
    }
    if !ed.offers.is_empty() {
        lines.extend(wrap_text(&format!("Tab: {}", ed.offers.join(" ")), w, 2, Style::default()));
    }
    if !hints.is_empty() {
        lines.extend(wrap_text(&format!("unknown — did you mean  {}", hints.join("; ")), w, 2, t.bad()));
    }
    let word = match &ed.purpose {
        EditPurpose::Item => app.current().map(|i| i.word.clone()).unwrap_or_default(),
        EditPurpose::ChangeEntry { word, .. } | EditPurpose::AddVariant { word } => word.clone(),
    };
    let audit = app.phones.audit(&word, ed.text.trim());
    if !audit.is_empty() && !ed.text.trim().is_empty() {
        let marks: Vec<String> = audit.iter().map(|v| format!("{}{}", if v.problem.is_some() { "✗" } else { "✓" }, v.check)).collect();
        let pieces: Vec<&str> = marks.iter().map(String::as_str).collect();
        for l in wrap_pieces(&pieces, " ", w, w) {
            lines.push(Line::from(Span::styled(l, t.dim())));
        }
        for v in &audit {
            if let Some(p) = &v.problem {
                let style = if v.error { t.bad() } else { t.warn() };
                lines.extend(wrap_text(&format!("{}: {p}", v.check), w, 2, style));
            }
        }
    }
    lines
}

fn draw_candidates(frame: &mut Frame, app: &App, t: Theme, area: Rect, hidden: &[String]) {
    let w = area.width.saturating_sub(1) as usize;
    let h = area.height.saturating_sub(1) as usize;
    let mut lines: Vec<Line> = Vec::new();
    if let Mode::Edit(ed) = &app.mode {
        lines.extend(editor_lines(app, ed, w, t));
    }
    if let Some(item) = app.current() {
        if item.candidates.is_empty() {
            lines.push(Line::from(Span::styled("no candidates yet — press e to type one", t.dim())));
        }
        let source_w = item.candidates.iter().map(|c| width(&c.source)).max().unwrap_or(0).min(w / 3).max(3);
        let blocks: Vec<Vec<Line>> = item
            .candidates
            .iter()
            .enumerate()
            .map(|(i, c)| candidate_lines(app, i, c, i == app.selected, w, source_w, t))
            .collect();
        let mut extra: Vec<Line> = Vec::new();
        if let Some(c) = app.current_candidate() {
            if !c.alignment.is_empty() {
                let pairs: Vec<String> = c
                    .alignment
                    .iter()
                    .map(|p| format!("{}:{}", p.letters, if p.phones.is_empty() { "∅".to_string() } else { app.shown_pronunciation(&p.phones).replace(' ', "·") }))
                    .collect();
                let pieces: Vec<&str> = pairs.iter().map(String::as_str).collect();
                for (k, l) in wrap_pieces(&pieces, " ", w.saturating_sub(6), w.saturating_sub(6)).into_iter().enumerate() {
                    extra.push(Line::from(vec![Span::styled(if k == 0 { "align " } else { "      " }, t.dim()), Span::raw(l)]));
                }
            }
            if !c.rules.is_empty() {
                extra.extend(wrap_text(&format!("rules {}", c.rules.join(", ")), w, 2, Style::default()));
            }
        }
        // Scroll so the selected candidate is whole, marking what is above and below.
        let room = h.saturating_sub(lines.len() + extra.len().min(h / 3));
        let (shown, above, below) = window(&blocks, app.selected, room);
        if above > 0 {
            lines.push(Line::from(Span::styled(format!("↑ {above} more"), t.dim())));
        }
        lines.extend(shown);
        if below > 0 {
            lines.push(Line::from(Span::styled(format!("↓ {below} more (↓/j)"), t.dim())));
        }
        lines.extend(extra);
    }
    if lines.len() > h {
        let cut = lines.len() - h + 1;
        lines.truncate(h.saturating_sub(1));
        lines.push(Line::from(Span::styled(format!("… {cut} more line(s): a taller terminal shows them"), t.dim())));
    }
    let title = if hidden.is_empty() { "candidates".to_string() } else { format!("candidates · hidden: {}", hidden.join(", ")) };
    let block = Block::default().borders(Borders::RIGHT).title(Span::styled(ellipsize(&title, w), t.title()));
    frame.render_widget(Paragraph::new(lines).block(block), area);
}

/// The candidate blocks that fit in `room` lines with `selected` whole: the lines, and how many
/// candidates are left out above and below. Marks take a line each when needed.
fn window<'a>(blocks: &[Vec<Line<'a>>], selected: usize, room: usize) -> (Vec<Line<'a>>, usize, usize) {
    let total: usize = blocks.iter().map(Vec::len).sum();
    if total <= room {
        return (blocks.iter().flatten().cloned().collect(), 0, 0);
    }
    let selected = selected.min(blocks.len().saturating_sub(1));
    let (mut first, mut last) = (selected, selected);
    let mut used = blocks.get(selected).map_or(0, Vec::len);
    let budget = room.saturating_sub(2).max(1);
    loop {
        let grew_down = last + 1 < blocks.len() && used + blocks[last + 1].len() <= budget;
        if grew_down {
            last += 1;
            used += blocks[last].len();
        }
        let grew_up = first > 0 && used + blocks[first - 1].len() <= budget;
        if grew_up {
            first -= 1;
            used += blocks[first].len();
        }
        if !grew_down && !grew_up {
            break;
        }
    }
    let lines = blocks[first..=last].iter().flatten().cloned().collect();
    (lines, first, blocks.len() - last - 1)
}

fn word_lines(app: &App, label: &str, words: &[WordPron], max: usize, w: usize, t: Theme) -> Vec<Line<'static>> {
    let mut out = vec![fit_line(vec![Span::styled(label.to_string(), t.title())], w)];
    if words.is_empty() {
        out.push(Line::from(Span::styled("  none", t.dim())));
    }
    let word_w = 14.min(w / 3);
    let pron_w = w.saturating_sub(word_w + 3).max(6);
    for entry in words.iter().take(max) {
        for (k, part) in pronunciation_lines(app, &entry.pronunciation, pron_w, pron_w).into_iter().enumerate() {
            let head = if k == 0 { ellipsize(&entry.word, word_w) } else { String::new() };
            out.push(Line::from(vec![Span::raw(format!("  {head:<word_w$} ")), Span::styled(part, t.dim())]));
        }
    }
    if words.len() > max {
        out.push(Line::from(Span::styled(format!("  … {} more", words.len() - max), t.dim())));
    }
    out
}

fn draw_neighbours(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let block = Block::default().title(Span::styled(" neighbours", t.title()));
    let Some(n) = app.neighbours.as_ref().filter(|_| app.current().is_some()) else {
        let text = if app.current().is_some() { " looking up…" } else { "" };
        frame.render_widget(Paragraph::new(Span::styled(text, t.dim())).block(block), area);
        return;
    };
    let w = area.width.saturating_sub(1) as usize;
    let h = area.height.saturating_sub(1) as usize;
    // Six lines go to headers and "more" marks; the rest is shared by the three lists.
    let per = (h.saturating_sub(6) / 3).max(1);
    let ending = if n.ending.is_empty() { " ending".to_string() } else { format!(" ending -{}", n.ending) };
    let mut lines = word_lines(app, " spelling", &n.spelling, per, w, t);
    lines.extend(word_lines(app, &ending, &n.rhymes, per, w, t));
    lines.extend(word_lines(app, " sounds the same", &n.homophones, per, w, t));
    if lines.len() > h {
        let cut = lines.len() - h + 1;
        lines.truncate(h.saturating_sub(1));
        lines.push(Line::from(Span::styled(format!("  … {cut} more line(s)"), t.dim())));
    }
    frame.render_widget(Paragraph::new(lines).block(block), area);
}

fn gap(s: &str) -> String {
    if s.is_empty() {
        "–".to_string()
    } else {
        s.to_string()
    }
}

/// Lines the candidate and neighbour panels would like (title, every candidate with room for a
/// wrapped line or two, alignment, rules, the editor; the three neighbour lists).
fn middle_height_wanted(app: &App) -> u16 {
    let candidates = app.current().map_or(1, |i| i.candidates.len() + i.candidates.len() / 4 + 3);
    let editor = if matches!(app.mode, Mode::Edit(_)) { 9 } else { 0 };
    let neighbours = app.neighbours.as_ref().map_or(4, |n| {
        4 + [n.spelling.len(), n.rhymes.len(), n.homophones.len()].iter().map(|k| (*k).max(1)).sum::<usize>()
    });
    (candidates + editor).max(neighbours) as u16
}

/// Lines the feature panel would like: its border, the two phone rows, every feature row.
fn feature_height_wanted(app: &App) -> u16 {
    let rows = app.neighbours.as_ref().and_then(|n| n.features.as_ref()).map_or(1, |c| 2 + c.view.rows.len());
    rows as u16 + 1
}

/// The candidate is the view's variant side ("this"), the form it is compared with the canonical
/// side ("other"). Rows that differ come first; the rest follow while there is room, and a
/// last line counts what did not fit.
fn feature_lines(app: &App, view: &FeatureView, width_cols: usize, height: usize, t: Theme) -> Vec<Line<'static>> {
    let text = |v: &Option<String>| gap(&v.as_deref().map(|p| app.shown_pronunciation(p)).unwrap_or_default());
    let plain = |v: &Option<String>| gap(v.as_deref().unwrap_or(""));
    let cell = |a: &Option<String>, b: &Option<String>| if a == b { plain(a) } else { format!("{}/{}", plain(a), plain(b)) };
    let value = |values: &[Option<String>], i: usize| values.get(i).cloned().flatten();
    let widths: Vec<usize> = view
        .columns
        .iter()
        .enumerate()
        .map(|(i, c)| {
            let mut w = width(&text(&c.variant)).max(width(&text(&c.canonical)));
            for r in &view.rows {
                w = w.max(width(&cell(&value(&r.variant, i), &value(&r.canonical, i))));
            }
            w + 1
        })
        .collect();
    let label = 10usize;
    let row = |name: &str, cells: Vec<(String, bool)>| {
        let mut spans = vec![Span::styled(format!("{:<label$}", ellipsize(name, label - 1)), t.dim())];
        let mut used = label;
        for (i, (text, diff)) in cells.into_iter().enumerate() {
            let w = widths.get(i).copied().unwrap_or(1);
            if used + w > width_cols.saturating_sub(1) {
                spans.push(Span::styled("…", t.dim()));
                break;
            }
            used += w;
            spans.push(Span::styled(format!("{text:<w$}"), if diff { t.differs() } else { Style::default() }));
        }
        Line::from(spans)
    };
    let mut lines = vec![
        row("this", view.columns.iter().map(|c| (text(&c.variant), c.edit != Edit::Same)).collect()),
        row("other", view.columns.iter().map(|c| (text(&c.canonical), c.edit != Edit::Same)).collect()),
    ];
    let rows: Vec<(bool, Line)> = view
        .rows
        .iter()
        .map(|r| {
            let cells: Vec<(String, bool)> = (0..view.columns.len())
                .map(|i| {
                    let (a, b) = (value(&r.variant, i), value(&r.canonical, i));
                    let differs = a != b;
                    (cell(&a, &b), differs)
                })
                .collect();
            (cells.iter().any(|(_, d)| *d), row(&r.feature, cells))
        })
        .collect();
    let ordered: Vec<Line> =
        rows.iter().filter(|(d, _)| *d).chain(rows.iter().filter(|(d, _)| !*d)).map(|(_, l)| l.clone()).collect();
    let room = height.saturating_sub(2);
    if ordered.len() <= room {
        lines.extend(ordered);
    } else {
        let keep = room.saturating_sub(1);
        let differing = rows.iter().filter(|(d, _)| *d).count();
        lines.extend(ordered.iter().take(keep).cloned());
        let left = ordered.len() - keep;
        let which = if keep >= differing { "all differing rows shown" } else { "some differ" };
        lines.push(Line::from(Span::styled(format!("… {left} more feature rows ({which}); a taller terminal shows them"), t.dim())));
    }
    lines
}

fn draw_features(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let view = app.neighbours.as_ref().filter(|_| app.current().is_some()).and_then(|n| n.features.as_ref());
    let title = match view {
        Some(v) => format!(" features vs {} ", shown_between_slashes(app, &v.against)),
        None => " features ".to_string(),
    };
    let w = area.width as usize;
    let block = Block::default().borders(Borders::TOP).title(Span::styled(ellipsize(&title, w.saturating_sub(2)), t.title()));
    let lines = match view {
        Some(v) => feature_lines(app, &v.view, w, area.height.saturating_sub(1) as usize, t),
        None => vec![Line::from(Span::styled("nothing close enough to compare with", t.dim()))],
    };
    frame.render_widget(Paragraph::new(lines).block(block), area);
}

/// "port /P AO1 R T/" with the part between the slashes in the chosen display.
fn shown_between_slashes(app: &App, text: &str) -> String {
    match text.split_once('/').and_then(|(head, rest)| rest.split_once('/').map(|(p, tail)| (head, p, tail))) {
        Some((head, pronunciation, tail)) => format!("{head}/{}/{tail}", app.shown_pronunciation(pronunciation)),
        None => text.to_string(),
    }
}

fn draw_status(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let w = area.width as usize;
    let pron = match &app.mode {
        Mode::Edit(ed) => ed.text.clone(),
        _ => app.current_candidate().map(|c| c.pronunciation.clone()).unwrap_or_default(),
    };
    let verdicts = check_all(app.phones.as_ref(), &pron);
    let bad: Vec<String> = verdicts.iter().filter(|(_, v)| *v != TokenVerdict::Known).map(|(s, _)| s.clone()).collect();
    let word = app.current().map(|i| i.word.clone()).unwrap_or_default();
    let failed: Vec<String> = if pron.trim().is_empty() || !bad.is_empty() {
        Vec::new()
    } else {
        app.phones.audit(&word, &pron).into_iter().filter(|v| v.problem.is_some()).map(|v| v.check.to_string()).collect()
    };
    let validation = if pron.trim().is_empty() {
        Span::styled("no pronunciation selected".to_string(), t.dim())
    } else if !bad.is_empty() {
        Span::styled(format!("✗ not in {}: {}", app.phones.name(), bad.join(" ")), t.bad())
    } else if !failed.is_empty() {
        Span::styled(format!("⚠ audit: {}", failed.join(", ")), t.warn())
    } else {
        Span::styled(format!("✓ valid in {} ({} phones)", app.phones.name(), verdicts.len()), t.good())
    };
    let by = &app.progress().by_origin;
    // "words:new-words.txt" is shown as "new-words" to keep the line short.
    let short = |k: &str| {
        let name = k.rsplit(':').next().unwrap_or(k);
        name.rsplit_once('.').map_or(name, |(stem, _)| stem).to_string()
    };
    let origins: Vec<String> = by.iter().map(|(k, (d, n))| format!("{} {d}/{n}", short(k))).collect();
    let mut first = vec![validation];
    if !app.filter.text().is_empty() {
        first.push(Span::styled(format!("   filter: {}", app.filter.text()), t.fg(Color::Yellow)));
    }
    let lines = vec![fit_line(first, w), fit_line(vec![Span::styled(origins.join("  ·  "), t.dim())], w)];
    frame.render_widget(Paragraph::new(lines), area);
}

fn draw_keys(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let w = area.width as usize;
    let line = match &app.mode {
        Mode::Filter(text, err) => {
            let mut spans = vec![Span::styled("filter> ", t.title()), Span::raw(text.clone()), Span::raw("▏")];
            if let Some(e) = err {
                spans.push(Span::styled(format!("  {e}"), t.bad()));
            }
            fit_line(spans, w)
        }
        Mode::Note(text) => fit_line(vec![Span::styled("note> ", t.title()), Span::raw(text.clone()), Span::raw("▏")], w),
        Mode::Threshold(kind, text, err) => {
            let prompt = match kind {
                crate::queue::Threshold::AcceptAbove(_) => "accept shown items scoring at least> ",
                crate::queue::Threshold::RejectBelow(_) => "reject shown items scoring below> ",
            };
            let mut spans = vec![Span::styled(prompt, t.title()), Span::raw(text.clone()), Span::raw("▏")];
            if let Some(e) = err {
                spans.push(Span::styled(format!("  {e}"), t.bad()));
            }
            fit_line(spans, w)
        }
        _ if !app.message.is_empty() => fit_line(vec![Span::raw(app.message.clone())], w),
        _ => fit_line(
            vec![Span::styled(
                "Enter accept  e edit  x reject  s aside  m note  n/p item  u undo  / search  f filter  i IPA  ? help  q quit",
                t.dim(),
            )],
            w,
        ),
    };
    frame.render_widget(Paragraph::new(line), area);
}

fn centred(area: Rect, width: u16, height: u16) -> Rect {
    let w = width.min(area.width);
    let h = height.min(area.height);
    Rect { x: area.x + (area.width - w) / 2, y: area.y + (area.height - h) / 2, width: w, height: h }
}

/// A bordered box in the middle of the screen, sized to its lines (wrapped if narrower).
fn draw_box(frame: &mut Frame, t: Theme, area: Rect, title: &str, lines: Vec<Line<'static>>) {
    let wide = lines.iter().map(Line::width).max().unwrap_or(0) as u16 + 2;
    let rect = centred(area, wide.max(title.len() as u16 + 4), lines.len() as u16 + 2);
    frame.render_widget(Clear, rect);
    let block = Block::bordered().title(Span::styled(title.to_string(), t.title()));
    frame.render_widget(Paragraph::new(lines).block(block).wrap(Wrap { trim: false }), rect);
}

fn draw_help(frame: &mut Frame, t: Theme, area: Rect) {
    let mut lines: Vec<Line> = KEYS
        .iter()
        .map(|(k, what)| Line::from(vec![Span::styled(format!(" {k:<11}"), t.title()), Span::raw(*what)]))
        .collect();
    lines.push(Line::from(Span::styled(" filter terms (f), all must hold:", t.title())));
    lines.extend(TERMS.iter().map(|(term, what)| Line::from(vec![Span::styled(format!("  {term}"), t.title()), Span::raw(format!("  {what}"))])));
    let rect = centred(area, 96, area.height);
    let inner = rect.height.saturating_sub(2) as usize;
    // Wrapped lines take more rows at narrow widths: count them to know what fits.
    let per_line = |l: &Line| l.width().div_ceil(rect.width.saturating_sub(2).max(1) as usize).max(1);
    let mut used = 0;
    let mut keep = 0;
    for l in &lines {
        if used + per_line(l) > inner.saturating_sub(1) {
            break;
        }
        used += per_line(l);
        keep += 1;
    }
    if keep < lines.len() {
        let left = lines.len() - keep;
        lines.truncate(keep);
        lines.push(Line::from(Span::styled(format!(" … {left} more: a larger terminal shows them"), t.dim())));
    }
    let rect = Rect { height: (used as u16 + 3).min(rect.height), ..centred(area, 96, used as u16 + 3) };
    frame.render_widget(Clear, rect);
    let block = Block::bordered().title(" keys — any key closes ");
    frame.render_widget(Paragraph::new(lines).block(block).wrap(Wrap { trim: false }), rect);
}

fn draw_search(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let Mode::Search(b) = &app.mode else { return };
    let rect = centred(area, 72, area.height.saturating_sub(2).max(6));
    let w = rect.width.saturating_sub(2) as usize;
    let mut lines = vec![
        fit_line(vec![Span::styled(format!("{}> ", b.mode.name()), t.title()), Span::raw(b.query.clone()), Span::raw("▏")], w),
        fit_line(vec![Span::styled("Tab: exact/prefix/fuzzy  ↑↓: pick  Enter: open  Esc: close", t.dim())], w),
    ];
    if b.hits.is_empty() && !b.query.trim().is_empty() {
        lines.push(Line::from(Span::styled("no match", t.dim())));
    }
    let room = (rect.height as usize).saturating_sub(5).max(1);
    let first = b.selected.saturating_sub(room.saturating_sub(1));
    if first > 0 {
        lines.push(Line::from(Span::styled(format!("↑ {first} more"), t.dim())));
    }
    let word_w = 18.min(w / 3);
    for (i, h) in b.hits.iter().enumerate().skip(first).take(room) {
        let queued = if app.position_of_word(&h.word).is_some() { "queued " } else { "" };
        let style = if i == b.selected { t.selected() } else { Style::default() };
        let pron_w = w.saturating_sub(word_w + 1 + queued.len()).max(6);
        for (k, part) in pronunciation_lines(app, &h.pronunciation, pron_w, pron_w).into_iter().enumerate() {
            let head = if k == 0 { ellipsize(&h.word, word_w) } else { String::new() };
            lines.push(Line::from(vec![
                Span::styled(format!("{head:<word_w$} "), style),
                Span::styled(if k == 0 { queued.to_string() } else { " ".repeat(queued.len()) }, t.warn()),
                Span::styled(part, t.dim()),
            ]));
        }
    }
    let below = b.hits.len().saturating_sub(first + room);
    if below > 0 {
        lines.push(Line::from(Span::styled(format!("↓ {below} more"), t.dim())));
    }
    frame.render_widget(Clear, rect);
    frame.render_widget(Paragraph::new(lines).block(Block::bordered().title(" search the lexicon ")), rect);
}

fn draw_entry(frame: &mut Frame, app: &App, t: Theme, area: Rect, entry: &WordPron) {
    let mut lines = vec![Line::from(vec![
        Span::styled(entry.word.clone(), t.word()),
        Span::raw(format!("  /{}/", app.shown_pronunciation(&entry.pronunciation))),
    ])];
    if let Some((seq, d)) = app.ledger().current(&entry_key(&entry.word, &entry.pronunciation)) {
        lines.extend(wrap_text(&format!("decision #{seq}: {} — {}", describe_shown(app, &d.action), d.note), 58, 3, t.warn()));
    }
    lines.push(Line::from(Span::styled("c: change it   v: add a variant   d: deprecate it   Esc: close", t.dim())));
    draw_box(frame, t, area, " lexicon entry ", lines);
}
