//! `starsift plot CATALOGUE --candidate ID -o FILE.svg|.png`: the one-page
//! figure of a candidate (several ids, or `--where`, write one file per
//! candidate into a folder). The facts on it are the session's: the same
//! verdict, odds and flags as every other command.

use std::io::Write;
use std::path::{Path, PathBuf};

use crate::catalogue::CandidateId;
use crate::cli::args::VettingArgs;
use crate::cli::error::CliError;
use crate::lightcurve::Cache;
use crate::sanitize::clean;
use crate::session::{LedgerUse, Session};

#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    #[command(flatten)]
    pub vetting: VettingArgs,
    /// The candidate to draw (repeat for several).
    #[arg(long, value_name = "ID")]
    pub candidate: Vec<String>,
    /// Draw every candidate this filter matches (the browser's syntax).
    #[arg(long = "where", value_name = "FILTER")]
    pub filter: Option<String>,
    /// The file (`.svg` or `.png`) for one candidate, or a folder for
    /// several (created if missing; one `<id>.<format>` each).
    #[arg(short = 'o', long = "output", value_name = "FILE|DIR")]
    pub output: PathBuf,
    /// The image format in a folder: svg or png.
    #[arg(long, value_parser = ["svg", "png"], default_value = "svg")]
    pub format: String,
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    // Flags first: nothing is read before they are known to make sense.
    let filter = crate::cli::args::parse_where(args.filter.as_deref())?;
    if args.candidate.is_empty() && filter.is_none() {
        return Err(CliError::Input(
            "say what to draw: --candidate ID (repeatable) or --where FILTER".into(),
        ));
    }
    let single = args.candidate.len() == 1 && filter.is_none();
    if single && crate::figure::format_of(&args.output).is_none() {
        return Err(CliError::Input(format!(
            "-o {}: the figure is written as .svg or .png; name the file so",
            clean(&args.output.display().to_string())
        )));
    }
    crate::cli::args::check_output_path(&args.output, &args.vetting)?;
    let v = Session::open_for_verdicts(&args.vetting, LedgerUse::Read)?;
    // Who decided each candidate drawn, and when: its own latest entry,
    // not every candidate's.
    let ledger = match &v.ledger_path {
        Some(p) => Some(crate::ledger::Ledger::open(Path::new(p))?),
        None => None,
    };
    let decided = |c: CandidateId| -> Result<Option<(String, String)>, CliError> {
        let Some(l) = &ledger else { return Ok(None) };
        let vetter = args.vetting.ledger.vetter.as_deref();
        let e = l.latest_of(v.loaded.catalogue.candidate_id(c), vetter)?;
        Ok(e.map(|e| (e.vetter.to_string(), e.decided_at)))
    };
    v.warn();
    let live = v.live()?;
    let cat = &v.loaded.catalogue;
    let mut chosen: Vec<CandidateId> = args
        .candidate
        .iter()
        .map(|id| v.loaded.candidate(id))
        .collect::<Result<_, _>>()?;
    if let Some(f) = &filter {
        chosen.extend(v.selected(live, Some(f)));
    }
    let finder = args.vetting.lc.finder(&v.loaded);
    let detrend = args.vetting.lc.detrend();
    let cache = Cache::default();
    if single {
        let path = &args.output;
        let c = chosen[0];
        write_figure(&v, &cache, &finder, &detrend, c, decided(c)?, path)?;
        writeln!(out, "wrote {}", clean(&path.display().to_string()))?;
        return Ok(());
    }
    std::fs::create_dir_all(&args.output)?;
    for &c in &chosen {
        let path = args.output.join(format!(
            "{}.{}",
            crate::figure::file_name(cat.candidate_id(c)),
            args.format
        ));
        write_figure(&v, &cache, &finder, &detrend, c, decided(c)?, &path)?;
        cache.forget(cat.star_of(c));
    }
    writeln!(
        out,
        "wrote {} figures into {}",
        chosen.len(),
        clean(&args.output.display().to_string())
    )?;
    Ok(())
}

/// Draws one candidate's figure into `path` (its extension says SVG or PNG),
/// with who decided it and when (`decided`), if anyone did.
pub fn write_figure(
    v: &Session,
    cache: &Cache,
    finder: &crate::lightcurve::Finder,
    detrend: &crate::lightcurve::analysis::DetrendSettings,
    c: CandidateId,
    decided: Option<(String, String)>,
    path: &Path,
) -> Result<(), CliError> {
    let cat = &v.loaded.catalogue;
    let shown = crate::lightcurve::show(cache, finder, cat, c, detrend, 80);
    let verdict = v.live.as_ref().map_or("no verdict".to_string(), |l| {
        l.verdict(c).name().to_string()
    });
    crate::figure::draw_to(
        cat,
        shown.as_ref().map_err(String::as_str),
        &facts(v, c, decided),
        &verdict,
        c,
        path,
    )
    .map_err(|e| {
        CliError::Input(format!(
            "{}: cannot draw {}: {e}",
            clean(&path.display().to_string()),
            clean(cat.candidate_id(c))
        ))
    })
}

/// The facts box of a candidate, from the session, with who decided it
/// and when.
pub fn facts(v: &Session, c: CandidateId, decided: Option<(String, String)>) -> Vec<String> {
    let cat = &v.loaded.catalogue;
    crate::figure::facts_of(
        &crate::figure::FactsOf {
            cat,
            settings: &v.settings,
            live: v.live.as_ref().ok(),
            checks: &v.checks,
            decided,
        },
        c,
    )
}
