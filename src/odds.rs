//! The multiplicity odds model (docs/science.md §1–§1.2; the framework of
//! Lissauer et al. 2012, ApJ 750, 112 and 2014, ApJ 784, 44): false positives
//! land on the N searched targets at random, planets cluster, so a candidate
//! that shares its star is more likely a planet. This module computes the
//! per-multiplicity table from N, f and the histogram of non-rejected
//! candidates per star; [`live`] keeps it current as decisions change.

mod fenwick;
pub mod live;
pub mod pool;

use std::fmt;

use statrs::function::factorial::ln_factorial;

use crate::flags::FlagSet;

pub use live::{Dispute, Hold, Live, Status, VerdictCounts, names_false_positive};

/// How the boost on prior odds is defined (docs/science.md §1).
#[derive(Clone, Debug, PartialEq)]
pub enum BoostMode {
    /// From the catalogue's own histogram, per candidate: q_k = F_k/(k n_k).
    Catalogue,
    /// The per-system variant: s_k = E_k/n_k used as the FP probability.
    System,
    /// Given factors on prior odds per k, ascending; a k beyond the last
    /// given uses the last; a k below the first uses 1.
    Fixed(Vec<(usize, f64)>),
}

impl BoostMode {
    /// Whether the boost comes from the catalogue's histogram (not given).
    pub fn uses_histogram(&self) -> bool {
        matches!(self, BoostMode::Catalogue | BoostMode::System)
    }

    /// Parses `catalogue`, `system` or `fixed:2=25,3=100`.
    pub fn parse(s: &str) -> Result<BoostMode, String> {
        match s {
            "catalogue" | "catalog" => Ok(BoostMode::Catalogue),
            "system" => Ok(BoostMode::System),
            _ => {
                let Some(list) = s.strip_prefix("fixed:") else {
                    return Err(format!(
                        "`{s}` is not a boost mode; use catalogue, system or fixed:2=25,3=100"
                    ));
                };
                let mut v = Vec::new();
                for item in list.split(',') {
                    let (k, b) = item.split_once('=').ok_or_else(|| {
                        format!("`{item}` in `{s}` should be k=factor, e.g. 2=25")
                    })?;
                    let k: usize = k
                        .trim()
                        .parse()
                        .map_err(|_| format!("`{k}` in `{s}` is not a multiplicity"))?;
                    let b: f64 = b
                        .trim()
                        .parse()
                        .map_err(|_| format!("`{b}` in `{s}` is not a number"))?;
                    if k < 2 || !b.is_finite() || b <= 0.0 {
                        return Err(format!(
                            "`{item}` in `{s}`: k must be at least 2 and the factor a positive number"
                        ));
                    }
                    v.push((k, b));
                }
                v.sort_by_key(|e| e.0);
                v.dedup_by_key(|e| e.0);
                if let Some(w) = v.windows(2).find(|w| w[1].1 < w[0].1) {
                    return Err(format!(
                        "`{s}`: the factor for k = {} ({}) is below that for k = {} ({}); a boost must not fall as k rises",
                        w[1].0, w[1].1, w[0].0, w[0].1
                    ));
                }
                Ok(BoostMode::Fixed(v))
            }
        }
    }

    pub fn describe(&self) -> String {
        match self {
            BoostMode::Catalogue => {
                "catalogue (per candidate: q_k = F_k/(k n_k), boost = [(1-q_k)/q_k]/[(1-f)/f])"
                    .into()
            }
            BoostMode::System => {
                "system (per system: s_k = E_k/n_k, boost = [(1-s_k)/s_k]/[(1-f)/f])".into()
            }
            BoostMode::Fixed(v) => format!(
                "fixed ({})",
                v.iter()
                    .map(|(k, b)| format!("{k}={b}"))
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        }
    }
}

/// The model's settings: survey facts and the validation rule.
#[derive(Clone, Debug, PartialEq)]
pub struct Model {
    /// N: targets searched. Required by the catalogue and system modes.
    pub targets: Option<u64>,
    /// f: false-positive fraction among single-candidate stars, in (0, 1);
    /// for candidates outside every size bin (or with no radius) when f
    /// depends on planet radius.
    pub fp_fraction: f64,
    /// f by planet radius, when given: the bin a candidate's radius falls in
    /// sets its f (docs/science.md §1.4).
    pub fp_by_radius: Vec<SizeBin>,
    pub mode: BoostMode,
    /// Posterior odds needed for `validated` (default 100, i.e. P ≥ 100/101).
    pub threshold: f64,
    /// Flags that keep a candidate from `validated`.
    pub blocking: FlagSet,
}

/// A planet-radius range [lo, hi) in Earth radii with its false-positive
/// fraction.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SizeBin {
    pub lo_rearth: f64,
    pub hi_rearth: f64,
    pub f: f64,
}

/// Parses `--fp-fraction`: one number (`0.1`) or size bins
/// (`0-2:0.07,2-6:0.09,6-22:0.18`, radii in Earth radii, [lo, hi)). Returns
/// the single f (None with bins) and the bins.
pub fn parse_fp_fraction(s: &str) -> Result<(Option<f64>, Vec<SizeBin>), String> {
    let s = s.trim();
    if !s.contains(':') {
        let f: f64 = s.parse().map_err(|_| {
            format!("--fp-fraction `{s}` is not a number nor size bins like 0-2:0.07,2-6:0.09")
        })?;
        if !(f > 0.0 && f < 1.0) {
            return Err(format!(
                "--fp-fraction {s} is outside (0, 1); the odds form needs 0 < f < 1"
            ));
        }
        return Ok((Some(f), Vec::new()));
    }
    let mut bins: Vec<SizeBin> = Vec::new();
    for item in s.split(',').map(str::trim) {
        let bad = || {
            format!(
                "`{item}` in --fp-fraction {s}: write lo-hi:f, e.g. 6-22:0.18 (radii in Earth radii)"
            )
        };
        let (range, f) = item.split_once(':').ok_or_else(bad)?;
        let (lo, hi) = range.split_once('-').ok_or_else(bad)?;
        let (lo, hi, f): (f64, f64, f64) = (
            lo.trim().parse().map_err(|_| bad())?,
            hi.trim().parse().map_err(|_| bad())?,
            f.trim().parse().map_err(|_| bad())?,
        );
        if !(lo >= 0.0 && hi > lo && f > 0.0 && f < 1.0) {
            return Err(format!(
                "`{item}` in --fp-fraction {s}: need 0 <= lo < hi and 0 < f < 1"
            ));
        }
        if let Some(o) = bins.iter().find(|b| lo < b.hi_rearth && b.lo_rearth < hi) {
            return Err(format!(
                "`{item}` in --fp-fraction {s} overlaps {}-{}",
                o.lo_rearth, o.hi_rearth
            ));
        }
        bins.push(SizeBin {
            lo_rearth: lo,
            hi_rearth: hi,
            f,
        });
    }
    bins.sort_by(|a, b| a.lo_rearth.total_cmp(&b.lo_rearth));
    Ok((None, bins))
}

impl Model {
    /// f for a candidate of planet radius `radius_rearth` (NaN = unknown):
    /// its size bin's, else the model's f.
    pub fn fp_for_radius(&self, radius_rearth: f64) -> f64 {
        self.fp_by_radius
            .iter()
            .find(|b| radius_rearth >= b.lo_rearth && radius_rearth < b.hi_rearth)
            .map_or(self.fp_fraction, |b| b.f)
    }

    /// `f = 0.1`, or the size bins and the f outside them.
    pub fn describe_fp(&self) -> String {
        if self.fp_by_radius.is_empty() {
            format!("f = {}", self.fp_fraction)
        } else {
            format!(
                "f by planet radius {} (R⊕), {} outside them or without a radius",
                self.fp_by_radius
                    .iter()
                    .map(|b| format!("{}-{}:{}", b.lo_rearth, b.hi_rearth, b.f))
                    .collect::<Vec<_>>()
                    .join(","),
                self.fp_fraction
            )
        }
    }
}

/// The validation threshold of docs/science.md §1 and §1.1: planet:FP odds of 100:1.
pub const DEFAULT_THRESHOLD: f64 = 100.0;
/// The default f (docs/science.md §1; Fressin et al. 2013, ApJ 766, 81 give 9.4%).
pub const DEFAULT_FP_FRACTION: f64 = 0.1;
/// The smallest FP probability a table row may hold: below it the model says
/// nothing more (q_k underflows only when λ is 0 or k is very large).
const Q_FLOOR: f64 = 1e-300;

impl Default for Model {
    fn default() -> Model {
        Model {
            targets: None,
            fp_fraction: DEFAULT_FP_FRACTION,
            fp_by_radius: Vec::new(),
            mode: BoostMode::Catalogue,
            threshold: DEFAULT_THRESHOLD,
            blocking: FlagSet::default_blocking(),
        }
    }
}

#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ModelError {
    #[error(
        "the {0} boost needs the number of targets searched (N): give --targets N, \
         put targets_searched in survey.toml beside the catalogue, or use --boost fixed:2=25,3=100"
    )]
    NoTargets(&'static str),
    #[error("--fp-fraction {0} is outside (0, 1); the odds form needs 0 < f < 1")]
    BadFraction(f64),
    #[error("--threshold {0} must be a positive number")]
    BadThreshold(f64),
    #[error(
        "N = {targets} targets searched is below the {stars} stars with candidates in the catalogue; \
         N must count every star searched, with or without candidates"
    )]
    TooFewTargets { targets: u64, stars: usize },
}

/// One multiplicity's row of the model table (docs/science.md §1.2–§1.3).
#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    pub k: usize,
    /// n_k: stars with exactly k countable candidates.
    pub stars: usize,
    /// E_k: expected k-systems that contain at least one FP.
    pub e: f64,
    /// F_k: expected FP candidates in k-systems.
    pub f: f64,
    /// q_k = F_k/(k n_k): FP probability per candidate, this k alone.
    pub q: f64,
    /// s_k = E_k/n_k: FP probability per system, this k alone.
    pub s: f64,
    /// B_k,cand = f/q_k.
    pub boost_cand: f64,
    /// B_k,sys = f/s_k.
    pub boost_sys: f64,
    /// B_k,odds = [(1−q_k)/q_k]/[(1−f)/f].
    pub boost_odds: f64,
    /// The multiplicities pooled with this one for the boost applied
    /// (lo, hi); (k, k) when it stands alone.
    pub pool: (usize, usize),
    /// The FP probability the applied boost uses: pooled, monotone in k.
    pub q_used: f64,
    /// The factor on prior odds that the chosen mode applies.
    pub boost: f64,
}

/// The model table for one histogram: a row for every k from 1 to k_max.
#[derive(Clone, Debug, PartialEq)]
pub struct Table {
    pub targets: Option<u64>,
    /// f̄: the mean false-positive fraction of the single-candidate stars
    /// (f itself unless f depends on planet radius).
    pub fp_fraction: f64,
    /// λ = N_FP / N: FPs per target, N_FP = Σ f over the singles.
    pub lambda: f64,
    pub rows: Vec<Row>,
    /// Clamps and other cautions, each naming its cause.
    pub warnings: Vec<String>,
}

/// Poisson probability of j events at mean λ, computed in logs so that large
/// j cannot overflow: π_j = exp(−λ + j ln λ − ln j!) (docs/science.md §1.2 step 3).
pub fn poisson(lambda: f64, j: usize) -> f64 {
    if lambda == 0.0 {
        return if j == 0 { 1.0 } else { 0.0 };
    }
    (-lambda + j as f64 * lambda.ln() - ln_factorial(j as u64)).exp()
}

/// Checks the model's inputs against the catalogue.
pub fn check_inputs(model: &Model, stars: usize) -> Result<(), ModelError> {
    if !(model.fp_fraction > 0.0 && model.fp_fraction < 1.0) {
        return Err(ModelError::BadFraction(model.fp_fraction));
    }
    if let Some(b) = model
        .fp_by_radius
        .iter()
        .find(|b| !(b.f > 0.0 && b.f < 1.0))
    {
        return Err(ModelError::BadFraction(b.f));
    }
    if !(model.threshold.is_finite() && model.threshold > 0.0) {
        return Err(ModelError::BadThreshold(model.threshold));
    }
    match (&model.mode, model.targets) {
        (BoostMode::Catalogue, None) => Err(ModelError::NoTargets("catalogue")),
        (BoostMode::System, None) => Err(ModelError::NoTargets("system")),
        (_, Some(n)) if (n as u128) < stars as u128 => {
            Err(ModelError::TooFewTargets { targets: n, stars })
        }
        _ => Ok(()),
    }
}

/// The model table for histogram `hist` with one f for every single
/// (N_FP = f n₁): see [`table_with`].
pub fn table(model: &Model, hist: &[usize]) -> Table {
    let n1 = hist.get(1).copied().unwrap_or(0) as f64;
    table_with(model, hist, model.fp_fraction * n1)
}

/// The model table for histogram `hist` (`hist[k]` = stars with k countable
/// candidates; index 0 ignored) when the singles hold `fp_singles` expected
/// false positives (Σ f over them), docs/science.md §1.2:
///
/// 1. λ = N_FP / N, f̄ = N_FP / n₁
/// 2. h₁ = n₁ − N_FP, h_m = n_m (m ≥ 2), h₀ = N − Σ h_m
/// 3. π_j = e^{−λ} λ^j / j!
/// 4. E_k = Σ_{j=1..k} h_{k−j} π_j,  5. F_k = Σ_{j=1..k} j h_{k−j} π_j
/// 6. q_k = F_k/(k n_k), s_k = E_k/n_k
/// 7. B_cand = f̄/q_k, B_sys = f̄/s_k, B_odds = [(1−q_k)/q_k]/[(1−f̄)/f̄]
///
/// The boost applied uses q_k (catalogue mode) or s_k (system mode) pooled
/// over sparse bins and made non-increasing in k (docs/science.md §1.3,
/// [`pool::pools`]), never above f̄, so the boost never falls as k rises.
/// Rows where n_k = 0 still get E_k and F_k, with q_k computed as if one such
/// star existed, so a what-if can read them. Inputs must have passed
/// [`check_inputs`].
pub fn table_with(model: &Model, hist: &[usize], fp_singles: f64) -> Table {
    let k_max = hist.len().saturating_sub(1).max(1);
    let n = |k: usize| hist.get(k).copied().unwrap_or(0);
    let n1 = n(1) as f64;
    let f = if n(1) > 0 {
        (fp_singles / n1).clamp(Q_FLOOR, 1.0 - 1e-12)
    } else {
        model.fp_fraction
    };
    let mut warnings = Vec::new();
    let Some(targets) = model.targets else {
        // Fixed mode without N: only the given factors.
        let rows = (1..=k_max)
            .map(|k| Row {
                k,
                stars: n(k),
                e: f64::NAN,
                f: f64::NAN,
                q: f64::NAN,
                s: f64::NAN,
                boost_cand: f64::NAN,
                boost_sys: f64::NAN,
                boost_odds: f64::NAN,
                pool: (k, k),
                q_used: f64::NAN,
                boost: fixed_boost(&model.mode, k),
            })
            .collect();
        return Table {
            targets: None,
            fp_fraction: f,
            lambda: f64::NAN,
            rows,
            warnings,
        };
    };
    let big_n = targets as f64;
    let n_fp = f * n1;
    let lambda = n_fp / big_n;
    // No single to estimate N_FP from: λ would be 0 and every multiple
    // planets beyond doubt, which says nothing of a survey but that the
    // table holds only its multiples (a subset, or singles all held back).
    let no_singles = n(1) == 0;
    let multiples: usize = (2..hist.len()).map(n).sum();
    if !model.mode.uses_histogram() {
        // A given boost stands, whatever the histogram.
    } else if no_singles {
        warnings.push(
            "no single-candidate stars: the model's false-positive rate λ = N_FP/N cannot be \
             estimated (N_FP comes from the singles; a table of multiples only is not a \
             survey's catalogue), so no multiplicity boost is applied"
                .to_string(),
        );
    } else if n(1) < multiples {
        warnings.push(format!(
            "fewer single-candidate stars ({}) than stars with several ({multiples}): a survey's \
             catalogue has several singles to each multiple (827 to 170 among Kepler's first \
             candidates, Latham et al. 2011, from memory), so this table may be a subset of one; \
             the odds assume it is a survey's whole vetted catalogue",
            n(1)
        ));
    }
    let h = |m: usize| -> f64 {
        match m {
            0 => big_n - (n1 - n_fp) - (2..hist.len()).map(|j| n(j) as f64).sum::<f64>(),
            1 => n1 - n_fp,
            m => n(m) as f64,
        }
    };
    let prior_odds = (1.0 - f) / f;
    let pi: Vec<f64> = (0..=k_max).map(|j| poisson(lambda, j)).collect();
    let mut rows = Vec::with_capacity(k_max);
    let clamp = |x: f64, k: usize, stars: usize, what: &str, warnings: &mut Vec<String>| -> f64 {
        if x >= 1.0 {
            if stars > 0 {
                warnings.push(format!(
                    "k = {k}: {what} = {x:.3} ≥ 1 (the model expects more false positives in \
                     {k}-candidate stars than the {stars} the catalogue has); clamped to 0.999999"
                ));
            }
            0.999_999
        } else if x < Q_FLOOR {
            Q_FLOOR
        } else {
            x
        }
    };
    for k in 1..=k_max {
        let (mut e, mut fk) = (0.0, 0.0);
        for (j, p) in pi.iter().enumerate().take(k + 1).skip(1) {
            let term = h(k - j) * p;
            e += term;
            fk += j as f64 * term;
        }
        let stars = n(k);
        let denom = stars.max(1) as f64;
        let (q, s) = if k == 1 {
            (f, f)
        } else {
            (
                clamp(fk / (k as f64 * denom), k, stars, "q", &mut warnings),
                clamp(e / denom, k, stars, "s", &mut warnings),
            )
        };
        rows.push(Row {
            k,
            stars,
            e,
            f: fk,
            q,
            s,
            boost_cand: f / q,
            boost_sys: f / s,
            boost_odds: ((1.0 - q) / q) / prior_odds,
            pool: (k, k),
            q_used: q,
            boost: 1.0,
        });
    }
    // The estimate the mode applies, pooled and monotone over k ≥ 2.
    let system = model.mode == BoostMode::System;
    let bins: Vec<(f64, f64, usize)> = rows[1..]
        .iter()
        .map(|r| {
            if system {
                (r.e, r.stars as f64, r.stars)
            } else {
                (r.f, (r.k * r.stars) as f64, r.stars)
            }
        })
        .collect();
    let grow = |k: usize| if system { 1.0 } else { k as f64 };
    for p in pool::pools(&bins, grow) {
        let v = if p.den > 0.0 {
            clamp(
                p.value(),
                p.lo,
                p.stars,
                "pooled FP probability",
                &mut warnings,
            )
        } else {
            // A run of empty bins (what-if rows): the lowest k's own estimate.
            if system {
                rows[p.lo - 1].s
            } else {
                rows[p.lo - 1].q
            }
        };
        for r in &mut rows[p.lo - 1..p.hi] {
            r.pool = (p.lo, p.hi);
            r.q_used = v.min(f);
        }
    }
    for r in &mut rows {
        r.boost = match &model.mode {
            BoostMode::Catalogue | BoostMode::System if no_singles => 1.0,
            BoostMode::Catalogue | BoostMode::System => ((1.0 - r.q_used) / r.q_used) / prior_odds,
            fixed => fixed_boost(fixed, r.k),
        };
    }
    Table {
        targets: Some(targets),
        fp_fraction: f,
        lambda,
        rows,
        warnings,
    }
}

fn fixed_boost(mode: &BoostMode, k: usize) -> f64 {
    match mode {
        BoostMode::Fixed(v) => v
            .iter()
            .rev()
            .find(|(kk, _)| *kk <= k)
            .map_or(1.0, |(_, b)| *b),
        _ => 1.0,
    }
}

impl Table {
    /// The row for multiplicity k (k ≥ 1). Beyond the table, the last row's
    /// boost is used (only reachable for a what-if above k_max).
    pub fn row(&self, k: usize) -> Option<&Row> {
        self.rows.get(k.checked_sub(1)?)
    }

    pub fn boost(&self, k: usize) -> f64 {
        match self.row(k) {
            Some(r) => r.boost,
            None => self.rows.last().map_or(1.0, |r| r.boost),
        }
    }
}

/// Posterior odds planet : FP for a candidate with prior FP probability `p`
/// (its `fpp`, else f) in a system whose boost is `b`: O = B (1−p)/p
/// (docs/science.md §1). Finite for p in (0, 1].
pub fn posterior_odds(boost: f64, prior_fp: f64) -> f64 {
    let p = prior_fp.clamp(Q_FLOOR, 1.0);
    let o = boost * (1.0 - p) / p;
    if o.is_finite() { o } else { f64::MAX }
}

/// P = O/(1+O).
pub fn probability(odds: f64) -> f64 {
    if odds.is_infinite() {
        1.0
    } else {
        odds / (1.0 + odds)
    }
}

/// The computed verdict of a candidate (never typed by a person).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Verdict {
    Validated,
    Likely,
    Unlikely,
    Rejected,
}

pub const ALL_VERDICTS: [Verdict; 4] = [
    Verdict::Validated,
    Verdict::Likely,
    Verdict::Unlikely,
    Verdict::Rejected,
];

impl Verdict {
    pub fn name(self) -> &'static str {
        match self {
            Verdict::Validated => "validated",
            Verdict::Likely => "likely",
            Verdict::Unlikely => "unlikely",
            Verdict::Rejected => "rejected",
        }
    }
}

impl fmt::Display for Verdict {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// `rejected`: a vetter rejected it; `validated`: counted by the model (not
/// rejected, no blocking flag, the representative of its signal group) with
/// odds ≥ threshold; else `likely` at odds ≥ 1 and `unlikely` below.
/// (`Live::verdict` makes a held candidate whose own flags say it is no
/// planet `unlikely` before asking this; docs/science.md §1.1.)
pub fn verdict(odds: f64, threshold: f64, rejected: bool, counted: bool) -> Verdict {
    if rejected {
        Verdict::Rejected
    } else if odds >= threshold && counted {
        Verdict::Validated
    } else if odds >= 1.0 {
        Verdict::Likely
    } else {
        Verdict::Unlikely
    }
}

/// The statement every output carries.
pub fn model_statement(model: &Model) -> String {
    format!(
        "Odds are planet : false positive under the multiplicity model (false positives placed at random \
         on N targets, planets clustered; Lissauer et al. 2012, 2014), boost {}, sparse k pooled and the \
         boost never falling with k; only counted candidates (not rejected, no blocking flag, one per \
         signal group) make a system; validated means counted with odds >= {}:1. Statistical validation \
         is not confirmation.",
        model.mode.describe(),
        model.threshold
    )
}

/// Why a candidate is held back from the count, in a few words (ids
/// sanitised); empty when it counts or is rejected.
pub fn hold_text(
    cat: &crate::catalogue::Catalogue,
    live: &Live,
    c: crate::catalogue::CandidateId,
) -> String {
    let id = |c| crate::sanitize::clean(cat.candidate_id(c)).into_owned();
    match live.hold(c) {
        None => String::new(),
        Some(Hold::Flags(f)) => format!("blocked by {}", f.joined(", ")),
        Some(Hold::Unvetted) => "an event not yet kept by a vetter".to_string(),
        Some(Hold::Copy { rep, kind }) => {
            format!("{kind}: one signal with {}, counted as it", id(rep))
        }
        Some(Hold::GroupRejected { by, reason }) => {
            format!("one signal with {}, rejected as {}", id(by), reason.name())
        }
        Some(Hold::GroupHeld { rep }) => {
            format!("one signal with {}, which is held back", id(rep))
        }
        Some(Hold::Sibling { fp, reason, flags }) => {
            let why = match reason {
                Some(r) => format!("rejected as {}", r.name()),
                None => format!("flagged {}", flags.joined(", ")),
            };
            format!("its star hosts a known false positive: {}, {why}", id(fp))
        }
        Some(Hold::UnseenSibling { why, .. }) => {
            format!("its star hosts a known false positive: {why}")
        }
        Some(Hold::Disputed { fp, why, other }) => format!(
            "vetters disagree whether {}{} is a false positive ({why}): held until they agree",
            id(fp),
            match other {
                Some((star, tie)) => format!(
                    ", on star {} ({}),",
                    crate::sanitize::clean(cat.star_id(star)),
                    tie.describe()
                ),
                None => String::new(),
            }
        ),
        Some(Hold::OtherId {
            fp,
            reason,
            other,
            tie,
        }) => format!(
            "its star is also star {} ({}), which hosts a known false positive: {}, rejected as {}",
            crate::sanitize::clean(cat.star_id(other)),
            tie.describe(),
            id(fp),
            reason.name()
        ),
    }
}

/// `4-6` for a pooled run of multiplicities, `-` for a k alone.
pub fn format_pool(pool: (usize, usize)) -> String {
    if pool.0 == pool.1 {
        "-".into()
    } else {
        format!("{}-{}", pool.0, pool.1)
    }
}

/// Odds for people: `340:1`, `1:25` below even.
pub fn format_odds(o: f64) -> String {
    let mut s = String::new();
    push_odds(&mut s, o);
    s
}

/// [`format_odds`] appended to `s` (no allocation of its own).
pub fn push_odds(s: &mut String, o: f64) {
    use std::fmt::Write;
    if !o.is_finite() || o <= 0.0 {
        s.push('-');
        return;
    }
    let big = |s: &mut String, x: f64| {
        if x >= 1e6 {
            let _ = write!(s, "{x:.1e}");
        } else if x >= 10.0 {
            crate::output::push_fixed(s, x, 0);
        } else {
            crate::output::push_fixed(s, x, 1);
        }
    };
    if o >= 1.0 {
        big(s, o);
        s.push_str(":1");
    } else {
        s.push_str("1:");
        big(s, 1.0 / o);
    }
}

#[cfg(test)]
mod tests;
