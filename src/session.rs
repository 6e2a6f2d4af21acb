//! One vetting session: the catalogue, its checks, the light-curve
//! diagnostics of every star whose light curve is found, the ledger's
//! decisions and the live odds built from all of them. Every command that
//! reports a verdict (`odds`, `checks`, `export`, `report`, `decide`) opens
//! one with the same defaults, so a candidate gets the same verdict
//! everywhere; the browser builds the same [`Live`] from the same pieces.

use std::collections::BTreeMap;
use std::io::IsTerminal;

use crate::checks::{CheckSettings, Checks};
use crate::cli::args::{LedgerRead, Loaded, VettingArgs};
use crate::cli::error::CliError;
use crate::decision::Decision;
use crate::ledger::{Decided, Entry, Stamps, Tally};
use crate::odds::{Dispute, Live, ModelError};
use crate::sanitize::clean;

/// What a session reads of the ledger.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LedgerUse {
    /// The ledger's decisions if the ledger exists; never creates one.
    Read,
    /// As `Read`, and who made each candidate's decision in force too,
    /// when, with its note (`export`).
    ReadEntries,
    /// As `Read`, and its rows counted by vetter and kind too (`report`).
    ReadTally,
    /// No ledger: every candidate open.
    Ignore,
}

/// A catalogue with all its evidence and the odds it implies.
pub struct Session {
    pub loaded: Loaded,
    pub settings: CheckSettings,
    pub checks: Checks,
    /// The odds; `Err` when the model cannot be built (e.g. no N), for the
    /// commands that can report without it.
    pub live: Result<Live, ModelError>,
    /// Who made each candidate's decision in force (of one vetter when
    /// asked), when, with its note: read for `LedgerUse::ReadEntries`
    /// only, empty otherwise.
    pub stamps: Stamps,
    /// The ledger read, if one was.
    pub ledger_path: Option<String>,
    pub disagreements: BTreeMap<String, Vec<Entry>>,
    /// The ledger's rows counted by vetter and kind: for
    /// `LedgerUse::ReadTally` only, empty otherwise.
    pub tally: Tally,
    /// Stars whose light curve was read, and those that failed (id, error).
    pub lightcurve_stars: usize,
    pub lightcurve_errors: Vec<(String, String)>,
    /// A plain notice about the light curves as a whole (epochs and
    /// light-curve times counted from different zeros).
    pub lightcurve_notice: Option<String>,
    /// Segments and samples of the light curves read.
    pub lightcurve_totals: crate::checks::LightcurveTotals,
}

/// The odds of a catalogue from its checks and the ledger's latest
/// decisions (every candidate open without a ledger): the one place a
/// `Live` is built, for every command (through [`Session`]) and the browser.
///
/// The decisions are taken out of `decided`; the rest is left to the
/// caller (where vetters disagree, which the odds read here first).
pub fn odds_of(
    cat: &crate::catalogue::Catalogue,
    model: crate::odds::Model,
    checks: &Checks,
    decided: Option<&mut Decided>,
) -> Result<Live, ModelError> {
    let (decisions, gone, disputes) = match decided {
        Some(d) => {
            let decisions = std::mem::take(&mut d.decisions);
            let disputes = disputes_in(cat, &decisions, d);
            let mut gone = gone_false_positives(cat, &d.gone);
            gone.extend(gone_disputes(cat, &d.gone, &d.disagreements));
            (decisions, gone, disputes)
        }
        None => (vec![Decision::Open; cat.len()], Vec::new(), Vec::new()),
    };
    odds_with(cat, model, checks, decisions, &gone, disputes)
}

/// Where vetters disagree whether a candidate is a false positive
/// ([`dispute_of`] of every candidate the ledger's disagreements name and
/// the catalogue lists), under the decisions in force.
pub fn disputes_of(
    cat: &crate::catalogue::Catalogue,
    decisions: &[Decision],
    disagreements: &BTreeMap<String, Vec<Entry>>,
) -> Vec<Dispute> {
    disagreements
        .iter()
        .filter_map(|(id, latest)| {
            let c = cat.find_candidate(id)?;
            dispute_of(cat, c, decisions[c as usize], latest)
        })
        .collect()
}

/// Every dispute a read of the ledger (`decided`) shows under the
/// decisions in force: where vetters disagree ([`disputes_of`]), and, in
/// one vetter's view, the other vetters' rejections as a false positive of
/// candidates that vetter has not decided on (`Decided::others_fp`).
pub fn disputes_in(
    cat: &crate::catalogue::Catalogue,
    decisions: &[Decision],
    decided: &Decided,
) -> Vec<Dispute> {
    let mut disputes = disputes_of(cat, decisions, &decided.disagreements);
    disputes.extend(decided.others_fp.iter().filter_map(|e| {
        let c = cat.find_candidate(&e.candidate)?;
        dispute_of(cat, c, decisions[c as usize], std::slice::from_ref(e))
    }));
    disputes
}

/// Candidate c's dispute: some vetter's latest decision (`latest`, each
/// vetter's) rejects it as a false positive (an eclipsing binary, a blend,
/// a stellar-size companion) and the decision in force does not; the
/// newest such rejection is named, with what the others decided. `None`
/// when no such rejection stands, or the decision in force is one
/// (docs/science.md §1.1).
pub fn dispute_of(
    cat: &crate::catalogue::Catalogue,
    c: crate::catalogue::CandidateId,
    in_force: Decision,
    latest: &[Entry],
) -> Option<Dispute> {
    if rejects_as_fp(in_force) {
        return None;
    }
    let by = newest_fp_rejection(latest)?;
    let others: Vec<String> = latest
        .iter()
        .filter(|e| !rejects_as_fp(e.decision))
        .map(|e| format!("{} {}", clean(&e.vetter), e.decision))
        .collect();
    Some(Dispute {
        candidate: c,
        star: cat.star_of(c),
        why: format!(
            "{}{}",
            rejected_as(by),
            if others.is_empty() {
                String::new()
            } else {
                format!("; {}", others.join(", "))
            }
        ),
    })
}

/// Whether a decision rejects its candidate as a false positive of its
/// star (an eclipsing binary, a blend, a stellar-size companion).
fn rejects_as_fp(d: Decision) -> bool {
    d.reason().is_some_and(crate::odds::names_false_positive)
}

/// The newest of `latest` that rejects its candidate as a false positive.
fn newest_fp_rejection(latest: &[Entry]) -> Option<&Entry> {
    latest
        .iter()
        .filter(|e| rejects_as_fp(e.decision))
        .max_by_key(|e| e.id)
}

/// "rejected as REASON by VETTER on DAY", of a rejection's entry.
fn rejected_as(e: &Entry) -> String {
    format!(
        "rejected as {} by {} on {}",
        e.decision.reason().map_or("", |r| r.name()),
        clean(&e.vetter),
        clean(e.decided_at.get(..10).unwrap_or(&e.decided_at)),
    )
}

/// The stars a vetter's latest decision calls the host of a false positive
/// through a candidate the catalogue no longer has (`gone`: their latest
/// entries; rejected as an eclipsing binary, a blend or a stellar-size
/// companion; docs/science.md §1.1): a new release that dropped the binary
/// still has its star.
pub fn gone_false_positives(
    cat: &crate::catalogue::Catalogue,
    gone: &[Entry],
) -> Vec<crate::checks::UnseenFp> {
    gone.iter()
        .filter(|e| rejects_as_fp(e.decision))
        .filter_map(|e| {
            Some(crate::checks::UnseenFp {
                star: cat.find_star(&e.star)?,
                by_tie: false,
                why: format!(
                    "{}, no longer in the catalogue, {} (the ledger)",
                    clean(&e.candidate),
                    rejected_as(e)
                ),
            })
        })
        .collect()
}

/// The stars of candidates the catalogue no longer lists on which vetters
/// disagree whether they are a false positive: one vetter's latest
/// decision rejects one as such and the decision in force (`gone`, the
/// latest entries of the view) does not ([`dispute_of`], for a candidate
/// no row shows): held as a gone false positive's are.
pub fn gone_disputes(
    cat: &crate::catalogue::Catalogue,
    gone: &[Entry],
    disagreements: &BTreeMap<String, Vec<Entry>>,
) -> Vec<crate::checks::UnseenFp> {
    disagreements
        .iter()
        .filter(|(id, _)| cat.find_candidate(id).is_none())
        .filter_map(|(id, latest)| {
            let in_force = gone.iter().find(|e| &e.candidate == id);
            if in_force.is_some_and(|e| rejects_as_fp(e.decision)) {
                // Said by `gone_false_positives` already.
                return None;
            }
            let by = newest_fp_rejection(latest)?;
            Some(crate::checks::UnseenFp {
                star: cat.find_star(&by.star)?,
                by_tie: false,
                why: format!(
                    "{}, no longer in the catalogue, {}, which other vetters did not (the ledger: vetters disagree)",
                    clean(id),
                    rejected_as(by)
                ),
            })
        })
        .collect()
}

/// The other ids (a split candidate family, rows at one place:
/// `checks::links_of`, docs/science.md §3.4) of stars known to host a false
/// positive that no loaded row shows (a skipped row's word, a rejection of
/// a candidate the catalogue no longer has): held as well, as a rejection
/// of a loaded candidate holds them. One pass over the catalogue, only
/// when there are such stars.
fn held_at_other_ids(
    cat: &crate::catalogue::Catalogue,
    unseen: &[crate::checks::UnseenFp],
) -> Vec<crate::checks::UnseenFp> {
    // From the stars that host one themselves: one step, so that a
    // rebuild given the odds' own list holds what a first build holds.
    let own: Vec<_> = unseen.iter().filter(|u| !u.by_tie).collect();
    let mut stars: Vec<_> = own.iter().map(|u| u.star).collect();
    if stars.is_empty() {
        return Vec::new();
    }
    stars.sort_unstable();
    stars.dedup();
    crate::checks::links_of(cat, &stars)
        .into_iter()
        .filter_map(|link| {
            let u = own.iter().find(|u| u.star == link.star)?;
            Some(crate::checks::UnseenFp {
                star: link.other,
                by_tie: true,
                why: format!(
                    "{}, on star {}, the same star as this one ({})",
                    u.why,
                    clean(cat.star_id(link.star)),
                    link.tie.describe()
                ),
            })
        })
        .collect()
}

/// The odds under `model` with the checks' flags and signal groups and
/// these decisions: the one way every command and the browser build them.
///
/// `gone` are the stars the ledger knows to host a false positive the
/// catalogue no longer has ([`gone_false_positives`]; a rebuild passes
/// `Live::unseen_fps` of the odds it replaces); `disputes` where vetters
/// disagree whether a candidate is one ([`disputes_of`]; a rebuild passes
/// `Live::disputes`).
pub fn odds_with(
    cat: &crate::catalogue::Catalogue,
    model: crate::odds::Model,
    checks: &Checks,
    decisions: Vec<Decision>,
    gone: &[crate::checks::UnseenFp],
    disputes: Vec<Dispute>,
) -> Result<Live, ModelError> {
    let rejected: Vec<_> = decisions
        .iter()
        .enumerate()
        .filter(|(_, d)| rejects_as_fp(**d))
        .map(|(c, &d)| (c as crate::catalogue::CandidateId, d))
        .collect();
    let mut unseen: Vec<_> = checks.unseen_fp().iter().chain(gone).cloned().collect();
    let others = held_at_other_ids(cat, &unseen);
    unseen.extend(others);
    let mut live = Live::with_evidence(
        cat,
        model,
        checks.all_flags().to_vec(),
        checks.groups().clone(),
        decisions,
        unseen,
    )?;
    link_other_ids(&mut live, cat, rejected);
    // A disputed rejection holds the other ids of its star too, as a
    // rejection does (docs/science.md §3.4).
    link_stars(&mut live, cat, disputes.iter().map(|d| d.star));
    live.set_disputes(disputes);
    // What the checks say of the inputs, among the other input warnings.
    live.input_warnings.extend(checks.notes().iter().cloned());
    Ok(live)
}

/// Finds the other ids (`checks::links_of`: one pass over the catalogue
/// for all of them) of the stars whose candidates these decisions reject as
/// a false positive, where `live` has not looked yet, so that it holds
/// their candidates too (docs/science.md §3.4). Every command (through
/// [`odds_with`]) and the browser, before it sets decisions, call it.
pub fn link_other_ids(
    live: &mut Live,
    cat: &crate::catalogue::Catalogue,
    decided: impl IntoIterator<Item = (crate::catalogue::CandidateId, Decision)>,
) {
    let stars = decided
        .into_iter()
        .filter(|(_, d)| rejects_as_fp(*d))
        .map(|(c, _)| cat.star_of(c));
    link_stars(live, cat, stars);
}

/// Finds the other ids of `stars` where `live` has not looked yet (one
/// pass over the catalogue for all of them, only when there are some).
pub fn link_stars(
    live: &mut Live,
    cat: &crate::catalogue::Catalogue,
    stars: impl IntoIterator<Item = crate::catalogue::StarId>,
) {
    let mut ask: Vec<_> = stars
        .into_iter()
        .filter(|&s| !live.links_asked(s))
        .collect();
    if ask.is_empty() {
        return;
    }
    ask.sort_unstable();
    ask.dedup();
    live.add_links(&ask, crate::checks::links_of(cat, &ask));
}

impl Session {
    /// The catalogue's fingerprint as it is now, for provenance
    /// (`Loaded::fingerprint_now`, with the ledger this session read).
    pub fn catalogue_fingerprint(&self) -> std::io::Result<String> {
        let ledger = self.ledger_path.as_deref().map(std::path::Path::new);
        self.loaded.fingerprint_now(ledger)
    }

    /// Loads the catalogue, runs every check (light curves included unless
    /// `--no-lightcurves`), reads the ledger and builds the odds.
    pub fn open(args: &VettingArgs, ledger: LedgerUse) -> Result<Session, CliError> {
        // Flags first: a bad value costs nothing.
        match args.model.model(&crate::survey::SurveyFacts::default()) {
            Ok(_) | Err(CliError::Model(ModelError::NoTargets(_))) => {}
            Err(e) => return Err(e),
        }
        if ledger != LedgerUse::Ignore {
            args.ledger.check_exists()?;
        }
        args.lc.check_folder()?;
        // The ledger's decisions are read while the catalogue loads.
        let ahead =
            (ledger != LedgerUse::Ignore).then(|| args.ledger.read_ahead(&args.input, true));
        let loaded = args.input.load()?;
        Session::build(args, loaded, ledger, ahead)
    }

    /// [`Session::open`] for a command whose output needs the verdicts:
    /// the model is built from the flags and survey.toml before the
    /// catalogue is read, so a missing N or a bad survey.toml costs no load.
    pub fn open_for_verdicts(args: &VettingArgs, ledger: LedgerUse) -> Result<Session, CliError> {
        args.model.model(&args.input.survey()?.0)?;
        Session::open(args, ledger)
    }

    /// [`Session::open`] for a catalogue already loaded.
    pub fn with_loaded(
        args: &VettingArgs,
        loaded: Loaded,
        ledger: LedgerUse,
    ) -> Result<Session, CliError> {
        Session::build(args, loaded, ledger, None)
    }

    /// [`Session::with_loaded`], the ledger taken from `ahead` when it was
    /// opened and read while the catalogue loaded.
    fn build(
        args: &VettingArgs,
        loaded: Loaded,
        ledger: LedgerUse,
        ahead: Option<std::thread::JoinHandle<Result<Option<LedgerRead>, CliError>>>,
    ) -> Result<Session, CliError> {
        let VettingArgs {
            input,
            ledger: ledger_args,
            model,
            checks: check_args,
            lc,
        } = args;
        let settings = check_args.settings();
        let model = model.model(&loaded.survey);
        let cat = &loaded.catalogue;
        let mut checks = crate::checks::run(cat, &settings);
        let (mut lightcurve_stars, mut lightcurve_errors) = (0, Vec::new());
        let mut lightcurve_notice = None;
        let mut lightcurve_totals = Default::default();
        if lc.wanted() {
            let finder = lc.finder(&loaded);
            let progress = std::io::stderr().is_terminal();
            let run = crate::checks::run_lightcurves_counted(
                cat,
                &finder,
                &lc.detrend(),
                &mut checks,
                |done, total| {
                    if progress {
                        eprint!("\rstarsift: light curves {done} / {total}");
                        if done == total {
                            eprintln!();
                        }
                    }
                },
            );
            lightcurve_stars = run.stars;
            lightcurve_errors = run.errors;
            lightcurve_notice = run.notice;
            lightcurve_totals = run.totals;
        }
        let (opened, read) = match ahead {
            Some(thread) => match thread
                .join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e))?
            {
                Some((l, read)) => (Some(l), Some(read)),
                None => (None, None),
            },
            None => match ledger {
                LedgerUse::Read | LedgerUse::ReadEntries | LedgerUse::ReadTally => {
                    (ledger_args.open_existing(input)?, None)
                }
                LedgerUse::Ignore => (None, None),
            },
        };
        let vetter = ledger_args.vetter.as_deref();
        let (mut decided, stamps, tally, ledger_path) = match &opened {
            Some(l) => {
                let entries = ledger == LedgerUse::ReadEntries;
                let (decided, stamps) = match read {
                    Some(read) => l.decided_ahead(cat, vetter, read, entries)?,
                    None if entries => l.decided_with_stamps(cat, vetter)?,
                    None => (l.decided(cat, vetter)?, Stamps::default()),
                };
                if let Some(n) = crate::cli::args::gone_note(&decided.not_listed) {
                    eprintln!("starsift: note: {n}");
                }
                (
                    Some(decided),
                    stamps,
                    if ledger == LedgerUse::ReadTally {
                        l.tally()?
                    } else {
                        Tally::default()
                    },
                    Some(l.path().display().to_string()),
                )
            }
            None => (None, Stamps::default(), Tally::default(), None),
        };
        let live = match model {
            Ok(m) => odds_of(cat, m, &checks, decided.as_mut()),
            Err(CliError::Model(e)) => Err(e),
            Err(e) => return Err(e),
        };
        let disagreements = decided.map(|d| d.disagreements).unwrap_or_default();
        Ok(Session {
            loaded,
            settings,
            checks,
            live,
            stamps,
            ledger_path,
            disagreements,
            tally,
            lightcurve_stars,
            lightcurve_errors,
            lightcurve_notice,
            lightcurve_totals,
        })
    }

    /// The odds, or the error that stopped them, for commands that need them.
    pub fn live(&self) -> Result<&Live, CliError> {
        self.live.as_ref().map_err(|e| CliError::Model(e.clone()))
    }

    /// Prints the light-curve errors and the held-back line on stderr.
    pub fn warn(&self) {
        for w in self.loaded.catalogue.load_warnings() {
            eprintln!("starsift: warning: {}", clean(&w));
        }
        for (star, e) in &self.lightcurve_errors {
            eprintln!("starsift: warning: star {}: {}", clean(star), clean(e));
        }
        if let Some(n) = &self.lightcurve_notice {
            eprintln!("starsift: warning: {}", clean(n));
        }
        if let Ok(live) = &self.live {
            for w in live.input_warnings.iter().chain(&live.table().warnings) {
                eprintln!("starsift: warning: {}", clean(w));
            }
        }
    }

    /// The candidates `filter` selects (all without one), in file order, as
    /// the filter sees them under `live` (the session's own odds).
    pub fn selected(
        &self,
        live: &Live,
        filter: Option<&crate::query::Filter>,
    ) -> Vec<crate::catalogue::CandidateId> {
        let cat = &self.loaded.catalogue;
        let disagree = crate::selection::disagreeing(cat, &self.disagreements);
        crate::selection::selected(cat, live, &self.checks, &disagree, filter)
    }
}
