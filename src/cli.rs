//! The command line: raw arguments (clap), their resolution into settings
//! for the core, errors for users and exit codes.
//!
//! Exit codes: 0 success; 1 an unexpected internal error; 2 bad input or
//! usage (unreadable or invalid catalogue, survey or column-map file, bad
//! flag values, impossible model inputs); 3 a ledger that cannot be written.

use std::io::{self, Write};

use clap::{Parser, Subcommand};

use crate::cmd;

pub mod args;
pub mod error;
mod lightcurve_args;

pub use args::*;
pub use error::CliError;

#[derive(Debug, Parser)]
#[command(
    name = "starsift",
    version,
    about = "Triage transiting-exoplanet candidate catalogues, star by star, with live multiplicity odds.",
    long_about = "Triage transiting-exoplanet candidate catalogues, star by star, with live multiplicity odds.\n\n\
                  With no command, opens the built-in demo catalogue (an invented survey).\n\
                  Odds are reported under a stated model; statistical validation is not confirmation.",
    after_help = "Exit codes: 0 success, 1 internal error, 2 bad input or usage, 3 ledger not writable.",
    args_conflicts_with_subcommands = true
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Option<Command>,
    /// With no command: the browser's options (`starsift --ascii`,
    /// `starsift CATALOGUE --where ...`), as `starsift browse` takes them.
    #[command(flatten)]
    pub browse: crate::tui::Args,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Browse a catalogue in the terminal (the default, on the demo).
    Browse(crate::tui::Args),
    /// Stars, candidates, multiplicity histogram, column mapping, skipped rows.
    Summary(cmd::summary::Args),
    /// Multiplicity odds and verdict of every candidate.
    Odds(cmd::odds::Args),
    /// Derived physics and vetting flags of every candidate.
    Checks(cmd::checks::Args),
    /// A candidate's folded light curve, its diagnostics and the model transit.
    Fold(cmd::fold::Args),
    /// Record a decision in the ledger.
    Decide(cmd::decide::Args),
    /// The ledger's decisions, oldest first.
    History(cmd::history::Args),
    /// The vetted catalogue: every input column plus odds, verdicts and decisions.
    Export(cmd::export::Args),
    /// A Markdown (or self-contained HTML) report of the vetting.
    Report(cmd::report::Args),
    /// A candidate's one-page figure (SVG or PNG): light curve, folds,
    /// odd/even, secondary search, per-transit depths and the facts.
    Plot(cmd::plot::Args),
    /// Write a stream of decisions, acknowledging each commit (for crash tests).
    #[command(hide = true)]
    StressLedger(cmd::decide::StressArgs),
    /// Regenerate the demo catalogue or write a large synthetic one.
    #[command(hide = true)]
    Generate(cmd::generate::Args),
}

/// Runs the command line and returns the process exit code.
pub fn main() -> i32 {
    let cli = match Cli::try_parse() {
        Ok(c) => c,
        Err(e) => {
            // Usage errors quote what was typed: through the terminal guard.
            let text = e.render().to_string();
            let safe = crate::sanitize::for_terminal(&text);
            if e.use_stderr() {
                eprint!("{safe}");
                return 2;
            }
            print!("{safe}");
            return 0;
        }
    };
    let stdout = io::stdout();
    let mut out = io::BufWriter::new(stdout.lock());
    let result = run(cli, &mut out).and_then(|()| out.flush().map_err(CliError::from));
    match result {
        Ok(()) => 0,
        Err(CliError::Io(e)) if e.kind() == io::ErrorKind::BrokenPipe => 0,
        Err(e) => {
            let _ = out.flush();
            let text = e.to_string();
            eprintln!("starsift: error: {}", crate::sanitize::for_terminal(&text));
            e.exit_code()
        }
    }
}

pub fn run(cli: Cli, out: &mut dyn Write) -> Result<(), CliError> {
    match cli.command {
        None => crate::tui::run(&cli.browse),
        Some(Command::Browse(a)) => crate::tui::run(&a),
        Some(Command::Summary(a)) => cmd::summary::run(&a, out),
        Some(Command::Odds(a)) => cmd::odds::run(&a, out),
        Some(Command::Checks(a)) => cmd::checks::run(&a, out),
        Some(Command::Fold(a)) => cmd::fold::run(&a, out),
        Some(Command::Decide(a)) => cmd::decide::run(&a, out),
        Some(Command::History(a)) => cmd::history::run(&a, out),
        Some(Command::Export(a)) => cmd::export::run(&a, out),
        Some(Command::Report(a)) => cmd::report::run(&a, out),
        Some(Command::Plot(a)) => cmd::plot::run(&a, out),
        Some(Command::StressLedger(a)) => cmd::decide::stress(&a, out),
        Some(Command::Generate(a)) => cmd::generate::run(&a, out),
    }
}
