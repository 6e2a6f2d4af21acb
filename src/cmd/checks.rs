//! `starsift checks CATALOGUE`: what each candidate's transit implies
//! physically, and which warning signs fired, with the numbers behind them.

use std::borrow::Cow;
use std::io::Write;

use serde_json::{Value, json};

use crate::catalogue::CandidateId;
use crate::checks::{self, Checks};
use crate::cli::error::CliError;
use crate::flags::{ALL_FLAGS, Flag};
use crate::output::{Align, Format, push_num, write_csv_rows, write_json_rows, write_table_rows};
use crate::sanitize::clean;
use crate::session::{LedgerUse, Session};

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: crate::cli::args::VettingArgs,
    /// Only candidates on which this flag fired (firmly or as a warning).
    #[arg(long, value_name = "FLAG")]
    pub only: Option<String>,
    /// Output format: a table for people, CSV or JSON for scripts.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
}

const COLUMNS: [&str; 18] = [
    "star",
    "candidate",
    "radius_rearth",
    "a_au",
    "a_rstar",
    "teq_k",
    "insolation_earth",
    "t14_central_h",
    "density_transit_kg_m3",
    "density_star_kg_m3",
    "density_ratio",
    "flags",
    "warnings",
    "why",
    "k",
    "odds",
    "verdict",
    "held_back",
];

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let only = match &args.only {
        Some(name) => Some(Flag::parse(name).ok_or_else(|| {
            CliError::Input(format!(
                "--only {name}: unknown flag; known: {}",
                ALL_FLAGS.map(Flag::name).join(", ")
            ))
        })?),
        None => None,
    };
    let session = Session::open(&args.vetting, LedgerUse::Read)?;
    let (loaded, settings, ch) = (&session.loaded, &session.settings, &session.checks);
    let cat = &loaded.catalogue;
    let lc_errors = &session.lightcurve_errors;
    // Verdicts come with the checks when the model can be built (it needs N).
    let live = session.live.as_ref().ok();
    if args.format != Format::Json {
        for w in cat.load_warnings() {
            eprintln!("starsift: warning: {}", clean(&w));
        }
        for (star, e) in lc_errors {
            eprintln!("starsift: warning: star {}: {}", clean(star), clean(e));
        }
        if let Some(n) = &session.lightcurve_notice {
            eprintln!("starsift: warning: {}", clean(n));
        }
        if let Err(e) = &session.live {
            eprintln!("starsift: note: no verdicts: {e}");
        }
        // What the checks say of the inputs (without verdicts too).
        for n in ch.notes() {
            eprintln!("starsift: warning: {}", clean(n));
        }
    }
    let rows: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| only.is_none_or(|f| ch.flags(c).contains(f) || ch.warnings(c).contains(f)))
        .collect();
    // Rows read their star's id out of file order.
    let ahead = |&c: &CandidateId, bytes: bool| cat.prefetch_star_id(c, bytes);
    match args.format {
        Format::Csv => {
            write_csv_rows(out, COLUMNS, &rows, ahead, |w, &c| {
                let d = checks::derive(cat, c, settings);
                w.text(clean(cat.star_id(cat.star_of(c))).as_bytes());
                w.text(clean(cat.candidate_id(c)).as_bytes());
                for v in [
                    d.radius_rearth,
                    d.a_au,
                    d.a_rstar,
                    d.teq_k,
                    d.insolation_earth,
                    d.t14_central_h,
                    d.density_transit,
                    d.density_star,
                    d.density_ratio,
                ] {
                    w.exact(v);
                }
                w.list(ch.flags(c).iter().map(Flag::name), ";");
                w.list(ch.warnings(c).iter().map(Flag::name), ";");
                w.text(clean(&ch.why(c)).as_bytes());
                match live {
                    Some(l) => {
                        w.int(l.k(c));
                        w.exact(l.odds(c));
                        w.text(l.verdict(c).name());
                        w.text(crate::odds::hold_text(cat, l, c));
                    }
                    None => {
                        for _ in 0..4 {
                            w.text("");
                        }
                    }
                }
            })?;
        }
        Format::Json => {
            let head = vec![
                ("catalogue", json!(clean(&cat.source))),
                (
                    "temperature_assumption",
                    json!(format!(
                        "Bond albedo {}, redistribution factor {}",
                        settings.albedo, settings.redistribution
                    )),
                ),
                ("flag_counts", flag_counts(ch, cat.len())),
                ("lightcurve_stars", json!(session.lightcurve_stars)),
                ("lightcurve_samples", json!(session.lightcurve_totals)),
                (
                    "lightcurve_errors",
                    lc_errors
                        .iter()
                        .map(|(s, e)| json!({"star": clean(s), "error": clean(e)}))
                        .collect(),
                ),
                ("lightcurve_notice", json!(session.lightcurve_notice)),
            ];
            let row = |&c: &CandidateId| {
                let d = checks::derive(cat, c, settings);
                JsonRow {
                    star: clean(cat.star_id(cat.star_of(c))),
                    candidate: clean(cat.candidate_id(c)),
                    radius_rearth: d.radius_rearth,
                    a_au: d.a_au,
                    a_rstar: d.a_rstar,
                    teq_k: d.teq_k,
                    insolation_earth: d.insolation_earth,
                    t14_central_h: d.t14_central_h,
                    density_transit_kg_m3: d.density_transit,
                    density_star_kg_m3: d.density_star,
                    density_ratio: d.density_ratio,
                    impact_assumed_zero: d.assumed_central,
                    flags: ch.flags(c).iter().map(Flag::name).collect(),
                    warnings: ch.warnings(c).iter().map(Flag::name).collect(),
                    findings: ch
                        .findings(c)
                        .map(|x| JsonFinding {
                            flag: x.flag.name(),
                            soft: x.soft,
                            why: clean(&x.why),
                        })
                        .collect(),
                    k: live.map(|l| l.k(c)),
                    odds: live.and_then(|l| l.odds(c)),
                    verdict: live.map(|l| l.verdict(c).name()),
                    held_back: live.map(|l| crate::odds::hold_text(cat, l, c)),
                }
            };
            write_json_rows(out, head, "candidates", &rows, ahead, row)?;
        }
        Format::Table => {
            writeln!(out, "catalogue  {}", clean(&cat.source))?;
            let columns = [
                ("star", Align::Left),
                ("candidate", Align::Left),
                ("R_earth", Align::Right),
                ("a_au", Align::Right),
                ("Teq_K", Align::Right),
                ("S_earth", Align::Right),
                ("rho_ratio", Align::Right),
                ("verdict", Align::Left),
                ("flags", Align::Left),
            ];
            write_table_rows(out, &columns, &rows, ahead, |&c, cells| {
                let [star, cand, r, a, teq, s, rho, verdict, flags] = cells;
                let d = checks::derive(cat, c, settings);
                star.push_str(cat.star_id(cat.star_of(c)));
                cand.push_str(cat.candidate_id(c));
                push_num(r, d.radius_rearth, 3);
                push_num(a, d.a_au, 3);
                push_num(teq, d.teq_k.map(f64::round), 4);
                push_num(s, d.insolation_earth, 3);
                push_num(rho, d.density_ratio, 2);
                verdict.push_str(live.map_or("-", |l| l.verdict(c).name()));
                // Firm flags, then the warnings in brackets.
                let (firm, soft) = (ch.flags(c), ch.warnings(c));
                firm.push_joined(",", flags);
                if !soft.is_empty() {
                    if !firm.is_empty() {
                        flags.push(' ');
                    }
                    flags.push('(');
                    soft.push_joined(",", flags);
                    flags.push(')');
                }
            })?;
            writeln!(out)?;
            writeln!(out, "why (flags firm, warnings in brackets above)")?;
            for &c in &rows {
                for f in ch.findings(c) {
                    writeln!(
                        out,
                        "  {}  {}{}: {}",
                        clean(cat.candidate_id(c)),
                        if f.soft { "warning " } else { "" },
                        f.flag,
                        clean(&f.why)
                    )?;
                }
            }
            writeln!(out)?;
            let counts = flag_counts(ch, cat.len());
            let line: Vec<String> = counts
                .as_object()
                .map(|m| m.iter().map(|(k, v)| format!("{k} {v}")).collect())
                .unwrap_or_default();
            writeln!(out, "flags      {}", line.join(", "))?;
            if !args.vetting.lc.wanted() {
                writeln!(
                    out,
                    "light curves not read (--no-lightcurves): odd-even, secondary and v-shape unchecked"
                )?;
            } else {
                writeln!(
                    out,
                    "light curves found for {} stars, {} not readable: {}",
                    session.lightcurve_stars,
                    lc_errors.len(),
                    session.lightcurve_totals.describe()
                )?;
            }
            if let Some(line) = live.and_then(|l| l.held_line()) {
                writeln!(out, "cleaning   {line}")?;
            }
            for (star, e) in lc_errors {
                writeln!(out, "light curve of {} not read: {}", clean(star), clean(e))?;
            }
            writeln!(
                out,
                "T_eq assumes Bond albedo {} and redistribution factor {} (1/4: whole planet); densities are mean stellar densities.",
                settings.albedo, settings.redistribution
            )?;
        }
    }
    Ok(())
}

/// Candidates per flag (firm), for every flag that fired.
fn flag_counts(ch: &Checks, n: usize) -> Value {
    let mut m = serde_json::Map::new();
    for f in ALL_FLAGS {
        let k = (0..n as CandidateId)
            .filter(|&c| ch.flags(c).contains(f))
            .count();
        if k > 0 {
            m.insert(f.name().to_string(), json!(k));
        }
    }
    Value::Object(m)
}

/// One candidate of the JSON output.
#[derive(serde::Serialize)]
struct JsonRow<'a> {
    star: Cow<'a, str>,
    candidate: Cow<'a, str>,
    radius_rearth: Option<f64>,
    a_au: Option<f64>,
    a_rstar: Option<f64>,
    teq_k: Option<f64>,
    insolation_earth: Option<f64>,
    t14_central_h: Option<f64>,
    density_transit_kg_m3: Option<f64>,
    density_star_kg_m3: Option<f64>,
    density_ratio: Option<f64>,
    impact_assumed_zero: bool,
    flags: Vec<&'static str>,
    warnings: Vec<&'static str>,
    findings: Vec<JsonFinding<'a>>,
    k: Option<usize>,
    odds: Option<f64>,
    verdict: Option<&'static str>,
    held_back: Option<String>,
}

/// Why a flag fired, in the JSON output.
#[derive(serde::Serialize)]
struct JsonFinding<'a> {
    flag: &'static str,
    soft: bool,
    why: Cow<'a, str>,
}
