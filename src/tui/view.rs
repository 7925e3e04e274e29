//! Drawing the review screen with ratatui: a pure function from [`App`] to a frame.
//!
//! Layout, top to bottom: a title bar (project, progress, save state, background gauge); the
//! word with its count, origin and example line; candidates (score bars, source, alignment,
//! rules) beside lexicon neighbours (spelling, shared ending, homophones); the feature view of
//! the selected candidate against its closest form; validation and progress by origin; a key
//! line. Overlays (help, search, filter) are drawn on top. With `color = false` (NO_COLOR) only
//! bold, reverse and underline are used, and unknown phones are also marked with `?`.

use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::{Color, Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Borders, Clear, Gauge, Paragraph, Wrap};
use ratatui::Frame;

use super::help::KEYS;
use super::phones::{check_all, TokenVerdict};
use super::state::{App, Mode, SaveState, WordPron};
use crate::variants::{Edit, FeatureView};
use crate::queue::{Candidate, ItemKind};

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
        if self.color {
            Style::default().fg(Color::DarkGray)
        } else {
            Style::default()
        }
    }
    fn selected(self) -> Style {
        Style::default().add_modifier(Modifier::REVERSED)
    }
    fn bad(self) -> Style {
        self.fg(Color::Red).add_modifier(Modifier::UNDERLINED | Modifier::BOLD)
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
    let [top, word, middle, features, status, keys] = Layout::vertical([
        Constraint::Length(1),
        Constraint::Length(3),
        Constraint::Min(6),
        Constraint::Length(6),
        Constraint::Length(2),
        Constraint::Length(1),
    ])
    .areas(area);
    draw_top(frame, app, t, top);
    draw_word(frame, app, t, word);
    let [left, right] = Layout::horizontal([Constraint::Percentage(56), Constraint::Percentage(44)]).areas(middle);
    draw_candidates(frame, app, t, left);
    draw_neighbours(frame, app, t, right);
    draw_features(frame, app, t, features);
    draw_status(frame, app, t, status);
    draw_keys(frame, app, t, keys);
    match &app.mode {
        Mode::Help => draw_help(frame, t, area),
        Mode::Search(_) => draw_search(frame, app, t, area),
        _ => {}
    }
}

fn draw_top(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let (done, total, _) = app.progress();
    let save = match &app.save {
        SaveState::Saved(0) => Span::styled("nothing decided yet", t.dim()),
        SaveState::Saved(seq) => Span::styled(format!("saved ✓ #{seq}"), t.good()),
        SaveState::Writing => Span::styled("saving…", t.fg(Color::Yellow)),
        SaveState::Failed(_) => Span::styled("NOT SAVED", t.bad()),
    };
    let left = Line::from(vec![
        Span::styled(" orthoepy review ", t.title().add_modifier(Modifier::REVERSED)),
        Span::raw(format!(" {}  ", app.title)),
        Span::styled(format!("{done}/{total} done"), Style::default().add_modifier(Modifier::BOLD)),
        Span::raw("  "),
        save,
    ]);
    match &app.job {
        Some(job) => {
            let [l, r] = Layout::horizontal([Constraint::Min(10), Constraint::Length(30)]).areas(area);
            frame.render_widget(Paragraph::new(left), l);
            let ratio = if job.total == 0 { 0.0 } else { (job.done as f64 / job.total as f64).clamp(0.0, 1.0) };
            let gauge = Gauge::default()
                .gauge_style(t.fg(Color::Blue).add_modifier(Modifier::REVERSED))
                .ratio(ratio)
                .label(format!("{} {}/{}", job.label, job.done, job.total));
            frame.render_widget(gauge, r);
        }
        None => frame.render_widget(Paragraph::new(left), area),
    }
}

fn draw_word(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let lines = match app.current() {
        None => vec![Line::from("The queue is empty. Add words with `orthoepy queue add`.")],
        Some(item) => {
            let kind = match &item.kind {
                ItemKind::NewWord => "new word".to_string(),
                ItemKind::Variant { canonical, profile } => format!("variant of /{canonical}/ ({profile})"),
                ItemKind::Audit { check, message, .. } => format!("audit {check}: {message}"),
            };
            let state = app.state_of(app.cursor).name();
            vec![
                Line::from(vec![
                    Span::styled(format!(" {} ", item.word), t.word()),
                    Span::raw(format!(" ×{}  ", item.count)),
                    Span::styled(kind, t.fg(Color::Cyan)),
                    Span::styled(format!("  [{state}]"), t.dim()),
                    Span::styled(format!("  {}", item.origin), t.dim()),
                    Span::styled(
                        app.keys.get(app.cursor).and_then(|k| app.notes.get(k)).map(|n| format!("  ✎ {n}")).unwrap_or_default(),
                        t.fg(Color::Yellow),
                    ),
                ]),
                Line::from(Span::styled(
                    if item.context.is_empty() { "   (no example line)".to_string() } else { format!("   “{}”", item.context) },
                    Style::default().add_modifier(Modifier::ITALIC),
                )),
            ]
        }
    };
    frame.render_widget(Paragraph::new(lines).block(Block::default().borders(Borders::BOTTOM)), area);
}

fn bar(score: Option<f64>, width: usize) -> String {
    match score {
        Some(s) => {
            let filled = ((s.clamp(0.0, 1.0)) * width as f64).round() as usize;
            format!("{}{} {:>4.2}", "█".repeat(filled), "░".repeat(width - filled.min(width)), s)
        }
        None => format!("{:<w$} {:>4}", "", "–", w = width),
    }
}

fn candidate_line(i: usize, c: &Candidate, selected: bool, t: Theme) -> Line<'static> {
    let marker = if selected { "▶" } else { " " };
    let style = if selected { t.selected() } else { Style::default() };
    Line::from(vec![
        Span::styled(format!("{}{} {:<20}", i + 1, marker, c.pronunciation), style),
        Span::styled(format!(" {} ", bar(c.score, 6)), t.fg(Color::Green)),
        Span::styled(c.source.clone(), t.dim()),
    ])
}

fn draw_candidates(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let mut lines: Vec<Line> = Vec::new();
    if let Mode::Edit(ed) = &app.mode {
        lines.push(Line::from(Span::styled("editing (Tab completes, Enter saves, Esc cancels)", t.dim())));
        let mut spans = vec![Span::raw("> ")];
        let verdicts = ed.verdicts(app.phones.as_ref());
        let mut hints = Vec::new();
        for (tok, v) in &verdicts {
            match v {
                TokenVerdict::Known => spans.push(Span::styled(tok.clone(), t.good())),
                TokenVerdict::Unknown(s) => {
                    let shown = if t.color { tok.clone() } else { format!("{tok}?") };
                    spans.push(Span::styled(shown, t.bad()));
                    hints.push(format!("{tok}: {}", if s.is_empty() { "?".into() } else { s.join(" ") }));
                }
            }
            spans.push(Span::raw(" "));
        }
        lines.push(Line::from(spans));
        let before: String = ed.text.chars().take(ed.cursor).collect();
        lines.push(Line::from(format!("  {}^", " ".repeat(before.chars().count()))));
        if !ed.offers.is_empty() {
            lines.push(Line::from(format!("Tab: {}", ed.offers.join(" "))));
        }
        if !hints.is_empty() {
            lines.push(Line::from(Span::styled(format!("unknown — did you mean  {}", hints.join("; ")), t.bad())));
        }
    }
    if let Some(item) = app.current() {
        if item.candidates.is_empty() {
            lines.push(Line::from(Span::styled("no candidates yet — press e to type one", t.dim())));
        }
        let room = (area.height as usize).saturating_sub(lines.len() + 5).max(1);
        let first = app.selected.saturating_sub(room.saturating_sub(1));
        for (i, c) in item.candidates.iter().enumerate().skip(first).take(room) {
            lines.push(candidate_line(i, c, i == app.selected, t));
        }
        if let Some(c) = app.current_candidate() {
            if !c.alignment.is_empty() {
                let pairs: Vec<String> = c
                    .alignment
                    .iter()
                    .map(|p| format!("{}:{}", p.letters, if p.phones.is_empty() { "∅" } else { &p.phones }))
                    .collect();
                lines.push(Line::from(vec![Span::styled("align ", t.dim()), Span::raw(pairs.join(" "))]));
            }
            if !c.rules.is_empty() {
                lines.push(Line::from(vec![Span::styled("rules ", t.dim()), Span::raw(c.rules.join(", "))]));
            }
        }
    }
    let block = Block::default().borders(Borders::RIGHT).title(Span::styled("candidates", t.title()));
    frame.render_widget(Paragraph::new(lines).block(block).wrap(Wrap { trim: false }), area);
}

fn word_lines(label: &str, words: &[WordPron], max: usize, t: Theme) -> Vec<Line<'static>> {
    let mut out = vec![Line::from(Span::styled(label.to_string(), t.title()))];
    if words.is_empty() {
        out.push(Line::from(Span::styled("  none", t.dim())));
    }
    for w in words.iter().take(max) {
        out.push(Line::from(vec![Span::raw(format!("  {:<14}", w.word)), Span::styled(w.pronunciation.clone(), t.dim())]));
    }
    out
}

fn draw_neighbours(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let block = Block::default().title(Span::styled(" neighbours", t.title()));
    let Some(n) = &app.neighbours else {
        frame.render_widget(Paragraph::new(Span::styled(" looking up…", t.dim())).block(block), area);
        return;
    };
    let per = ((area.height as usize).saturating_sub(4) / 3).max(1);
    let mut lines = word_lines(" spelling", &n.spelling, per, t);
    let ending = if n.ending.is_empty() { " ending".to_string() } else { format!(" ending -{}", n.ending) };
    lines.extend(word_lines(&ending, &n.rhymes, per, t));
    lines.extend(word_lines(" sounds the same", &n.homophones, per, t));
    frame.render_widget(Paragraph::new(lines).block(block), area);
}

fn gap(s: &str) -> String {
    if s.is_empty() {
        "–".to_string()
    } else {
        s.to_string()
    }
}

/// The candidate is the view's variant side ("this"), the form it is compared with the canonical
/// side ("other").
fn feature_lines(view: &FeatureView, width: usize, t: Theme) -> Vec<Line<'static>> {
    let text = |v: &Option<String>| gap(v.as_deref().unwrap_or(""));
    let cell = |a: &Option<String>, b: &Option<String>| if a == b { text(a) } else { format!("{}/{}", text(a), text(b)) };
    let value = |values: &[Option<String>], i: usize| values.get(i).cloned().flatten();
    let widths: Vec<usize> = view
        .columns
        .iter()
        .enumerate()
        .map(|(i, c)| {
            let mut w = text(&c.variant).chars().count().max(text(&c.canonical).chars().count());
            for r in &view.rows {
                w = w.max(cell(&value(&r.variant, i), &value(&r.canonical, i)).chars().count());
            }
            w + 1
        })
        .collect();
    let label = 9usize;
    let row = |name: &str, cells: Vec<(String, bool)>| {
        let mut spans = vec![Span::styled(format!("{name:<label$}"), t.dim())];
        let mut used = label;
        for (i, (text, diff)) in cells.into_iter().enumerate() {
            let w = widths.get(i).copied().unwrap_or(1);
            if used + w > width {
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
    for r in &view.rows {
        let cells: Vec<(String, bool)> = (0..view.columns.len())
            .map(|i| {
                let (a, b) = (value(&r.variant, i), value(&r.canonical, i));
                let differs = a != b;
                (cell(&a, &b), differs)
            })
            .collect();
        if cells.iter().any(|(_, d)| *d) {
            lines.push(row(&r.feature, cells));
        }
    }
    lines
}

fn draw_features(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let view = app.neighbours.as_ref().and_then(|n| n.features.as_ref());
    let title = match view {
        Some(v) => format!(" features vs {} ", v.against),
        None => " features ".to_string(),
    };
    let block = Block::default().borders(Borders::TOP).title(Span::styled(title, t.title()));
    let lines = match view {
        Some(v) => feature_lines(&v.view, area.width as usize, t),
        None => vec![Line::from(Span::styled("nothing close enough to compare with", t.dim()))],
    };
    frame.render_widget(Paragraph::new(lines).block(block), area);
}

fn draw_status(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let pron = match &app.mode {
        Mode::Edit(ed) => ed.text.clone(),
        _ => app.current_candidate().map(|c| c.pronunciation.clone()).unwrap_or_default(),
    };
    let verdicts = check_all(app.phones.as_ref(), &pron);
    let bad: Vec<String> = verdicts.iter().filter(|(_, v)| *v != TokenVerdict::Known).map(|(s, _)| s.clone()).collect();
    let validation = if pron.trim().is_empty() {
        Span::styled("no pronunciation selected".to_string(), t.dim())
    } else if bad.is_empty() {
        Span::styled(format!("✓ valid in {} ({} phones)", app.phones.name(), verdicts.len()), t.good())
    } else {
        Span::styled(format!("✗ not in {}: {}", app.phones.name(), bad.join(" ")), t.bad())
    };
    let (_, _, by) = app.progress();
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
    let lines = vec![Line::from(first), Line::from(Span::styled(origins.join("  ·  "), t.dim()))];
    frame.render_widget(Paragraph::new(lines), area);
}

fn draw_keys(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let line = match &app.mode {
        Mode::Filter(text, err) => {
            let mut spans = vec![Span::styled("filter> ", t.title()), Span::raw(text.clone()), Span::raw("▏")];
            if let Some(e) = err {
                spans.push(Span::styled(format!("  {e}"), t.bad()));
            }
            Line::from(spans)
        }
        Mode::Note(text) => Line::from(vec![Span::styled("note> ", t.title()), Span::raw(text.clone()), Span::raw("▏")]),
        _ if !app.message.is_empty() => Line::from(Span::raw(app.message.clone())),
        _ => Line::from(Span::styled(
            "↑↓ move  Enter accept  e edit  x reject  s aside  m note  n/p item  u undo  / search  f filter  ? help  q quit",
            t.dim(),
        )),
    };
    frame.render_widget(Paragraph::new(line), area);
}

fn centred(area: Rect, width: u16, height: u16) -> Rect {
    let w = width.min(area.width);
    let h = height.min(area.height);
    Rect { x: area.x + (area.width - w) / 2, y: area.y + (area.height - h) / 2, width: w, height: h }
}

fn draw_help(frame: &mut Frame, t: Theme, area: Rect) {
    let lines: Vec<Line> = KEYS
        .iter()
        .map(|(k, what)| Line::from(vec![Span::styled(format!(" {k:<11}"), t.title()), Span::raw(*what)]))
        .collect();
    let rect = centred(area, 78, KEYS.len() as u16 + 2);
    frame.render_widget(Clear, rect);
    let block = Block::bordered().title(" keys — any key closes ");
    frame.render_widget(Paragraph::new(lines).block(block).wrap(Wrap { trim: false }), rect);
}

fn draw_search(frame: &mut Frame, app: &App, t: Theme, area: Rect) {
    let Mode::Search(b) = &app.mode else { return };
    let rect = centred(area, 64, area.height.saturating_sub(4).max(6));
    let mut lines = vec![
        Line::from(vec![Span::styled(format!("{}> ", b.mode.name()), t.title()), Span::raw(b.query.clone()), Span::raw("▏")]),
        Line::from(Span::styled("Tab: exact / prefix / fuzzy    Esc: close", t.dim())),
    ];
    if b.hits.is_empty() && !b.query.trim().is_empty() {
        lines.push(Line::from(Span::styled("no match", t.dim())));
    }
    for h in b.hits.iter().take(rect.height.saturating_sub(4) as usize) {
        lines.push(Line::from(vec![Span::raw(format!("{:<18}", h.word)), Span::styled(h.pronunciation.clone(), t.dim())]));
    }
    frame.render_widget(Clear, rect);
    frame.render_widget(Paragraph::new(lines).block(Block::bordered().title(" search the lexicon ")), rect);
}
