//! The multiplicity odds model (METHODS.md §0–§1.2; the framework of
//! Lissauer et al. 2012, ApJ 750, 112 and 2014, ApJ 784, 44): false positives
//! land on the N searched targets at random, planets cluster, so a candidate
//! that shares its star is more likely a planet. This module computes the
//! per-multiplicity table from N, f and the histogram of non-rejected
//! candidates per star; [`live`] keeps it current as decisions change.

pub mod live;

use std::fmt;

use statrs::function::factorial::ln_factorial;

use crate::flags::FlagSet;

pub use live::{Live, VerdictCounts};

/// How the boost on prior odds is defined (METHODS.md §0).
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
    /// f: false-positive fraction among single-candidate stars, in (0, 1).
    pub fp_fraction: f64,
    pub mode: BoostMode,
    /// Posterior odds needed for `validated` (default 100, i.e. P ≥ 100/101).
    pub threshold: f64,
    /// Flags that keep a candidate from `validated`.
    pub blocking: FlagSet,
}

/// The validation threshold of METHODS.md §0 and §1.1: planet:FP odds of 100:1.
pub const DEFAULT_THRESHOLD: f64 = 100.0;
/// The default f (METHODS.md §0; Fressin et al. 2013, ApJ 766, 81 give 9.4%).
pub const DEFAULT_FP_FRACTION: f64 = 0.1;
/// The smallest FP probability a table row may hold: below it the model says
/// nothing more (q_k underflows only when λ is 0 or k is very large).
const Q_FLOOR: f64 = 1e-300;

impl Default for Model {
    fn default() -> Model {
        Model {
            targets: None,
            fp_fraction: DEFAULT_FP_FRACTION,
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

/// One multiplicity's row of the model table (METHODS.md §1.2).
#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    pub k: usize,
    /// n_k: stars with exactly k non-rejected candidates.
    pub stars: usize,
    /// E_k: expected k-systems that contain at least one FP.
    pub e: f64,
    /// F_k: expected FP candidates in k-systems.
    pub f: f64,
    /// q_k = F_k/(k n_k): FP probability per candidate.
    pub q: f64,
    /// s_k = E_k/n_k: FP probability per system.
    pub s: f64,
    /// B_k,cand = f/q_k.
    pub boost_cand: f64,
    /// B_k,sys = f/s_k.
    pub boost_sys: f64,
    /// B_k,odds = [(1−q_k)/q_k]/[(1−f)/f].
    pub boost_odds: f64,
    /// The factor on prior odds that the chosen mode applies.
    pub boost: f64,
}

/// The model table for one histogram: a row for every k from 1 to k_max.
#[derive(Clone, Debug, PartialEq)]
pub struct Table {
    pub targets: Option<u64>,
    pub fp_fraction: f64,
    /// λ = f n₁ / N: FPs per target.
    pub lambda: f64,
    pub rows: Vec<Row>,
    /// Clamps and other cautions, each naming its cause.
    pub warnings: Vec<String>,
}

/// Poisson probability of j events at mean λ, computed in logs so that large
/// j cannot overflow: π_j = exp(−λ + j ln λ − ln j!) (METHODS.md §1.2 step 3).
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

/// The model table for histogram `hist` (`hist[k]` = stars with k
/// non-rejected candidates; index 0 ignored), METHODS.md §1.2:
///
/// 1. λ = f n₁ / N
/// 2. h₁ = (1−f) n₁, h_m = n_m (m ≥ 2), h₀ = N − Σ h_m
/// 3. π_j = e^{−λ} λ^j / j!
/// 4. E_k = Σ_{j=1..k} h_{k−j} π_j,  5. F_k = Σ_{j=1..k} j h_{k−j} π_j
/// 6. q_k = F_k/(k n_k), s_k = E_k/n_k
/// 7. B_cand = f/q_k, B_sys = f/s_k, B_odds = [(1−q_k)/q_k]/[(1−f)/f]
///
/// Rows where n_k = 0 still get E_k and F_k, with q_k computed as if one such
/// star existed, so a what-if can read them. Inputs must have passed
/// [`check_inputs`].
pub fn table(model: &Model, hist: &[usize]) -> Table {
    let f = model.fp_fraction;
    let k_max = hist.len().saturating_sub(1).max(1);
    let n = |k: usize| hist.get(k).copied().unwrap_or(0);
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
    let n1 = n(1) as f64;
    let lambda = f * n1 / big_n;
    if n(1) == 0 {
        warnings.push(
            "no single-candidate stars: the model's false-positive rate λ = f n₁/N is 0, \
             so multiplicity odds are unbounded and were floored"
                .to_string(),
        );
    }
    let h = |m: usize| -> f64 {
        match m {
            0 => big_n - (1.0 - f) * n1 - (2..hist.len()).map(|j| n(j) as f64).sum::<f64>(),
            1 => (1.0 - f) * n1,
            m => n(m) as f64,
        }
    };
    let prior_odds = (1.0 - f) / f;
    let pi: Vec<f64> = (0..=k_max).map(|j| poisson(lambda, j)).collect();
    let mut rows = Vec::with_capacity(k_max);
    for k in 1..=k_max {
        let (mut e, mut fk) = (0.0, 0.0);
        for (j, p) in pi.iter().enumerate().take(k + 1).skip(1) {
            let term = h(k - j) * p;
            e += term;
            fk += j as f64 * term;
        }
        let stars = n(k);
        let denom = stars.max(1) as f64;
        let clamp = |x: f64, what: &str, warnings: &mut Vec<String>| -> f64 {
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
        let q = if k == 1 {
            f
        } else {
            clamp(fk / (k as f64 * denom), "q", &mut warnings)
        };
        let s = if k == 1 {
            f
        } else {
            clamp(e / denom, "s", &mut warnings)
        };
        let boost_odds = ((1.0 - q) / q) / prior_odds;
        let boost_odds_sys = ((1.0 - s) / s) / prior_odds;
        let boost = match &model.mode {
            BoostMode::Catalogue => boost_odds,
            BoostMode::System => boost_odds_sys,
            fixed => fixed_boost(fixed, k),
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
            boost_odds,
            boost,
        });
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
/// (METHODS.md §0). Finite for p in (0, 1].
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

/// `validated`: odds ≥ threshold, not rejected, no blocking flag; `likely`:
/// odds ≥ 1; `unlikely`: odds < 1; `rejected`: a vetter rejected it.
pub fn verdict(
    odds: f64,
    threshold: f64,
    rejected: bool,
    flags: FlagSet,
    blocking: FlagSet,
) -> Verdict {
    if rejected {
        Verdict::Rejected
    } else if odds >= threshold && !flags.intersects(blocking) {
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
         on N targets, planets clustered; Lissauer et al. 2012, 2014), boost {}; validated means odds >= {}:1 \
         with no blocking flag. Statistical validation is not confirmation.",
        model.mode.describe(),
        model.threshold
    )
}

/// Odds for people: `340:1`, `1:25` below even.
pub fn format_odds(o: f64) -> String {
    if !o.is_finite() || o <= 0.0 {
        return "-".into();
    }
    let big = |x: f64| -> String {
        if x >= 1e6 {
            format!("{x:.1e}")
        } else if x >= 10.0 {
            format!("{x:.0}")
        } else {
            format!("{x:.1}")
        }
    };
    if o >= 1.0 {
        format!("{}:1", big(o))
    } else {
        format!("1:{}", big(1.0 / o))
    }
}

#[cfg(test)]
mod tests;
