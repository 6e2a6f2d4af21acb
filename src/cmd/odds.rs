//! `starsift odds CATALOGUE`: the multiplicity odds and verdict of every
//! candidate, the model table per multiplicity, and counts per verdict.

use std::io::Write;

use serde_json::{Value, json};

use crate::catalogue::{CandidateId, Catalogue};
use crate::cli::args::VettingArgs;
use crate::cli::error::CliError;
use crate::odds::{
    ALL_VERDICTS, Live, Table, format_odds, format_pool, hold_text, model_statement, push_odds,
};
use crate::output::{
    Align, Format, Table as TextTable, num, push_fixed, push_num, write_csv_rows, write_json_rows,
    write_table_rows,
};
use crate::sanitize::clean;
use crate::session::{LedgerUse, Session};

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: VettingArgs,
    /// Output format: a table for people, CSV or JSON for scripts.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
    /// List only the candidates this filter matches (the browser's syntax,
    /// e.g. "k>=2 verdict:validated"); the odds, the table per k and the
    /// counts are still those of the whole catalogue.
    #[arg(long = "where", value_name = "FILTER")]
    pub filter: Option<String>,
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let filter = crate::cli::args::parse_where(args.filter.as_deref())?;
    let session = Session::open_for_verdicts(&args.vetting, LedgerUse::Read)?;
    let cat = &session.loaded.catalogue;
    let live = session.live()?;
    let rows = session.selected(live, filter.as_ref());
    let shown = Shown {
        rows: &rows,
        filter: filter.as_ref().map(|f| f.text.as_str()),
    };
    if args.format != Format::Json {
        session.warn();
    }
    match args.format {
        Format::Csv => write_csv(cat, live, &shown, out),
        Format::Json => write_json_out(cat, live, &session, &shown, out).map_err(CliError::from),
        Format::Table => write_table(cat, live, &shown, out),
    }
}

/// The candidates listed, and the filter that chose them.
struct Shown<'a> {
    rows: &'a [CandidateId],
    filter: Option<&'a str>,
}

fn write_csv(
    cat: &Catalogue,
    live: &Live,
    shown: &Shown,
    out: &mut dyn Write,
) -> Result<(), CliError> {
    let header = [
        "star",
        "candidate",
        "k",
        "prior",
        "boost",
        "odds",
        "probability",
        "verdict",
        "decision",
        "flags",
        "counted",
        "held_back",
        "holds_to_f",
    ];
    let ahead = |&c: &CandidateId, bytes: bool| live.prefetch_star(cat, c, bytes);
    write_csv_rows(out, header, shown.rows, ahead, |w, &c| {
        w.text(clean(cat.star_id(cat.star_of(c))).as_bytes());
        w.text(clean(cat.candidate_id(c)).as_bytes());
        w.int(live.k(c));
        w.exact(Some(live.prior(c)));
        w.exact(live.boost(c));
        w.exact(live.odds(c));
        w.exact(live.probability(c));
        w.text(live.verdict(c).name());
        w.text(live.decision(c).name());
        w.list(live.flags(c).iter().map(|f| f.name()), ";");
        w.text(if live.counted(c) { "yes" } else { "no" });
        w.text(hold_text(cat, live, c));
        w.exact(live.holds_to(c));
    })?;
    Ok(())
}

fn table_json(t: &Table) -> Vec<Value> {
    let f = |v: f64| if v.is_finite() { json!(v) } else { Value::Null };
    t.rows
        .iter()
        .map(|r| {
            json!({
                "k": r.k, "stars": r.stars, "e_k": f(r.e), "f_k": f(r.f), "q_k": f(r.q), "s_k": f(r.s),
                "boost_candidate": f(r.boost_cand), "boost_system": f(r.boost_sys),
                "boost_odds": f(r.boost_odds), "pooled_k": [r.pool.0, r.pool.1],
                "q_used": f(r.q_used), "boost": f(r.boost),
            })
        })
        .collect()
}

fn model_json(live: &Live) -> Value {
    let m = live.model();
    json!({
        "targets_searched": m.targets,
        "fp_fraction_singles": live.table().fp_fraction,
        "fp_fraction": m.describe_fp(),
        "lambda": if live.table().lambda.is_finite() { json!(live.table().lambda) } else { Value::Null },
        "boost_mode": m.mode.describe(),
        "threshold": m.threshold,
        "blocking_flags": m.blocking.iter().map(|f| f.name()).collect::<Vec<_>>(),
        "statement": model_statement(m),
    })
}

/// One candidate of the JSON output.
#[derive(serde::Serialize)]
struct JsonRow<'a> {
    star: std::borrow::Cow<'a, str>,
    candidate: std::borrow::Cow<'a, str>,
    k: usize,
    prior: f64,
    boost: Option<f64>,
    odds: Option<f64>,
    probability: Option<f64>,
    verdict: &'static str,
    decision: &'static str,
    flags: Vec<&'static str>,
    counted: bool,
    held_back: String,
    holds_to_f: Option<f64>,
}

/// The JSON output, its candidates streamed.
fn write_json_out(
    cat: &Catalogue,
    live: &Live,
    session: &Session,
    shown: &Shown,
    out: &mut dyn Write,
) -> std::io::Result<()> {
    let counts: serde_json::Map<String, Value> = ALL_VERDICTS
        .iter()
        .map(|v| (v.name().to_string(), json!(live.counts().get(*v))))
        .collect();
    let warnings: Vec<&String> = live
        .input_warnings
        .iter()
        .chain(&live.table().warnings)
        .collect();
    let head = vec![
        ("catalogue", json!(clean(&cat.source))),
        ("model", model_json(live)),
        ("table", Value::Array(table_json(live.table()))),
        ("counts", Value::Object(counts)),
        ("warnings", json!(warnings)),
        (
            "held_back",
            live.held_summary()
                .into_iter()
                .map(|(what, n)| json!({"cause": what, "candidates": n}))
                .collect(),
        ),
        ("ledger", json!(session.ledger_path.as_deref().map(clean))),
        ("lightcurve_stars", json!(session.lightcurve_stars)),
        ("lightcurve_notice", json!(session.lightcurve_notice)),
        ("filter", json!(shown.filter.map(|t| clean(t).into_owned()))),
    ];
    let row = |&c: &CandidateId| JsonRow {
        star: clean(cat.star_id(cat.star_of(c))),
        candidate: clean(cat.candidate_id(c)),
        k: live.k(c),
        prior: live.prior(c),
        boost: live.boost(c),
        odds: live.odds(c),
        probability: live.probability(c),
        verdict: live.verdict(c).name(),
        decision: live.decision(c).name(),
        flags: live.flags(c).iter().map(|f| f.name()).collect(),
        counted: live.counted(c),
        held_back: hold_text(cat, live, c),
        holds_to_f: live.holds_to(c),
    };
    let ahead = |&c: &CandidateId, bytes: bool| live.prefetch_star(cat, c, bytes);
    write_json_rows(out, head, "candidates", shown.rows, ahead, row)
}

fn write_table(
    cat: &Catalogue,
    live: &Live,
    shown: &Shown,
    out: &mut dyn Write,
) -> Result<(), CliError> {
    writeln!(out, "catalogue  {}", clean(&cat.source))?;
    if let Some(f) = shown.filter {
        writeln!(
            out,
            "where      {} ({} of {} candidates)",
            clean(f),
            shown.rows.len(),
            cat.len()
        )?;
    }
    // Two passes over the rows, holding none: measure, then write.
    let columns = [
        ("star", Align::Left),
        ("candidate", Align::Left),
        ("k", Align::Right),
        ("prior", Align::Right),
        ("boost", Align::Right),
        ("odds", Align::Right),
        ("probability", Align::Right),
        ("verdict", Align::Left),
        ("holds to f", Align::Right),
        ("held back", Align::Left),
    ];
    let ahead = |&c: &CandidateId, bytes: bool| live.prefetch_star(cat, c, bytes);
    write_table_rows(out, &columns, shown.rows, ahead, |&c, cells| {
        let [
            star,
            cand,
            k,
            prior,
            boost,
            odds,
            prob,
            verdict,
            holds,
            held,
        ] = cells;
        star.push_str(cat.star_id(cat.star_of(c)));
        cand.push_str(cat.candidate_id(c));
        k.push_str(itoa::Buffer::new().format(live.k(c)));
        push_num(prior, Some(live.prior(c)), 3);
        push_num(boost, live.boost(c), 4);
        push_odds(odds, live.odds(c).unwrap_or(f64::NAN));
        match live.probability(c) {
            Some(p) => push_fixed(prob, p, 5),
            None => prob.push('-'),
        }
        verdict.push_str(live.verdict(c).name());
        match live.holds_to(c) {
            Some(f) => push_fixed(holds, f, 3),
            None => holds.push('-'),
        }
        held.push_str(&hold_text(cat, live, c));
    })?;
    write_model_footer(live, out)
}

/// N, f, the table per k, counts per verdict, and the model statement.
pub fn write_model_footer(live: &Live, out: &mut dyn Write) -> Result<(), CliError> {
    let m = live.model();
    let table = live.table();
    writeln!(out)?;
    writeln!(
        out,
        "model      N = {} targets searched, {} (false-positive fraction of singles; mean over the counted singles {}), λ = N_FP/N = {}",
        m.targets.map_or("not given".into(), |n| n.to_string()),
        m.describe_fp(),
        num(Some(table.fp_fraction), 4),
        num(Some(table.lambda), 4)
    )?;
    writeln!(out, "boost      {}", m.mode.describe())?;
    let mut t = TextTable::new(&[
        ("k", Align::Right),
        ("stars", Align::Right),
        ("q_k", Align::Right),
        ("s_k", Align::Right),
        ("B_cand", Align::Right),
        ("B_sys", Align::Right),
        ("B_odds", Align::Right),
        ("pooled", Align::Left),
        ("boost", Align::Right),
        ("odds at f", Align::Right),
        ("P", Align::Right),
    ]);
    for r in &table.rows {
        let o = crate::odds::posterior_odds(r.boost, table.fp_fraction);
        t.row(&[
            r.k.to_string(),
            r.stars.to_string(),
            num(Some(r.q), 4),
            num(Some(r.s), 4),
            num(Some(r.boost_cand), 4),
            num(Some(r.boost_sys), 4),
            num(Some(r.boost_odds), 4),
            format_pool(r.pool),
            num(Some(r.boost), 4),
            format_odds(o),
            format!("{:.5}", crate::odds::probability(o)),
        ]);
    }
    t.write(out, "  ")?;
    let c = live.counts();
    writeln!(
        out,
        "verdicts   {} validated, {} likely, {} unlikely, {} rejected",
        c.validated, c.likely, c.unlikely, c.rejected
    )?;
    if let Some(line) = live.held_line() {
        writeln!(out, "cleaning   {line}")?;
    }
    for w in live.input_warnings.iter().chain(&table.warnings) {
        writeln!(out, "warning    {}", clean(w))?;
    }
    writeln!(out, "{}", model_statement(m))?;
    Ok(())
}
