//! `starsift history CATALOGUE [--candidate ID]`: the ledger's entries,
//! oldest first — who decided what, when and why.

use std::io::Write;

use serde_json::json;

use crate::cli::args::{CatalogueArgs, LedgerArgs};
use crate::cli::error::CliError;
use crate::ledger::Entry;
use crate::output::{Align, Format, JsonRows, Measured, csv_writer};
use crate::sanitize::clean;

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub input: CatalogueArgs,
    #[command(flatten)]
    pub ledger: LedgerArgs,
    /// Only this candidate's history.
    #[arg(long, value_name = "ID")]
    pub candidate: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
}

/// The entries are read from the ledger as they are written, none held
/// (a table reads them twice: once for its widths).
pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let loaded = args.input.load_for_ledger(true, &args.ledger)?;
    let ledger = args.ledger.open(&args.input, &loaded)?;
    let (candidate, vetter) = (args.candidate.as_deref(), args.ledger.vetter.as_deref());
    let each = |f: &mut dyn FnMut(&Entry) -> std::io::Result<()>| -> Result<(), CliError> {
        ledger.history_each(candidate, vetter, f)??;
        Ok(())
    };
    let reason = |e: &Entry| e.decision.reason().map_or("", |r| r.name());
    let path = clean(&ledger.path().display().to_string()).into_owned();
    match args.format {
        Format::Json => {
            let mut w = JsonRows::new(out, vec![("ledger", json!(path))], "entries")?;
            each(&mut |e| {
                w.row(&json!({
                    "id": e.id, "candidate": clean(&e.candidate), "star": clean(&e.star),
                    "vetter": clean(&e.vetter), "decision": e.decision.name(), "reason": e.decision.reason().map(|r| r.name()),
                    "note": e.note.as_deref().map(|n| clean(n).into_owned()), "decided_at": e.decided_at,
                    "tool_version": e.tool_version.as_deref(), "undoes": e.undoes,
                }))
            })?;
            w.finish()?;
        }
        Format::Csv => {
            let mut w = csv_writer(out);
            w.write_record([
                "id",
                "candidate",
                "star",
                "vetter",
                "decision",
                "reason",
                "note",
                "decided_at",
                "undoes",
            ])?;
            each(&mut |e| {
                w.write_record([
                    &e.id.to_string(),
                    &*clean(&e.candidate),
                    &clean(&e.star),
                    &clean(&e.vetter),
                    e.decision.name(),
                    reason(e),
                    &e.note
                        .as_deref()
                        .map_or(String::new(), |n| clean(n).into_owned()),
                    &e.decided_at,
                    &e.undoes.map_or(String::new(), |u| u.to_string()),
                ])
                .map_err(std::io::Error::other)
            })?;
            w.flush()?;
        }
        Format::Table => {
            writeln!(out, "ledger  {path}")?;
            let mut t = Measured::new(&[
                ("#", Align::Right),
                ("when (UTC)", Align::Left),
                ("vetter", Align::Left),
                ("candidate", Align::Left),
                ("decision", Align::Left),
                ("reason", Align::Left),
                ("note", Align::Left),
            ]);
            // Each row's cells, into strings kept from row to row.
            let fill = |e: &Entry, c: &mut [String; 7]| {
                use std::fmt::Write as _;
                c.iter_mut().for_each(String::clear);
                let _ = write!(c[0], "{}", e.id);
                c[1].push_str(&e.decided_at);
                c[2].push_str(&e.vetter);
                c[3].push_str(&e.candidate);
                c[4].push_str(e.decision.name());
                if let Some(u) = e.undoes {
                    let _ = write!(c[4], " (undoes #{u})");
                }
                c[5].push_str(reason(e));
                c[6].push_str(e.note.as_deref().unwrap_or_default());
            };
            let mut cells: [String; 7] = Default::default();
            // The rows measured, and only they, are written: a decision
            // recorded between the two passes is left to the next look.
            let mut last = None;
            each(&mut |e| {
                fill(e, &mut cells);
                t.measure(&cells);
                last = Some(e.id);
                Ok(())
            })?;
            let Some(last) = last else {
                writeln!(out, "no decisions yet")?;
                return Ok(());
            };
            t.header(out)?;
            each(&mut |e| match e.id <= last {
                true => {
                    fill(e, &mut cells);
                    t.row(&cells, out)
                }
                false => Ok(()),
            })?;
            t.finish(out)?;
        }
    }
    Ok(())
}
