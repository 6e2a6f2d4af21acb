//! `starsift report CATALOGUE`: a Markdown report of the vetting — the model
//! and its inputs, counts per verdict and decision, the validated list,
//! rejections by reason, decisions per vetter and disagreements.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::io::Write;
use std::path::PathBuf;

use crate::catalogue::CandidateId;
use crate::cli::args::VettingArgs;
use crate::cli::error::CliError;
use crate::odds::{
    ALL_VERDICTS, Verdict, format_odds, model_statement, posterior_odds, probability,
};
use crate::output::num;
use crate::output::write_atomically;
use crate::sanitize::clean;
use crate::session::{LedgerUse, Session};

mod html;

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: VettingArgs,
    /// Write to this file (atomically) instead of standard output.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: Option<PathBuf>,
    /// markdown, or html: one self-contained file (inline SVG figures and
    /// CSS, no scripts, no external reference) that opens offline.
    #[arg(long, value_parser = ["markdown", "html"], default_value = "markdown")]
    pub format: String,
}

/// Markdown-safe text: sanitised, with table pipes escaped.
fn md(s: &str) -> String {
    clean(s).replace('|', "\\|")
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    if let Some(path) = &args.output {
        crate::cli::args::check_output_path(path, &args.vetting)?;
    }
    let v = Session::open_for_verdicts(&args.vetting, LedgerUse::ReadTally)?;
    v.warn();
    let r = markdown(&v)?;
    let r = if args.format == "html" {
        html::page(&v, &args.vetting, &r)?
    } else {
        r
    };
    match &args.output {
        Some(path) => {
            write_atomically(path, r.as_bytes())?;
            eprintln!(
                "starsift: wrote the report to {}",
                clean(&path.display().to_string())
            );
        }
        None => out.write_all(r.as_bytes())?,
    }
    Ok(())
}

/// The report as Markdown: the one source of its content (the HTML report
/// is this text with figures added).
pub fn markdown(v: &Session) -> Result<String, CliError> {
    let cat = &v.loaded.catalogue;
    let live = v.live()?;
    let m = live.model();
    let mut r = String::new();
    let _ = writeln!(r, "# Vetting report: {}\n", md(&cat.source));
    if let Some(name) = &v.loaded.survey.name {
        let _ = writeln!(r, "Survey: {}.  ", md(name));
    }
    let _ = writeln!(
        r,
        "Ledger: `{}`; {} decisions recorded.\n",
        md(v.ledger_path.as_deref().unwrap_or("none yet")),
        v.tally.rows
    );
    let _ = writeln!(r, "> {}\n", model_statement(m));
    let _ = writeln!(r, "## Model\n");
    let _ = writeln!(
        r,
        "- N (targets searched): {}\n- f (false-positive fraction of single-candidate stars): {}\n- λ = N_FP/N: {}\n- boost: {}\n- validated at odds ≥ {}:1, counted only: not rejected, one per signal group, no blocking flag ({})\n",
        m.targets.map_or("not given".into(), |n| n.to_string()),
        md(&m.describe_fp()),
        num(Some(live.table().lambda), 4),
        m.mode.describe(),
        m.threshold,
        m.blocking.joined(", ")
    );
    let _ = writeln!(
        r,
        "| k | stars | q_k | B_cand | B_sys | B_odds | pooled | boost | odds at f | P |"
    );
    let _ = writeln!(r, "|---|---|---|---|---|---|---|---|---|---|");
    for row in &live.table().rows {
        let o = posterior_odds(row.boost, live.table().fp_fraction);
        let _ = writeln!(
            r,
            "| {} | {} | {} | {} | {} | {} | {} | {} | {} | {:.5} |",
            row.k,
            row.stars,
            num(Some(row.q), 4),
            num(Some(row.boost_cand), 4),
            num(Some(row.boost_sys), 4),
            num(Some(row.boost_odds), 4),
            crate::odds::format_pool(row.pool),
            num(Some(row.boost), 4),
            format_odds(o),
            probability(o)
        );
    }
    for w in live.input_warnings.iter().chain(&live.table().warnings) {
        let _ = writeln!(r, "\nWarning: {}", md(w));
    }
    let _ = writeln!(r, "\n## Counts\n");
    let counts = live.counts();
    let _ = writeln!(r, "| verdict | candidates |\n|---|---|");
    for vd in ALL_VERDICTS {
        let _ = writeln!(r, "| {} | {} |", vd.name(), counts.get(vd));
    }
    let mut by_decision: BTreeMap<&str, usize> = BTreeMap::new();
    for c in 0..cat.len() as CandidateId {
        *by_decision.entry(live.decision(c).name()).or_default() += 1;
    }
    let _ = writeln!(r, "\n| decision | candidates |\n|---|---|");
    for (d, n) in &by_decision {
        let _ = writeln!(r, "| {d} | {n} |");
    }
    let _ = writeln!(r, "\n## Validated\n");
    let validated: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| live.verdict(c) == Verdict::Validated)
        .collect();
    if validated.is_empty() {
        let _ = writeln!(r, "None.");
    } else {
        let _ = writeln!(
            r,
            "| star | candidate | k | odds | P | holds to f | decision |\n|---|---|---|---|---|---|---|"
        );
        for &c in &validated {
            let o = live.odds(c).unwrap_or(0.0);
            let _ = writeln!(
                r,
                "| {} | {} | {} | {} | {:.5} | {} | {} |",
                md(cat.star_id(cat.star_of(c))),
                md(cat.candidate_id(c)),
                live.k(c),
                format_odds(o),
                probability(o),
                live.holds_to(c).map_or("-".into(), |f| format!("{f:.3}")),
                live.decision(c).name()
            );
        }
    }
    let _ = writeln!(r, "\n## Held back by the cleaning\n");
    let held: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| live.hold(c).is_some())
        .collect();
    if held.is_empty() {
        let _ = writeln!(r, "None: every candidate not rejected counts.");
    } else {
        let _ = writeln!(
            r,
            "Not rejected, but not counted toward any system and never validated:\n"
        );
        for (what, n) in live.held_summary() {
            let _ = writeln!(r, "- {}: {n}", md(&what));
        }
        let _ = writeln!(r, "\n| star | candidate | why | flags |\n|---|---|---|---|");
        for &c in &held {
            let _ = writeln!(
                r,
                "| {} | {} | {} | {} |",
                md(cat.star_id(cat.star_of(c))),
                md(cat.candidate_id(c)),
                md(&crate::odds::hold_text(cat, live, c)),
                live.flags(c).joined(", ")
            );
        }
    }
    let _ = writeln!(r, "\n## Rejections by reason\n");
    let mut by_reason: BTreeMap<&str, Vec<String>> = BTreeMap::new();
    for c in 0..cat.len() as CandidateId {
        if let Some(reason) = live.decision(c).reason() {
            by_reason
                .entry(reason.name())
                .or_default()
                .push(md(cat.candidate_id(c)));
        }
    }
    if by_reason.is_empty() {
        let _ = writeln!(r, "None.");
    }
    for (reason, ids) in &by_reason {
        let _ = writeln!(r, "- {reason} ({}): {}", ids.len(), ids.join(", "));
    }
    let _ = writeln!(r, "\n## Decisions per vetter\n");
    // An undo row and the row it reverted are not decisions: the undos are
    // counted apart (`Ledger::tally`).
    let per = &v.tally.per_vetter;
    if per.is_empty() {
        let _ = writeln!(r, "No decisions yet.");
    } else {
        let _ = writeln!(
            r,
            "| vetter | open | kept | parked | rejected | undone |\n|---|---|---|---|---|---|"
        );
        for (who, d) in per {
            let g = |k: &str| d.get(k).copied().unwrap_or(0);
            let _ = writeln!(
                r,
                "| {} | {} | {} | {} | {} | {} |",
                md(who),
                g("open"),
                g("kept"),
                g("parked"),
                g("rejected"),
                g("undo")
            );
        }
    }
    let _ = writeln!(r, "\n## Disagreements\n");
    if v.disagreements.is_empty() {
        let _ = writeln!(r, "None: every vetter's latest decision agrees.");
    }
    for (cand, entries) in &v.disagreements {
        let each: Vec<String> = entries
            .iter()
            .map(|e| format!("{}: {}", md(&e.vetter), e.decision))
            .collect();
        let _ = writeln!(r, "- {}: {}", md(cand), each.join("; "));
    }
    let _ = writeln!(r, "\n## Provenance\n");
    let fingerprint = v
        .catalogue_fingerprint()
        .unwrap_or_else(|_| "unreadable".into());
    let _ = writeln!(
        r,
        "- tool: starsift {}\n- written: {}\n- catalogue: {} ({}, {} candidates, fingerprint {fingerprint})\n- ledger: {}\n- light curves read for {} stars ({}); {} could not be read",
        env!("CARGO_PKG_VERSION"),
        crate::ledger::now_rfc3339(),
        md(&cat.source),
        cat.format,
        cat.len(),
        md(v.ledger_path.as_deref().unwrap_or("none")),
        v.lightcurve_stars,
        v.lightcurve_totals.describe(),
        v.lightcurve_errors.len()
    );
    let _ = writeln!(
        r,
        "\n---\nStatistical validation is not confirmation: these odds hold under the stated model and its assumptions; the team's own publication standards decide."
    );
    Ok(r)
}
