//! `starsift history CATALOGUE [--candidate ID]`: the ledger's entries,
//! oldest first — who decided what, when and why.

use std::io::Write;

use serde_json::json;

use crate::cli::args::{CatalogueArgs, LedgerArgs};
use crate::cli::error::CliError;
use crate::output::{Align, Format, Table, csv_writer, write_json};
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

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let loaded = args.input.load_for_ledger(true, &args.ledger)?;
    let ledger = args.ledger.open(&args.input, &loaded)?;
    let mut rows = ledger.history(args.candidate.as_deref())?;
    if let Some(v) = &args.ledger.vetter {
        rows.retain(|e| *e.vetter == **v);
    }
    let reason = |e: &crate::ledger::Entry| e.decision.reason().map_or("", |r| r.name());
    match args.format {
        Format::Json => write_json(
            out,
            &json!({
                "ledger": clean(&ledger.path().display().to_string()),
                "entries": rows.iter().map(|e| json!({
                    "id": e.id, "candidate": clean(&e.candidate), "star": clean(&e.star),
                    "vetter": clean(&e.vetter), "decision": e.decision.name(), "reason": e.decision.reason().map(|r| r.name()),
                    "note": e.note.as_deref().map(|n| clean(n).into_owned()), "decided_at": e.decided_at,
                    "tool_version": e.tool_version.as_deref(), "undoes": e.undoes,
                })).collect::<Vec<_>>(),
            }),
        )?,
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
            for e in &rows {
                w.write_record([
                    e.id.to_string(),
                    clean(&e.candidate).into_owned(),
                    clean(&e.star).into_owned(),
                    clean(&e.vetter).into_owned(),
                    e.decision.name().to_string(),
                    reason(e).to_string(),
                    e.note
                        .as_deref()
                        .map_or(String::new(), |n| clean(n).into_owned()),
                    e.decided_at.clone(),
                    e.undoes.map_or(String::new(), |u| u.to_string()),
                ])?;
            }
            w.flush()?;
        }
        Format::Table => {
            writeln!(
                out,
                "ledger  {}",
                clean(&ledger.path().display().to_string())
            )?;
            if rows.is_empty() {
                writeln!(out, "no decisions yet")?;
                return Ok(());
            }
            let mut t = Table::new(&[
                ("#", Align::Right),
                ("when (UTC)", Align::Left),
                ("vetter", Align::Left),
                ("candidate", Align::Left),
                ("decision", Align::Left),
                ("reason", Align::Left),
                ("note", Align::Left),
            ]);
            for e in &rows {
                t.row(&[
                    e.id.to_string(),
                    e.decided_at.clone(),
                    e.vetter.to_string(),
                    e.candidate.clone(),
                    match e.undoes {
                        Some(u) => format!("{} (undoes #{u})", e.decision.name()),
                        None => e.decision.name().to_string(),
                    },
                    reason(e).to_string(),
                    e.note.clone().unwrap_or_default(),
                ]);
            }
            t.write(out, "")?;
        }
    }
    Ok(())
}
