//! `starsift export CATALOGUE`: the vetted catalogue — every input column,
//! then the system size, boost, odds, probability and verdict recomputed from
//! the ledger's decisions (rejected candidates leave their systems), the
//! decision with its reason, vetter and time, and the flags.

use std::io::Write;
use std::path::PathBuf;

use serde_json::{Map, Value, json};

use crate::catalogue::{CandidateId, Field, NUMERIC};
use crate::cli::{CliError, VettingArgs};
use crate::odds::{Live, model_statement};
use crate::output::{csv_writer, exact_in, write_json};
use crate::query::Filter;
use crate::sanitize::clean;
use crate::session::{LedgerUse, Session};

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: VettingArgs,
    /// Output format.
    #[arg(long, value_enum, default_value = "csv")]
    pub format: ExportFormat,
    /// Write to this file (atomically) instead of standard output.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// Only the candidates this filter matches (the browser's syntax, e.g.
    /// "verdict:validated !flag:echo"); the odds are still those of the
    /// whole catalogue.
    #[arg(long = "where", value_name = "FILTER")]
    pub filter: Option<String>,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum ExportFormat {
    Csv,
    Json,
}

/// Writes `text` to `path` through a temporary file and a rename, so a
/// reader never sees half a file.
pub fn write_atomically(path: &std::path::Path, bytes: &[u8]) -> Result<(), CliError> {
    let tmp = path.with_extension(format!("tmp-{}", std::process::id()));
    std::fs::write(&tmp, bytes)?;
    std::fs::rename(&tmp, path)?;
    Ok(())
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let filter = crate::cli::parse_where(args.filter.as_deref())?;
    if let Some(path) = &args.output {
        crate::cli::check_output_path(path, &args.vetting)?;
    }
    let v = Session::open(&args.vetting, LedgerUse::Read)?;
    v.warn();
    let live = v.live()?;
    let rows = v.selected(live, filter.as_ref());
    let mut buf: Vec<u8> = Vec::new();
    let sink: &mut dyn Write = if args.output.is_some() { &mut buf } else { out };
    match args.format {
        ExportFormat::Csv => write_csv(&v, live, &rows, filter.as_ref(), sink)?,
        ExportFormat::Json => write_json(sink, &to_json(&v, live, &rows, filter.as_ref()))?,
    }
    if let Some(path) = &args.output {
        write_atomically(path, &buf)?;
        eprintln!(
            "starsift: wrote {} candidates to {}",
            rows.len(),
            clean(&path.display().to_string())
        );
    }
    Ok(())
}

const VETTING_COLUMNS: [&str; 15] = [
    "k",
    "boost",
    "odds",
    "probability",
    "verdict",
    "decision",
    "reason",
    "note",
    "vetter",
    "decided_at",
    "flags",
    "warnings",
    "counted",
    "held_back",
    "holds_to_f",
];

fn input_numeric(v: &Session) -> Vec<Field> {
    NUMERIC
        .iter()
        .copied()
        .filter(|f| v.loaded.catalogue.has(*f))
        .collect()
}

fn write_csv(
    v: &Session,
    live: &Live,
    rows: &[CandidateId],
    filter: Option<&Filter>,
    out: &mut dyn Write,
) -> Result<(), CliError> {
    let cat = &v.loaded.catalogue;
    let m = live.model();
    writeln!(
        out,
        "# starsift vetted catalogue of {}; ledger {}",
        clean(&cat.source),
        clean(v.ledger_path.as_deref().unwrap_or("none"))
    )?;
    writeln!(
        out,
        "# model: N = {}, {}, boost {}",
        m.targets.map_or("not given".into(), |n| n.to_string()),
        m.describe_fp(),
        m.mode.describe()
    )?;
    if let Some(line) = live.held_line() {
        writeln!(out, "# {line}")?;
    }
    writeln!(out, "# {}", model_statement(m))?;
    if let Some(f) = filter {
        writeln!(
            out,
            "# only the {} of {} candidates matching: {}",
            rows.len(),
            cat.len(),
            clean(&f.text)
        )?;
    }
    let numeric = input_numeric(v);
    let extras: Vec<String> = cat.extra_headers().map(str::to_string).collect();
    let mut w = csv_writer(out);
    let mut header: Vec<String> = vec!["star".into(), "candidate".into()];
    header.extend(numeric.iter().map(|f| f.name().to_string()));
    if cat.has(Field::Lightcurve) {
        header.push("lightcurve".into());
    }
    header.extend(extras.iter().cloned());
    header.extend(VETTING_COLUMNS.iter().map(|s| s.to_string()));
    w.write_record(&header)?;
    let mut b = ryu::Buffer::new();
    for &c in rows {
        w.write_field(cat.star_id(cat.star_of(c)).as_bytes())?;
        w.write_field(cat.candidate_id(c).as_bytes())?;
        for f in &numeric {
            w.write_field(exact_in(&mut b, cat.value(*f, c)))?;
        }
        if cat.has(Field::Lightcurve) {
            w.write_field(cat.lightcurve(c).unwrap_or("").as_bytes())?;
        }
        for i in 0..extras.len() {
            w.write_field(cat.extra(i, c).as_bytes())?;
        }
        let e = v.latest.get(cat.candidate_id(c));
        w.write_field(live.k(c).to_string())?;
        w.write_field(exact_in(&mut b, live.boost(c)))?;
        w.write_field(exact_in(&mut b, live.odds(c)))?;
        w.write_field(exact_in(&mut b, live.probability(c)))?;
        w.write_field(live.verdict(c).name())?;
        w.write_field(live.decision(c).name())?;
        w.write_field(live.decision(c).reason().map_or("", |r| r.name()))?;
        w.write_field(e.and_then(|e| e.note.as_deref()).unwrap_or("").as_bytes())?;
        w.write_field(e.map_or("", |e| &*e.vetter).as_bytes())?;
        w.write_field(e.map_or("", |e| e.decided_at.as_str()))?;
        w.write_field(v.checks.flags(c).joined(";"))?;
        w.write_field(v.checks.warnings(c).joined(";"))?;
        w.write_field(if live.counted(c) { "yes" } else { "no" })?;
        w.write_field(crate::odds::hold_text(cat, live, c))?;
        w.write_field(exact_in(&mut b, live.holds_to(c)))?;
        w.write_record(None::<&[u8]>)?;
    }
    w.flush()?;
    Ok(())
}

fn to_json(v: &Session, live: &Live, selected: &[CandidateId], filter: Option<&Filter>) -> Value {
    let cat = &v.loaded.catalogue;
    let numeric = input_numeric(v);
    let f = |x: Option<f64>| x.map_or(Value::Null, |y| json!(y));
    let rows: Vec<Value> = selected
        .iter()
        .map(|&c| {
            let mut o = Map::new();
            o.insert("star".into(), json!(cat.star_id(cat.star_of(c))));
            o.insert("candidate".into(), json!(cat.candidate_id(c)));
            for fl in &numeric {
                o.insert(fl.name().into(), f(cat.value(*fl, c)));
            }
            for (i, h) in cat.extra_headers().enumerate() {
                o.insert(h.to_string(), json!(cat.extra(i, c)));
            }
            let e = v.latest.get(cat.candidate_id(c));
            o.insert("k".into(), json!(live.k(c)));
            o.insert("boost".into(), f(live.boost(c)));
            o.insert("odds".into(), f(live.odds(c)));
            o.insert("probability".into(), f(live.probability(c)));
            o.insert("verdict".into(), json!(live.verdict(c).name()));
            o.insert("decision".into(), json!(live.decision(c).name()));
            o.insert(
                "reason".into(),
                json!(live.decision(c).reason().map(|r| r.name())),
            );
            o.insert("note".into(), json!(e.and_then(|e| e.note.as_deref())));
            o.insert("vetter".into(), json!(e.map(|e| &*e.vetter)));
            o.insert("decided_at".into(), json!(e.map(|e| e.decided_at.clone())));
            o.insert(
                "flags".into(),
                json!(
                    v.checks
                        .flags(c)
                        .iter()
                        .map(|x| x.name())
                        .collect::<Vec<_>>()
                ),
            );
            o.insert(
                "warnings".into(),
                json!(
                    v.checks
                        .warnings(c)
                        .iter()
                        .map(|x| x.name())
                        .collect::<Vec<_>>()
                ),
            );
            o.insert("counted".into(), json!(live.counted(c)));
            o.insert(
                "held_back".into(),
                json!(crate::odds::hold_text(cat, live, c)),
            );
            o.insert("holds_to_f".into(), f(live.holds_to(c)));
            Value::Object(o)
        })
        .collect();
    let m = live.model();
    json!({
        "catalogue": cat.source,
        "ledger": v.ledger_path.as_deref().map(clean),
        "held_back": live.held_line(),
        "model": {
            "targets_searched": m.targets, "fp_fraction_singles": m.fp_fraction,
            "fp_fraction": m.describe_fp(),
            "boost_mode": m.mode.describe(), "threshold": m.threshold, "statement": model_statement(m),
        },
        "filter": filter.map(|f| f.text.as_str()),
        "candidates": rows,
    })
}
