//! `starsift plot CATALOGUE --candidate ID -o FILE.svg|.png`: the one-page
//! figure of a candidate (several ids, or `--where`, write one file per
//! candidate into a folder). The facts on it are the session's: the same
//! verdict, odds and flags as every other command.

use std::io::Write;
use std::path::{Path, PathBuf};

use crate::catalogue::{CandidateId, Field};
use crate::cli::{CliError, VettingArgs};
use crate::figure::Page;
use crate::lightcurve::Cache;
use crate::output::num;
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

/// The image format of a file name, if it is one we write.
fn format_of(path: &Path) -> Option<&'static str> {
    match path.extension()?.to_str()?.to_ascii_lowercase().as_str() {
        "svg" => Some("svg"),
        "png" => Some("png"),
        _ => None,
    }
}

/// An id as a file name: anything but letters, digits, `.`, `-` and `_`
/// becomes `_`.
pub fn file_name(id: &str) -> String {
    id.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || matches!(c, '.' | '-' | '_') {
                c
            } else {
                '_'
            }
        })
        .collect()
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    // Flags first: nothing is read before they are known to make sense.
    let filter = crate::cli::parse_where(args.filter.as_deref())?;
    if args.candidate.is_empty() && filter.is_none() {
        return Err(CliError::Input(
            "say what to draw: --candidate ID (repeatable) or --where FILTER".into(),
        ));
    }
    let single = args.candidate.len() == 1 && filter.is_none();
    if single && format_of(&args.output).is_none() {
        return Err(CliError::Input(format!(
            "-o {}: the figure is written as .svg or .png; name the file so",
            clean(&args.output.display().to_string())
        )));
    }
    crate::cli::check_output_path(&args.output, &args.vetting)?;
    let v = Session::open(&args.vetting, LedgerUse::Read)?;
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
        write_figure(&v, &cache, &finder, &detrend, chosen[0], path)?;
        writeln!(out, "wrote {}", clean(&path.display().to_string()))?;
        return Ok(());
    }
    std::fs::create_dir_all(&args.output)?;
    for &c in &chosen {
        let path = args.output.join(format!(
            "{}.{}",
            file_name(cat.candidate_id(c)),
            args.format
        ));
        write_figure(&v, &cache, &finder, &detrend, c, &path)?;
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

/// Draws one candidate's figure into `path` (its extension says SVG or PNG).
pub fn write_figure(
    v: &Session,
    cache: &Cache,
    finder: &crate::lightcurve::Finder,
    detrend: &crate::lightcurve::analysis::DetrendSettings,
    c: CandidateId,
    path: &Path,
) -> Result<(), CliError> {
    let cat = &v.loaded.catalogue;
    let shown = crate::lightcurve::show(cache, finder, cat, c, detrend, 80);
    let facts = facts(v, c);
    let verdict = v.live.as_ref().map_or("no verdict".to_string(), |l| {
        l.verdict(c).name().to_string()
    });
    let page = Page {
        title: format!(
            "{} on {} · {verdict}",
            clean(cat.candidate_id(c)),
            clean(cat.star_id(cat.star_of(c)))
        ),
        facts: &facts,
        model: crate::lightcurve::model_params(cat, c),
        shown: shown.as_ref().map_err(String::as_str),
    };
    let fail = |e: String| {
        CliError::Input(format!(
            "{}: cannot draw {}: {e}",
            clean(&path.display().to_string()),
            clean(cat.candidate_id(c))
        ))
    };
    match format_of(path) {
        Some("png") => crate::figure::png(path, &page).map_err(fail)?,
        _ => {
            let svg = crate::figure::svg(&page).map_err(fail)?;
            crate::output::write_atomically(path, svg.as_bytes())?;
        }
    }
    Ok(())
}

/// The facts box of a candidate, from the session: the ephemeris and
/// size, the system and odds, the decision, every flag with its reason, and
/// the statement under which the odds hold.
pub fn facts(v: &Session, c: CandidateId) -> Vec<String> {
    let cat = &v.loaded.catalogue;
    let d = crate::checks::derive(cat, c, &v.settings);
    let val = |f| cat.value(f, c);
    let mut lines = vec![format!(
        "period {} d · epoch {} · depth {} ppm · duration {} h · radius {} R⊕ · a/R★ {} · Teq {} K",
        num(val(Field::PeriodD), 8),
        num(val(Field::Epoch), 9),
        num(val(Field::DepthPpm), 4),
        num(val(Field::DurationH), 4),
        num(d.radius_rearth, 3),
        num(d.a_rstar, 3),
        num(d.teq_k.map(f64::round), 4)
    )];
    match &v.live {
        Ok(live) => {
            lines.push(format!(
                "system of k = {} counted · odds {} · probability {} · holds to f = {} · verdict {}",
                live.k(c),
                live.odds(c).map_or("-".into(), crate::odds::format_odds),
                num(live.probability(c), 4),
                num(live.holds_to(c), 3),
                live.verdict(c).name()
            ));
            let held = crate::odds::hold_text(cat, live, c);
            if !held.is_empty() {
                lines.push(format!("held back: {held}"));
            }
            let decision = live.decision(c);
            let who = v
                .latest
                .get(cat.candidate_id(c))
                .map(|e| format!(" by {} at {}", clean(&e.vetter), e.decided_at))
                .unwrap_or_default();
            lines.push(format!(
                "decision: {}{}{who}",
                decision.name(),
                decision
                    .reason()
                    .map_or(String::new(), |r| format!(" ({})", r.name()))
            ));
        }
        Err(e) => lines.push(format!("no odds: {e}")),
    }
    let findings: Vec<String> = v
        .checks
        .findings(c)
        .map(|f| {
            format!(
                "{}{}: {}",
                if f.soft { "warning " } else { "flag " },
                f.flag,
                clean(&f.why)
            )
        })
        .collect();
    if findings.is_empty() {
        lines.push("flags: none".into());
    }
    lines.extend(findings);
    if let Ok(live) = &v.live {
        lines.push(crate::odds::model_statement(live.model()));
    }
    lines
}
