//! `starsift decide CATALOGUE --candidate ID --decision D`: records one
//! decision in the ledger; exits 0 only once it is committed to disk.

use std::io::Write;
use std::path::PathBuf;

use crate::cli::{CatalogueArgs, CliError, LedgerArgs};
use crate::decision::{ALL_REASONS, Decision, Reason};
use crate::ledger::{Ledger, NewDecision};
use crate::sanitize::clean;

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub input: CatalogueArgs,
    #[command(flatten)]
    pub ledger: LedgerArgs,
    /// The candidate decided on.
    #[arg(long, value_name = "ID")]
    pub candidate: String,
    /// The decision.
    #[arg(long, value_parser = ["kept", "rejected", "parked", "open"])]
    pub decision: String,
    /// Why it was rejected (required with `rejected`): eclipsing-binary, blend,
    /// artefact, duplicate, alias, too-large, unstable, other.
    #[arg(long, value_name = "REASON")]
    pub reason: Option<String>,
    /// A note for the team.
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    #[command(flatten)]
    pub model: crate::cli::ModelArgs,
    #[command(flatten)]
    pub checks: crate::cmd::checks::CheckArgs,
    #[command(flatten)]
    pub lc: crate::cli::LightcurveArgs,
}

/// Parses a decision and its reason as a person typed them.
pub fn parse_decision(decision: &str, reason: Option<&str>) -> Result<Decision, CliError> {
    let known = || ALL_REASONS.map(Reason::name).join(", ");
    match (decision, reason) {
        ("rejected", None) => Err(CliError::Input(format!(
            "a rejection needs a reason: --reason {}",
            known()
        ))),
        ("rejected", Some(r)) => Reason::parse(r).map(Decision::Rejected).ok_or_else(|| {
            CliError::Input(format!(
                "--reason {}: unknown; known: {}",
                clean(r),
                known()
            ))
        }),
        (d, Some(_)) => Err(CliError::Input(format!(
            "--reason goes with `rejected` only, not `{}`",
            clean(d)
        ))),
        ("kept", None) => Ok(Decision::Kept),
        ("parked", None) => Ok(Decision::Parked),
        ("open", None) => Ok(Decision::Open),
        (d, None) => Err(CliError::Input(format!(
            "--decision {}: use kept, rejected, parked or open",
            clean(d)
        ))),
    }
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    let decision = parse_decision(&args.decision, args.reason.as_deref())?;
    let vetting = crate::cli::VettingArgs {
        input: args.input.clone(),
        ledger: args.ledger.clone(),
        model: args.model.clone(),
        checks: args.checks.clone(),
        lc: args.lc.clone(),
    };
    let loaded = args.input.load()?;
    let cat = &loaded.catalogue;
    let c = loaded.candidate(&args.candidate)?;
    let vetter = args.ledger.vetter();
    let mut ledger = args.ledger.open(&args.input, &loaded)?;
    let id = ledger.record(&NewDecision {
        candidate: cat.candidate_id(c),
        star: cat.star_id(cat.star_of(c)),
        vetter: &vetter,
        decision,
        note: args.note.as_deref(),
        undoes: None,
    })?;
    writeln!(
        out,
        "recorded #{id}: {} {decision} by {} in {}",
        clean(cat.candidate_id(c)),
        clean(&vetter),
        clean(&ledger.path().display().to_string())
    )?;
    drop(ledger);
    // What the decision did, from the same session every command opens:
    // the verdict of each member of the star.
    let star = cat.star_of(c);
    let members: Vec<String> = cat
        .members(star)
        .iter()
        .map(|&m| cat.candidate_id(m).to_string())
        .collect();
    let session =
        crate::session::Session::with_loaded(&vetting, loaded, crate::session::LedgerUse::Read)?;
    match &session.live {
        Ok(live) => {
            let cat = &session.loaded.catalogue;
            for id in &members {
                let Some(m) = cat.find_candidate(id) else {
                    continue;
                };
                let held = crate::odds::hold_text(cat, live, m);
                writeln!(
                    out,
                    "  {} {} {} (k={}){}",
                    clean(id),
                    live.verdict(m),
                    live.odds(m).map_or("-".into(), crate::odds::format_odds),
                    live.k(m),
                    if held.is_empty() {
                        String::new()
                    } else {
                        format!(": {held}")
                    }
                )?;
            }
        }
        Err(e) => writeln!(out, "  no verdicts: {e}")?,
    }
    Ok(())
}

/// Arguments of the hidden ledger stress writer.
#[derive(Debug, Clone, clap::Args)]
pub struct StressArgs {
    #[arg(long)]
    pub ledger: PathBuf,
    #[arg(long)]
    pub vetter: String,
    #[arg(long, default_value_t = 1000)]
    pub count: usize,
}

/// Writes `count` decisions one by one, printing `ack ID` after each commit.
pub fn stress(args: &StressArgs, out: &mut dyn Write) -> Result<(), CliError> {
    let mut ledger = Ledger::open(&args.ledger)?;
    for i in 0..args.count {
        let candidate = format!("STRESS-{}", i % 97);
        let decision = if i % 3 == 0 {
            Decision::Rejected(Reason::Artefact)
        } else {
            Decision::Kept
        };
        let id = ledger.record(&NewDecision {
            candidate: &candidate,
            star: "STRESS",
            vetter: &args.vetter,
            decision,
            note: None,
            undoes: None,
        })?;
        writeln!(out, "ack {id}")?;
        out.flush()?;
    }
    Ok(())
}
