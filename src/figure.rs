//! Pictures of a candidate, drawn with `plotters` (SVG and PNG back ends):
//! the one-page figure and the small fold thumbnail of the HTML report.
//! Everything drawn comes from [`Shown`] (the folds and diagnostics the
//! browser and `checks` compute) and the facts the caller gathers from the
//! session; nothing is derived here.
//!
//! Colours are the Okabe–Ito palette (Okabe & Ito 2008, "Color Universal
//! Design"), which stays distinct for colour-blind readers, and every
//! series also differs by mark shape, so a greyscale print reads too.

use std::path::Path;

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;

use crate::lightcurve::analysis::{Binned, fold_bin};
use crate::lightcurve::{MASK_WIDEN, ModelParams, Shown};

/// Data points.
const INK: RGBColor = RGBColor(0, 0, 0);
/// Binned points and error bars.
const GREY: RGBColor = RGBColor(110, 110, 110);
/// The model transit.
const VERMILLION: RGBColor = RGBColor(213, 94, 0);
/// This candidate's transits.
const BLUE: RGBColor = RGBColor(0, 114, 178);
/// Its siblings' transits.
const ORANGE: RGBColor = RGBColor(230, 159, 0);
/// The secondary search.
const GREEN: RGBColor = RGBColor(0, 158, 115);

/// The figure's size in pixels (a portrait page).
pub const PAGE: (u32, u32) = (1200, 1560);
/// A thumbnail's size in pixels.
pub const THUMB: (u32, u32) = (180, 70);

/// The font every label uses, embedded (DejaVu Sans, free licence:
/// assets/fonts/DejaVuSans-LICENSE.txt) so a PNG draws the same anywhere.
const FONT: &[u8] = include_bytes!("../assets/fonts/DejaVuSans.ttf");

fn register_font() {
    static ONCE: std::sync::Once = std::sync::Once::new();
    ONCE.call_once(|| {
        let _ = plotters::style::register_font("sans-serif", FontStyle::Normal, FONT);
    });
}

fn err<E: std::fmt::Display>(e: E) -> String {
    e.to_string()
}

/// What a figure shows besides the light curve.
pub struct Page<'a> {
    /// "HWT00001-s1 on HWT00001 · validated".
    pub title: String,
    /// The facts box, one line each (flags with their reasons included),
    /// ending with the not-confirmation statement.
    pub facts: &'a [String],
    pub model: ModelParams,
    /// The light curve, or why there is none (the model alone is drawn).
    pub shown: Result<&'a Shown, &'a str>,
}

/// The one-page figure as an SVG document.
pub fn svg(page: &Page) -> Result<String, String> {
    register_font();
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, PAGE).into_drawing_area();
        draw_page(&root, page)?;
        root.present().map_err(err)?;
    }
    Ok(out)
}

/// The one-page figure written as a PNG file.
pub fn png(path: &std::path::Path, page: &Page) -> Result<(), String> {
    register_font();
    let root = BitMapBackend::new(path, PAGE).into_drawing_area();
    draw_page(&root, page)?;
    root.present().map_err(err)
}

/// (x, y) ranges padded by 8 % (and never empty).
fn span(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = values
        .filter(|v| v.is_finite())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        });
    if !lo.is_finite() {
        return (-1.0, 1.0);
    }
    let pad = ((hi - lo) * 0.08).max(1e-9);
    (lo - pad, hi + pad)
}

/// Binned points as (x, y ppm, err ppm), x scaled from cycles.
fn points(b: &Binned, x_scale: f64) -> Vec<(f64, f64, f64)> {
    (0..b.centre.len())
        .filter(|&i| b.count[i] > 0 && b.mean[i].is_finite())
        .map(|i| {
            (
                b.centre[i] * x_scale,
                (b.mean[i] - 1.0) * 1e6,
                b.err[i] * 1e6,
            )
        })
        .collect()
}

fn draw_page<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, page: &Page) -> Result<(), String> {
    root.fill(&WHITE).map_err(err)?;
    let (head, rest) = root.split_vertically(44);
    head.draw(&Text::new(
        page.title.clone(),
        (16, 10),
        ("sans-serif", 24).into_font().color(&INK),
    ))
    .map_err(err)?;
    let (row1, rest) = rest.split_vertically(300);
    let (row2, rest) = rest.split_vertically(380);
    let (row3, facts) = rest.split_vertically(330);
    match page.shown {
        Ok(shown) => {
            unfolded(&row1, shown)?;
            let (fold_area, parity_area) = row2.split_horizontally(620);
            transit_fold(&fold_area, shown, &page.model)?;
            odd_even(&parity_area, shown)?;
            let (phase_area, per_area) = row3.split_horizontally(620);
            whole_orbit(&phase_area, shown)?;
            per_transit(&per_area, shown)?;
        }
        Err(why) => {
            row1.draw(&Text::new(
                format!("no light curve: {why}"),
                (16, 20),
                ("sans-serif", 18).into_font(),
            ))
            .map_err(err)?;
            model_only(&row2, &page.model)?;
        }
    }
    facts_box(&facts, page.facts)
}

/// The whole light curve (every segment), binned to about 1,500 points,
/// with this candidate's transits (blue triangles) and its siblings'
/// (orange crosses) marked above it.
fn unfolded<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, s: &Shown) -> Result<(), String> {
    let lc = s.lc();
    let (t0, t1) = (lc.time[0], lc.time[lc.time.len() - 1]);
    let width = ((t1 - t0) / 1500.0).max(1e-6);
    let mut bins: std::collections::BTreeMap<i64, (f64, f64, u32)> = Default::default();
    for (i, &t) in lc.time.iter().enumerate() {
        let e = bins
            .entry(((t - t0) / width) as i64)
            .or_insert((0.0, 0.0, 0));
        e.0 += t;
        e.1 += s.flux[i];
        e.2 += 1;
    }
    let pts: Vec<(f64, f64)> = bins
        .values()
        .map(|(t, f, n)| (t / *n as f64, (f / *n as f64 - 1.0) * 1e6))
        .collect();
    let (y0, y1) = span(pts.iter().map(|p| p.1));
    let top = y1 + (y1 - y0) * 0.1;
    let mut chart = ChartBuilder::on(area)
        .caption(
            format!(
                "light curve, detrended: {} ({} segments)",
                lc.describe_use(),
                lc.segments.len()
            ),
            ("sans-serif", 15),
        )
        .margin(12)
        .x_label_area_size(34)
        .y_label_area_size(70)
        .build_cartesian_2d(t0..t1, y0..top + (y1 - y0) * 0.05)
        .map_err(err)?;
    chart
        .configure_mesh()
        .x_desc("time (d)")
        .y_desc("flux (ppm)")
        .light_line_style(WHITE)
        .draw()
        .map_err(err)?;
    chart
        .draw_series(pts.iter().map(|&p| Circle::new(p, 1, INK.filled())))
        .map_err(err)?;
    let marks = |e: &crate::lightcurve::analysis::Ephemeris| -> Vec<f64> {
        if e.period_d.is_nan() || e.period_d <= 0.0 {
            return Vec::new();
        }
        let first = ((t0 - e.epoch) / e.period_d).ceil() as i64;
        let last = ((t1 - e.epoch) / e.period_d).floor() as i64;
        (first..=last.min(first + 5000))
            .map(|n| e.epoch + n as f64 * e.period_d)
            .collect()
    };
    chart
        .draw_series(
            marks(&s.me)
                .into_iter()
                .map(|t| TriangleMarker::new((t, top), 6, BLUE.filled())),
        )
        .map_err(err)?
        .label("this candidate's transits")
        .legend(|(x, y)| TriangleMarker::new((x, y), 5, BLUE.filled()));
    for (i, o) in s.others.iter().enumerate() {
        let drawn = chart
            .draw_series(
                marks(o)
                    .into_iter()
                    .map(|t| Cross::new((t, top), 5, ORANGE.stroke_width(2))),
            )
            .map_err(err)?;
        if i == 0 {
            drawn
                .label("siblings' transits")
                .legend(|(x, y)| Cross::new((x, y), 5, ORANGE.stroke_width(2)));
        }
    }
    chart
        .configure_series_labels()
        .background_style(WHITE.mix(0.8))
        .border_style(GREY)
        .position(SeriesLabelPosition::LowerRight)
        .draw()
        .map_err(err)
}

/// Axes with a caption and both axes named, in the figure's one style.
fn axes<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    caption: String,
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
    (x_desc, y_desc): (&str, &str),
) -> Result<ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>, String> {
    let mut chart = ChartBuilder::on(area)
        .caption(caption, ("sans-serif", 15))
        .margin(10)
        .x_label_area_size(34)
        .y_label_area_size(64)
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(err)?;
    chart
        .configure_mesh()
        .x_desc(x_desc)
        .y_desc(y_desc)
        .light_line_style(WHITE)
        .draw()
        .map_err(err)?;
    Ok(chart)
}

/// Binned points with error bars, and an optional model line.
fn binned_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    caption: String,
    pts: &[(f64, f64, f64)],
    model: Option<&[(f64, f64)]>,
    (x0, x1): (f64, f64),
    (y0, y1): (f64, f64),
    x_desc: &str,
) -> Result<(), String> {
    let mut chart = axes(area, caption, (x0, x1), (y0, y1), (x_desc, "flux (ppm)"))?;
    chart
        .draw_series(
            pts.iter()
                .map(|&(x, y, e)| ErrorBar::new_vertical(x, y - e, y, y + e, GREY, 4)),
        )
        .map_err(err)?;
    chart
        .draw_series(
            pts.iter()
                .map(|&(x, y, _)| Circle::new((x, y), 3, INK.filled())),
        )
        .map_err(err)?;
    if let Some(m) = model {
        chart
            .draw_series(LineSeries::new(
                m.iter().copied(),
                VERMILLION.stroke_width(2),
            ))
            .map_err(err)?;
    }
    Ok(())
}

/// The fold around the transit (hours from mid-transit) with the model,
/// and the residuals (data − model) below.
fn transit_fold<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    s: &Shown,
    model: &ModelParams,
) -> Result<(), String> {
    let hours = s.me.period_d * 24.0;
    let pts = points(&s.views.transit, hours);
    let curve: Vec<(f64, f64)> = (0..=240)
        .map(|i| {
            let ph = -s.zoom + 2.0 * s.zoom * i as f64 / 240.0;
            (ph * hours, (model.flux(ph) - 1.0) * 1e6)
        })
        .collect();
    let x = (-s.zoom * hours, s.zoom * hours);
    let y = span(
        pts.iter()
            .flat_map(|p| [p.1 - p.2, p.1 + p.2])
            .chain(curve.iter().map(|c| c.1)),
    );
    let (top, bottom) = area.split_vertically(area.dim_in_pixel().1 * 64 / 100);
    let d = match s.diagnostics.as_ref() {
        Ok(d) => format!(
            "transit: depth {:.0} ± {:.0} ppm, SNR {:.1} · model (line)",
            d.depth.value, d.depth.err, d.snr
        ),
        Err(_) => "transit".into(),
    };
    binned_panel(&top, d, &pts, Some(&curve), x, y, "hours from mid-transit")?;
    let resid: Vec<(f64, f64, f64)> = pts
        .iter()
        .map(|&(h, f, e)| (h, f - (model.flux(h / hours) - 1.0) * 1e6, e))
        .collect();
    let ry = span(resid.iter().flat_map(|p| [p.1 - p.2, p.1 + p.2]));
    binned_panel(
        &bottom,
        "residuals (data − model)".into(),
        &resid,
        None,
        x,
        ry,
        "hours",
    )
}

/// Odd beside even transits on one scale, with their depths and Z.
fn odd_even<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, s: &Shown) -> Result<(), String> {
    let hours = s.me.period_d * 24.0;
    let odd = points(&s.views.odd, hours);
    let even = points(&s.views.even, hours);
    let y = span(odd.iter().chain(&even).flat_map(|p| [p.1 - p.2, p.1 + p.2]));
    let x = (-s.zoom * hours, s.zoom * hours);
    let (l, r) = area.split_horizontally(area.dim_in_pixel().0 / 2);
    let (co, ce) = match s.diagnostics.as_ref() {
        Ok(d) => (
            format!("odd: {:.0} ± {:.0} ppm", d.odd.value, d.odd.err),
            format!(
                "even: {:.0} ± {:.0} ppm (Z {:.1})",
                d.even.value, d.even.err, d.odd_even_z
            ),
        ),
        Err(_) => ("odd".into(), "even".into()),
    };
    binned_panel(&l, co, &odd, None, x, y, "hours")?;
    binned_panel(&r, ce, &even, None, x, y, "hours")
}

/// The whole orbit (phase −0.25 to 0.75) with the secondary search: the
/// depth at phase 0.5 and the deepest dip found elsewhere (green line).
fn whole_orbit<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, s: &Shown) -> Result<(), String> {
    let lc = s.lc();
    let skip = crate::lightcurve::analysis::in_transit(&lc.time, &s.others, MASK_WIDEN);
    let b = fold_bin(
        &lc.time,
        &s.flux,
        &lc.flux_err,
        Some(&skip),
        s.me.period_d,
        s.me.epoch,
        0.25,
        (-0.5, 0.5),
        200,
    );
    // Phases are binned about 0.25, so the orbit runs from −0.25 to 0.75.
    let pts: Vec<(f64, f64, f64)> = points(&b, 1.0)
        .into_iter()
        .map(|(x, y, e)| (x + 0.25, y, e))
        .collect();
    let y = span(pts.iter().map(|p| p.1));
    let caption = match s.diagnostics.as_ref() {
        Ok(d) => {
            let mut c = format!(
                "whole orbit: secondary at 0.5 {:.0} ± {:.0} ppm",
                d.secondary.value, d.secondary.err
            );
            if let Some(e) = d.eclipse {
                c.push_str(&format!(
                    "; deepest elsewhere {:.0} ± {:.0} ppm at {:.3}",
                    e.depth.value, e.depth.err, e.phase
                ));
            }
            c
        }
        Err(_) => "whole orbit".into(),
    };
    let mut chart = axes(area, caption, (-0.25, 0.75), y, ("phase", "flux (ppm)"))?;
    chart
        .draw_series(
            pts.iter()
                .map(|&(x, y, _)| Circle::new((x, y), 2, INK.filled())),
        )
        .map_err(err)?;
    if let Ok(d) = s.diagnostics.as_ref() {
        let mut at = vec![0.5];
        if let Some(e) = d.eclipse {
            at.push((e.phase + 0.25).rem_euclid(1.0) - 0.25);
        }
        for p in at {
            chart
                .draw_series(LineSeries::new([(p, y.0), (p, y.1)], GREEN.stroke_width(1)))
                .map_err(err)?;
        }
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [
                    (0.5 - 0.01, -d.secondary.value - d.secondary.err),
                    (0.5 + 0.01, -d.secondary.value + d.secondary.err),
                ],
                GREEN.mix(0.4).filled(),
            )))
            .map_err(err)?;
    }
    Ok(())
}

/// Each transit's depth with its error bar against time, the mean depth as
/// a line: a lone deep transit or a trend shows at once.
fn per_transit<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, s: &Shown) -> Result<(), String> {
    let Ok(d) = s.diagnostics.as_ref() else {
        return Ok(());
    };
    let pts: Vec<(f64, f64, f64)> = d
        .per_transit
        .iter()
        .map(|(t, m)| (*t, m.value, m.err))
        .collect();
    let x = span(pts.iter().map(|p| p.0));
    let y = span(
        pts.iter()
            .flat_map(|p| [p.1 - p.2, p.1 + p.2])
            .chain([0.0, d.depth.value]),
    );
    let mut chart = axes(
        area,
        format!("per-transit depths ({} transits)", pts.len()),
        x,
        y,
        ("mid-transit time (d)", "depth (ppm)"),
    )?;
    chart
        .draw_series(LineSeries::new(
            [(x.0, d.depth.value), (x.1, d.depth.value)],
            VERMILLION.stroke_width(1),
        ))
        .map_err(err)?;
    chart
        .draw_series(
            pts.iter()
                .map(|&(t, v, e)| ErrorBar::new_vertical(t, v - e, v, v + e, GREY, 4)),
        )
        .map_err(err)?;
    chart
        .draw_series(
            pts.iter()
                .map(|&(t, v, _)| Circle::new((t, v), 3, BLUE.filled())),
        )
        .map_err(err)?;
    Ok(())
}

/// Without a light curve: the model transit alone, marked as such.
fn model_only<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    model: &ModelParams,
) -> Result<(), String> {
    let hours = model.period_d * 24.0;
    let zoom = 0.05_f64.min(0.5);
    let curve: Vec<(f64, f64)> = (0..=240)
        .map(|i| {
            let ph = -zoom + 2.0 * zoom * i as f64 / 240.0;
            (ph * hours, (model.flux(ph) - 1.0) * 1e6)
        })
        .collect();
    let y = span(curve.iter().map(|c| c.1));
    binned_panel(
        area,
        "model transit only (no light curve)".into(),
        &[],
        Some(&curve),
        (-zoom * hours, zoom * hours),
        y,
        "hours from mid-transit",
    )
}

/// The facts, one per line, wrapped to the page.
fn facts_box<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    facts: &[String],
) -> Result<(), String> {
    let style = ("sans-serif", 16).into_font().color(&INK);
    let mut y = 12;
    for line in facts {
        for piece in wrap(line, 130) {
            area.draw(&Text::new(piece, (20, y), style.clone()))
                .map_err(err)?;
            y += 21;
        }
    }
    Ok(())
}

fn wrap(text: &str, width: usize) -> Vec<String> {
    let mut out = Vec::new();
    let mut line = String::new();
    for w in text.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + w.chars().count() > width {
            out.push(std::mem::take(&mut line));
            line.push_str("    ");
        }
        if !line.is_empty() && !line.ends_with(' ') {
            line.push(' ');
        }
        line.push_str(w);
    }
    if !line.is_empty() {
        out.push(line);
    }
    out
}

/// A small fold (± the zoom, binned points and the model), as an inline
/// SVG element for the HTML report; the model alone, dashed, without data.
pub fn thumbnail_svg(shown: Option<&Shown>, model: &ModelParams) -> Result<String, String> {
    register_font();
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, THUMB).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let zoom = shown.map_or(0.05, |s| s.zoom);
        let curve: Vec<(f64, f64)> = (0..=80)
            .map(|i| {
                let ph = -zoom + 2.0 * zoom * i as f64 / 80.0;
                (ph, (model.flux(ph) - 1.0) * 1e6)
            })
            .collect();
        let pts = shown.map_or_else(Vec::new, |s| points(&s.views.transit, 1.0));
        let y = span(pts.iter().map(|p| p.1).chain(curve.iter().map(|c| c.1)));
        let mut chart = ChartBuilder::on(&root)
            .margin(3)
            .build_cartesian_2d(-zoom..zoom, y.0..y.1)
            .map_err(err)?;
        chart
            .draw_series(
                pts.iter()
                    .map(|&(x, y, _)| Circle::new((x, y), 1, INK.filled())),
            )
            .map_err(err)?;
        let style = if shown.is_some() {
            VERMILLION.stroke_width(2)
        } else {
            GREY.stroke_width(1)
        };
        chart
            .draw_series(LineSeries::new(curve, style))
            .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(out)
}

/// The boost per system size k as bars on a log scale (the model's table),
/// as an SVG document.
pub fn boost_chart_svg(rows: &[(u32, f64)]) -> Result<String, String> {
    register_font();
    let mut out = String::new();
    {
        let root = SVGBackend::with_string(&mut out, (640, 260)).into_drawing_area();
        root.fill(&WHITE).map_err(err)?;
        let finite: Vec<(u32, f64)> = rows
            .iter()
            .copied()
            .filter(|r| r.1.is_finite() && r.1 > 0.0)
            .collect();
        let kmax = finite.iter().map(|r| r.0).max().unwrap_or(1);
        let top = finite
            .iter()
            .map(|r| r.1.log10())
            .fold(1.0_f64, f64::max)
            .ceil()
            + 0.5;
        let mut chart = ChartBuilder::on(&root)
            .caption("boost by system size k (log10)", ("sans-serif", 15))
            .margin(10)
            .x_label_area_size(34)
            .y_label_area_size(50)
            .build_cartesian_2d(0.5..kmax as f64 + 0.5, 0.0..top)
            .map_err(err)?;
        chart
            .configure_mesh()
            .x_desc("k (counted candidates on the star)")
            .y_desc("log10 boost")
            .light_line_style(WHITE)
            .draw()
            .map_err(err)?;
        chart
            .draw_series(finite.iter().map(|&(k, b)| {
                Rectangle::new(
                    [
                        (k as f64 - 0.35, 0.0),
                        (k as f64 + 0.35, b.log10().max(0.0)),
                    ],
                    BLUE.filled(),
                )
            }))
            .map_err(err)?;
        chart
            .draw_series(finite.iter().map(|&(k, b)| {
                Text::new(
                    crate::output::num(Some(b), 3),
                    (k as f64 - 0.3, b.log10().max(0.0) + 0.25),
                    ("sans-serif", 13).into_font(),
                )
            }))
            .map_err(err)?;
        root.present().map_err(err)?;
    }
    Ok(out)
}

/// The image format of a file name, if it is one we write.
pub fn format_of(path: &Path) -> Option<&'static str> {
    match path.extension()?.to_str()?.to_ascii_lowercase().as_str() {
        "svg" => Some("svg"),
        "png" => Some("png"),
        _ => None,
    }
}

/// An id as a file name: anything but letters, digits, `.`, `-` and `_`
/// becomes `_`.
pub fn file_name(id: &str) -> String {
    id.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || matches!(c, '.' | '-' | '_') {
                c
            } else {
                '_'
            }
        })
        .collect()
}

/// What the facts box reads: the session's pieces (the browser has the
/// same ones).
pub struct FactsOf<'a> {
    pub cat: &'a crate::catalogue::Catalogue,
    pub settings: &'a crate::checks::CheckSettings,
    pub live: Option<&'a crate::odds::Live>,
    pub checks: &'a crate::checks::Checks,
    /// Who decided and when, if anyone did.
    pub decided: Option<(String, String)>,
}

/// The facts box of a candidate: the ephemeris and size, the system and
/// odds, the decision, every flag with its reason, and the statement under
/// which the odds hold.
pub fn facts_of(f: &FactsOf, c: crate::catalogue::CandidateId) -> Vec<String> {
    let cat = f.cat;
    let d = crate::checks::derive(cat, c, f.settings);
    let val = |x| cat.value(x, c);
    let mut lines = vec![format!(
        "period {} d · epoch {} · depth {} ppm · duration {} h · radius {} R⊕ · a/R★ {} · Teq {} K",
        crate::output::num(val(crate::catalogue::Field::PeriodD), 8),
        crate::output::num(val(crate::catalogue::Field::Epoch), 9),
        crate::output::num(val(crate::catalogue::Field::DepthPpm), 4),
        crate::output::num(val(crate::catalogue::Field::DurationH), 4),
        crate::output::num(d.radius_rearth, 3),
        crate::output::num(d.a_rstar, 3),
        crate::output::num(d.teq_k.map(f64::round), 4)
    )];
    match f.live {
        Some(live) => {
            lines.push(format!(
                "system of k = {} counted · odds {} · probability {} · holds to f = {} · verdict {}",
                live.k(c),
                live.odds(c).map_or("-".into(), crate::odds::format_odds),
                crate::output::num(live.probability(c), 4),
                crate::output::num(live.holds_to(c), 3),
                live.verdict(c).name()
            ));
            let held = crate::odds::hold_text(cat, live, c);
            if !held.is_empty() {
                lines.push(format!("held back: {held}"));
            }
            let decision = live.decision(c);
            let who = f
                .decided
                .as_ref()
                .map(|(v, at)| format!(" by {} at {at}", crate::sanitize::clean(v)))
                .unwrap_or_default();
            lines.push(format!(
                "decision: {}{}{who}",
                decision.name(),
                decision
                    .reason()
                    .map_or(String::new(), |r| format!(" ({})", r.name()))
            ));
        }
        None => lines.push("no odds: the model needs N (--targets)".into()),
    }
    let findings: Vec<String> = f
        .checks
        .findings(c)
        .map(|x| {
            format!(
                "{}{}: {}",
                if x.soft { "warning " } else { "flag " },
                x.flag,
                crate::sanitize::clean(&x.why)
            )
        })
        .collect();
    if findings.is_empty() {
        lines.push("flags: none".into());
    }
    lines.extend(findings);
    if let Some(live) = f.live {
        lines.push(crate::odds::model_statement(live.model()));
    }
    lines
}

/// Draws a candidate's figure from its facts into `path` (SVG or PNG by
/// the extension), computing the folds with the one pipeline.
pub fn draw_to(
    cat: &crate::catalogue::Catalogue,
    shown: Result<&crate::lightcurve::Shown, &str>,
    facts: &[String],
    verdict: &str,
    c: crate::catalogue::CandidateId,
    path: &Path,
) -> Result<(), String> {
    let page = Page {
        title: format!(
            "{} on {} · {verdict}",
            crate::sanitize::clean(cat.candidate_id(c)),
            crate::sanitize::clean(cat.star_id(cat.star_of(c)))
        ),
        facts,
        model: crate::lightcurve::model_params(cat, c),
        shown,
    };
    match format_of(path) {
        Some("png") => crate::figure::png(path, &page),
        _ => {
            let svg = crate::figure::svg(&page)?;
            crate::output::write_atomically(path, svg.as_bytes()).map_err(|e| e.to_string())
        }
    }
}
