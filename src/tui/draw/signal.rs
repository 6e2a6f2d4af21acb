//! The signal pane: the folded light curve (all transits, odd and even,
//! the secondary window) with the model, and the diagnostics line; or the
//! model alone when there is no light curve.

use super::*;

/// One plot of the signal pane: its label, the binned points, and the model
/// curve drawn with them.
type Panel<'a> = (String, Vec<(f64, f64)>, &'a [(f64, f64)]);

pub(super) fn draw_signal(app: &App, frame: &mut Frame, area: Rect, look: Look) {
    use crate::tui::app::SignalView;
    let Some(c) = app.candidate() else {
        frame.render_widget(block(" Signal ".into(), false, look), area);
        return;
    };
    if let Some(why) = values_wait(app) {
        let b = block(" Signal ".into(), false, look);
        let inner = b.inner(area);
        frame.render_widget(b, area);
        frame.render_widget(
            Paragraph::new(spelled(look, why)).wrap(Wrap { trim: true }),
            inner,
        );
        return;
    }
    let m = crate::lightcurve::model_params(&app.cat, c);
    let (period, dur) = (
        app.cat.value(Field::PeriodD, c).unwrap_or(1.0),
        app.cat.value(Field::DurationH, c).unwrap_or(1.0),
    );
    // The same window the folds are binned in: ± 3 durations, at most half an orbit.
    let span_h = (3.0 * dur).min(12.0 * period);
    let model: Vec<(f64, f64)> = (0..120)
        .map(|i| {
            let h = -span_h + 2.0 * span_h * i as f64 / 119.0;
            (h, (m.flux(h / 24.0 / period) - 1.0) * 1e6)
        })
        .collect();
    let flat = [(-span_h, 0.0), (span_h, 0.0)];
    let views = match app.signals.get(&c) {
        Some(SignalResult::Data { views, .. }) => Some(views.as_ref()),
        _ => None,
    };
    let (title, note) = match app.signals.get(&c) {
        Some(SignalResult::Data {
            diagnostics: d,
            source,
            ..
        }) => {
            let note = if d.depth.value.is_finite() {
                format!(
                    "depth {:.0}±{:.0} · odd {:.0} even {:.0} (Z {:.1}) · sec {:.0}±{:.0} · flat {:.2}",
                    d.depth.value,
                    d.depth.err,
                    d.odd.value,
                    d.even.value,
                    d.odd_even_z,
                    d.secondary.value,
                    d.secondary.err,
                    d.flat_fraction
                )
            } else {
                "no sample of the light curve falls in a transit of this ephemeris".to_string()
            };
            (format!(" Signal · data {} ", clean(source)), note)
        }
        Some(SignalResult::Model(why)) => (
            " Signal · model (no light curve) ".to_string(),
            clean(why).into_owned(),
        ),
        None if app.loading(c) => (
            " Signal · loading… ".to_string(),
            "reading the light curve".into(),
        ),
        None => (" Signal · model ".to_string(), String::new()),
    };
    let b = block(title, false, look);
    let inner = b.inner(area);
    frame.render_widget(b, area);
    let [chart_area, note_area] =
        Layout::vertical([Constraint::Min(3), Constraint::Length(1)]).areas(inner);
    // The binned points of one fold of the data (none without data).
    let points = |pick: fn(&Views) -> &Binned| -> Vec<(f64, f64)> {
        let Some(b) = views.map(pick) else {
            return Vec::new();
        };
        (0..b.centre.len())
            .filter(|&i| b.mean[i].is_finite())
            .map(|i| (b.centre[i] * period * 24.0, (b.mean[i] - 1.0) * 1e6))
            .collect()
    };
    let tall = chart_area.height >= 16 && chart_area.width >= 60;
    let mut panels: Vec<Panel> = Vec::new();
    let mut areas = Vec::new();
    if tall {
        let [top, bottom] =
            Layout::vertical([Constraint::Percentage(60), Constraint::Percentage(40)])
                .areas(chart_area);
        panels.push((
            "all transits".to_string(),
            points(|v| &v.transit),
            &model[..],
        ));
        areas.push(top);
        panels.push(("odd".to_string(), points(|v| &v.odd), &model[..]));
        panels.push(("even".to_string(), points(|v| &v.even), &model[..]));
        panels.push((
            "secondary (phase 0.5)".to_string(),
            points(|v| &v.secondary),
            &flat[..],
        ));
        areas.extend(
            Layout::horizontal([Constraint::Ratio(1, 3); 3])
                .split(bottom)
                .iter(),
        );
    } else {
        match app.signal_view {
            SignalView::Transit => {
                panels.push((
                    format!(
                        "all transits · {}: odd/even",
                        app.keymap.keys_of(crate::tui::app::Action::SignalView)
                    ),
                    points(|v| &v.transit),
                    &model[..],
                ));
                areas.push(chart_area);
            }
            SignalView::OddEven => {
                panels.push(("odd".to_string(), points(|v| &v.odd), &model[..]));
                panels.push(("even".to_string(), points(|v| &v.even), &model[..]));
                areas.extend(
                    Layout::horizontal([Constraint::Ratio(1, 2); 2])
                        .split(chart_area)
                        .iter(),
                );
            }
            SignalView::Secondary => {
                panels.push((
                    format!(
                        "secondary (phase 0.5) · {}: all",
                        app.keymap.keys_of(crate::tui::app::Action::SignalView)
                    ),
                    points(|v| &v.secondary),
                    &flat[..],
                ));
                areas.push(chart_area);
            }
        }
    }
    // One vertical scale for every panel, so depths compare by eye.
    let ys = panels
        .iter()
        .flat_map(|(_, p, curve)| p.iter().chain(curve.iter()).map(|q| q.1));
    let lo = ys.clone().fold(f64::INFINITY, f64::min);
    let hi = ys.fold(f64::NEG_INFINITY, f64::max).max(lo + 1.0);
    let pad = (hi - lo) * 0.08;
    let marker = if look.ascii {
        Marker::Dot
    } else {
        Marker::Braille
    };
    for (i, ((label, points, curve), r)) in panels.iter().zip(areas).enumerate() {
        let label = spelled(
            look,
            if views.is_none() {
                format!("{label} · model")
            } else {
                label.clone()
            },
        );
        let mut sets = vec![
            Dataset::default()
                .marker(marker)
                .graph_type(GraphType::Line)
                .style(style(look, Color::Magenta))
                .data(curve),
        ];
        if !points.is_empty() {
            sets.push(
                Dataset::default()
                    .marker(marker)
                    .graph_type(GraphType::Scatter)
                    .style(style(look, Color::White))
                    .data(points),
            );
        }
        // Labels on the first panel of a row only: small panels need the room.
        let first = i == 0 || (tall && i == 1);
        let y_labels = if first {
            vec![
                Line::from(format!("{lo:.0}")),
                Line::from(format!("{hi:.0} ppm")),
            ]
        } else {
            Vec::new()
        };
        let x_labels = if first && r.width >= 30 {
            vec![
                Line::from(format!("{:.1} h", -span_h)),
                Line::from("0"),
                Line::from(format!("{span_h:.1} h")),
            ]
        } else if first {
            vec![
                Line::from(format!("{:.0}", -span_h)),
                Line::from("0"),
                Line::from(format!("{span_h:.0}h")),
            ]
        } else {
            vec![Line::from(""), Line::from("0"), Line::from("")]
        };
        let chart = Chart::new(sets)
            .block(Block::default().title(Line::from(label).style(style(look, Color::DarkGray))))
            .x_axis(Axis::default().bounds([-span_h, span_h]).labels(x_labels))
            .y_axis(
                Axis::default()
                    .bounds([lo - pad, hi + pad])
                    .labels(y_labels),
            );
        frame.render_widget(chart, r);
    }
    frame.render_widget(Paragraph::new(spelled(look, note)), note_area);
}
