//! Drawing: a pure function of the [`App`] state. Only visible rows become
//! widgets; every text from the catalogue is sanitised.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::{Color, Modifier, Style};
use ratatui::symbols::Marker;
use ratatui::text::{Line, Span};
use ratatui::widgets::{
    Axis, Block, Borders, Cell, Chart, Clear, Dataset, GraphType, Paragraph, Row, Table, Wrap,
};

use super::app::{App, Hits, Mode, Pane, PromptKind, SignalResult, Values};
use crate::catalogue::{CandidateId, Field};
use crate::decision::ALL_REASONS;
use crate::lightcurve::analysis::{Binned, Views};
use crate::odds::{Verdict, format_odds};
use crate::output::num;
use crate::sanitize::clean;

mod ascii;
mod overlays;
mod signal;
mod systems;
use overlays::{draw_box, draw_help, draw_prompt, draw_reasons};
use signal::draw_signal;
pub use systems::sparkline;
use systems::{draw_systems, fit_id};

/// How the terminal can show things: one chokepoint for colour and glyphs.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Look {
    pub palette: Palette,
    pub ascii: bool,
}

/// The colours the terminal is told it can show (`--color`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Palette {
    /// No colour at all (`NO_COLOR`, `--color never`): emphasis by bold and
    /// reverse video only.
    None,
    /// The 16 named colours, as the terminal's theme draws them.
    Basic,
    /// Fixed entries of the 256-colour cube, the same on every theme.
    Indexed,
    /// 24-bit colour.
    Rgb,
}

impl Palette {
    pub fn parse(s: &str) -> Option<Palette> {
        match s {
            "never" => Some(Palette::None),
            "16" => Some(Palette::Basic),
            "256" => Some(Palette::Indexed),
            "true" => Some(Palette::Rgb),
            _ => None,
        }
    }

    /// A named colour in this palette: softer hues chosen to stay readable
    /// on dark and light backgrounds alike where the palette allows it.
    fn paint(self, c: Color) -> Option<Color> {
        // (256-colour index, 24-bit value) per named colour.
        let (indexed, rgb) = match c {
            Color::Green => (114, (135, 215, 135)),
            Color::Cyan => (80, (95, 215, 215)),
            Color::Yellow => (221, (255, 215, 95)),
            Color::Red => (203, (255, 95, 95)),
            Color::Magenta => (176, (215, 135, 215)),
            Color::DarkGray => (245, (138, 138, 138)),
            Color::White => (253, (218, 218, 218)),
            Color::Blue => (75, (95, 175, 255)),
            other => return (self != Palette::None).then_some(other),
        };
        match self {
            Palette::None => None,
            Palette::Basic => Some(c),
            Palette::Indexed => Some(Color::Indexed(indexed)),
            Palette::Rgb => Some(Color::Rgb(rgb.0, rgb.1, rgb.2)),
        }
    }
}

/// The smallest area the browser draws into.
pub const MIN_SIZE: (u16, u16) = (60, 16);

fn style(look: Look, color: Color) -> Style {
    match look.palette.paint(color) {
        Some(c) => Style::default().fg(c),
        None => Style::default(),
    }
}

fn verdict_style(look: Look, v: Verdict) -> Style {
    match v {
        Verdict::Validated => style(look, Color::Green).add_modifier(Modifier::BOLD),
        Verdict::Likely => style(look, Color::Cyan),
        Verdict::Unlikely => style(look, Color::Yellow),
        Verdict::Rejected => style(look, Color::DarkGray),
    }
}

/// Draws the browser; with `look.ascii` nothing above byte 127 is left in
/// the frame (see `ascii`).
pub fn draw(app: &App, frame: &mut Frame, look: Look) -> Hits {
    let mut hits = Hits::default();
    draw_screen(app, frame, look, &mut hits);
    if look.ascii {
        ascii::asciify(frame.buffer_mut());
    }
    hits
}

/// Text in the look's alphabet: symbols spelled in ASCII when it is ASCII.
fn spelled(look: Look, text: String) -> String {
    if look.ascii {
        ascii::spell(&text).into_owned()
    } else {
        text
    }
}

fn draw_screen(app: &App, frame: &mut Frame, look: Look, hits: &mut Hits) {
    let area = frame.area();
    if area.width < MIN_SIZE.0 || area.height < MIN_SIZE.1 {
        let msg = format!(
            "starsift needs at least {}x{}; this terminal is {}x{}",
            MIN_SIZE.0, MIN_SIZE.1, area.width, area.height
        );
        frame.render_widget(Paragraph::new(msg).wrap(Wrap { trim: true }), area);
        return;
    }
    let [main, whatif, status, prompt] = Layout::vertical([
        Constraint::Min(10),
        Constraint::Length(1),
        Constraint::Length(1),
        Constraint::Length(1),
    ])
    .areas(area);
    // The candidates pane gets the wider half: its first four columns (id,
    // odds, verdict, decision) must fit at the smallest size.
    let [left, right] =
        Layout::horizontal([Constraint::Percentage(40), Constraint::Percentage(60)]).areas(main);
    let [systems, facts] =
        Layout::vertical([Constraint::Percentage(65), Constraint::Percentage(35)]).areas(left);
    let [candidates, signal] =
        Layout::vertical([Constraint::Percentage(45), Constraint::Percentage(55)]).areas(right);
    hits.systems = draw_systems(app, frame, systems, look);
    hits.candidates = draw_candidates(app, frame, candidates, look);
    draw_signal(app, frame, signal, look);
    draw_facts(app, frame, facts, look);
    draw_what_if(app, frame, whatif, look);
    draw_status(app, frame, status, look);
    draw_prompt(app, frame, prompt, look);
    match &app.mode {
        Mode::Help => draw_help(app, frame, area),
        Mode::Reasons {
            selected,
            bulk,
            note,
        } => draw_reasons(app, frame, area, (*selected, *bulk, note), look),
        Mode::Bulk => {
            let k = |a| app.keymap.keys_of(a);
            use super::app::Action as A;
            let message = format!(
                "Decide every candidate matching [{}]:",
                clean(&app.filter.text)
            );
            let hints = [
                format!("{} keep", k(A::Keep)),
                format!("{} reject", k(A::Reject)),
                format!("{} park", k(A::Park)),
                format!("{} reopen", k(A::Reopen)),
                format!("{} cancel", k(A::Close)),
            ];
            draw_box(frame, area, " Apply to the filter ", &message, &hints, look);
        }
        Mode::Confirm {
            decision,
            count,
            note,
        } => {
            let note = match note.trim() {
                "" => String::new(),
                n => format!(" with the note \"{}\"", clean(n)),
            };
            let message = format!(
                "Record {decision} for {count} candidates matching [{}]{note}?",
                clean(&app.filter.text),
            );
            let hints = [
                format!(
                    "{} confirms",
                    app.keymap.keys_of(super::app::Action::Select)
                ),
                format!("{} cancels", app.keymap.keys_of(super::app::Action::Close)),
            ];
            draw_box(frame, area, " Confirm ", &message, &hints, look);
        }
        _ => {}
    }
}

fn block(title: String, focused: bool, look: Look) -> Block<'static> {
    let b = Block::default()
        .borders(Borders::ALL)
        .title(spelled(look, title));
    if focused {
        b.border_style(style(look, Color::Yellow).add_modifier(Modifier::BOLD))
    } else {
        b
    }
}

/// The window of rows to draw so the selection stays visible.
fn window(selected: usize, len: usize, height: usize) -> (usize, usize) {
    if height == 0 {
        return (0, 0);
    }
    let start = selected
        .saturating_sub(height / 2)
        .min(len.saturating_sub(height));
    (start, (start + height).min(len))
}

/// The rows of a list: its area below the header line.
fn rows_area(inner: Rect) -> Rect {
    Rect {
        y: inner.y.saturating_add(1),
        height: inner.height.saturating_sub(1),
        ..inner
    }
}

/// The sort direction as shown in a pane title.
fn direction(look: Look, descending: bool) -> &'static str {
    match (look.ascii, descending) {
        (false, true) => " ↓",
        (false, false) => " ↑",
        (true, true) => " desc",
        (true, false) => " asc",
    }
}

/// Draws the candidates pane; returns where its rows are (for the mouse).
fn draw_candidates(app: &App, frame: &mut Frame, area: Rect, look: Look) -> (Rect, usize) {
    let order = match (app.cand_sort, app.cand_descending) {
        (super::app::CandidateSort::File, false) => String::new(),
        (k, d) => {
            let later = k.reads_values() && app.values != Values::In;
            format!(
                "· by {}{}{} ",
                k.name(),
                direction(look, d),
                if later { systems::VALUES_LATER } else { "" }
            )
        }
    };
    let title = match app.star() {
        Some(s) => format!(" Candidates of {} {order}", clean(app.cat.star_id(s))),
        None => " Candidates ".into(),
    };
    let b = block(title, app.focus == Pane::Candidates, look);
    let inner = b.inner(area);
    frame.render_widget(b, area);
    let members = app.members();
    let height = inner.height.saturating_sub(1) as usize;
    let (a, z) = window(app.cand_row, members.len(), height);
    let placed = (rows_area(inner), a);
    let v = |f, c| app.cat.value(f, c);
    // A catalogue value not read yet (the browser's second read) is not a
    // missing one.
    let num = |x: Option<f64>, digits: usize| match app.values {
        Values::In => num(x, digits),
        Values::Reading(_) if look.ascii => "...".to_string(),
        Values::Reading(_) => "…".to_string(),
        Values::Missing => "?".to_string(),
    };
    // Columns by priority (0 always: id, odds, verdict, decision); as many
    // as fit are shown, in this order. Headers name the filter field and
    // the unit.
    let cols: [(&str, u16, u8); 12] = [
        ("id", 12, 0),
        ("odds", 8, 0),
        ("verdict", 9, 0),
        ("period d", 9, 1),
        ("decision", 8, 0),
        ("flags", 10, 1),
        ("depth ppm", 9, 2),
        ("prob", 6, 2),
        ("dur h", 5, 3),
        (if look.ascii { "R Re" } else { "R R⊕" }, 5, 3),
        ("snr", 5, 3),
        ("boost", 6, 3),
    ];
    // The id column as wide as the members' ids (6 to 24), keeping their
    // ends when the pane is narrow: siblings differ at the end.
    let id_w = members
        .iter()
        .map(|&c| app.cat.candidate_id(c).chars().count() as u16)
        .max()
        .unwrap_or(6)
        .clamp(6, 24)
        .min(inner.width.saturating_sub(8 + 1 + 9 + 1 + 8 + 1).max(6));
    let width = |i: usize| if i == 0 { id_w } else { cols[i].1 };
    let mut used = 0u16;
    let mut shown: Vec<usize> = Vec::new();
    for level in 0..4u8 {
        for (i, col) in cols.iter().enumerate() {
            if col.2 == level && used + width(i) <= inner.width {
                used += width(i) + 1;
                shown.push(i);
            }
        }
    }
    shown.sort_unstable();
    let rows: Vec<Row> = (a..z)
        .map(|i| {
            let c = members[i];
            let verdict = app.live.verdict(c);
            // Before the checks, no candidate is called validated: the
            // verdict waits for its evidence.
            let (verdict_text, verdict_look) =
                if app.verdicts_withheld() && verdict == Verdict::Validated {
                    let why = if app.checks_failed {
                        "unchecked"
                    } else {
                        "checking"
                    };
                    (why, style(look, Color::DarkGray))
                } else {
                    (verdict.name(), verdict_style(look, verdict))
                };
            let mut flags = app.flags(c).joined(",");
            if let Some(SignalResult::Data { diagnostics, .. }) = app.signals.get(&c) {
                for (f, _) in &diagnostics.findings {
                    if !flags.contains(f.name()) {
                        if !flags.is_empty() {
                            flags.push(',');
                        }
                        flags.push_str(f.name());
                    }
                }
            }
            let cell = |k: usize| -> Cell {
                match k {
                    0 => Cell::from(fit_id(&clean(app.cat.candidate_id(c)), id_w, look)),
                    1 => Cell::from(app.live.odds(c).map_or("-".into(), format_odds)),
                    2 => Cell::from(Span::styled(verdict_text, verdict_look)),
                    3 => Cell::from(num(v(Field::PeriodD, c), 5)),
                    4 => Cell::from(app.live.decision(c).name()),
                    5 => Cell::from(flags.clone()),
                    6 => Cell::from(num(v(Field::DepthPpm, c), 4)),
                    7 => Cell::from(
                        app.live
                            .probability(c)
                            .map_or("-".into(), |p| format!("{p:.4}")),
                    ),
                    8 => Cell::from(num(v(Field::DurationH, c), 3)),
                    9 => Cell::from(num(
                        crate::checks::derive(&app.cat, c, &Default::default()).radius_rearth,
                        3,
                    )),
                    10 => Cell::from(num(v(Field::Snr, c), 3)),
                    _ => Cell::from(num(app.live.boost(c), 3)),
                }
            };
            let r = Row::new(shown.iter().map(|&k| cell(k)).collect::<Vec<_>>());
            if i == app.cand_row {
                r.style(Style::default().add_modifier(Modifier::REVERSED))
            } else {
                r
            }
        })
        .collect();
    let widths: Vec<Constraint> = shown
        .iter()
        .map(|&k| Constraint::Length(width(k)))
        .collect();
    let header: Vec<&str> = shown.iter().map(|&k| cols[k].0).collect();
    frame.render_widget(
        Table::new(rows, widths)
            .column_spacing(1)
            .header(Row::new(header).style(Style::default().add_modifier(Modifier::BOLD))),
        inner,
    );
    placed
}

fn draw_ledger(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    let n = app.history.len();
    let b = block(
        format!(
            " Ledger · {n} {} · {} for facts ",
            if n == 1 { "entry" } else { "entries" },
            app.keymap.keys_of(super::app::Action::ShowLedger)
        ),
        false,
        look,
    );
    let inner = b.inner(area);
    frame.render_widget(b, area);
    if app.ledger.is_none() {
        frame.render_widget(Paragraph::new("no ledger: decisions stay in memory"), inner);
        return;
    }
    let lines: Vec<Line> = app
        .history
        .iter()
        .map(|e| {
            let when = e
                .decided_at
                .get(5..16)
                .unwrap_or(&e.decided_at)
                .replace('T', " ");
            Line::from(vec![
                Span::styled(format!("{when} "), style(look, Color::DarkGray)),
                Span::raw(format!(
                    "{} {} {}",
                    clean(&e.vetter),
                    clean(&e.candidate),
                    e.decision
                )),
                Span::raw(
                    e.note
                        .as_deref()
                        .map_or(String::new(), |n| format!(" · {}", clean(n))),
                ),
            ])
        })
        .collect();
    if lines.is_empty() {
        frame.render_widget(Paragraph::new("no decisions on this system yet"), inner);
        return;
    }
    // The newest entries that fit, newest last, long ones wrapped: count
    // the wrapped rows from the newest back, and scroll off the top rows
    // of the oldest one shown when it does not fit whole.
    let wrap = Wrap { trim: false };
    let (mut rows, mut first) = (0, lines.len());
    while first > 0 && rows < inner.height as usize {
        first -= 1;
        rows += Paragraph::new(lines[first].clone())
            .wrap(wrap)
            .line_count(inner.width);
    }
    let over = rows.saturating_sub(inner.height as usize) as u16;
    let shown = Paragraph::new(lines[first..].to_vec())
        .wrap(wrap)
        .scroll((over, 0));
    frame.render_widget(shown, inner);
}

fn draw_facts(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    if app.show_ledger {
        draw_ledger(app, frame, area, look);
        return;
    }
    let b = block(" Facts ".into(), false, look);
    let inner = b.inner(area);
    frame.render_widget(b, area);
    let Some(c) = app.candidate() else { return };
    if let Some(why) = values_wait(app) {
        frame.render_widget(
            Paragraph::new(spelled(look, why)).wrap(Wrap { trim: true }),
            inner,
        );
        return;
    }
    let d = crate::checks::derive(&app.cat, c, &Default::default());
    // Why each flag fired first: on a small screen the flags are what a
    // vetter must see; the derived quantities follow.
    let mut lines: Vec<Line> = Vec::new();
    for f in app.checks.findings(c) {
        let head = format!("{}{}: ", if f.soft { "warning " } else { "" }, f.flag);
        lines.push(Line::from(vec![
            Span::styled(head, style(look, Color::Yellow)),
            Span::raw(spelled(look, clean(&f.why).into_owned())),
        ]));
    }
    if let Some(SignalResult::Data { diagnostics, .. }) = app.signals.get(&c) {
        for (f, why) in &diagnostics.findings {
            lines.push(Line::from(vec![
                Span::styled(format!("{f}: "), style(look, Color::Yellow)),
                Span::raw(spelled(look, clean(why).into_owned())),
            ]));
        }
    }
    let standing = match app.live.status(c) {
        crate::odds::Status::Counted => format!(
            "counted in a {}-system{}",
            app.live.k(c),
            app.live
                .holds_to(c)
                .map_or(String::new(), |f| format!(" · holds to f = {f:.3}"))
        ),
        crate::odds::Status::Held => format!(
            "held back, never validated: {}",
            crate::odds::hold_text(&app.cat, &app.live, c)
        ),
        crate::odds::Status::Rejected => "rejected: out of every system".into(),
    };
    lines.push(Line::from(Span::styled(
        spelled(look, standing),
        style(look, Color::Cyan),
    )));
    lines.extend([
        Line::from(spelled(
            look,
            format!(
                "R {} R⊕ · a {} au (a/R★ {}) · Teq {} K · S {} S⊕",
                num(d.radius_rearth, 3),
                num(d.a_au, 3),
                num(d.a_rstar, 3),
                num(d.teq_k.map(f64::round), 4),
                num(d.insolation_earth, 3)
            ),
        )),
        Line::from(spelled(
            look,
            format!(
                "ρ★ transit {} / star {} kg/m³ (ratio {}){} · central T14 {} h",
                num(d.density_transit, 3),
                num(d.density_star, 3),
                num(d.density_ratio, 2),
                if d.assumed_central {
                    ", b = 0 assumed"
                } else {
                    ""
                },
                num(d.t14_central_h, 3)
            ),
        )),
    ]);
    frame.render_widget(Paragraph::new(lines).wrap(Wrap { trim: true }), inner);
}

fn draw_what_if(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    let w = app.what_if();
    let text = if w.is_empty() {
        String::new()
    } else {
        let each: Vec<String> = w
            .iter()
            .map(|(s, k, o)| {
                format!(
                    "{} → {} (k={k})",
                    clean(app.cat.candidate_id(*s)),
                    format_odds(*o)
                )
            })
            .collect();
        // Rejected as a false positive of the star, it would hold them all
        // back instead: said where the line has room (the reason picker
        // says it for each reason).
        let line = format!("if rejected: {}", each.join(", "));
        let tail = " · as a binary or blend: all held back";
        let fits = line.chars().count() + tail.chars().count() <= area.width as usize;
        spelled(look, if fits { line + tail } else { line })
    };
    frame.render_widget(Paragraph::new(text).style(style(look, Color::Cyan)), area);
}

/// 1234567 → "1,234,567".
fn thousands(n: usize) -> String {
    let digits = n.to_string();
    let mut out = String::new();
    for (i, ch) in digits.chars().enumerate() {
        if i > 0 && (digits.len() - i).is_multiple_of(3) {
            out.push(',');
        }
        out.push(ch);
    }
    out
}

/// What the panes that show catalogue values say while there are none
/// (`Values`), or `None` once they are in.
fn values_wait(app: &App) -> Option<String> {
    match app.values {
        Values::In => None,
        Values::Reading(p) => Some(format!(
            "reading the catalogue's values ({p} %): periods, depths and the checks follow"
        )),
        Values::Missing => Some("the catalogue's values could not be read".into()),
    }
}

fn draw_status(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    let c = app.live.counts();
    let m = app.live.model();
    let text = match &app.message {
        Some(msg) => clean(msg).into_owned(),
        None => format!(
            "{}{}{} validated {} likely {} unlikely {} rejected · {} held back{} · N={} f={} · {} · disagree {} · {}",
            // The filter in effect first: it must show at every width.
            match app.filter.text.trim() {
                "" => String::new(),
                f => format!("filter [{}] · ", clean(f)),
            },
            match (app.values, app.checks_pending, app.lc_progress) {
                (Values::Reading(p), ..) => format!("reading the values: {p} % · "),
                (_, false, _) => String::new(),
                (_, true, None) => match app.flags_so_far {
                    Some(_) => format!(
                        "checks running: {} %, {} flagged so far · ",
                        app.checks_percent,
                        thousands(app.flagged_so_far)
                    ),
                    None => format!("checks running: {} % · ", app.checks_percent),
                },
                (_, true, Some((done, total))) => format!(
                    "checks running: light curves {} / {} · ",
                    thousands(done),
                    thousands(total)
                ),
            },
            // No count of validated candidates before the checks.
            if app.verdicts_withheld() {
                "?".to_string()
            } else {
                c.validated.to_string()
            },
            c.likely,
            c.unlikely,
            c.rejected,
            app.live.held_count(),
            match app.cat.skipped.len() {
                0 => String::new(),
                1 => " · 1 row skipped".to_string(),
                n => format!(" · {n} rows skipped"),
            },
            m.targets.map_or("?".into(), |n| n.to_string()),
            m.fp_fraction,
            clean(&app.vetter),
            app.disagree.len(),
            clean(&app.cat.source),
        ),
    };
    let st = if app
        .message
        .as_deref()
        .is_some_and(|m| m.starts_with("NOT SAVED"))
    {
        style(look, Color::Red).add_modifier(Modifier::BOLD)
    } else {
        Style::default().add_modifier(Modifier::REVERSED)
    };
    frame.render_widget(Paragraph::new(spelled(look, text)).style(st), area);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_ids_keep_their_ends() {
        let (utf8, ascii) = (
            Look {
                palette: Palette::None,
                ascii: false,
            },
            Look {
                palette: Palette::None,
                ascii: true,
            },
        );
        assert_eq!(fit_id("HWT52057-s2", 11, utf8), "HWT52057-s2");
        assert_eq!(fit_id("HWT52057-s2", 8, utf8), "…2057-s2");
        assert_eq!(fit_id("HWT52057-s2", 6, ascii), "~57-s2");
        assert_eq!(
            fit_id("ab", 1, ascii),
            "ab",
            "too narrow to say anything better"
        );
    }
}
