//! Vetting checks on the catalogue: the physics each candidate implies
//! (radius, orbit, temperature, insolation, the stellar density its transit
//! implies), and the warning signs — a stellar-size companion, a too-short
//! duration for its star, two signals that cannot both orbit one star, a
//! duplicate or alias, a signal copied from a neighbour. Methods and
//! thresholds: docs/science.md §2–§3.

mod copies;
mod echo;
mod families;
mod groups;
pub mod known;
mod lightcurves;
mod orbits;
mod other_ids;
mod progress;
mod reported;
mod same_place;
mod second_ids;
mod system;

pub use groups::SignalGroups;
pub use known::UnseenFp;
pub use lightcurves::{
    LightcurveRun, LightcurveTotals, measured_radius_too_big, run_lightcurves,
    run_lightcurves_counted,
};
pub use other_ids::{StarLink, Tie, links_of};
pub use progress::CheckProgress;

use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::constants::{AU_M, G, R_SUN_M};
use crate::flags::{Flag, FlagSet};
use crate::science;

/// Every candidate's planet radius (Earth radii; NaN where it cannot be
/// derived), as the checks derive it.
pub fn planet_radii(cat: &Catalogue) -> Vec<f64> {
    let settings = CheckSettings::default();
    (0..cat.len() as CandidateId)
        .map(|c| {
            derive_for_flags(cat, c, &settings)
                .radius_rearth
                .unwrap_or(f64::NAN)
        })
        .collect()
}

/// Thresholds of the checks. Defaults carry their source.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct CheckSettings {
    /// `big-radius` above this, Earth radii: 2 R_J from nominal radii
    /// (docs/science.md §2, derived from Borucki 2011's largest planetary class).
    pub big_radius_rearth: f64,
    /// A softer `big-radius` warning above this (Fressin 2013's giant bin).
    pub suspect_radius_rearth: f64,
    /// `low-snr` below this (common practice, no source: the 7.1σ threshold of
    /// transit searches).
    pub low_snr: f64,
    /// `density-mismatch` when the transit's stellar density differs from the
    /// star's or its siblings' by more than this factor (common practice, no
    /// source; eccentric orbits alone can shift it by ~2).
    pub density_factor: f64,
    /// A soft `density-mismatch` when |log10 ξ| of a pair exceeds this
    /// (from the spread of docs/science.md §2's Monte Carlo: ±0.16 for 1.5°
    /// mutual inclinations).
    pub xi_log10: f64,
    /// `near-twin` and `harmonic`: the relative period tolerance used when
    /// it is larger than three combined uncertainties (common practice, no source).
    pub period_rel_tol: f64,
    /// `harmonic`: integers 2..=this are checked.
    pub harmonic_max: u32,
    /// `crowded` trio threshold: Δ_in + Δ_out below this (Lissauer 2011,
    /// Fabrycky 2014; docs/science.md §3, from memory).
    pub trio_hill_sum: f64,
    /// `echo`: only within this angular distance when positions exist, arcsec.
    pub echo_radius_arcsec: f64,
    /// `echo`: the widest relative period difference ever matched; bounds the
    /// sweep so it stays O(n log n). Half of it is the tolerance when period
    /// errors are missing (common practice, no source: catalogue periods are
    /// typically known to 1e-6–1e-5).
    pub echo_max_rel: f64,
    /// Bond albedo and redistribution factor of the equilibrium temperature.
    pub albedo: f64,
    pub redistribution: f64,
}

impl Default for CheckSettings {
    fn default() -> CheckSettings {
        CheckSettings {
            big_radius_rearth: 22.4,
            suspect_radius_rearth: 15.0,
            low_snr: 7.1,
            density_factor: 4.0,
            xi_log10: 0.25,
            period_rel_tol: 1e-3,
            harmonic_max: 5,
            trio_hill_sum: 18.0,
            echo_radius_arcsec: 120.0,
            echo_max_rel: 5e-5,
            albedo: 0.0,
            redistribution: 0.25,
        }
    }
}

/// What a candidate's transit implies, where the inputs exist (`None`
/// otherwise, never zero).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Derived {
    pub star_radius_rsun: Option<f64>,
    pub star_mass_msun: Option<f64>,
    /// R_p from depth (or `ror`), stellar radius and contamination; where
    /// the star's radius is unknown, the catalogue's own planet radius.
    pub radius_rearth: Option<f64>,
    /// The catalogue's own planet radius, where it gives one.
    pub catalogue_radius_rearth: Option<f64>,
    pub a_au: Option<f64>,
    pub a_rstar: Option<f64>,
    pub teq_k: Option<f64>,
    pub insolation_earth: Option<f64>,
    /// Expected T₁₄ of a central transit for the catalogue's star, hours.
    pub t14_central_h: Option<f64>,
    /// Mean stellar density implied by the transit, kg m⁻³.
    pub density_transit: Option<f64>,
    /// Mean density of the catalogue's star, kg m⁻³.
    pub density_star: Option<f64>,
    /// density_transit / density_star.
    pub density_ratio: Option<f64>,
    /// True when the transit density assumed b = 0 (no impact column).
    pub assumed_central: bool,
    /// Where the star's radius is unknown: the least radius any star of
    /// the transit's density can have (`science::least_star_radius_rsun`),
    /// and the planet's radius on it, a lower bound (docs/science.md §2).
    pub least_star_rsun: Option<f64>,
    pub least_radius_rearth: Option<f64>,
    /// The least density a star can have for this orbit to clear its
    /// surface (`science::least_density_for_orbit`), kg m⁻³, where the
    /// catalogue's star has a density to compare.
    pub least_density_orbit: Option<f64>,
    /// The transit lasts half the period or more: no orbit gives it
    /// (`science::longest_transit_h`).
    pub transit_too_long: bool,
}

fn finite(v: f64) -> Option<f64> {
    v.is_finite().then_some(v)
}

/// The derived quantities of one candidate.
pub fn derive(cat: &Catalogue, c: CandidateId, s: &CheckSettings) -> Derived {
    derive_with(cat, c, s, true)
}

/// What the flags read of [`derive`]: the radius and the two densities;
/// the orbit's size, equilibrium temperature, insolation and expected
/// duration stay `None` (the outputs that show them call `derive`).
pub fn derive_for_flags(cat: &Catalogue, c: CandidateId, s: &CheckSettings) -> Derived {
    derive_with(cat, c, s, false)
}

/// [`derive`], the orbit's quantities only when `orbit`.
fn derive_with(cat: &Catalogue, c: CandidateId, s: &CheckSettings, orbit: bool) -> Derived {
    let v = |f: Field| cat.value(f, c);
    let (period, depth, t14) = (
        v(Field::PeriodD).unwrap_or(f64::NAN),
        v(Field::DepthPpm).unwrap_or(f64::NAN),
        v(Field::DurationH).unwrap_or(f64::NAN),
    );
    let contamination = v(Field::Contamination).unwrap_or(0.0);
    // Surface gravity g = GM/R² (cgs logg) fills in a missing mass or radius.
    let g = v(Field::StarLogg).map(|l| 10f64.powf(l) / 100.0);
    let m_sun = crate::constants::GM_SUN / G;
    let mut radius = v(Field::StarRadiusRsun).filter(|r| *r > 0.0);
    let mut mass = v(Field::StarMassMsun).filter(|m| *m > 0.0);
    if let (None, Some(m), Some(g)) = (radius, mass, g) {
        radius = finite((G * m * m_sun / g).sqrt() / R_SUN_M);
    }
    if let (None, Some(r), Some(g)) = (mass, radius, g) {
        mass = finite(g * (r * R_SUN_M).powi(2) / G / m_sun);
    }
    // The radius ratio: the catalogue's `ror` when given, else the
    // limb-darkening-corrected ratio of the depth (the one the model transit
    // uses; docs/science.md §2).
    let impact = v(Field::Impact);
    let k = v(Field::Ror).filter(|r| *r > 0.0).unwrap_or_else(|| {
        science::ror_from_depth(
            depth,
            contamination,
            impact.unwrap_or(0.0),
            crate::transit_model::DEFAULT_LD,
        )
    });
    let mut d = Derived {
        star_radius_rsun: radius,
        star_mass_msun: mass,
        ..Derived::default()
    };
    d.catalogue_radius_rearth = v(Field::PlanetRadiusRearth).filter(|r| *r > 0.0);
    d.radius_rearth = radius
        .and_then(|r| finite(science::radius_rearth(k, r)))
        .or(d.catalogue_radius_rearth);
    if let (Some(m), Some(r)) = (mass, radius) {
        d.density_star = finite(science::star_density(m, r));
    }
    if let (Some(m), true) = (mass, orbit) {
        d.a_au = finite(science::semi_major_axis_m(period, m, 0.0) / AU_M);
    }
    if let (Some(m), Some(r), true) = (mass, radius, orbit) {
        let a_rstar = science::a_over_rstar(period, m, r);
        d.a_rstar = finite(a_rstar);
        d.t14_central_h = science::durations_h(period, a_rstar, k, 0.0).map(|t| t.0);
        if let Some(teff) = v(Field::StarTeffK) {
            d.teq_k = finite(science::equilibrium_temperature_k(
                teff,
                a_rstar,
                s.albedo,
                s.redistribution,
            ));
            d.insolation_earth = d
                .a_au
                .and_then(|a| finite(science::insolation_earth(r, teff, a)));
        }
    }
    d.assumed_central = impact.is_none();
    d.density_transit =
        science::a_rstar_from_duration(period, t14, k, impact.unwrap_or(0.0).min(1.0 + k))
            .and_then(|a| finite(science::density_from_a_rstar(a, period)));
    if let (Some(t), Some(st)) = (d.density_transit, d.density_star) {
        d.density_ratio = finite(t / st);
    }
    d.transit_too_long = period > 0.0 && t14 >= science::longest_transit_h(period);
    if d.density_star.is_some() && period > 0.0 {
        d.least_density_orbit = finite(science::least_density_for_orbit(period, k));
    }
    if radius.is_none() {
        d.least_star_rsun = d.density_transit.and_then(science::least_star_radius_rsun);
        d.least_radius_rearth = d
            .least_star_rsun
            .and_then(|r| finite(science::radius_rearth(k, r)));
    }
    d
}

/// A diagnostic that fired on a candidate, with the numbers behind it. A
/// soft finding is a warning: it is shown but never blocks a verdict.
#[derive(Clone, Debug, PartialEq)]
pub struct Finding {
    pub flag: Flag,
    pub soft: bool,
    pub why: String,
}

/// The outcome of the checks for a whole catalogue.
#[derive(Clone, Debug, Default)]
pub struct Checks {
    flags: Vec<FlagSet>,
    soft: Vec<FlagSet>,
    /// (candidate, finding), sorted by candidate.
    findings: Vec<(CandidateId, Finding)>,
    /// Candidates that are one signal, best first.
    groups: SignalGroups,
    /// The measured fold of each candidate whose light curve was read (see
    /// `Diagnostics::shape`).
    shapes: std::collections::HashMap<CandidateId, [f32; crate::lightcurve::analysis::SHAPE_CELLS]>,
    /// What the checks say of the catalogue as a whole (an input they could
    /// not read as meant), for the warnings of every output.
    notes: Vec<String>,
    /// Stars that a skipped row calls the host of a false positive
    /// (`known::flag`), in star order.
    unseen_fp: Vec<UnseenFp>,
    /// The `big-radius` limit the checks ran with, R⊕, for the light
    /// curves' own depths (`lightcurves`).
    big_radius_rearth: f64,
}

impl Checks {
    /// No findings yet, for `n` candidates (before the checks have run).
    pub fn none(n: usize) -> Checks {
        Checks {
            flags: vec![FlagSet::EMPTY; n],
            soft: vec![FlagSet::EMPTY; n],
            findings: Vec::new(),
            groups: SignalGroups::none(),
            shapes: Default::default(),
            notes: Vec::new(),
            unseen_fp: Vec::new(),
            big_radius_rearth: CheckSettings::default().big_radius_rearth,
        }
    }

    /// The stars a skipped row calls the host of a false positive, by star
    /// (docs/science.md §3.5).
    pub fn unseen_fp(&self) -> &[UnseenFp] {
        &self.unseen_fp
    }

    /// What the checks say of the catalogue as a whole.
    pub fn notes(&self) -> &[String] {
        &self.notes
    }

    /// The measured fold of a candidate, once its light curve was read.
    pub fn shape(
        &self,
        c: CandidateId,
    ) -> Option<&[f32; crate::lightcurve::analysis::SHAPE_CELLS]> {
        self.shapes.get(&c)
    }

    /// The signal groups: candidates of one star that are one signal.
    pub fn groups(&self) -> &SignalGroups {
        &self.groups
    }

    /// Flags that fired firmly (these feed verdicts).
    pub fn flags(&self, c: CandidateId) -> FlagSet {
        self.flags[c as usize]
    }

    /// Warnings: soft findings only.
    pub fn warnings(&self, c: CandidateId) -> FlagSet {
        self.soft[c as usize]
    }

    pub fn all_flags(&self) -> &[FlagSet] {
        &self.flags
    }

    pub fn findings(&self, c: CandidateId) -> impl Iterator<Item = &Finding> {
        let a = self.findings.partition_point(|(x, _)| *x < c);
        self.findings[a..]
            .iter()
            .take_while(move |(x, _)| *x == c)
            .map(|(_, f)| f)
    }

    /// `flag: why; flag: why` for exports.
    pub fn why(&self, c: CandidateId) -> String {
        self.findings(c)
            .map(|f| {
                format!(
                    "{}{}: {}",
                    if f.soft { "warning " } else { "" },
                    f.flag,
                    f.why
                )
            })
            .collect::<Vec<_>>()
            .join("; ")
    }

    /// Adds the flags of the light-curve diagnostics (they fire firmly).
    /// The findings stay unsorted until [`Checks::sort_findings`], which a
    /// pass calls once at its end (a sort per candidate would make a pass
    /// over many light curves quadratic in the catalogue's findings).
    fn add_lightcurve(&mut self, c: CandidateId, findings: &[(Flag, String)]) {
        for (flag, why) in findings {
            self.add(c, *flag, false, why.clone());
        }
    }

    /// Sorts the findings by candidate, stably: per candidate, they keep
    /// the order they were found in.
    fn sort_findings(&mut self) {
        self.findings.sort_by_key(|(c, _)| *c);
    }

    fn add(&mut self, c: CandidateId, flag: Flag, soft: bool, why: String) {
        if soft {
            self.soft[c as usize].insert(flag);
        } else {
            self.flags[c as usize].insert(flag);
        }
        self.findings.push((c, Finding { flag, soft, why }));
    }
}

/// A note when the epoch column counts from different zeros: some rows near
/// a full Julian date (above 2,000,000) and some far below it (under
/// 100,000, as BJD − 2457000 and the like are). The checks that compare
/// epochs (signal groups, echoes) and the light curves need one zero.
fn epoch_zeros(cat: &Catalogue, out: &mut Checks) {
    let Some(epochs) = cat.column(Field::Epoch) else {
        return;
    };
    let full = epochs.iter().position(|e| e > 2.0e6);
    let offset = epochs.iter().position(|e| e < 1.0e5);
    if let (Some(f), Some(o)) = (full, offset) {
        let count = |p: fn(f64) -> bool| epochs.iter().filter(|&e| p(e)).count();
        out.notes.push(format!(
            "the epochs count from different zeros: {} rows near a full Julian date (such as {}, {}) and {} far below one (such as {}, {}; BJD − 2457000 and the like): signal groups, echoes and light curves compare epochs, so give the table one zero",
            count(|e| e > 2.0e6),
            crate::sanitize::clean(cat.candidate_id(f as CandidateId)),
            epochs.get(f),
            count(|e| e < 1.0e5),
            crate::sanitize::clean(cat.candidate_id(o as CandidateId)),
            epochs.get(o),
        ));
    }
}

/// Whether candidate `c` is a false positive by the checks so far, as the
/// odds read its own star (`Live::known_fp_among`): the catalogue calls it
/// one, or it carries a firm sign that holds its own star
/// (`FlagSet::false_positive_signs`) and is no copy of another signal of
/// its star (a firm group flag): a copy's `secondary` is its own transit
/// folded at twice its period, and says nothing of the star.
pub(crate) fn shows_false_positive(checks: &Checks, c: CandidateId) -> bool {
    let f = checks.flags(c);
    f.contains(Flag::KnownFp)
        || (f.intersects(FlagSet::false_positive_signs()) && !f.intersects(FlagSet::group_flags()))
}

/// A false positive's signs (the catalogue's word, an eclipse pair, a
/// radius no planet has) hold its star under its other ids too: a split
/// candidate family (`families`), one place (`same_place`), one row
/// listed under both (`copies`). The false
/// positives are found in one pass for both; run after the star checks
/// and again after the light curves.
pub(crate) fn hold_other_ids(cat: &Catalogue, out: &mut Checks) {
    // Few, usually none.
    let shown: Vec<CandidateId> = (0..cat.len() as CandidateId)
        .filter(|&c| shows_false_positive(out, c))
        .collect();
    families::flag(cat, out, &shown);
    same_place::flag(cat, out, &shown);
    copies::hold(cat, out, &shown);
    second_ids::flag(cat, out, &shown);
}

/// How a false positive is known, for the notes of the stars it holds
/// under another id: `a known false positive (the catalogue)`, else the
/// signs its checks show.
pub(crate) fn false_positive_words(checks: &Checks, c: CandidateId) -> String {
    if checks.flags(c).contains(Flag::KnownFp) {
        return "a known false positive (the catalogue)".into();
    }
    let signs: Vec<&str> = checks
        .flags(c)
        .intersection(FlagSet::false_positive_signs())
        .iter()
        .map(|f| f.name())
        .collect();
    format!("a false positive by its checks ({})", signs.join(", "))
}

/// Runs every check on the catalogue.
pub fn run(cat: &Catalogue, s: &CheckSettings) -> Checks {
    run_counted(cat, s, &CheckProgress::default())
}

/// [`run`], counting the work done into `progress` as it goes.
pub fn run_counted(cat: &Catalogue, s: &CheckSettings, progress: &CheckProgress) -> Checks {
    let n = cat.len();
    let empty = || Checks::none(n);
    // The cross-star echo sweep is independent of the per-star checks: it
    // runs on a thread of its own and the two results are merged.
    let (mut checks, mut links, echoes) = std::thread::scope(|scope| {
        let echo = scope.spawn(|| echo::check(cat, s, progress));
        let mut checks = empty();
        checks.big_radius_rearth = s.big_radius_rearth;
        // The star checks derive their members' densities and radii again
        // where they read them, a star at a time: two arrays of every
        // candidate's would be 16 bytes a candidate at the checks' peak.
        for c in 0..n as CandidateId {
            let d = derive_for_flags(cat, c, s);
            candidate_flags(cat, c, &d, s, &mut checks);
            if (c as usize + 1).is_multiple_of(progress::STEP) {
                progress.add(progress::STEP);
            }
        }
        progress.add(n % progress::STEP);
        known::flag(cat, &mut checks);
        reported::flag(cat, &mut checks);
        epoch_zeros(cat, &mut checks);
        progress.publish(checks.all_flags());
        let mut scratch = system::Scratch::default();
        let mut links = Vec::new();
        let mut unsaid = 0;
        // A star's rows lie anywhere in the file: the memory is asked for
        // them some stars ahead, so that it serves many at once.
        let columns = system::read_columns(cat);
        const AHEAD: u32 = 8;
        let stars = cat.star_count() as u32;
        for star in 0..stars {
            if star + AHEAD < stars {
                let ahead = cat.members(star + AHEAD);
                if ahead.len() >= 2 {
                    system::prefetch(&columns, ahead);
                }
            }
            let members = cat.members(star);
            if members.len() >= 2 {
                system::check(cat, members, s, &mut scratch, &mut links, &mut checks);
            }
            unsaid += members.len();
            if unsaid >= progress::STEP {
                progress.add(std::mem::take(&mut unsaid));
            }
        }
        progress.add(unsaid);
        progress.publish(checks.all_flags());
        (
            checks,
            links,
            echo.join().unwrap_or_else(|e| std::panic::resume_unwind(e)),
        )
    });
    // The signal groups and the holds across star ids wait for the echo
    // search, which finds the rows listed on two star ids (`copies`).
    links.extend(copies::links(cat, &echoes.copies));
    copies::flag(cat, &echoes.copies, &mut checks);
    group_flags(cat, &links, &mut checks);
    hold_other_ids(cat, &mut checks);
    for (c, soft, why) in echoes.findings {
        checks.add(c, Flag::Echo, soft, why);
    }
    checks.notes.extend(echoes.chance.note());
    checks.sort_findings();
    progress.publish(checks.all_flags());
    checks
}

/// Signal groups from the links between candidates, and their flags: each
/// member but the representative gets the firm flag of its link, naming the
/// representative it follows; the representative gets it as a warning. An
/// eclipse pair whose shallower eclipse is deeper than any planet's
/// occultation could be marks every member `secondary`
/// (docs/science.md §3.1, §4.3).
fn group_flags(cat: &Catalogue, links: &[system::Link], out: &mut Checks) {
    let triples: Vec<(CandidateId, CandidateId, Flag)> =
        links.iter().map(|l| (l.a, l.b, l.flag)).collect();
    let groups = SignalGroups::from_links(cat, &triples);
    let id = |c: CandidateId| cat.candidate_id(c).to_string();
    // The links of each candidate, by index into `links`.
    let mut of: std::collections::HashMap<CandidateId, Vec<usize>> = Default::default();
    for (i, l) in links.iter().enumerate() {
        of.entry(l.a).or_default().push(i);
        of.entry(l.b).or_default().push(i);
    }
    let links_of = |c: CandidateId| of.get(&c).map_or(&[][..], |v| v.as_slice());
    let other = |l: &system::Link, c: CandidateId| if l.a == c { l.b } else { l.a };
    for g in 0..groups.len() as u32 {
        let members = groups.members(g);
        let rep = members[0];
        // A row on two star ids counts towards neither (`copies`): its
        // group is still one signal, one verdict.
        let counts = if out.flags(rep).contains(Flag::MixedHost) {
            "one signal with"
        } else {
            "counts once, as"
        };
        for &m in &members[1..] {
            // The link to the representative if there is one, else any.
            let mine = links_of(m);
            let link = mine
                .iter()
                .map(|&i| &links[i])
                .find(|l| other(l, m) == rep)
                .or_else(|| mine.first().map(|&i| &links[i]));
            if let Some(l) = link {
                out.add(
                    m,
                    l.flag,
                    false,
                    format!(
                        "with {}: {}; {counts} {}",
                        id(other(l, m)),
                        l.detail,
                        id(rep)
                    ),
                );
            }
        }
        // The representative's warnings: one per kind of link, the first
        // link's numbers, and how many more (linear in the group's size).
        let mut kinds: Vec<(Flag, &system::Link, usize)> = Vec::new();
        for l in links_of(rep).iter().map(|&i| &links[i]) {
            match kinds.iter_mut().find(|k| k.0 == l.flag) {
                Some(k) => k.2 += 1,
                None => kinds.push((l.flag, l, 0)),
            }
        }
        for (flag, l, more) in kinds {
            let more = if more > 0 {
                format!(" (and {more} more like it)")
            } else {
                String::new()
            };
            out.add(
                rep,
                flag,
                true,
                format!(
                    "with {}: {}{more}; this candidate stands for the signal",
                    id(other(l, rep)),
                    l.detail
                ),
            );
        }
        let too_deep = members.iter().find_map(|&m| {
            links_of(m)
                .iter()
                .map(|&i| &links[i])
                .filter(|l| l.flag == Flag::HalfPhase && l.a == m)
                .find_map(|l| eclipse_pair_too_deep(cat, l.a, l.b))
        });
        if let Some(why) = too_deep {
            for &m in members {
                out.add(m, Flag::Secondary, false, why.clone());
            }
        }
    }
    out.groups = groups;
}

/// Whether the shallower of two eclipses of one binary (same period, or
/// one at a multiple of the other's) is deeper than a
/// planet's occultation could be behind the deeper: reflected light with
/// geometric albedo 1 plus dayside thermal emission (bolometric, no
/// redistribution), together (5/3)·k²·(R★/a)² with k² the deeper depth
/// (docs/science.md §4.3; Winn 2010 for the geometry). a/R★ from the star,
/// else from the deeper transit's duration (b = 0 when unknown: the largest
/// a/R★, the lowest ceiling). The shallower depth must clear the ceiling by
/// three times its error (depth/SNR) when the SNR is known.
fn eclipse_pair_too_deep(cat: &Catalogue, a: CandidateId, b: CandidateId) -> Option<String> {
    let depth = |c| cat.value(Field::DepthPpm, c).unwrap_or(f64::NAN);
    let (deep, shallow) = if depth(a) >= depth(b) { (a, b) } else { (b, a) };
    let (d1, d2) = (depth(deep), depth(shallow));
    if !(d1 > 0.0 && d2 > 0.0) {
        return None;
    }
    let k = (d1 * 1e-6).sqrt();
    let period = cat.value(Field::PeriodD, deep)?;
    // The binary's orbit is the shorter period where one eclipse was found
    // at a multiple of it: a/R★ ∝ P^(2/3) (Kepler's third law).
    let other = cat.value(Field::PeriodD, shallow).unwrap_or(period);
    let orbit = other.min(period);
    let a_rstar = reported::a_rstar_of(cat, deep, k)? * (orbit / period).powf(2.0 / 3.0);
    let ceiling = reported::occultation_ceiling_ppm(d1, a_rstar);
    let sigma2 = cat
        .value(Field::Snr, shallow)
        .filter(|s| *s > 0.0)
        .map_or(0.0, |s| d2 / s);
    (d2 - 3.0 * sigma2 > ceiling).then(|| {
        format!(
            "{} {} ({d1:.0} ppm) and {} ({d2:.0} ppm): the shallower is above the {ceiling:.0} ppm a planet's occultation can reach at a/R★ = {a_rstar:.1} (albedo 1 plus dayside heat): an eclipsing binary",
            if (other / period - 1.0).abs() < 0.01 {
                "same-period signals"
            } else {
                "eclipses"
            },
            cat.candidate_id(deep),
            cat.candidate_id(shallow)
        )
    })
}

/// Reflected (geometric albedo 1) plus bolometric dayside thermal emission
/// ((T_day/T_eff)⁴ = (2/3)(R★/a)², no redistribution) of a planet, in units
/// of k²(R★/a)²: 1 + 2/3 (docs/science.md §4.3).
const OCCULTATION_CEILING_FACTOR: f64 = 5.0 / 3.0;

/// The radius the `big-radius` check reads, and whose it is when not the
/// checks' own: the larger of the checks' (depth and star) and the
/// catalogue's own planet radius. Either is evidence of a body too large
/// for a planet; a fit's radius can be larger than the depth's (a grazing
/// transit), the depth's than a fit's (a contaminated or outdated star).
fn flag_radius(d: &Derived) -> Option<(f64, String)> {
    if d.star_radius_rsun.is_none() {
        // The star's radius unknown: the catalogue's radius, or the least
        // the transit's own density allows, whichever is larger.
        let least = d.least_radius_rearth.zip(d.least_star_rsun).map(|(r, star)| {
            (
                r,
                format!(
                    " at least (its star's radius is unknown; the transit's density, {:.0} kg/m³{}, \
                     allows no star smaller than {star:.2} R☉)",
                    d.density_transit.unwrap_or(f64::NAN),
                    if d.assumed_central { " at b = 0" } else { "" },
                ),
            )
        });
        let given = d.catalogue_radius_rearth.map(|g| {
            (
                g,
                " (the catalogue's; its star's radius is unknown)".to_string(),
            )
        });
        return match (given, least) {
            (Some(g), Some(l)) if l.0 > g.0 => Some(l),
            (given, least) => given.or(least),
        };
    }
    let r = d.radius_rearth?;
    Some(match d.catalogue_radius_rearth {
        Some(g) if g > r => (
            g,
            format!(" (the catalogue's; its depth and star give {r:.1})"),
        ),
        _ => (r, String::new()),
    })
}

fn candidate_flags(
    cat: &Catalogue,
    c: CandidateId,
    d: &Derived,
    s: &CheckSettings,
    out: &mut Checks,
) {
    if let Some((r, whose)) = flag_radius(d) {
        if r > s.big_radius_rearth {
            out.add(
                c,
                Flag::BigRadius,
                false,
                format!(
                    "R = {r:.1} R⊕{whose} > {} R⊕ (2 R_J): likely a star",
                    s.big_radius_rearth
                ),
            );
        } else if r > s.suspect_radius_rearth {
            out.add(
                c,
                Flag::BigRadius,
                true,
                format!(
                    "R = {r:.1} R⊕{whose} > {} R⊕: giant or small star",
                    s.suspect_radius_rearth
                ),
            );
        }
    }
    if let Some(snr) = cat.value(Field::Snr, c)
        && snr < s.low_snr
    {
        out.add(
            c,
            Flag::LowSnr,
            false,
            format!("SNR {snr:.1} < {}", s.low_snr),
        );
    }
    orbits::flag(cat, c, d, out);
    if let Some(ratio) = d.density_ratio {
        // With b unknown the transit density (b = 0) is an upper bound: a
        // transit density far above the star's can be a high-b transit, so
        // it is a warning; one far below no b can explain (docs/science.md §2).
        let explainable = d.assumed_central && ratio > s.density_factor;
        if ratio > s.density_factor || ratio < 1.0 / s.density_factor {
            out.add(c, Flag::DensityMismatch, explainable, format!(
                "the transit implies ρ★ = {:.0} kg/m³{}, the catalogue star {:.0} kg/m³ (ratio {:.3}, outside 1/{f}–{f})",
                d.density_transit.unwrap_or(f64::NAN),
                if d.assumed_central { " (b = 0 assumed)" } else { "" },
                d.density_star.unwrap_or(f64::NAN),
                ratio,
                f = s.density_factor
            ) + if explainable { "; b is unknown and a larger b lowers the transit density, so this is a warning" } else { "" });
        }
    }
}

#[cfg(test)]
mod tests;
