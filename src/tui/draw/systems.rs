//! The Systems pane: one row per star (k, best odds, the fold sparkline,
//! flags), its title with the filter in effect, and ids fitted to a width.

use super::*;

/// A tiny fold of a candidate: 8 cells from −2 to +2 durations, from its
/// measured light curve once read (the signal pane's fold, else the one the
/// background checks measured), else from the model; true when measured.
/// The dip's floor says the depth class on a shared scale (below 300 ppm
/// one level, to 3000 two, to 30000 three, deeper four; the measured depth
/// when measured), so shallow planets and deep eclipses look different at
/// a glance.
pub fn sparkline(app: &App, c: CandidateId, look: Look) -> (String, bool) {
    let m = crate::lightcurve::model_params(&app.cat, c);
    let (period, dur) = (
        app.cat.value(Field::PeriodD, c).unwrap_or(1.0),
        app.cat.value(Field::DurationH, c).unwrap_or(1.0),
    );
    let glyphs: &[char] = if look.ascii {
        &['_', '.', '-', '~', '\'']
    } else {
        &['▁', '▂', '▃', '▅', '▇']
    };
    let top = glyphs.len() - 1;
    let cell = |i: usize| (i as f64 - 3.5) / 3.5 * 2.0 * dur / 24.0 / period;
    let half_cell = 2.0 * dur / 24.0 / period / 7.0;
    // Relative flux drop in each cell.
    let (drops, measured): (Vec<f64>, bool) = match (app.signals.get(&c), app.checks.shape(c)) {
        (Some(SignalResult::Data { views, .. }), _) => {
            let b = &views.transit;
            let d = (0..8)
                .map(|i| {
                    let x = cell(i);
                    let (sum, n) = (0..b.centre.len())
                        .filter(|&j| (b.centre[j] - x).abs() <= half_cell && b.mean[j].is_finite())
                        .fold((0.0, 0), |(s, n), j| (s + 1.0 - b.mean[j], n + 1));
                    if n > 0 { sum / n as f64 } else { 0.0 }
                })
                .collect();
            (d, true)
        }
        (_, Some(shape)) => (
            shape
                .iter()
                .map(|&v| if v.is_finite() { v as f64 } else { 0.0 })
                .collect(),
            true,
        ),
        _ => ((0..8).map(|i| 1.0 - m.flux(cell(i))).collect(), false),
    };
    let deepest = drops.iter().copied().fold(0.0, f64::max);
    let depth_ppm = if measured {
        deepest * 1e6
    } else {
        app.cat.value(Field::DepthPpm, c).unwrap_or(deepest * 1e6)
    }
    .max(1.0);
    let levels = (1.0 + (depth_ppm / 30.0).log10().floor()).clamp(1.0, top as f64);
    let line = drops
        .iter()
        .map(|&d| {
            let f = if deepest > 0.0 {
                (d / deepest).clamp(0.0, 1.0)
            } else {
                0.0
            };
            glyphs[top - (f * levels).round() as usize]
        })
        .collect();
    (line, measured)
}

/// Draws the systems pane; returns where its rows are (for the mouse).
pub(super) fn draw_systems(app: &App, frame: &mut Frame, area: Rect, look: Look) -> (Rect, usize) {
    let title = systems_title(app, area.width.saturating_sub(4) as usize, look);
    let b = block(title, app.focus == Pane::Systems, look);
    let inner = b.inner(area);
    frame.render_widget(b, area);
    let height = inner.height.saturating_sub(1) as usize;
    let (a, z) = window(app.star_row, app.stars.len(), height);
    let placed = (rows_area(inner), a);
    // The fold sparkline only where the id, k, odds and some flags still fit.
    let with_fold = inner.width >= 40;
    // The id column as wide as the ids shown (what is left beside k, odds,
    // fold and four columns of flags, at most); a longer id keeps its end.
    let k_w = (a..z)
        .map(|i| app.cat.members(app.stars[i]).len().to_string().len())
        .max()
        .unwrap_or(1) as u16;
    let rest = k_w + 1 + 8 + 1 + if with_fold { 9 } else { 0 } + 4 + 1;
    let id_w = (a..z)
        .map(|i| app.cat.star_id(app.stars[i]).chars().count() as u16)
        .max()
        .unwrap_or(4)
        .clamp(4, inner.width.saturating_sub(rest).max(4));
    let rows: Vec<Row> = (a..z)
        .map(|i| {
            let s = app.stars[i];
            let k = app
                .cat
                .members(s)
                .iter()
                .filter(|&&c| app.live.k(c) > 0)
                .count();
            let best = app
                .cat
                .members(s)
                .iter()
                .copied()
                .filter(|&c| app.live.k(c) > 0)
                .max_by(|&x, &y| {
                    app.live
                        .odds(x)
                        .unwrap_or(0.0)
                        .total_cmp(&app.live.odds(y).unwrap_or(0.0))
                });
            let mut cells = vec![
                Cell::from(fit_id(&clean(app.cat.star_id(s)), id_w, look)),
                Cell::from(k.to_string()),
                Cell::from(app.best_odds(s).map_or("-".into(), format_odds)),
            ];
            if with_fold {
                // The model's shape is dimmed: only a measured fold is data.
                // No shape before the catalogue's values are in.
                let shape = best.filter(|_| app.values == Values::In);
                cells.push(match shape.map(|c| sparkline(app, c, look)) {
                    Some((line, true)) => Cell::from(line),
                    Some((line, false)) => Cell::from(Span::styled(
                        line,
                        Style::default().add_modifier(Modifier::DIM),
                    )),
                    None => Cell::from(""),
                });
            }
            cells.push(Cell::from(app.star_flags(s).joined(",")));
            let r = Row::new(cells);
            if i == app.star_row {
                r.style(Style::default().add_modifier(Modifier::REVERSED))
            } else {
                r
            }
        })
        .collect();
    let (widths, header) = if with_fold {
        (
            vec![
                Constraint::Length(id_w),
                Constraint::Length(k_w),
                Constraint::Length(8),
                Constraint::Length(8),
                Constraint::Min(4),
            ],
            vec!["star", "k", "odds", "fold", "flags"],
        )
    } else {
        (
            vec![
                Constraint::Length(id_w),
                Constraint::Length(k_w),
                Constraint::Length(8),
                Constraint::Min(4),
            ],
            vec!["star", "k", "odds", "flags"],
        )
    };
    let table = Table::new(rows, widths)
        .column_spacing(1)
        .header(Row::new(header).style(Style::default().add_modifier(Modifier::BOLD)));
    frame.render_widget(table, inner);
    placed
}

/// The Systems title in `room` columns: the count, then the filter in
/// effect (always, cut at its end if it must be), then the sort if it fits.
pub(super) fn systems_title(app: &App, room: usize, look: Look) -> String {
    let dot = if look.ascii { " - " } else { " · " };
    let mut t = format!("Systems {}/{}", app.stars.len(), app.cat.star_count());
    // A filter or an order by values not read yet is redone when they are.
    let waiting = app.values != Values::In;
    let later = |reads: bool| if waiting && reads { VALUES_LATER } else { "" };
    if !app.filter.text.is_empty() {
        let f = format!(
            "{dot}filter {}{}",
            clean(&app.filter.text),
            later(crate::selection::reads_values(&app.filter))
        );
        let left = room.saturating_sub(t.chars().count());
        if f.chars().count() <= left {
            t.push_str(&f);
        } else {
            let cut: String = f.chars().take(left.saturating_sub(1)).collect();
            t.push_str(&cut);
            t.push_str(if look.ascii { "~" } else { "…" });
        }
    }
    let sort = format!(
        "{dot}sort {}{}",
        app.sort.name(),
        direction(look, app.descending)
    );
    let said = format!("{sort}{}", later(app.sort.reads_values()));
    if let Some(s) = [said, sort]
        .into_iter()
        .find(|s| t.chars().count() + s.chars().count() <= room)
    {
        t.push_str(&s);
    }
    format!(" {t} ")
}

/// Said after a filter or an order that reads values not read yet.
pub(super) const VALUES_LATER: &str = " (values to come)";

/// An id in at most `width` columns: whole when it fits, else its end after
/// an ellipsis (ids of one survey share their beginnings).
pub(super) fn fit_id(id: &str, width: u16, look: Look) -> String {
    let n = id.chars().count();
    let width = width as usize;
    if n <= width || width < 2 {
        return id.to_string();
    }
    let tail: String = id.chars().skip(n - (width - 1)).collect();
    format!("{}{tail}", if look.ascii { "~" } else { "…" })
}
