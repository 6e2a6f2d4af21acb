//! Checks between the candidates of one star: duplicates, aliases, orbits too
//! close to be stable, and durations that betray a different star.

use super::{CheckSettings, Checks};
use crate::catalogue::{CandidateId, Catalogue, Column, Field};
use crate::flags::Flag;
use crate::science;
use crate::transit_model::DEFAULT_LD;

use crate::science::{SMALLEST_STAR_MSUN, SMALLEST_STAR_RSUN};

/// Relative uncertainty of a period ratio r = P₂/P₁:
/// σ_r = r √((σ₁/P₁)² + (σ₂/P₂)²) (docs/science.md §3); `None` without errors.
fn ratio_sigma(r: f64, p1: f64, e1: Option<f64>, p2: f64, e2: Option<f64>) -> Option<f64> {
    Some(r * ((e1? / p1).powi(2) + (e2? / p2).powi(2)).sqrt())
}

/// Epoch offset of b's transits from a's, days: E_b − E_a reduced modulo P_a
/// into (−P_a/2, P_a/2].
pub(super) fn phase_offset_d(e_a: f64, p_a: f64, e_b: f64) -> f64 {
    let d = e_b - e_a;
    d - (d / p_a).round() * p_a
}

/// Two candidates of one star that are one signal, and how they were found.
#[derive(Clone, Debug)]
pub(super) struct Link {
    pub a: CandidateId,
    pub b: CandidateId,
    /// `near-twin`, `harmonic` or `half-phase`.
    pub flag: Flag,
    pub detail: String,
}

/// The most partners in period each candidate of a star is compared with.
const PAIR_WINDOW: usize = 64;

/// Which candidates of one star (by position in period order) are joined
/// by links already: a union-find.
struct Joined {
    parent: Vec<usize>,
}

impl Joined {
    fn new(n: usize) -> Joined {
        Joined {
            parent: (0..n).collect(),
        }
    }

    fn root(&mut self, mut x: usize) -> usize {
        while self.parent[x] != x {
            self.parent[x] = self.parent[self.parent[x]];
            x = self.parent[x];
        }
        x
    }

    fn same(&mut self, a: usize, b: usize) -> bool {
        self.root(a) == self.root(b)
    }

    fn join(&mut self, a: usize, b: usize) {
        let (ra, rb) = (self.root(a), self.root(b));
        self.parent[ra] = rb;
    }
}

/// What the checks of a star read of one member, gathered once (the
/// catalogue's columns are read at random, a star at a time; NaN = missing).
#[derive(Clone, Copy)]
struct Member {
    c: CandidateId,
    period: f64,
    period_err: f64,
    duration_h: f64,
    epoch: f64,
    epoch_err: f64,
    /// The stellar density its transit implies, kg m⁻³, and its radius,
    /// R⊕ (`derive_for_flags`; NaN where unknown).
    density_transit: f64,
    radius_rearth: f64,
}

/// A value, `None` where missing (NaN), as `Catalogue::value` gives it.
fn given(v: f64) -> Option<f64> {
    (!v.is_nan()).then_some(v)
}

/// Whether b's transits fall on a's, and how far they were carried to be
/// compared.
struct Together {
    yes: bool,
    /// b's transit nearest a's epoch, from a's transits, days; `None` when
    /// the epochs count from different zeros and cannot be compared.
    off_d: Option<f64>,
    /// The cycles an ephemeris was carried, where that, beyond the
    /// durations and the epochs' own errors, made the transits together.
    carried: Option<Carried>,
}

struct Carried {
    cycles: f64,
    allow_d: f64,
    by_error: bool,
}

impl Together {
    /// What carrying the ephemeris allowed, where it was needed.
    fn carried_words(&self) -> String {
        self.carried.as_ref().map_or(String::new(), |c| {
            format!(
                ", within the {:.2} h that {:.0} cycles of the {} allow",
                c.allow_d * 24.0,
                c.cycles,
                if c.by_error {
                    "period's error"
                } else {
                    "periods' disagreement"
                }
            )
        })
    }

    /// `transits 0.11 h apart`, for a near-twin's detail.
    fn apart_words(&self) -> String {
        match self.off_d {
            Some(off) => format!(
                "transits {:.2} h apart{}",
                off.abs() * 24.0,
                self.carried_words()
            ),
            None => "transits the epochs cannot place (they count from different zeros)".into(),
        }
    }

    /// `offset 0.11 h`, for a harmonic's detail.
    fn offset_words(&self) -> String {
        match self.off_d {
            Some(off) => format!("offset {:.2} h{}", off.abs() * 24.0, self.carried_words()),
            None => "offset unknown: the epochs count from different zeros".into(),
        }
    }
}

/// Whether b's transits fall on a's, b's period being about n·P_a
/// (docs/science.md §3.1). An ephemeris is surest near its own epoch, and
/// two searches of one signal (a sector's and a mission's, say) can give
/// epochs years apart, so the test is made at both epochs: b's ephemeris
/// carried to a's epoch, and a's carried to b's. A carried transit time is
/// uncertain by σ² = σ_Ea² + σ_Eb² + N²σ_P² for N cycles of the carried
/// period (a missing epoch error counts 0). A period given without an error
/// is given the pair's own disagreement instead, |P_b − n·P_a| at b's
/// period (a n-th of it at a's): one of the two is off by about that much.
/// Together when the offset at either epoch is within the longer duration
/// plus 3σ. Epochs from different zeros (100,000 days apart) cannot be
/// compared: together. (The loader keeps no row without an epoch; were one
/// missing, the same.)
fn together(a: &Member, b: &Member, n: f64, t14_d: f64) -> Together {
    let (ea, eb) = (a.epoch, b.epoch);
    // Epochs 100,000 days apart count from different zeros (docs/science.md
    // §3.1): nothing tells the transits apart either.
    if ea.is_nan() || eb.is_nan() || (ea - eb).abs() > 1.0e5 {
        return Together {
            yes: true,
            off_d: None,
            carried: None,
        };
    }
    let (pa, pb) = (a.period, b.period);
    let var_e =
        given(a.epoch_err).unwrap_or(0.0).powi(2) + given(b.epoch_err).unwrap_or(0.0).powi(2);
    let disagreement = (pb - n * pa).abs();
    let (err_a, err_b) = (given(a.period_err), given(b.period_err));
    // At a's epoch: b's transit nearest it, carried nb cycles of P_b.
    let nb = ((ea - eb) / pb).round();
    let off_a = phase_offset_d(ea, pa, eb + nb * pb);
    let sigma_pb = err_b.unwrap_or(disagreement);
    let allow_a = t14_d + 3.0 * (var_e + (nb * sigma_pb).powi(2)).sqrt();
    // At b's epoch: a's transit nearest it, carried na cycles of P_a.
    let na = ((eb - ea) / pa).round();
    let off_b = phase_offset_d(ea, pa, eb);
    let sigma_pa = err_a.unwrap_or(disagreement / n);
    let allow_b = t14_d + 3.0 * (var_e + (na * sigma_pa).powi(2)).sqrt();
    let plain = t14_d + 3.0 * var_e.sqrt();
    let carried = |n: f64, allow_d: f64, off: f64, by_error: bool| {
        (off.abs() > plain).then_some(Carried {
            cycles: n.abs(),
            allow_d,
            by_error,
        })
    };
    // Of the tests that pass, the one that finds the transits closer.
    let at_a = (off_a.abs() <= allow_a).then(|| Together {
        yes: true,
        off_d: Some(off_a),
        carried: carried(nb, allow_a, off_a, err_b.is_some()),
    });
    let at_b = (off_b.abs() <= allow_b).then(|| Together {
        yes: true,
        off_d: Some(off_b),
        carried: carried(na, allow_b, off_b, err_a.is_some()),
    });
    match (at_a, at_b) {
        (Some(x), Some(y)) => {
            if off_b.abs() < off_a.abs() {
                y
            } else {
                x
            }
        }
        (Some(x), None) | (None, Some(x)) => x,
        (None, None) => Together {
            yes: false,
            off_d: Some(off_a),
            carried: None,
        },
    }
}

/// The catalogue's columns [`check`] reads of each member, its own and
/// those `derive_for_flags` reads.
pub(super) struct Read<'a> {
    catalogue: Vec<&'a Column>,
}

/// The columns [`check`] reads of each member.
pub(super) fn read_columns(cat: &Catalogue) -> Read<'_> {
    let catalogue = [
        Field::PeriodD,
        Field::PeriodErrD,
        Field::DurationH,
        Field::Epoch,
        Field::EpochErrD,
        Field::RaDeg,
        Field::DecDeg,
        Field::Mag,
        Field::StarRadiusRsun,
        Field::StarTeffK,
        Field::DepthPpm,
        Field::StarMassMsun,
        Field::StarLogg,
        Field::Contamination,
        Field::Impact,
        Field::Ror,
        Field::PlanetRadiusRearth,
    ]
    .into_iter()
    .filter_map(|f| cat.column(f))
    .collect();
    Read { catalogue }
}

/// Asks the memory for what [`check`] will read of `members`' rows
/// (`columns` from [`read_columns`]), some stars before it reads them: a
/// star's rows lie anywhere in the file.
pub(super) fn prefetch(columns: &Read, members: &[CandidateId]) {
    for &c in members {
        for col in &columns.catalogue {
            col.prefetch(c as usize);
        }
    }
}

/// Buffers reused from star to star.
#[derive(Default)]
pub(super) struct Scratch {
    members: Vec<Member>,
    deltas: Vec<Option<f64>>,
    others: Vec<f64>,
}

pub(super) fn check(
    cat: &Catalogue,
    members: &[CandidateId],
    s: &CheckSettings,
    scratch: &mut Scratch,
    links: &mut Vec<Link>,
    out: &mut Checks,
) {
    let v = |f: Field, c: CandidateId| cat.value(f, c);
    let id = |c: CandidateId| cat.candidate_id(c).to_string();
    let Scratch {
        members: m,
        deltas,
        others,
    } = scratch;
    let col = |f: Field| cat.column(f);
    let (periods, period_errs, durations, epochs, epoch_errs) = (
        col(Field::PeriodD),
        col(Field::PeriodErrD),
        col(Field::DurationH),
        col(Field::Epoch),
        col(Field::EpochErrD),
    );
    let at =
        |column: Option<&Column>, c: CandidateId| column.map_or(f64::NAN, |x| x.get(c as usize));
    m.clear();
    m.extend(members.iter().map(|&c| {
        let d = super::derive_for_flags(cat, c, s);
        Member {
            c,
            period: at(periods, c),
            period_err: at(period_errs, c),
            duration_h: at(durations, c),
            epoch: at(epochs, c),
            epoch_err: at(epoch_errs, c),
            density_transit: d.density_transit.unwrap_or(f64::NAN),
            radius_rearth: d.radius_rearth.unwrap_or(f64::NAN),
        }
    }));
    // Stable: members of equal period keep their catalogue order.
    m.sort_by(|a, b| a.period.total_cmp(&b.period));
    let m: &[Member] = m;
    deltas.clear();

    let mut joined = link_pairs(m, s, links);
    if !one_place(cat, members, s, out) && !rounded_id(cat, members, out) {
        one_star_values(cat, members, out);
    }

    // Adjacent pairs and trios: Hill spacing with masses from radii. A
    // candidate without a radius (its star's is unknown) is given the one
    // its depth implies around the smallest main-sequence star (§3.2): the
    // smallest planet it can be, so that a pair is flagged only if no host
    // could keep both.
    let star_mass = v(Field::StarMassMsun, m[0].c);
    let depths = col(Field::DepthPpm);
    let radius = |x: &Member| {
        let r = x.radius_rearth;
        if r.is_finite() {
            return Some((r, false));
        }
        let k = science::ror_from_depth(at(depths, x.c), 0.0, 0.0, DEFAULT_LD);
        let smallest = science::radius_rearth(k, SMALLEST_STAR_RSUN);
        (smallest.is_finite() && smallest > 0.0).then_some((smallest, true))
    };
    for i in 0..m.len().saturating_sub(1) {
        let (a, b) = (m[i].c, m[i + 1].c);
        let (period_a, period_b) = (m[i].period, m[i + 1].period);
        let delta = match (radius(&m[i]), radius(&m[i + 1])) {
            (Some((ra, least_a)), Some((rb, least_b))) => {
                let least = least_a || least_b;
                let mass_star = match (star_mass, least) {
                    (Some(mass), _) => mass,
                    (None, false) => 1.0,
                    (None, true) => SMALLEST_STAR_MSUN,
                };
                let (ma, mb) = (
                    science::mass_from_radius_mearth(ra),
                    science::mass_from_radius_mearth(rb),
                );
                let d = science::hill_separation(period_a, period_b, ma, mb, mass_star);
                // Two candidates of one signal group are one signal, not two
                // orbits.
                if d < science::HILL_CRITICAL && !joined.same(i, i + 1) {
                    // What was assumed, said only where a pair is flagged.
                    let (digits, assumed) = match (star_mass, least) {
                        (Some(_), false) => (1, String::new()),
                        (None, false) => (1, " (1 M☉ assumed)".to_string()),
                        (given, true) => (
                            3,
                            format!(
                                "; the star's radius unknown, the smallest main-sequence star \
                                 assumed ({SMALLEST_STAR_RSUN} R☉{}), which makes the planets \
                                 smallest",
                                if given.is_none() {
                                    format!(", {SMALLEST_STAR_MSUN} M☉")
                                } else {
                                    String::new()
                                }
                            ),
                        ),
                    };
                    for (x, y) in [(a, b), (b, a)] {
                        out.add(x, Flag::Crowded, false, format!(
                            "{d:.2} mutual Hill radii from {} (< 2√3 = 3.46; masses {ma:.digits$} and {mb:.digits$} M⊕ from Weiss & Marcy 2014{assumed}): both cannot orbit this star stably",
                            id(y)
                        ));
                    }
                }
                Some(d)
            }
            _ => None,
        };
        deltas.push(delta);
    }
    for i in 0..deltas.len().saturating_sub(1) {
        if let (Some(d1), Some(d2)) = (deltas[i], deltas[i + 1])
            && d1 + d2 < s.trio_hill_sum
            && d1 >= science::HILL_CRITICAL
            && d2 >= science::HILL_CRITICAL
        {
            let trio = [m[i].c, m[i + 1].c, m[i + 2].c];
            for &x in &trio {
                out.add(
                    x,
                    Flag::Crowded,
                    true,
                    format!(
                        "trio {}, {}, {}: Hill spacings {d1:.1} + {d2:.1} < {}",
                        id(trio[0]),
                        id(trio[1]),
                        id(trio[2]),
                        s.trio_hill_sum
                    ),
                );
            }
        }
    }

    // Durations: the density each transit implies, against its siblings'.
    // The siblings' median is read from one sorted list of the whole star
    // with the candidate's own value taken out (O(m log m) per star).
    others.clear();
    others.extend(
        m.iter()
            .map(|o| o.density_transit)
            .filter(|d| d.is_finite()),
    );
    others.sort_by(f64::total_cmp);
    for (c, own) in m.iter().map(|x| (x.c, x.density_transit)) {
        if !own.is_finite() || others.len() < 2 {
            continue;
        }
        // `others` without one copy of `own`: index i maps to i, or i + 1
        // at and after own's first position.
        let at = others.partition_point(|x| *x < own);
        let mid = (others.len() - 1) / 2;
        let median = if mid < at {
            others[mid]
        } else {
            others[mid + 1]
        };
        let ratio = own / median;
        if ratio > s.density_factor || ratio < 1.0 / s.density_factor {
            out.add(c, Flag::DensityMismatch, false, format!(
                "its duration implies ρ★ = {own:.0} kg/m³, its siblings' {median:.0} kg/m³ (ratio {ratio:.3}): perhaps another star"
            ));
        }
    }
    // The normalised duration ratio of adjacent pairs, a soft signal.
    for i in 0..m.len().saturating_sub(1) {
        let (a, b) = (m[i].c, m[i + 1].c);
        if let (Some(ta), Some(tb)) = (given(m[i].duration_h), given(m[i + 1].duration_h)) {
            let xi = science::duration_ratio_xi(ta, m[i].period, tb, m[i + 1].period);
            if xi.log10().abs() > s.xi_log10 {
                for (x, y) in [(a, b), (b, a)] {
                    out.add(
                        x,
                        Flag::DensityMismatch,
                        true,
                        format!(
                            "normalised duration ratio ξ with {} is {xi:.2} (|log ξ| = {:.2} > {})",
                            id(y),
                            xi.log10().abs(),
                            s.xi_log10
                        ),
                    );
                }
            }
        }
    }
}

/// The links of one star's members (`m`, in period order): every pair that
/// is one signal twice (same period, transits together), an alias (period
/// ratio n or 1/n, transits together) or an eclipse pair (same period,
/// transits apart, or the longer's transits halfway between the shorter's:
/// two planets cannot share an orbit — zero Hill separation). Each is a
/// link of a signal group; the returned union-find says which members the
/// links joined.
fn link_pairs(m: &[Member], s: &CheckSettings, links: &mut Vec<Link>) -> Joined {
    // Bounded for any input: each candidate meets at most PAIR_WINDOW
    // partners, only those within the largest harmonic of its period, and a
    // link is kept only between candidates not already joined (a spanning
    // forest of each group), so thousands of copies of one signal on one
    // star cost linear memory.
    let mut joined = Joined::new(m.len());
    let widest = (s.harmonic_max as f64) * (1.0 + 10.0 * s.period_rel_tol).max(1.01);
    for (i, ma) in m.iter().enumerate() {
        let a = ma.c;
        let partners = m[i + 1..]
            .iter()
            .enumerate()
            .take_while(|&(_, mb)| mb.period <= widest * ma.period)
            .take(PAIR_WINDOW);
        for (j, mb) in partners {
            let b = mb.c;
            let j = i + 1 + j;
            if joined.same(i, j) {
                continue;
            }
            let before = links.len();
            let (pa, pb) = (ma.period, mb.period);
            let r = pb / pa;
            let sigma = ratio_sigma(r, pa, given(ma.period_err), pb, given(mb.period_err));
            let tol = |n: f64| (3.0 * sigma.unwrap_or(0.0)).max(s.period_rel_tol * n);
            let t14_d = given(ma.duration_h)
                .unwrap_or(0.0)
                .max(given(mb.duration_h).unwrap_or(0.0))
                / 24.0;
            if (r - 1.0).abs() <= tol(1.0) {
                let t = together(ma, mb, 1.0, t14_d);
                if t.yes {
                    links.push(Link {
                        a,
                        b,
                        flag: Flag::NearTwin,
                        detail: format!(
                            "period ratio {r:.6} (within {:.1e} of 1) and {}: one signal found twice",
                            tol(1.0),
                            t.apart_words()
                        ),
                    });
                } else {
                    let phase = (t.off_d.unwrap_or(0.0) / pa).rem_euclid(1.0);
                    links.push(Link {
                        a,
                        b,
                        flag: Flag::HalfPhase,
                        detail: format!(
                            "same period (ratio {r:.6}) with transits at phase {phase:.3} of each other: two eclipses of one binary (two planets cannot share an orbit)"
                        ),
                    });
                }
                joined.join(i, j);
                continue;
            }
            for n in 2..=s.harmonic_max {
                let nf = n as f64;
                if (r - nf).abs() > tol(nf) {
                    continue;
                }
                let t = together(ma, mb, nf, t14_d);
                if t.yes {
                    links.push(Link {
                        a,
                        b,
                        flag: Flag::Harmonic,
                        detail: format!(
                            "period ratio {r:.6} ≈ {n} and every transit of the longer falls on one of the shorter ({}): one signal at two periods",
                            t.offset_words()
                        ),
                    });
                    continue;
                }
                // The longer's transits halfway between the shorter's: a
                // circular binary's other eclipse, found at n times its
                // period (docs/science.md §3.1). One binary's two eclipses
                // give periods n:1 within their errors, so where errors are
                // given they alone bound the ratio.
                if sigma.is_some_and(|sg| (r - nf).abs() > 3.0 * sg) {
                    continue;
                }
                let halfway = Member {
                    epoch: mb.epoch + 0.5 * pa,
                    ..*mb
                };
                let t = together(ma, &halfway, nf, t14_d);
                if t.yes && t.off_d.is_some() {
                    links.push(Link {
                        a,
                        b,
                        flag: Flag::HalfPhase,
                        detail: format!(
                            "period ratio {r:.6} ≈ {n} and every transit of the longer falls halfway between two of the shorter ({}): the two eclipses of one binary, one found at {n} times the period (planets cannot share an orbit)",
                            t.offset_words().replacen("offset", "offset from phase 0.5", 1)
                        ),
                    });
                }
            }
            if links.len() > before {
                joined.join(i, j);
            }
        }
    }
    joined
}

/// One star, one place (docs/science.md §3.4). The rows of a star give its
/// position; rows farther apart than the echo radius (the distance at which
/// the checks take a signal to be on another star) are not one star, but
/// several under one host id, such as a placeholder for unknown hosts.
/// Which rows are the star is unknown, so every member is flagged
/// `mixed-host`: signals of several stars must not make one system.
/// True when it flagged the members.
fn one_place(
    cat: &Catalogue,
    members: &[CandidateId],
    s: &CheckSettings,
    out: &mut Checks,
) -> bool {
    let (Some(ra), Some(dec)) = (cat.column(Field::RaDeg), cat.column(Field::DecDeg)) else {
        return false;
    };
    let mut placed = members.iter().filter_map(|&c| {
        let (r, d) = (ra.get(c as usize), dec.get(c as usize));
        super::echo::real_position(r, d).then_some((c, r, d))
    });
    let Some((first, ra0, dec0)) = placed.next() else {
        return false;
    };
    let farthest = placed
        .map(|(c, r, d)| (c, super::echo::separation_arcsec(ra0, dec0, r, d)))
        .max_by(|a, b| a.1.total_cmp(&b.1));
    let Some((other, apart)) = farthest.filter(|f| f.1 > s.echo_radius_arcsec) else {
        return false;
    };
    let why = format!(
        "the rows of star {} lie {apart:.0}″ apart ({} and {}), farther than the echo radius \
         ({}″) at which the checks take a signal to be on another star: not one star but \
         several under one id (a placeholder for unknown hosts?), so none of them counts \
         towards a system",
        cat.star_id(cat.star_of(first)),
        cat.candidate_id(first),
        cat.candidate_id(other),
        s.echo_radius_arcsec
    );
    for &c in members {
        out.add(c, Flag::MixedHost, false, why.clone());
    }
    true
}

/// A star whose id is a whole number written as a rounded float
/// (`1.23457e+08`: `catalogue::rounded_number`) may be several stars whose
/// ids lost the digits that told them apart (docs/science.md §3.4). Unless
/// every row gives a position (which [`one_place`] has found within the
/// echo radius of each other), nothing shows its rows to be one star:
/// every member is flagged `mixed-host`. True when it flagged them.
fn rounded_id(cat: &Catalogue, members: &[CandidateId], out: &mut Checks) -> bool {
    let id = cat.star_id(cat.star_of(members[0]));
    if !crate::catalogue::rounded_number(id) {
        return false;
    }
    if let (Some(ra), Some(dec)) = (cat.column(Field::RaDeg), cat.column(Field::DecDeg)) {
        let placed =
            |c: CandidateId| super::echo::real_position(ra.get(c as usize), dec.get(c as usize));
        if members.iter().all(|&c| placed(c)) {
            return false;
        }
    }
    let why = format!(
        "the star's id `{}` is a whole number written as a rounded float: ids of several \
         stars that differ only in the digits left out read as this one, and no positions \
         say whether its rows are one star, so none of them counts towards a system; write \
         the ids as text or give positions",
        id.trim()
    );
    for &c in members {
        out.add(c, Flag::MixedHost, false, why.clone());
    }
    true
}

/// How far apart the rows of one star may give its brightness and its
/// parameters (docs/science.md §3.4). A star's magnitude in one band agrees
/// between catalogue rows within its photometric error, a few hundredths of
/// a magnitude for survey targets, and archives repeat the host's values on
/// every row of it; tables that fit the star anew for each candidate move
/// its radius and temperature by tens of per cent, not by a factor *(the
/// limits: common practice, no source; set wide, so that only rows of
/// different stars exceed them)*.
pub const ONE_STAR_MAG_SPREAD: f64 = 1.0;
pub const ONE_STAR_RADIUS_RATIO: f64 = 2.0;
pub const ONE_STAR_TEFF_RATIO: f64 = 1.5;

/// One star, one light: rows of one id whose magnitudes differ by more than
/// [`ONE_STAR_MAG_SPREAD`], or whose stellar radii or temperatures differ by
/// more than a factor [`ONE_STAR_RADIUS_RATIO`] or [`ONE_STAR_TEFF_RATIO`],
/// are several stars under one id (a placeholder for unknown hosts, in a
/// catalogue without positions): every member is flagged `mixed-host`.
fn one_star_values(cat: &Catalogue, members: &[CandidateId], out: &mut Checks) {
    let extremes = |f: Field| {
        let col = cat.column(f)?;
        let mut vals = members
            .iter()
            .map(|&c| (c, col.get(c as usize)))
            .filter(|v| v.1.is_finite());
        let first = vals.next()?;
        let (lo, hi) = vals.fold((first, first), |(lo, hi), v| {
            (
                if v.1 < lo.1 { v } else { lo },
                if v.1 > hi.1 { v } else { hi },
            )
        });
        Some((lo, hi))
    };
    let tests = [
        (Field::Mag, "magnitudes", ONE_STAR_MAG_SPREAD, false),
        (
            Field::StarRadiusRsun,
            "stellar radii",
            ONE_STAR_RADIUS_RATIO,
            true,
        ),
        (Field::StarTeffK, "temperatures", ONE_STAR_TEFF_RATIO, true),
    ];
    for (field, what, limit, ratio) in tests {
        let Some(((c_lo, lo), (c_hi, hi))) = extremes(field) else {
            continue;
        };
        let apart = if ratio {
            lo > 0.0 && hi / lo > limit
        } else {
            hi - lo > limit
        };
        if !apart {
            continue;
        }
        let bound = if ratio {
            format!("a factor {limit}")
        } else {
            format!("{limit} mag")
        };
        let why = format!(
            "the rows of star {} give {what} {lo} ({}) and {hi} ({}), farther apart than one \
             star's can be ({bound}): not one star but several under one id (a placeholder for \
             unknown hosts?), so none of them counts towards a system",
            cat.star_id(cat.star_of(c_lo)),
            cat.candidate_id(c_lo),
            cat.candidate_id(c_hi),
        );
        for &c in members {
            out.add(c, Flag::MixedHost, false, why.clone());
        }
        return;
    }
}
