//! `starsift fold CATALOGUE --candidate ID`: the candidate's light curve,
//! detrended, folded and binned, with its diagnostics and the model transit.

use std::io::Write;

use serde_json::{Value, json};

use crate::catalogue::Catalogue;
use crate::cli::args::{CatalogueArgs, LightcurveArgs};
use crate::cli::error::CliError;
use crate::lightcurve::analysis::{Binned, Diagnostics, detrend, diagnose_detrended, fold_bin};
use crate::lightcurve::{LightCurve, ModelParams, context, model_params, signals, star_signals};
use crate::output::{Format, csv_writer, exact_in, num, write_json};
use crate::sanitize::clean;

/// Which part of the orbit to bin.
#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum Window {
    /// The whole orbit, phase −0.5 to 0.5.
    Full,
    /// ± 3 transit durations around mid-transit.
    Transit,
    /// ± 3 transit durations around phase 0.5.
    Secondary,
}

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub input: CatalogueArgs,
    #[command(flatten)]
    pub lc: LightcurveArgs,
    /// The candidate to fold.
    #[arg(long, value_name = "ID")]
    pub candidate: String,
    /// Number of phase bins.
    #[arg(long, value_name = "N", default_value_t = 200)]
    pub bins: usize,
    /// Which part of the orbit to bin.
    #[arg(long, value_enum, default_value = "full")]
    pub window: Window,
    /// Only odd or only even transits (transit 0 at the epoch is even).
    #[arg(long, value_enum, default_value = "all")]
    pub parity: Parity,
    /// Output format: a plot and the diagnostics for people, CSV or JSON for scripts.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
}

/// Which transits to fold.
#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum Parity {
    All,
    Odd,
    Even,
}

/// Durations shown on each side of the transit in the zoomed windows.
const ZOOM_DURATIONS: f64 = 3.0;

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    // Flags first: a bad value costs no load.
    if args.bins == 0 || args.bins > 100_000 {
        return Err(CliError::Input(format!(
            "--bins {}: use 1 to 100000",
            args.bins
        )));
    }
    args.lc.check_folder()?;
    let loaded = args.input.load()?;
    let cat = &loaded.catalogue;
    let c = loaded.candidate(&args.candidate)?;
    let star = cat.star_of(c);
    let finder = args.lc.finder(&loaded);
    let lc = finder
        .load(cat, star)
        .map_err(|e| CliError::Input(format!("star {}: {e}", clean(cat.star_id(star)))))?;
    let (me, others) = signals(cat, c);
    let settings = args.lc.detrend();
    let flux = detrend(&lc, &star_signals(cat, star), &settings);
    let mut skip = crate::lightcurve::analysis::in_transit(&lc.time, &others, 1.2);
    if args.parity != Parity::All {
        crate::lightcurve::analysis::keep_parity(
            &lc.time,
            &me,
            args.parity == Parity::Odd,
            &mut skip,
        );
    }
    let zoom = (ZOOM_DURATIONS * me.duration_h / 24.0 / me.period_d).min(0.5);
    let (centre, range) = match args.window {
        Window::Full => (0.0, (-0.5, 0.5)),
        Window::Transit => (0.0, (-zoom, zoom)),
        Window::Secondary => (0.5, (-zoom, zoom)),
    };
    let binned = fold_bin(
        &lc.time,
        &flux,
        &lc.flux_err,
        Some(&skip),
        me.period_d,
        me.epoch,
        centre,
        range,
        args.bins,
    );
    // The CSV holds the bins only: the diagnostics are computed when shown,
    // on the flux already detrended for the fold.
    // With the flag the checks add from the light curve's own depth, at the
    // default limit (`fold` takes no check settings).
    let diag = || {
        let mut d = diagnose_detrended(&lc, &flux, &me, &others, &context(cat, c), &settings);
        let limit = crate::checks::CheckSettings::default().big_radius_rearth;
        if let Some(why) = crate::checks::measured_radius_too_big(cat, c, &d.depth, limit) {
            d.findings.push((crate::flags::Flag::BigRadius, why));
        }
        d
    };
    let model = model_params(cat, c);
    match args.format {
        Format::Csv => {
            let mut w = csv_writer(out);
            w.write_record([
                "phase",
                "flux",
                "flux_err",
                "count",
                "median",
                "weighted_mean",
                "model",
            ])?;
            let mut b = crate::output::Shortest::new();
            for i in 0..binned.centre.len() {
                let p = binned.centre[i];
                for v in [p, binned.mean[i], binned.err[i]] {
                    w.write_field(exact_in(&mut b, Some(v)))?;
                }
                w.write_field(binned.count[i].to_string())?;
                for v in [
                    binned.median[i],
                    binned.weighted_mean[i],
                    model.flux(p + centre),
                ] {
                    w.write_field(exact_in(&mut b, Some(v)))?;
                }
                w.write_record(None::<&[u8]>)?;
            }
            w.flush()?;
        }
        Format::Json => write_json(
            out,
            &json!({
                "candidate": clean(cat.candidate_id(c)),
                "star": clean(cat.star_id(star)),
                "lightcurve": light_curve_json(&lc),
                "window": format!("{:?}", args.window).to_lowercase(),
                "bins": binned_json(&binned, &model, centre),
                "diagnostics": diagnostics_json(&diag()),
            }),
        )?,
        Format::Table => write_table(cat, c, &lc, &binned, &diag(), &model, args, out)?,
    }
    Ok(())
}

fn light_curve_json(lc: &LightCurve) -> Value {
    json!({
        "source": clean(&lc.source),
        "samples": lc.time.len(),
        "dropped": lc.dropped,
        "dropped_quality": lc.dropped_quality,
        "normalised_by": lc.normalised_by,
        "errors_estimated": lc.err_estimated,
        "time_zero": lc.time_zero,
        "segments": lc.segments.iter().map(|s| json!({
            "source": clean(&s.source),
            "columns": clean(&s.columns),
            "samples": s.samples,
            "dropped": s.dropped,
            "dropped_quality": s.dropped_quality,
            "normalised_by": s.normalised_by,
            "first": s.first,
            "last": s.last,
        })).collect::<Vec<_>>(),
        "notes": lc.notes.iter().map(|n| clean(n).into_owned()).collect::<Vec<_>>(),
    })
}

fn binned_json(b: &Binned, m: &ModelParams, centre: f64) -> Vec<Value> {
    let f = |v: f64| if v.is_finite() { json!(v) } else { Value::Null };
    (0..b.centre.len())
        .map(|i| {
            json!({
                "phase": b.centre[i], "flux": f(b.mean[i]), "flux_err": f(b.err[i]), "count": b.count[i],
                "median": f(b.median[i]), "weighted_mean": f(b.weighted_mean[i]), "model": m.flux(b.centre[i] + centre),
            })
        })
        .collect()
}

/// Whether the light curve shows the catalogue's signal, in words.
fn recovery_text(r: &crate::lightcurve::analysis::Recovery) -> String {
    use crate::lightcurve::analysis::Recovery;
    match r {
        Recovery::Shown => "shown (or the test cannot tell)".into(),
        Recovery::Hidden => {
            "not measured: every transit in the data falls on another signal's transit".into()
        }
        Recovery::NoTransitInData { first, last } => {
            format!("no transit of the ephemeris in the light curve ({first:.4} to {last:.4})")
        }
        Recovery::TooShallow { catalogue_ppm, z } => {
            format!("not shown: below half the catalogue's {catalogue_ppm:.0} ppm, Z = {z:.1}")
        }
    }
}

/// The diagnostics as JSON: each with value, uncertainty and significance.
pub fn diagnostics_json(d: &Diagnostics) -> Value {
    let f = |v: f64| if v.is_finite() { json!(v) } else { Value::Null };
    let m = |x: crate::lightcurve::analysis::Measure| json!({"value": f(x.value), "err": f(x.err), "z": f(x.z())});
    json!({
        "depth_ppm": m(d.depth),
        "snr": f(d.snr),
        "odd_depth_ppm": m(d.odd),
        "even_depth_ppm": m(d.even),
        "odd_even_z": f(d.odd_even_z),
        "secondary_depth_ppm": m(d.secondary),
        "deepest_dip_elsewhere": d.eclipse.map(|e| json!({"phase": f(e.phase), "depth_ppm": m(e.depth), "z_needed": f(e.threshold_z)})),
        "recovery": recovery_text(&d.recovery),
        "reflected_ceiling_ppm": d.reflected_ceiling_ppm.map(f),
        "thermal_ppm": d.thermal_ppm.map(f),
        "depth_consistency": d.consistency.map(|(c, n, p)| json!({"chi2": c, "dof": n, "p": p})),
        "transits_measured": d.transits_seen,
        "orbit_variation": d.phase.map(|p| json!({
            "at_period_ppm": m(p.at_period),
            "at_half_period_ppm": m(p.at_half),
            "orbits": p.orbits,
            "t_needed": f(p.threshold_t),
            "ellipsoidal_ceiling_ppm": d.ellipsoidal_ceiling_ppm.map(f),
        })),
        "trapezoid_flat_fraction": f(d.flat_fraction),
        "v_shape_delta_chi2": f(d.v_shape_dchi2),
        "scatter": f(d.scatter),
        "flags": d.findings.iter().map(|(fl, why)| json!({"flag": fl.name(), "why": why})).collect::<Vec<_>>(),
    })
}

#[allow(clippy::too_many_arguments)]
fn write_table(
    cat: &Catalogue,
    c: crate::catalogue::CandidateId,
    lc: &LightCurve,
    binned: &Binned,
    d: &Diagnostics,
    model: &ModelParams,
    args: &Args,
    out: &mut dyn Write,
) -> Result<(), CliError> {
    let (me, _) = signals(cat, c);
    writeln!(
        out,
        "candidate  {} on {}",
        clean(cat.candidate_id(c)),
        clean(cat.star_id(cat.star_of(c)))
    )?;
    writeln!(
        out,
        "ephemeris  P = {} d, epoch {}, duration {} h",
        num(Some(me.period_d), 8),
        num(Some(me.epoch), 9),
        num(Some(me.duration_h), 4)
    )?;
    writeln!(
        out,
        "data       {} ({}{}{})",
        clean(&lc.source),
        lc.describe_use(),
        if lc.err_estimated {
            ", errors estimated from the scatter"
        } else {
            ""
        },
        if args.lc.no_detrend {
            ", not detrended"
        } else {
            ", running-median detrended"
        }
    )?;
    if lc.segments.len() > 1 {
        for seg in &lc.segments {
            writeln!(
                out,
                "segment    {} ({} samples, {} dropped, {} flagged; median flux {})",
                clean(&seg.source),
                seg.samples,
                seg.dropped,
                seg.dropped_quality,
                num(Some(seg.normalised_by), 6)
            )?;
        }
    }
    for n in &lc.notes {
        writeln!(out, "note       {}", clean(n))?;
    }
    writeln!(out)?;
    // x in hours from mid-transit for the zoomed windows, phase for the full orbit.
    let hours = args.window != Window::Full;
    let scale = if hours { me.period_d * 24.0 } else { 1.0 };
    let centre = if args.window == Window::Secondary {
        0.5
    } else {
        0.0
    };
    let pts: Vec<(f32, f32)> = (0..binned.centre.len())
        .filter(|&i| binned.mean[i].is_finite())
        .map(|i| {
            (
                (binned.centre[i] * scale) as f32,
                ((binned.mean[i] - 1.0) * 1e6) as f32,
            )
        })
        .collect();
    if pts.len() >= 2 {
        let xs = (
            binned.centre[0] * scale,
            binned.centre[binned.centre.len() - 1] * scale,
        );
        let model_pts: Vec<(f32, f32)> = (0..200)
            .map(|i| {
                let x = xs.0 + (xs.1 - xs.0) * i as f64 / 199.0;
                (
                    x as f32,
                    ((model.flux(x / scale + centre) - 1.0) * 1e6) as f32,
                )
            })
            .collect();
        let lo = pts
            .iter()
            .chain(&model_pts)
            .map(|p| p.1)
            .fold(f32::INFINITY, f32::min);
        let hi = pts
            .iter()
            .chain(&model_pts)
            .map(|p| p.1)
            .fold(f32::NEG_INFINITY, f32::max);
        let pad = ((hi - lo) * 0.05).max(1.0);
        use textplots::{Chart, LabelBuilder, LabelFormat, Plot, Shape};
        let data = Shape::Points(&pts);
        let curve = Shape::Lines(&model_pts);
        let mut chart =
            Chart::new_with_y_range(120, 40, xs.0 as f32, xs.1 as f32, lo - pad, hi + pad);
        let chart = chart
            .lineplot(&data)
            .lineplot(&curve)
            .x_label_format(LabelFormat::Custom(Box::new(move |v| {
                if hours {
                    format!("{v:.1} h")
                } else {
                    format!("phase {v:.2}")
                }
            })))
            .y_label_format(LabelFormat::Custom(Box::new(|v| format!("{v:.0} ppm"))));
        chart.axis();
        chart.figures();
        writeln!(
            out,
            "relative flux (ppm) — binned data (points) and the model transit (line)"
        )?;
        write!(out, "{chart}")?;
        writeln!(out)?;
    }
    // A box with no sample in it says so, instead of NaN ± NaN.
    let m = |x: crate::lightcurve::analysis::Measure| {
        if x.value.is_finite() && x.err.is_finite() {
            format!("{:.0} ± {:.0} ppm ({:.1}σ)", x.value, x.err, x.z())
        } else {
            "not measured: no sample of the light curve falls there".to_string()
        }
    };
    writeln!(out, "diagnostics")?;
    writeln!(
        out,
        "  depth (central half)   {}, SNR {:.1}",
        m(d.depth),
        d.snr
    )?;
    writeln!(
        out,
        "  odd / even             {} / {}, Z = {:.2}",
        m(d.odd),
        m(d.even),
        d.odd_even_z
    )?;
    writeln!(
        out,
        "  secondary (phase 0.5)  {}; planetary ceilings: reflected {}, thermal {}",
        m(d.secondary),
        d.reflected_ceiling_ppm
            .map_or("unknown".into(), |v| format!("{v:.0} ppm")),
        d.thermal_ppm
            .map_or("unknown".into(), |v| format!("{v:.1} ppm"))
    )?;
    if let Some(e) = d.eclipse {
        writeln!(
            out,
            "  deepest dip elsewhere  {} at phase {:.3} (Z {:.1} needed for the phases searched)",
            m(e.depth),
            e.phase,
            e.threshold_z
        )?;
    }
    writeln!(
        out,
        "  catalogue signal       {}",
        recovery_text(&d.recovery)
    )?;
    match d.consistency {
        Some((chi2, dof, p)) => writeln!(
            out,
            "  per-transit depths     χ² = {chi2:.1} on {dof} degrees of freedom, p = {p:.3} ({} transits)",
            d.transits_seen
        )?,
        None => writeln!(
            out,
            "  per-transit depths     fewer than two transits measured"
        )?,
    }
    let t = |x: crate::lightcurve::analysis::Measure| {
        format!("{:.0} ± {:.0} ppm (t = {:.1})", x.value, x.err, x.z())
    };
    match d.phase {
        Some(p) => writeln!(
            out,
            "  light with the orbit   at the period {}, at half the period {}, over {} orbits (t = {:.1} needed); ellipsoidal ceiling {}",
            t(p.at_period),
            t(p.at_half),
            p.orbits,
            p.threshold_t,
            d.ellipsoidal_ceiling_ppm
                .map_or("unknown".into(), |v| format!("{v:.0} ppm"))
        )?,
        None => writeln!(
            out,
            "  light with the orbit   not measured: fewer than {} orbits with enough samples",
            crate::lightcurve::analysis::MIN_ORBITS
        )?,
    }
    writeln!(
        out,
        "  shape (trapezoid fit)  flat fraction T23/T14 = {:.2}; V over flat-bottom Δχ² = {:.1}",
        d.flat_fraction, d.v_shape_dchi2
    )?;
    if d.findings.is_empty() {
        writeln!(out, "  flags                  none")?;
    }
    for (f, why) in &d.findings {
        writeln!(out, "  flag {f}: {}", clean(why))?;
    }
    Ok(())
}
