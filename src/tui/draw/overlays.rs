//! What opens over the lists: the prompt line, the key help, the reason
//! picker, and small boxes (apply to the filter, confirm).

use super::*;

pub(super) fn draw_prompt(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    let line = match &app.mode {
        Mode::Prompt {
            kind, line, error, ..
        } => {
            let head = match kind {
                PromptKind::Filter => "filter: ",
                PromptKind::Find => "find: ",
            };
            let (before, after) = line.split();
            let mut spans = vec![Span::raw(head)];
            if line.selected {
                // Selected: typing replaces it (shown reversed).
                spans.push(Span::styled(
                    clean(&line.text).into_owned(),
                    Style::default().add_modifier(Modifier::REVERSED),
                ));
            } else {
                // A line wider than the screen scrolls so the cursor stays
                // in sight: what is left of it shows after a `<` mark.
                let room = (area.width as usize).saturating_sub(head.len() + 2).max(8);
                let before = clean(before).into_owned();
                let n = before.chars().count();
                let before = if n > room {
                    let tail: String = before.chars().skip(n - (room - 1)).collect();
                    format!("<{tail}")
                } else {
                    before
                };
                spans.push(Span::raw(before));
                spans.push(Span::raw(if look.ascii { "|" } else { "▏" }));
                spans.push(Span::raw(clean(after).into_owned()));
            }
            if let Some(e) = error {
                spans.push(Span::styled(format!("  {e}"), style(look, Color::Red)));
            }
            Line::from(spans)
        }
        _ => Line::from(spelled(
            look,
            format!(
                "odds under the multiplicity model, not confirmation ({} explains) · {} keep · {} reject · {} park · {} undo · {} filter · {} find · ledger {}",
                app.keymap.keys_of(crate::tui::app::Action::Help),
                app.keymap.keys_of(crate::tui::app::Action::Keep),
                app.keymap.keys_of(crate::tui::app::Action::Reject),
                app.keymap.keys_of(crate::tui::app::Action::Park),
                app.keymap.keys_of(crate::tui::app::Action::Undo),
                app.keymap.keys_of(crate::tui::app::Action::Filter),
                app.keymap.keys_of(crate::tui::app::Action::Find),
                clean(&app.ledger_path),
            ),
        )),
    };
    frame.render_widget(Paragraph::new(line), area);
}

pub(super) fn centred(area: Rect, w: u16, h: u16) -> Rect {
    let w = w.min(area.width);
    let h = h.min(area.height);
    Rect {
        x: area.x + (area.width - w) / 2,
        y: area.y + (area.height - h) / 2,
        width: w,
        height: h,
    }
}

pub(super) fn draw_help(app: &App, frame: &mut Frame, area: Rect) {
    let width = 100.min(area.width);
    let inner = width.saturating_sub(2) as usize;
    // Name and keys, then the description wrapped beside them (or below
    // them, indented, when the box is narrow): never cut mid-word.
    let mut lines: Vec<Line> = Vec::new();
    for a in crate::tui::app::Action::ALL {
        let head = format!("{:<16} {:<18} ", a.name(), app.keymap.keys_of(a));
        let (indent, first_room) = if inner >= 60 {
            (
                head.chars().count(),
                inner.saturating_sub(head.chars().count()),
            )
        } else {
            (2, 0)
        };
        let body = wrap_words(a.describe(), inner.saturating_sub(indent).max(10));
        if first_room == 0 {
            lines.push(Line::from(head.trim_end().to_string()));
            lines.extend(body.into_iter().map(|l| Line::from(format!("  {l}"))));
        } else {
            for (i, l) in body.into_iter().enumerate() {
                let lead = if i == 0 {
                    head.clone()
                } else {
                    " ".repeat(indent)
                };
                lines.push(Line::from(format!("{lead}{l}")));
            }
        }
    }
    // What the odds mean, wrapped to the box.
    lines.push(Line::from(""));
    let statement = crate::odds::model_statement(app.live.model());
    lines.extend(wrap_words(&statement, inner).into_iter().map(Line::from));
    let height = (lines.len() as u16 + 2).min(area.height);
    let visible = height.saturating_sub(2) as usize;
    let skip = app.help_scroll.min(lines.len().saturating_sub(visible));
    let more = if lines.len() > visible {
        " · ↑↓ PgUp PgDn scroll"
    } else {
        ""
    };
    let r = centred(area, width, height);
    frame.render_widget(Clear, r);
    frame.render_widget(
        Paragraph::new(lines.split_off(skip)).block(Block::default().borders(Borders::ALL).title(
            format!(
                " Keys ({} closes){more} ",
                app.keymap.keys_of(crate::tui::app::Action::Close)
            ),
        )),
        r,
    );
}

/// Words of `text` in lines of at most `width` columns (a longer word is
/// cut into pieces).
pub(super) fn wrap_words(text: &str, width: usize) -> Vec<String> {
    let width = width.max(1);
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        let mut word: Vec<char> = word.chars().collect();
        while word.len() > width {
            if !line.is_empty() {
                lines.push(std::mem::take(&mut line));
            }
            lines.push(word.drain(..width).collect());
        }
        let word: String = word.into_iter().collect();
        let need = line.chars().count() + usize::from(!line.is_empty()) + word.chars().count();
        if need > width && !line.is_empty() {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(&word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// Key hints joined by " · " in lines of at most `width` columns, never
/// breaking a hint: a dialog's key line stays whole.
pub(super) fn key_lines(hints: &[String], width: usize, look: Look) -> Vec<String> {
    let dot = if look.ascii { " - " } else { " · " };
    let mut lines: Vec<String> = Vec::new();
    let mut line = String::new();
    for h in hints {
        let need = line.chars().count() + if line.is_empty() { 0 } else { 3 } + h.chars().count();
        if need > width && !line.is_empty() {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push_str(dot);
        }
        line.push_str(h);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// A centred box: the message wrapped to the box, then the key hints on
/// lines of their own, so the keys are never cut or pushed out.
pub(super) fn draw_box(
    frame: &mut Frame,
    area: Rect,
    title: &str,
    message: &str,
    hints: &[String],
    look: Look,
) {
    let width = 70.min(area.width);
    let inner = width.saturating_sub(2) as usize;
    let mut lines: Vec<Line> = wrap_words(message, inner)
        .into_iter()
        .map(Line::from)
        .collect();
    lines.extend(
        key_lines(hints, inner, look)
            .into_iter()
            .map(|l| Line::from(l).style(style(look, Color::DarkGray))),
    );
    let r = centred(area, width, lines.len() as u16 + 2);
    frame.render_widget(Clear, r);
    frame.render_widget(
        Paragraph::new(lines).block(
            Block::default()
                .borders(Borders::ALL)
                .title(title.to_string()),
        ),
        r,
    );
}

/// The reason picker: the reasons, the note being typed, the keys; titled
/// with the candidate (or the count, for the filter's candidates).
pub(super) fn draw_reasons(
    app: &App,
    frame: &mut Frame,
    area: Rect,
    (selected, bulk, note): (usize, bool, &str),
    look: Look,
) {
    use crate::tui::app::Action as A;
    // What each reason does to the siblings (one candidate, with siblings
    // counted now): a false positive of the star holds them back.
    let counted_siblings = app.candidate().filter(|_| !bulk).map(|c| {
        let star = app.cat.star_of(c);
        let n = app
            .cat
            .members(star)
            .iter()
            .filter(|&&m| m != c && app.live.counted(m))
            .count();
        (c, n)
    });
    let effect = |r: crate::decision::Reason| match counted_siblings {
        Some((c, n)) if n > 0 => match app.live.what_if_rejected(c, r).first() {
            None => "siblings held back".to_string(),
            Some(&(_, k, _)) => format!("siblings at k={k}"),
        },
        _ => String::new(),
    };
    let mut lines: Vec<Line> = ALL_REASONS
        .iter()
        .enumerate()
        .map(|(i, r)| {
            let l = Line::from(format!(" {:<17}{} ", r.name(), effect(*r)));
            if i == selected {
                l.style(style(look, Color::Yellow).add_modifier(Modifier::REVERSED))
            } else {
                l
            }
        })
        .collect();
    let title = match (bulk, app.candidate()) {
        (false, Some(c)) => format!(" Reject {}: why? ", clean(app.cat.candidate_id(c))),
        _ => format!(
            " Reject every candidate matching [{}]: why? ",
            clean(&app.filter.text)
        ),
    };
    let width = (title.chars().count() as u16 + 2)
        .clamp(44, 70)
        .min(area.width);
    let inner = width.saturating_sub(2) as usize;
    // The note's tail, so the cursor end stays in sight.
    let room = inner.saturating_sub(8);
    let shown: String = {
        let chars: Vec<char> = note.chars().collect();
        chars[chars.len().saturating_sub(room)..].iter().collect()
    };
    lines.push(Line::from(""));
    lines.push(Line::from(format!(" note: {}_", clean(&shown))));
    let arrows = if look.ascii { "up/down" } else { "↑↓" };
    let hints = [
        format!("{arrows} reason"),
        "type a note".to_string(),
        format!("{} records", app.keymap.keys_of(A::Select)),
        format!("{} cancels", app.keymap.keys_of(A::Close)),
    ];
    lines.extend(
        key_lines(&hints, inner.saturating_sub(1), look)
            .into_iter()
            .map(|l| Line::from(format!(" {l}")).style(style(look, Color::DarkGray))),
    );
    let r = centred(area, width, lines.len() as u16 + 2);
    frame.render_widget(Clear, r);
    frame.render_widget(
        Paragraph::new(lines).block(Block::default().borders(Borders::ALL).title(title)),
        r,
    );
}
