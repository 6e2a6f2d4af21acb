//! `starsift decide CATALOGUE --candidate ID --decision D`: records one
//! decision in the ledger; exits 0 only once it is committed to disk.

use std::io::Write;
use std::path::PathBuf;

use crate::cli::args::{CatalogueArgs, LedgerArgs};
use crate::cli::error::CliError;
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
    #[arg(long, value_name = "ID", required_unless_present = "from")]
    pub candidate: Option<String>,
    /// The decision.
    #[arg(
        long,
        value_parser = ["kept", "rejected", "parked", "open"],
        required_unless_present = "from"
    )]
    pub decision: Option<String>,
    /// Why it was rejected (required with `rejected`): eclipsing-binary, blend,
    /// artefact, duplicate, alias, too-large, unstable, other.
    #[arg(long, value_name = "REASON")]
    pub reason: Option<String>,
    /// A note for the team.
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// Many decisions from a CSV file with a header naming `candidate`,
    /// `decision` and optionally `reason` and `note` (`-` reads standard
    /// input). Every row is checked against the catalogue first; one bad
    /// row refuses the whole file, with its line; then all are written in
    /// one transaction.
    #[arg(long, value_name = "FILE", conflicts_with_all = ["candidate", "decision", "reason", "note", "verdicts"])]
    pub from: Option<PathBuf>,
    /// After the decision, print the verdict of every candidate of its star
    /// (this runs the checks and the odds over the whole catalogue; without
    /// it only the ids are read).
    #[arg(long)]
    pub verdicts: bool,
    #[command(flatten)]
    pub model: crate::cli::args::ModelArgs,
    #[command(flatten)]
    pub checks: crate::cli::args::CheckArgs,
    #[command(flatten)]
    pub lc: crate::cli::args::LightcurveArgs,
}

/// What is wrong with a decision and its reason as a person typed them,
/// and which of the two is at fault.
#[derive(Debug)]
pub enum BadDecision {
    /// `rejected` with no reason.
    NeedsReason,
    /// A reason that is not one of ours.
    UnknownReason(String),
    /// A reason with a decision other than `rejected`: (reason, decision).
    ReasonWithout(String, String),
    /// A decision that is not one of ours.
    UnknownDecision(String),
}

impl BadDecision {
    /// The field at fault: `decision` or `reason`.
    pub fn field(&self) -> &'static str {
        match self {
            BadDecision::UnknownDecision(_) => "decision",
            _ => "reason",
        }
    }

    /// What is wrong, without the field's name.
    pub fn what(&self) -> String {
        let known = || ALL_REASONS.map(Reason::name).join(", ");
        match self {
            BadDecision::NeedsReason => format!("a rejection needs a reason: {}", known()),
            BadDecision::UnknownReason(r) => {
                format!("`{}` is not a reason; known: {}", clean(r), known())
            }
            BadDecision::ReasonWithout(r, d) => format!(
                "`{}` goes with the decision `rejected` only, not `{}`",
                clean(r),
                clean(d)
            ),
            BadDecision::UnknownDecision(d) => format!(
                "`{}` is not a decision: use kept, rejected, parked or open",
                clean(d)
            ),
        }
    }
}

impl From<BadDecision> for CliError {
    /// As said of the command line's flags.
    fn from(e: BadDecision) -> CliError {
        CliError::Input(format!("--{}: {}", e.field(), e.what()))
    }
}

/// Parses a decision and its reason as a person typed them.
pub fn parse_decision(decision: &str, reason: Option<&str>) -> Result<Decision, BadDecision> {
    match (decision, reason) {
        ("rejected", None) => Err(BadDecision::NeedsReason),
        ("rejected", Some(r)) => Reason::parse(r)
            .map(Decision::Rejected)
            .ok_or_else(|| BadDecision::UnknownReason(r.to_string())),
        ("kept" | "parked" | "open", Some(r)) => Err(BadDecision::ReasonWithout(
            r.to_string(),
            decision.to_string(),
        )),
        ("kept", None) => Ok(Decision::Kept),
        ("parked", None) => Ok(Decision::Parked),
        ("open", None) => Ok(Decision::Open),
        (d, _) => Err(BadDecision::UnknownDecision(d.to_string())),
    }
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    if let Some(file) = &args.from {
        return run_batch(args, file, out);
    }
    let (Some(candidate), Some(decision)) = (&args.candidate, &args.decision) else {
        return Err(CliError::Input(
            "give --candidate ID and --decision D, or --from FILE".into(),
        ));
    };
    let decision = parse_decision(decision, args.reason.as_deref())?;
    let vetting = crate::cli::args::VettingArgs {
        input: args.input.clone(),
        ledger: args.ledger.clone(),
        model: args.model.clone(),
        checks: args.checks.clone(),
        lc: args.lc.clone(),
    };
    // Only the ids are needed, unless the verdicts are to be printed.
    let loaded = args.input.load_for_ledger(!args.verdicts, &args.ledger)?;
    let cat = &loaded.catalogue;
    let c = loaded.candidate(candidate)?;
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
    let star = cat.star_of(c);
    let members: Vec<String> = cat
        .members(star)
        .iter()
        .map(|&m| cat.candidate_id(m).to_string())
        .collect();
    if !args.verdicts {
        writeln!(
            out,
            "  star {}: {} (--verdicts prints their verdicts after this decision)",
            clean(cat.star_id(star)),
            members
                .iter()
                .map(|m| clean(m))
                .collect::<Vec<_>>()
                .join(", ")
        )?;
        return Ok(());
    }
    // What the decision did, from the same session every command opens:
    // the verdict of each member of the star.
    let session =
        crate::session::Session::with_loaded(&vetting, loaded, crate::session::LedgerUse::Read)?;
    match &session.live {
        Ok(live) => {
            let cat = &session.loaded.catalogue;
            let line = |out: &mut dyn Write, m: crate::catalogue::CandidateId| {
                let held = crate::odds::hold_text(cat, live, m);
                writeln!(
                    out,
                    "  {} {} {} (k={}){}",
                    clean(cat.candidate_id(m)),
                    live.verdict(m),
                    live.odds(m).map_or("-".into(), crate::odds::format_odds),
                    live.k(m),
                    if held.is_empty() {
                        String::new()
                    } else {
                        format!(": {held}")
                    }
                )
            };
            for id in &members {
                if let Some(m) = cat.find_candidate(id) {
                    line(out, m)?;
                }
            }
            // The star's other ids, whose candidates a rejection as a false
            // positive holds too (docs/science.md §3.4).
            for link in live.links_of(star) {
                writeln!(
                    out,
                    "  the same star as star {} ({}):",
                    clean(cat.star_id(link.other)),
                    link.tie.describe()
                )?;
                for &m in cat.members(link.other) {
                    line(out, m)?;
                }
            }
        }
        Err(e) => writeln!(out, "  no verdicts: {e}")?,
    }
    Ok(())
}

/// One row of a `--from` file, checked.
struct BatchRow {
    candidate: crate::catalogue::CandidateId,
    decision: Decision,
    note: Option<String>,
}

/// The most bad rows listed before the rest are counted.
const ERRORS_SHOWN: usize = 20;

/// Reads and checks every row of a `--from` file: the whole file or the
/// list of its bad rows (file, line, column, why).
/// The bytes of a `--from` file (`-` is standard input), with its header
/// checked: read before the catalogue, so a wrong file costs no load.
fn batch_file(file: &std::path::Path) -> Result<Vec<u8>, CliError> {
    let name = clean(&file.display().to_string()).into_owned();
    let bytes = if file.as_os_str() == "-" {
        let mut b = Vec::new();
        std::io::Read::read_to_end(&mut std::io::stdin(), &mut b)?;
        b
    } else {
        std::fs::read(file).map_err(|e| CliError::Input(format!("{name}: cannot read: {e}")))?
    };
    batch_reader(&name, &bytes)?;
    Ok(bytes)
}

/// A reader over a `--from` file and its header (lower case), or the error
/// naming what the header lacks.
fn batch_reader<'a>(
    name: &str,
    bytes: &'a [u8],
) -> Result<(csv::Reader<&'a [u8]>, Vec<String>), CliError> {
    let mut r = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .flexible(true)
        .from_reader(bytes);
    let header: Vec<String> = r
        .headers()
        .map_err(|e| CliError::Input(format!("{name}: line 1: {e}")))?
        .iter()
        .map(|h| h.trim().to_ascii_lowercase())
        .collect();
    if !header.iter().any(|h| h == "candidate") || !header.iter().any(|h| h == "decision") {
        return Err(CliError::Input(format!(
            "{name}: line 1: the header needs `candidate` and `decision` columns \
             (and may have `reason` and `note`); it is: {}",
            clean(&header.join(","))
        )));
    }
    Ok((r, header))
}

fn read_batch(
    file: &std::path::Path,
    bytes: &[u8],
    loaded: &crate::cli::args::Loaded,
) -> Result<Vec<BatchRow>, CliError> {
    let name = clean(&file.display().to_string()).into_owned();
    let (mut r, header) = batch_reader(&name, bytes)?;
    let col = |n: &str| header.iter().position(|h| h == n);
    let (Some(ci), Some(di)) = (col("candidate"), col("decision")) else {
        unreachable!("batch_reader checked the header");
    };
    let (ri, ni) = (col("reason"), col("note"));
    let cat = &loaded.catalogue;
    let mut rows = Vec::new();
    let mut errors: Vec<String> = Vec::new();
    let mut seen: std::collections::HashMap<crate::catalogue::CandidateId, u64> =
        Default::default();
    for rec in r.records() {
        let rec = match rec {
            Ok(rec) => rec,
            Err(e) => {
                let line = e.position().map_or(0, |p| p.line());
                errors.push(format!("{name}: line {line}: {e}"));
                continue;
            }
        };
        let line = rec.position().map_or(0, |p| p.line());
        let cell = |i: Option<usize>| i.and_then(|i| rec.get(i)).map(str::trim).unwrap_or("");
        let id = cell(Some(ci));
        let Some(c) = cat.find_candidate(id) else {
            errors.push(format!(
                "{name}: line {line}: column `candidate`: `{}` is not in {}",
                clean(id),
                clean(&cat.source)
            ));
            continue;
        };
        if let Some(first) = seen.insert(c, line) {
            errors.push(format!(
                "{name}: line {line}: column `candidate`: `{}` is decided twice (also line {first})",
                clean(id)
            ));
            continue;
        }
        let reason = Some(cell(ri)).filter(|r| !r.is_empty());
        match parse_decision(cell(Some(di)), reason) {
            Ok(decision) => rows.push(BatchRow {
                candidate: c,
                decision,
                note: Some(cell(ni).to_string()).filter(|n| !n.is_empty()),
            }),
            Err(e) => errors.push(format!(
                "{name}: line {line}: column `{}`: {}",
                e.field(),
                e.what()
            )),
        }
    }
    if !errors.is_empty() {
        let more = errors.len().saturating_sub(ERRORS_SHOWN);
        let mut text = errors
            .into_iter()
            .take(ERRORS_SHOWN)
            .collect::<Vec<_>>()
            .join("\n");
        if more > 0 {
            text.push_str(&format!("\n... and {more} more bad rows"));
        }
        text.push_str("\nnothing was recorded: mend the file and run it again");
        return Err(CliError::Input(text));
    }
    if rows.is_empty() {
        return Err(CliError::Input(format!("{name}: no decisions in the file")));
    }
    Ok(rows)
}

/// `decide --from FILE`: every row checked, then all in one transaction.
fn run_batch(args: &Args, file: &std::path::Path, out: &mut dyn Write) -> Result<(), CliError> {
    let bytes = batch_file(file)?;
    let loaded = args.input.load_for_ledger(true, &args.ledger)?;
    let rows = read_batch(file, &bytes, &loaded)?;
    let cat = &loaded.catalogue;
    let vetter = args.ledger.vetter();
    let mut ledger = args.ledger.open(&args.input, &loaded)?;
    let new: Vec<NewDecision> = rows
        .iter()
        .map(|r| NewDecision {
            candidate: cat.candidate_id(r.candidate),
            star: cat.star_id(cat.star_of(r.candidate)),
            vetter: &vetter,
            decision: r.decision,
            note: r.note.as_deref(),
            undoes: None,
        })
        .collect();
    let ids = ledger.record_all(&new)?;
    writeln!(
        out,
        "recorded {} decisions (#{}-#{}) by {} in {}",
        ids.len(),
        ids.first().copied().unwrap_or(0),
        ids.last().copied().unwrap_or(0),
        clean(&vetter),
        clean(&ledger.path().display().to_string())
    )?;
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
