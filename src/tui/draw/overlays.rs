//! What opens over the lists: the prompt line, the key help, the reason
//! picker, and small boxes (apply to the filter, confirm).

use super::*;

pub(super) fn draw_prompt(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    let line = match &app.mode {
        Mode::Prompt { kind, text, error } => {
            let head = match kind {
                PromptKind::Filter => "filter: ",
                PromptKind::Find => "find: ",
            };
            let mut spans = vec![
                Span::raw(head),
                Span::raw(clean(text).into_owned()),
                Span::raw("▏"),
            ];
            if let Some(e) = error {
                spans.push(Span::styled(format!("  {e}"), style(look, Color::Red)));
            }
            Line::from(spans)
        }
        _ => Line::from(format!(
            "odds under the multiplicity model, not confirmation ({} explains) · {} keep · {} reject · {} park · {} undo · {} filter · {} find · ledger {}",
            app.keymap.keys_of(crate::tui::app::Action::Help),
            app.keymap.keys_of(crate::tui::app::Action::Keep),
            app.keymap.keys_of(crate::tui::app::Action::Reject),
            app.keymap.keys_of(crate::tui::app::Action::Park),
            app.keymap.keys_of(crate::tui::app::Action::Undo),
            app.keymap.keys_of(crate::tui::app::Action::Filter),
            app.keymap.keys_of(crate::tui::app::Action::Find),
            clean(&app.ledger_path),
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
    let mut lines: Vec<Line> = crate::tui::app::Action::ALL
        .iter()
        .map(|a| {
            Line::from(format!(
                "{:<16} {:<18} {}",
                a.name(),
                app.keymap.keys_of(*a),
                a.describe()
            ))
        })
        .collect();
    // What the odds mean, wrapped to the box.
    lines.push(Line::from(""));
    let statement = crate::odds::model_statement(app.live.model());
    let mut row = String::new();
    for word in statement.split_whitespace() {
        if !row.is_empty() && row.len() + 1 + word.len() > width.saturating_sub(2) as usize {
            lines.push(Line::from(std::mem::take(&mut row)));
        }
        if !row.is_empty() {
            row.push(' ');
        }
        row.push_str(word);
    }
    lines.push(Line::from(row));
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
        Paragraph::new(lines.split_off(skip)).block(
            Block::default()
                .borders(Borders::ALL)
                .title(format!(" Keys (Esc closes){more} ")),
        ),
        r,
    );
}

pub(super) fn draw_box(frame: &mut Frame, area: Rect, title: &str, text: String) {
    let r = centred(area, 70, 4);
    frame.render_widget(Clear, r);
    frame.render_widget(
        Paragraph::new(text).wrap(Wrap { trim: true }).block(
            Block::default()
                .borders(Borders::ALL)
                .title(title.to_string()),
        ),
        r,
    );
}

pub(super) fn draw_reasons(frame: &mut Frame, area: Rect, selected: usize, note: &str, look: Look) {
    let mut lines: Vec<Line> = ALL_REASONS
        .iter()
        .enumerate()
        .map(|(i, r)| {
            let l = Line::from(format!(" {} ", r.name()));
            if i == selected {
                l.style(style(look, Color::Yellow).add_modifier(Modifier::REVERSED))
            } else {
                l
            }
        })
        .collect();
    let width = 40.min(area.width);
    // The note's tail, so the cursor end stays in sight.
    let room = (width as usize).saturating_sub(10);
    let shown: String = {
        let chars: Vec<char> = note.chars().collect();
        chars[chars.len().saturating_sub(room)..].iter().collect()
    };
    lines.push(Line::from(""));
    lines.push(Line::from(format!(" note: {}_", clean(&shown))));
    let arrows = if look.ascii { "up/down" } else { "↑↓" };
    lines.push(
        Line::from(format!(" {arrows} reason · type a note · Enter"))
            .style(style(look, Color::DarkGray)),
    );
    let r = centred(area, width, lines.len() as u16 + 2);
    frame.render_widget(Clear, r);
    frame.render_widget(
        Paragraph::new(lines).block(
            Block::default()
                .borders(Borders::ALL)
                .title(" Reject: why? "),
        ),
        r,
    );
}
