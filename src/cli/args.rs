//! The arguments every command shares (catalogue, ledger, model, checks,
//! light curves) and their resolution into what the core takes: loaded
//! catalogues, ledgers, models, finders. No command lives here.

use std::io::{self, IsTerminal};
use std::path::{Path, PathBuf};

use super::error::CliError;
pub use super::lightcurve_args::LightcurveArgs;
use crate::catalogue::{Catalogue, ColumnMap, DepthUnit, LoadOptions, Source};
use crate::checks::CheckSettings;
use crate::survey::SurveyFacts;

/// Arguments that say which catalogue to read and how.
#[derive(Debug, Clone, clap::Args)]
pub struct CatalogueArgs {
    /// Catalogue file: CSV, TSV, IPAC table (.tbl), VOTable (.vot, .xml),
    /// FITS binary table (.fits) or ECSV (.ecsv), optionally .gz. Omit it
    /// for the built-in demo.
    pub catalogue: Option<PathBuf>,
    /// Column-map file (TOML: canonical_field = "their header").
    #[arg(long, value_name = "FILE")]
    pub columns: Option<PathBuf>,
    /// Unit of the depth column, overriding detection.
    #[arg(long, value_name = "UNIT", value_parser = ["ppm", "fraction", "percent"])]
    pub depth_unit: Option<String>,
    /// Field delimiter, overriding detection by extension and sniffing.
    #[arg(long, value_name = "DELIM", value_parser = ["comma", "tab"])]
    pub delimiter: Option<String>,
    /// FITS catalogue: the extension holding the table, a number (1 = first
    /// extension) or a name [default: the first table extension].
    #[arg(long, value_name = "HDU")]
    pub table_hdu: Option<String>,
}

/// Arguments of the odds model. Flags win over `survey.toml`.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct ModelArgs {
    /// N: number of target stars searched (overrides survey.toml).
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub targets: Option<u64>,
    /// f: false-positive fraction of single-candidate stars, in (0, 1)
    /// [default: survey.toml, else 0.1]; or by planet radius in Earth radii,
    /// e.g. 0-2:0.07,2-6:0.09,6-22:0.18 (radii outside every bin, or unknown,
    /// take survey.toml's f, else 0.1).
    #[arg(long, value_name = "F")]
    pub fp_fraction: Option<String>,
    /// Boost definition: catalogue, system, or fixed:2=25,3=100.
    #[arg(long, value_name = "MODE", default_value = "catalogue")]
    pub boost: String,
    /// Posterior odds needed for `validated`.
    #[arg(long, value_name = "T", default_value_t = crate::odds::DEFAULT_THRESHOLD)]
    pub threshold: f64,
    /// Flags that hold a candidate back from the count and from `validated`
    /// (comma-separated) [default: big-radius, odd-even, secondary,
    /// density-mismatch, near-twin, harmonic, crowded, echo, low-snr,
    /// half-phase, not-recovered, mixed-host,
    /// known-fp, ellipsoidal, known-artefact].
    #[arg(long, value_name = "FLAGS")]
    pub blocking: Option<String>,
}

impl ModelArgs {
    /// The model, from these flags and the survey facts.
    pub fn model(&self, survey: &SurveyFacts) -> Result<crate::odds::Model, CliError> {
        let (single, bins) = match &self.fp_fraction {
            Some(text) => crate::odds::parse_fp_fraction(text).map_err(CliError::Input)?,
            None => (None, Vec::new()),
        };
        let model = crate::odds::Model {
            targets: self.targets.or(survey.targets_searched),
            fp_fraction: single
                .or(survey.fp_fraction_singles)
                .unwrap_or(crate::odds::DEFAULT_FP_FRACTION),
            fp_by_radius: bins,
            mode: crate::odds::BoostMode::parse(&self.boost).map_err(CliError::Input)?,
            threshold: self.threshold,
            blocking: match &self.blocking {
                Some(list) => crate::flags::FlagSet::parse_list(list).map_err(CliError::Input)?,
                None => crate::flags::FlagSet::default_blocking(),
            },
        };
        crate::odds::check_inputs(&model, 0)?;
        Ok(model)
    }
}

/// A ledger opened and its decisions scanned ([`LedgerArgs::read_ahead`]).
pub type LedgerRead = (crate::ledger::Ledger, crate::ledger::ReadAhead);

/// Which ledger to use and who is deciding.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct LedgerArgs {
    /// The ledger file [default: <catalogue>.ledger.sqlite beside the catalogue,
    /// or in the XDG data folder when that folder is not writable or for the demo].
    #[arg(long, value_name = "PATH")]
    pub ledger: Option<PathBuf>,
    /// Who is deciding [default: the login name].
    #[arg(long, value_name = "NAME")]
    pub vetter: Option<String>,
}

impl LedgerArgs {
    pub fn vetter(&self) -> String {
        self.vetter
            .clone()
            .unwrap_or_else(crate::ledger::login_name)
    }

    /// The fingerprint this command's ledger recorded for the catalogue at
    /// `catalogue` when the file had this very `stamp`
    /// (`crate::ledger::recorded_fingerprint`): a catalogue the ledger has
    /// seen, untouched since, need not be read whole for its fingerprint.
    /// Any ledger that recorded this path and stamp knows the right
    /// fingerprint, so the default ledger is found without the content
    /// fingerprint that only names a ledger of an earlier version.
    pub fn recorded_fingerprint(&self, catalogue: &Path, stamp: &str) -> Option<String> {
        let ledger = match &self.ledger {
            Some(p) => p.clone(),
            None => crate::ledger::default_path_with(Some(catalogue), &String::new),
        };
        crate::ledger::recorded_fingerprint(&ledger, &catalogue.display().to_string(), stamp)
    }

    /// For a read-only command: a given `--ledger` must exist (checked
    /// before any data is read).
    pub fn check_exists(&self) -> Result<(), CliError> {
        match &self.ledger {
            Some(p) if !p.exists() => Err(CliError::Input(format!(
                "--ledger {}: no such ledger (a read-only command never creates one)",
                crate::sanitize::clean(&p.display().to_string())
            ))),
            _ => Ok(()),
        }
    }

    /// The ledger a read-only command reads: the one `--ledger` names (which
    /// must exist: a mistyped path is an error, not an empty ledger), else
    /// the default one if it exists; `None` when there is none. Nothing is
    /// created or written.
    pub fn open_existing(
        &self,
        input: &CatalogueArgs,
    ) -> Result<Option<crate::ledger::Ledger>, CliError> {
        self.open_found(input, true)
    }

    /// [`LedgerArgs::open_existing`]; with `by_content` false, a default
    /// ledger named by the catalogue's content (an earlier version's name,
    /// where the catalogue's folder cannot be written) is not looked for:
    /// that would read the whole catalogue for its fingerprint.
    fn open_found(
        &self,
        input: &CatalogueArgs,
        by_content: bool,
    ) -> Result<Option<crate::ledger::Ledger>, CliError> {
        self.check_exists()?;
        let path = match &self.ledger {
            Some(p) => p.clone(),
            None => {
                let p = if by_content {
                    default_ledger_path(input)
                } else {
                    crate::ledger::default_path_with(input.catalogue.as_deref(), &String::new)
                };
                if !p.exists() {
                    return Ok(None);
                }
                p
            }
        };
        // The note of decided candidates gone from the catalogue comes
        // with the decisions (`crate::ledger::Decided::not_listed`).
        Ok(Some(crate::ledger::Ledger::open(&path)?))
    }

    /// The ledger [`LedgerArgs::open_existing`] opens, and its decisions
    /// scanned ([`crate::ledger::Ledger::read_ahead`]), on a thread, while
    /// the catalogue loads: they need no catalogue. `None` from the thread
    /// when the catalogue has no ledger yet. `by_content` as for
    /// `open_found`: false where the scan only saves time (the browser,
    /// which opens its ledger again after the load), so that it never
    /// reads the catalogue a second time.
    pub fn read_ahead(
        &self,
        input: &CatalogueArgs,
        by_content: bool,
    ) -> std::thread::JoinHandle<Result<Option<LedgerRead>, CliError>> {
        let (args, input) = (self.clone(), input.clone());
        std::thread::spawn(move || {
            let Some(ledger) = args.open_found(&input, by_content)? else {
                return Ok(None);
            };
            let read = ledger.read_ahead()?;
            Ok(Some((ledger, read)))
        })
    }

    /// Opens the ledger for a loaded catalogue, records the catalogue's
    /// fingerprint and warns (on stderr) when the catalogue changed or
    /// decisions name candidates it no longer has.
    pub fn open(
        &self,
        input: &CatalogueArgs,
        loaded: &Loaded,
    ) -> Result<crate::ledger::Ledger, CliError> {
        let (mut ledger, notes, _) = self.open_with(input, loaded, false)?;
        let gone = ledger.candidates_not_in(&loaded.catalogue)?;
        for n in notes.into_iter().chain(gone_note(&gone)) {
            eprintln!("starsift: note: {n}");
        }
        Ok(ledger)
    }

    /// [`LedgerArgs::open`] returning its note on the catalogue instead of
    /// printing it (the browser shows it on its message line), and without
    /// the note of decided candidates gone from the catalogue, which the
    /// browser makes from its read of the decisions (`gone_note`).
    pub fn open_noting(
        &self,
        input: &CatalogueArgs,
        loaded: &Loaded,
    ) -> Result<(crate::ledger::Ledger, Vec<String>), CliError> {
        let (ledger, notes, _) = self.open_with(input, loaded, false)?;
        Ok((ledger, notes))
    }

    /// [`LedgerArgs::open_noting`] for a catalogue whose fingerprint its
    /// load left for later ([`CatalogueArgs::load_counting`]): the sighting
    /// is not recorded, and the third value says so; the browser records it
    /// from the background ([`crate::ledger::Ledger::sighting_note`]).
    pub fn open_deferring(
        &self,
        input: &CatalogueArgs,
        loaded: &Loaded,
    ) -> Result<(crate::ledger::Ledger, Vec<String>, bool), CliError> {
        self.open_with(input, loaded, true)
    }

    /// Opens (or creates) the ledger and records the catalogue's sighting
    /// (unless deferred), with the note that it changed.
    fn open_with(
        &self,
        input: &CatalogueArgs,
        loaded: &Loaded,
        defer: bool,
    ) -> Result<(crate::ledger::Ledger, Vec<String>, bool), CliError> {
        // The fingerprint names the ledger only where an earlier version
        // named it by content: read for it then, and only then.
        let path = match &self.ledger {
            Some(p) => p.clone(),
            None => crate::ledger::default_path_with(input.catalogue.as_deref(), &|| {
                earlier_fingerprint(input.catalogue.as_deref())
            }),
        };
        if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
            std::fs::create_dir_all(dir).map_err(|e| {
                CliError::Ledger(crate::ledger::LedgerError::Unwritable {
                    path: path.display().to_string(),
                    message: e.to_string(),
                })
            })?;
        }
        let mut ledger = crate::ledger::Ledger::open(&path)?;
        let cat = &loaded.catalogue;
        let mut notes = Vec::new();
        let deferred = defer && loaded.sighting_deferred().is_some();
        if !deferred {
            let fp = loaded.fingerprint_now(None)?;
            notes.extend(ledger.sighting_note(
                &cat.source,
                &fp,
                cat.len(),
                loaded.stamp.as_deref(),
                &|| Some(earlier_fingerprint(input.catalogue.as_deref())).filter(|f| !f.is_empty()),
            )?);
        }
        Ok((ledger, notes, deferred))
    }
}

/// The default ledger of a catalogue (beside it, or in the data folder),
/// reading the catalogue for its fingerprint only if the place depends on it.
fn default_ledger_path(input: &CatalogueArgs) -> PathBuf {
    crate::ledger::default_path_with(input.catalogue.as_deref(), &|| {
        earlier_fingerprint(input.catalogue.as_deref())
    })
}

/// The catalogue's fingerprint as earlier versions took it (FNV-1a,
/// `crate::fingerprint::earlier_fingerprint`; the demo's when `None`),
/// empty when the file cannot be read: to find a ledger they named by it,
/// and to know a catalogue again by a sighting they recorded.
fn earlier_fingerprint(catalogue: Option<&Path>) -> String {
    match catalogue {
        Some(p) => crate::fingerprint::earlier_fingerprint_file(p).unwrap_or_default(),
        None => crate::fingerprint::earlier_fingerprint(crate::demo::CATALOGUE_CSV.as_bytes()),
    }
}

/// A path made absolute with its folder resolved (the file itself need not
/// exist yet), for comparing where two paths lead.
fn resolved(p: &Path) -> PathBuf {
    if let Ok(real) = std::fs::canonicalize(p) {
        return real;
    }
    // `a/missing/../b` is `a/b` even when `missing` does not exist.
    let mut lexical = PathBuf::new();
    for part in p.components() {
        match part {
            std::path::Component::ParentDir => {
                lexical.pop();
            }
            std::path::Component::CurDir => {}
            other => lexical.push(other),
        }
    }
    let p = lexical.as_path();
    if let Ok(real) = std::fs::canonicalize(p) {
        return real;
    }
    let parent = p
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let dir = std::fs::canonicalize(parent).unwrap_or_else(|_| parent.to_path_buf());
    p.file_name().map_or(dir.clone(), |f| dir.join(f))
}

/// Refuses an output path that names an input of this run or a ledger: the
/// catalogue, its `survey.toml`, the ledger in use (given or default) and
/// its SQLite side files, anything inside the light-curve folder, or any
/// existing SQLite file. Checked before any data is read, so a refused
/// command creates and changes nothing.
pub fn check_output_path(output: &Path, vetting: &VettingArgs) -> Result<(), CliError> {
    let out = resolved(output);
    let shown = crate::sanitize::clean(&output.display().to_string()).into_owned();
    let refuse = |what: &str| {
        Err(CliError::Input(format!(
            "--output {shown}: that is {what}; choose another file (nothing was written)"
        )))
    };
    let mut ledgers: Vec<PathBuf> = vetting.ledger.ledger.iter().cloned().collect();
    if let Some(cat) = &vetting.input.catalogue {
        if resolved(cat) == out {
            return refuse("the input catalogue");
        }
        if let Some(survey) = crate::survey::SurveyFacts::beside(cat)
            && resolved(&survey) == out
        {
            return refuse("the catalogue's survey.toml");
        }
    }
    ledgers.push(crate::ledger::default_path(
        vetting.input.catalogue.as_deref(),
        "",
    ));
    for l in &ledgers {
        let base = resolved(l);
        let side = ["", "-wal", "-shm", "-journal"]
            .iter()
            .map(|s| PathBuf::from(format!("{}{s}", base.display())));
        if side.into_iter().any(|p| p == out) {
            return refuse("the ledger (or one of its side files)");
        }
    }
    if let Some(dir) = vetting.lc.lightcurves.as_deref().filter(|d| !d.is_empty())
        && out.starts_with(resolved(Path::new(dir)))
    {
        return refuse("inside the light-curve folder");
    }
    let mut head = [0u8; 16];
    if std::fs::File::open(&out)
        .and_then(|mut f| std::io::Read::read_exact(&mut f, &mut head))
        .is_ok()
        && &head == b"SQLite format 3\0"
    {
        return refuse("an SQLite database (perhaps a ledger)");
    }
    Ok(())
}

/// Which decided candidates the catalogue no longer has (`gone`), in
/// words.
pub fn gone_note(gone: &[String]) -> Option<String> {
    if gone.is_empty() {
        return None;
    }
    Some(format!(
        "{} decided candidates are not in the catalogue: {}{}",
        gone.len(),
        gone.iter()
            .take(20)
            .map(|g| crate::sanitize::clean(g).into_owned())
            .collect::<Vec<_>>()
            .join(", "),
        if gone.len() > 20 { ", ..." } else { "" }
    ))
}

/// A loaded catalogue with the survey facts found beside it.
pub struct Loaded {
    pub catalogue: Catalogue,
    pub survey: SurveyFacts,
    /// Where the survey facts came from, for people.
    pub survey_source: Option<String>,
    /// The catalogue's folder (light-curve paths are relative to it).
    pub dir: Option<PathBuf>,
    /// True for the built-in demo.
    pub demo: bool,
    /// The catalogue file (`None` for the built-in demo).
    pub path: Option<PathBuf>,
    /// The file's fingerprint, when the load computed it from its own read
    /// or the ledger knew it from the file's stamp
    /// (`CatalogueArgs::load_for_ledger`).
    pub fingerprint: Option<String>,
    /// The file's stamp (`crate::fingerprint::file_stamp`) when it was the
    /// same before and after the read, for the ledger to record.
    pub stamp: Option<String>,
}

impl Loaded {
    /// The catalogue's fingerprint as it is now: the load's own (the demo's
    /// always), else the one `ledger` recorded for the file's stamp
    /// (`crate::ledger::recorded_fingerprint`), else read from the file.
    pub fn fingerprint_now(&self, ledger: Option<&Path>) -> std::io::Result<String> {
        if let Some(fp) = &self.fingerprint {
            return Ok(fp.clone());
        }
        let Some(path) = &self.path else {
            return Ok(crate::ledger::fingerprint(
                crate::demo::CATALOGUE_CSV.as_bytes(),
            ));
        };
        let recorded = |ledger: &Path| {
            let stamp = crate::fingerprint::file_stamp(path)?;
            crate::ledger::recorded_fingerprint(ledger, &path.display().to_string(), &stamp)
        };
        match ledger.and_then(recorded) {
            Some(fp) => Ok(fp),
            None => crate::ledger::fingerprint_file(path),
        }
    }

    /// The file and its stamp when the load left the fingerprint for later:
    /// a file whose stamp was the same before and after the read, and whose
    /// fingerprint neither the read nor the ledger gave
    /// (`CatalogueArgs::load_counting`).
    pub fn sighting_deferred(&self) -> Option<(&Path, &str)> {
        match (&self.fingerprint, &self.path, &self.stamp) {
            (None, Some(path), Some(stamp)) => Some((path, stamp)),
            _ => None,
        }
    }

    /// A candidate by id, or an error naming the catalogue.
    pub fn candidate(&self, id: &str) -> Result<crate::catalogue::CandidateId, CliError> {
        self.catalogue.find_candidate(id).ok_or_else(|| {
            CliError::Input(format!(
                "{}: no candidate `{}`",
                crate::sanitize::clean(&self.catalogue.source),
                crate::sanitize::clean(id)
            ))
        })
    }
}

/// Everything a vetted view needs: the catalogue, the ledger, the model, the
/// checks and the light curves.
#[derive(Debug, Clone, clap::Args)]
pub struct VettingArgs {
    #[command(flatten)]
    pub input: CatalogueArgs,
    #[command(flatten)]
    pub ledger: LedgerArgs,
    #[command(flatten)]
    pub model: ModelArgs,
    #[command(flatten)]
    pub checks: CheckArgs,
    #[command(flatten)]
    pub lc: LightcurveArgs,
}

/// A thread that, after half a second, shows how much of the catalogue was
/// read (`\r`-rewritten on stderr) until `done`; it clears its line.
fn progress_on_stderr(
    path: &Path,
    total: u64,
    read: &std::sync::Arc<std::sync::atomic::AtomicU64>,
    done: &std::sync::Arc<std::sync::atomic::AtomicBool>,
) -> std::thread::JoinHandle<()> {
    use std::sync::atomic::Ordering::Relaxed;
    let (read, done) = (std::sync::Arc::clone(read), std::sync::Arc::clone(done));
    let name = crate::sanitize::for_terminal(&path.display().to_string()).into_owned();
    std::thread::spawn(move || {
        let start = std::time::Instant::now();
        let mut shown = false;
        while !done.load(Relaxed) {
            std::thread::sleep(std::time::Duration::from_millis(100));
            if start.elapsed() < std::time::Duration::from_millis(500) {
                continue;
            }
            shown = true;
            let r = read.load(Relaxed);
            let pct = (100 * r).checked_div(total).unwrap_or(0).min(100);
            let bar = "#".repeat((pct / 5) as usize) + &".".repeat(20 - (pct / 5) as usize);
            eprint!(
                "\rstarsift: reading {name} [{bar}] {pct:>3}% ({:.0} of {:.0} MB)",
                r as f64 / 1e6,
                total as f64 / 1e6
            );
        }
        if shown {
            eprint!("\r\x1b[2K");
        }
    })
}

/// `--where FILTER`, parsed; a filter that does not parse says where.
pub fn parse_where(text: Option<&str>) -> Result<Option<crate::query::Filter>, CliError> {
    text.map(|t| {
        crate::query::Filter::parse(t)
            .map_err(|e| CliError::Input(format!("--where {}: {e}", crate::sanitize::clean(t))))
    })
    .transpose()
}

impl CatalogueArgs {
    pub fn options(&self) -> Result<LoadOptions, CliError> {
        let columns = match &self.columns {
            Some(p) => ColumnMap::from_file(p)?,
            None => ColumnMap::default(),
        };
        Ok(LoadOptions {
            columns,
            depth_unit: self.depth_unit.as_deref().and_then(DepthUnit::parse),
            delimiter: self
                .delimiter
                .as_deref()
                .map(|d| if d == "tab" { b'\t' } else { b',' }),
            index_only: false,
            header_units: Vec::new(),
            hdu: self.table_hdu.clone(),
            ids_from: None,
            progress: None,
            fingerprint: None,
        })
    }

    /// Loads the catalogue (or the demo) and its `survey.toml`, if any.
    /// On a terminal, a load that takes more than half a second shows its
    /// progress on stderr (nothing when stderr is piped).
    pub fn load(&self) -> Result<Loaded, CliError> {
        let opts = self.options()?;
        match &self.catalogue {
            Some(path) if io::stderr().is_terminal() => {
                let total = std::fs::metadata(path).map_or(0, |m| m.len());
                let read = std::sync::Arc::new(std::sync::atomic::AtomicU64::new(0));
                let opts = LoadOptions {
                    progress: Some(std::sync::Arc::clone(&read)),
                    ..opts
                };
                let done = std::sync::Arc::new(std::sync::atomic::AtomicBool::new(false));
                let shown = progress_on_stderr(path, total, &read, &done);
                let result = self.load_with(opts);
                done.store(true, std::sync::atomic::Ordering::Relaxed);
                let _ = shown.join();
                result
            }
            _ => self.load_with(opts),
        }
    }

    /// The browser's first read, counting the bytes read into `read` for
    /// its loading screen: the ids, the star index and the skips only
    /// (`LoadOptions::index_only`, as `summary`), enough for the table; the
    /// values follow in a second read ([`CatalogueArgs::load_values`]).
    /// The fingerprint for the ledger (none without one)
    /// comes from the ledger (`load_for_ledger`), else it is left for later
    /// ([`Loaded::sighting_deferred`]: the browser hashes the file in the
    /// background, where it costs the table nothing), else, for a file
    /// too fresh to trust its stamp, from the same read.
    pub fn load_counting(
        &self,
        read: std::sync::Arc<std::sync::atomic::AtomicU64>,
        ledger: Option<&LedgerArgs>,
    ) -> Result<Loaded, CliError> {
        let opts = LoadOptions {
            progress: Some(read),
            index_only: true,
            ..self.options()?
        };
        self.load_noting(opts, ledger, true)
    }

    /// The browser's second read: the whole catalogue, counting the bytes
    /// read into `read`, with nothing said on stderr (the browser's screen
    /// is in front of it), its ids shared with the first read's `ids` when
    /// its rows name the same (`LoadOptions::ids_from`). Whoever shows it
    /// checks that it holds the rows of the first read
    /// (`Catalogue::same_rows`).
    pub fn load_values(
        &self,
        read: std::sync::Arc<std::sync::atomic::AtomicU64>,
        ids: std::sync::Arc<Catalogue>,
    ) -> Result<Catalogue, CliError> {
        let opts = LoadOptions {
            progress: Some(read),
            ids_from: Some(ids),
            ..self.options()?
        };
        Ok(self.load_with(opts)?.catalogue)
    }

    /// `load` for a command that reads or writes the ledger: the
    /// catalogue's fingerprint (which the ledger records) comes from the
    /// ledger when the file's stamp is the one it recorded with it, else
    /// from the same read as the load, never from a second one. With
    /// `ids_only`, only what naming candidates needs is kept
    /// (`LoadOptions::index_only`: the same rows load and are skipped).
    pub fn load_for_ledger(&self, ids_only: bool, ledger: &LedgerArgs) -> Result<Loaded, CliError> {
        let opts = LoadOptions {
            index_only: ids_only,
            ..self.options()?
        };
        self.load_noting(opts, Some(ledger), false)
    }

    /// `load_with` for a ledger: the file's stamp taken before the read and
    /// kept when it is the same after it; the fingerprint the ledger
    /// recorded for that stamp, else the one the read computes.
    /// With `defer`, a file with a stamp is not hashed by the read
    /// ([`Loaded::sighting_deferred`]).
    fn load_noting(
        &self,
        opts: LoadOptions,
        ledger: Option<&LedgerArgs>,
        defer: bool,
    ) -> Result<Loaded, CliError> {
        let stamp_now = || {
            self.catalogue
                .as_deref()
                .and_then(crate::fingerprint::file_stamp)
        };
        let stamp = stamp_now();
        let known = match (&self.catalogue, &stamp, ledger) {
            (Some(path), Some(stamp), Some(ledger)) => ledger.recorded_fingerprint(path, stamp),
            _ => None,
        };
        // Hashed only for a ledger that does not know it yet.
        let opts = LoadOptions {
            fingerprint: (ledger.is_some() && known.is_none() && !(defer && stamp.is_some()))
                .then(Default::default),
            ..opts
        };
        let mut loaded = self.load_with(opts)?;
        // Changed while it was read: the recorded fingerprint is of the file
        // before, and is left out (the ledger reads the file for its own).
        if stamp.is_some() && stamp_now() == stamp {
            if known.is_some() {
                loaded.fingerprint = known;
            }
            loaded.stamp = stamp;
        }
        Ok(loaded)
    }

    /// `load` keeping only the ids, the star index, depth and the skips
    /// (`LoadOptions::index_only`), for `summary`.
    pub fn load_index(&self) -> Result<Loaded, CliError> {
        let opts = LoadOptions {
            index_only: true,
            ..self.options()?
        };
        self.load_with(opts)
    }

    /// The survey facts beside the catalogue (the demo's for the demo) and
    /// where they came from. Cheap: commands read them before the
    /// catalogue, so a bad survey.toml, or a model it cannot complete, is
    /// said before any wait.
    pub fn survey(&self) -> Result<(SurveyFacts, Option<String>), CliError> {
        Ok(match &self.catalogue {
            None => (
                crate::demo::survey(),
                Some("built-in demo survey.toml".into()),
            ),
            Some(path) => match SurveyFacts::beside(path) {
                Some(p) => (SurveyFacts::from_file(&p)?, Some(p.display().to_string())),
                None => (SurveyFacts::default(), None),
            },
        })
    }

    fn load_with(&self, opts: LoadOptions) -> Result<Loaded, CliError> {
        match &self.catalogue {
            None => Ok(Loaded {
                catalogue: Catalogue::load(
                    Source::Bytes {
                        name: crate::demo::NAME,
                        data: crate::demo::CATALOGUE_CSV.as_bytes(),
                    },
                    &opts,
                )?,
                survey: crate::demo::survey(),
                survey_source: Some("built-in demo survey.toml".into()),
                dir: crate::demo::source_dir(),
                demo: true,
                path: None,
                fingerprint: Some(crate::ledger::fingerprint(
                    crate::demo::CATALOGUE_CSV.as_bytes(),
                )),
                stamp: None,
            }),
            Some(path) => {
                let catalogue = Catalogue::load(Source::Path(path), &opts)?;
                let fingerprint = opts
                    .fingerprint
                    .as_ref()
                    .map(|h| h.load(std::sync::atomic::Ordering::Relaxed))
                    .filter(|&h| h != 0)
                    .map(crate::ledger::fingerprint_text);
                let (survey, survey_source) = self.survey()?;
                Ok(Loaded {
                    catalogue,
                    survey,
                    survey_source,
                    dir: Some(path.parent().map_or_else(
                        || PathBuf::from("."),
                        |p| {
                            if p.as_os_str().is_empty() {
                                PathBuf::from(".")
                            } else {
                                p.to_path_buf()
                            }
                        },
                    )),
                    demo: false,
                    path: Some(path.clone()),
                    fingerprint,
                    stamp: None,
                })
            }
        }
    }
}

/// Thresholds of the checks (defaults in `CheckSettings`, with sources).
#[derive(Debug, Clone, clap::Args)]
pub struct CheckArgs {
    /// `low-snr` below this signal-to-noise ratio.
    #[arg(long, value_name = "SNR", default_value_t = CheckSettings::default().low_snr)]
    pub low_snr: f64,
    /// `big-radius` above this many Earth radii (a warning above 15).
    #[arg(long, value_name = "R_EARTH", default_value_t = CheckSettings::default().big_radius_rearth)]
    pub big_radius: f64,
    /// `density-mismatch` beyond this factor between densities.
    #[arg(long, value_name = "FACTOR", default_value_t = CheckSettings::default().density_factor)]
    pub density_factor: f64,
    /// `echo` only within this many arcsec when positions exist.
    #[arg(long, value_name = "ARCSEC", default_value_t = CheckSettings::default().echo_radius_arcsec)]
    pub echo_radius: f64,
}

impl CheckArgs {
    pub fn settings(&self) -> CheckSettings {
        CheckSettings {
            low_snr: self.low_snr,
            big_radius_rearth: self.big_radius,
            density_factor: self.density_factor,
            echo_radius_arcsec: self.echo_radius,
            ..CheckSettings::default()
        }
    }
}
