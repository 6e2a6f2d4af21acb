//! From a catalogue candidate to its light curve, ephemerides, diagnostic
//! context and model parameters, and a cache of the results for callers on
//! other threads.

use std::collections::HashMap;
use std::path::PathBuf;
use std::sync::{Arc, Mutex, OnceLock};

use super::analysis::{Context, DetrendSettings, Diagnostics, Ephemeris, diagnose_detrended};
use super::{DirIndex, LcColumns, LcError, LightCurve, locate_all};
use crate::catalogue::{CandidateId, Catalogue, Field, StarId};
use crate::checks::{CheckSettings, derive};
use crate::science;
use crate::transit_model::DEFAULT_LD;

/// Where to look for light curves and how to read them.
#[derive(Clone, Debug, Default)]
pub struct Finder {
    /// The catalogue's folder, against which `lightcurve` paths are relative.
    pub catalogue_dir: Option<PathBuf>,
    /// `--lightcurves DIR`: files named `<star id>.<ext>`,
    /// `<star id>_<part>.<ext>` or in `<star id>/`.
    pub dir: Option<PathBuf>,
    pub columns: LcColumns,
    /// The built-in demo: regenerate a light curve from the seed when the
    /// file is not on disk.
    pub demo: bool,
    /// Days added to every light-curve time (`--lc-time-offset`, or minus
    /// `--epoch-offset`).
    pub time_offset: f64,
    /// True when the offset was given (flag or survey.toml): times are then
    /// never re-counted automatically.
    pub offset_given: bool,
    /// The listing of `dir`, made on first use.
    pub index: Arc<OnceLock<DirIndex>>,
}

/// Epochs and light-curve times further apart than this, days, are counted
/// from different zeros (see `timezero`).
const OTHER_ZERO_D: f64 = 10_000.0;

impl Finder {
    fn files(&self, cat: &Catalogue, star: StarId) -> Result<Vec<PathBuf>, LcError> {
        let named = cat.members(star).iter().find_map(|&c| cat.lightcurve(c));
        let dir = self
            .dir
            .as_deref()
            .map(|d| (d, self.index.get_or_init(|| DirIndex::build(d))));
        // As written: a file name is a star's id exactly, or not at all.
        let is_star = |id: &str| cat.has_star_id(id);
        locate_all(
            cat.star_id(star),
            named,
            self.catalogue_dir.as_deref(),
            dir,
            &is_star,
        )
    }

    /// True when the star has a light curve to read (a file that exists, or
    /// one the demo can regenerate); a file that exists may still be unreadable.
    pub fn has(&self, cat: &Catalogue, star: StarId) -> bool {
        let named = cat
            .members(star)
            .iter()
            .any(|&c| cat.lightcurve(c).is_some());
        self.files(cat, star).is_ok() || (self.demo && named)
    }

    /// The light curve of a star: every segment of it, stitched, with its
    /// times counted as the catalogue's epochs are.
    pub fn load(&self, cat: &Catalogue, star: StarId) -> Result<LightCurve, LcError> {
        let mut lc = self.load_as_stored(cat, star)?;
        if self.offset_given {
            if self.time_offset != 0.0 {
                lc.time.iter_mut().for_each(|t| *t += self.time_offset);
            }
        } else if lc.time_zero != 0.0 {
            recount_like_epochs(&mut lc, cat, star);
        }
        Ok(lc)
    }

    fn load_as_stored(&self, cat: &Catalogue, star: StarId) -> Result<LightCurve, LcError> {
        let id = cat.star_id(star);
        let named = cat.members(star).iter().find_map(|&c| cat.lightcurve(c));
        match self.files(cat, star) {
            Ok(paths) => {
                let mut parts = Vec::with_capacity(paths.len());
                for p in paths {
                    let raw = super::read_raw(&p, &self.columns)?;
                    parts.push((p.display().to_string(), raw));
                }
                LightCurve::from_segments(parts, self.columns.quality_mask)
            }
            Err(e) if self.demo && named.is_some() => match crate::demo::demo_lightcurve_csv(id) {
                Some(text) => LightCurve::from_text(
                    &format!("built-in demo light curve of {id}"),
                    text.into_bytes(),
                    &self.columns,
                ),
                None => Err(e),
            },
            Err(e) => Err(e),
        }
    }
}

/// When the files' headers made the times absolute (BJDREFI + BJDREFF...) but
/// the star's epochs count from that same zero (a catalogue in BJD − 2457000
/// beside archive files), the times go back to the files' own count: the
/// epochs sit thousands of days from the absolute times and within the
/// light curve's reach of the relative ones, so there is no other reading.
fn recount_like_epochs(lc: &mut LightCurve, cat: &Catalogue, star: StarId) {
    let mut epochs: Vec<f64> = cat
        .members(star)
        .iter()
        .filter_map(|&c| cat.value(Field::Epoch, c))
        .filter(|e| e.is_finite())
        .collect();
    let epoch = super::median_of(&mut epochs);
    let mid = super::median_of(&mut lc.time.clone());
    if epoch.is_nan() || mid.is_nan() {
        return;
    }
    let zero = lc.time_zero;
    if (epoch - mid).abs() > OTHER_ZERO_D && (epoch - (mid - zero)).abs() < OTHER_ZERO_D {
        lc.time.iter_mut().for_each(|t| *t -= zero);
        for s in &mut lc.segments {
            s.first -= zero;
            s.last -= zero;
        }
        lc.notes.push(format!(
            "the catalogue's epochs count from {zero} as the files' time column does, so times \
             are compared in that count (--epoch-offset or --lc-time-offset sets it by hand)"
        ));
    }
}

/// The candidate's ephemeris and those of its siblings (to be masked).
pub fn signals(cat: &Catalogue, c: CandidateId) -> (Ephemeris, Vec<Ephemeris>) {
    let others = cat
        .members(cat.star_of(c))
        .iter()
        .filter(|&&x| x != c)
        .map(|&x| ephemeris(cat, x))
        .collect();
    (ephemeris(cat, c), others)
}

/// Every signal of a star, in file order: what its trend masks.
pub fn star_signals(cat: &Catalogue, star: StarId) -> Vec<Ephemeris> {
    cat.members(star)
        .iter()
        .map(|&x| ephemeris(cat, x))
        .collect()
}

fn ephemeris(cat: &Catalogue, c: CandidateId) -> Ephemeris {
    Ephemeris {
        period_d: cat.value(Field::PeriodD, c).unwrap_or(f64::NAN),
        epoch: cat.value(Field::Epoch, c).unwrap_or(f64::NAN),
        duration_h: cat.value(Field::DurationH, c).unwrap_or(f64::NAN),
    }
}

/// R_p/R★ and a/R★ of a candidate. R_p/R★ reproduces the catalogue depth
/// with limb darkening: k² ≈ δ_true (1 − u₁/3 − u₂/6)/I(μ), μ = √(1−b²)
/// (Mandel & Agol 2002 small-planet limit; docs/science.md §2), δ_true =
/// δ/(1−c); the `ror` column only when there is no usable depth. a/R★ from
/// the star's mass and radius, else from the transit itself.
pub fn model_params(cat: &Catalogue, c: CandidateId) -> ModelParams {
    let d = derive(cat, c, &CheckSettings::default());
    let depth = cat.value(Field::DepthPpm, c).unwrap_or(0.0) * 1e-6;
    let contamination = cat
        .value(Field::Contamination, c)
        .unwrap_or(0.0)
        .clamp(0.0, 0.999);
    let impact = cat.value(Field::Impact, c).unwrap_or(0.0);
    let from_depth = science::ror_from_depth(depth * 1e6, contamination, impact, DEFAULT_LD);
    let ror = if from_depth > 0.0 {
        from_depth
    } else {
        cat.value(Field::Ror, c).filter(|r| *r > 0.0).unwrap_or(0.0)
    };
    let period = cat.value(Field::PeriodD, c).unwrap_or(f64::NAN);
    let t14 = cat.value(Field::DurationH, c).unwrap_or(f64::NAN);
    let a_rstar = d
        .a_rstar
        .or_else(|| science::a_rstar_from_duration(period, t14, ror, impact.min(1.0)));
    ModelParams {
        ror,
        a_rstar,
        impact,
        period_d: period,
        ld: DEFAULT_LD,
        teff_k: cat.value(Field::StarTeffK, c),
        // The model's observed depth is diluted like the data's.
        dilution: 1.0 - contamination,
    }
}

/// What the model transit needs.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ModelParams {
    pub ror: f64,
    pub a_rstar: Option<f64>,
    pub impact: f64,
    pub period_d: f64,
    pub ld: (f64, f64),
    pub teff_k: Option<f64>,
    /// Fraction of the aperture's light that is the target's.
    pub dilution: f64,
}

impl ModelParams {
    /// Relative model flux at `phase` (cycles); 1 where a/R★ is unknown.
    pub fn flux(&self, phase: f64) -> f64 {
        let Some(a) = self.a_rstar else { return 1.0 };
        let f =
            crate::transit_model::model_flux(phase, self.ror, a, self.impact, self.ld.0, self.ld.1);
        1.0 - (1.0 - f) * self.dilution
    }
}

/// The diagnostics context of a candidate.
pub fn context(cat: &Catalogue, c: CandidateId) -> Context {
    let m = model_params(cat, c);
    Context {
        ror: m.ror,
        a_rstar: m.a_rstar,
        teff_k: m.teff_k,
        catalogue_depth_ppm: cat.value(Field::DepthPpm, c),
        catalogue_snr: cat.value(Field::Snr, c),
        star_mass_msun: cat
            .value(Field::StarMassMsun, c)
            .or_else(|| cat.value(Field::StarRadiusRsun, c)),
    }
}

/// Transit durations shown on each side of mid-transit in the zoomed folds
/// (the browser's signal pane, `fold --window transit`, the figures).
pub const ZOOM_DURATIONS: f64 = 3.0;
/// Other signals' transits are masked this many half-durations wide.
pub const MASK_WIDEN: f64 = 1.2;

/// One candidate's light curve as every view shows it: the star's curve
/// and detrended flux, the four binned folds and the diagnostics, all from
/// the code the checks use.
pub struct Shown {
    pub curve: LoadedCurve,
    pub flux: Arc<Vec<f64>>,
    pub views: super::analysis::Views,
    pub diagnostics: CachedDiagnostics,
    pub me: Ephemeris,
    pub others: Vec<Ephemeris>,
    /// Half-width of the zoomed folds, cycles.
    pub zoom: f64,
}

impl Shown {
    /// The light curve (present whenever a `Shown` exists).
    pub fn lc(&self) -> &LightCurve {
        match self.curve.as_ref() {
            Ok(lc) => lc,
            Err(_) => unreachable!("a Shown is only built from a light curve that was read"),
        }
    }
}

/// The folds and diagnostics of a candidate in `bins` bins per zoomed
/// fold, or why there are none (no light curve, or it could not be read).
pub fn show(
    cache: &Cache,
    finder: &Finder,
    cat: &Catalogue,
    c: CandidateId,
    detrend: &DetrendSettings,
    bins: usize,
) -> Result<Shown, String> {
    let star = cat.star_of(c);
    if !finder.has(cat, star) {
        return Err("no light curve for this star: the model transit is shown".into());
    }
    let curve = cache.curve(finder, cat, star);
    let lc = match curve.as_ref() {
        Ok(lc) => lc,
        Err(e) => return Err(format!("light curve not read: {e}")),
    };
    let (me, others) = signals(cat, c);
    let flux = cache.detrended(cat, star, lc, detrend);
    let skip = super::analysis::in_transit(&lc.time, &others, MASK_WIDEN);
    let zoom = (ZOOM_DURATIONS * me.duration_h / 24.0 / me.period_d).min(0.5);
    let views = super::analysis::views(&lc.time, &flux, &lc.flux_err, &skip, &me, zoom, bins);
    let diagnostics = cache.diagnostics(finder, cat, c, detrend);
    if let Err(e) = diagnostics.as_ref() {
        return Err(e.clone());
    }
    Ok(Shown {
        curve: Arc::clone(&curve),
        flux,
        views,
        diagnostics,
        me,
        others,
        zoom,
    })
}

/// A light curve or why there is none.
pub type LoadedCurve = Arc<Result<LightCurve, String>>;
/// Diagnostics or why there are none.
pub type CachedDiagnostics = Arc<Result<Diagnostics, String>>;

/// Results computed once and shared: light curves per star, diagnostics per
/// candidate. Safe to use from several threads; a caller that loses interest
/// simply drops its handle.
#[derive(Default)]
pub struct Cache {
    curves: Mutex<HashMap<StarId, LoadedCurve>>,
    trends: Mutex<HashMap<StarId, Arc<Vec<f64>>>>,
    diagnostics: Mutex<HashMap<CandidateId, CachedDiagnostics>>,
}

impl Cache {
    pub fn curve(&self, finder: &Finder, cat: &Catalogue, star: StarId) -> LoadedCurve {
        self.read_curve(finder, cat, star)
            .unwrap_or_else(|| Arc::new(Err(LcError::Stopped.to_string())))
    }

    /// [`Cache::curve`], or `None` when the read was stopped
    /// ([`crate::lightcurve::stoppable`]): nothing is kept of it, and the
    /// next caller reads the file again.
    pub fn read_curve(
        &self,
        finder: &Finder,
        cat: &Catalogue,
        star: StarId,
    ) -> Option<LoadedCurve> {
        if let Some(hit) = self.curves.lock().ok().and_then(|m| m.get(&star).cloned()) {
            return Some(hit);
        }
        let what = format!("reading the light curve of star {}", cat.star_id(star));
        let read = crate::contain::contained(&what, || finder.load(cat, star));
        if let Ok(Err(LcError::Stopped)) = read {
            return None;
        }
        let loaded = Arc::new(read.and_then(|r| r.map_err(|e| e.to_string())));
        if let Ok(mut m) = self.curves.lock() {
            m.insert(star, Arc::clone(&loaded));
        }
        Some(loaded)
    }

    /// A star's light curve divided by its trend, with all its signals
    /// masked (`analysis::detrend`), computed once per star: every
    /// candidate of the star reads the same trend.
    pub fn detrended(
        &self,
        cat: &Catalogue,
        star: StarId,
        lc: &LightCurve,
        settings: &DetrendSettings,
    ) -> Arc<Vec<f64>> {
        if let Some(hit) = self.trends.lock().ok().and_then(|m| m.get(&star).cloned()) {
            return hit;
        }
        let all = star_signals(cat, star);
        let flux = Arc::new(super::analysis::detrend(lc, &all, settings));
        if let Ok(mut m) = self.trends.lock() {
            m.insert(star, Arc::clone(&flux));
        }
        flux
    }

    /// The diagnostics of a candidate, computed on first use.
    pub fn diagnostics(
        &self,
        finder: &Finder,
        cat: &Catalogue,
        c: CandidateId,
        detrend: &DetrendSettings,
    ) -> CachedDiagnostics {
        if let Some(hit) = self
            .diagnostics
            .lock()
            .ok()
            .and_then(|m| m.get(&c).cloned())
        {
            return hit;
        }
        let curve = self.curve(finder, cat, cat.star_of(c));
        let result = match curve.as_ref() {
            Ok(lc) => {
                let what = format!("checking {} in {}", cat.candidate_id(c), lc.source);
                crate::contain::contained(&what, || {
                    let (me, others) = signals(cat, c);
                    let flux = self.detrended(cat, cat.star_of(c), lc, detrend);
                    diagnose_detrended(lc, &flux, &me, &others, &context(cat, c), detrend)
                })
            }
            Err(e) => Err(e.clone()),
        };
        let result = Arc::new(result);
        if let Ok(mut m) = self.diagnostics.lock() {
            m.insert(c, Arc::clone(&result));
        }
        result
    }

    /// Drops a star's light curve and trend (its diagnostics stay): a pass
    /// over every star keeps one curve in memory at a time.
    pub fn forget(&self, star: StarId) {
        if let Ok(mut m) = self.curves.lock() {
            m.remove(&star);
        }
        if let Ok(mut m) = self.trends.lock() {
            m.remove(&star);
        }
    }

    /// What is cached now, without computing anything.
    pub fn peek(&self, c: CandidateId) -> Option<CachedDiagnostics> {
        self.diagnostics.lock().ok()?.get(&c).cloned()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_shared_trend_gives_what_a_trend_per_candidate_gives() {
        let cat = crate::demo::catalogue().unwrap();
        let finder = Finder {
            demo: true,
            ..Finder::default()
        };
        let star = (0..cat.star_count() as StarId)
            .find(|&s| cat.members(s).len() >= 3 && finder.has(&cat, s))
            .expect("a demo system of three with a light curve");
        let (cache, settings) = (Cache::default(), DetrendSettings::default());
        let lc = finder.load(&cat, star).unwrap();
        for &c in cat.members(star) {
            let (me, others) = signals(&cat, c);
            let alone =
                super::super::analysis::diagnose(&lc, &me, &others, &context(&cat, c), &settings);
            let shared = cache.diagnostics(&finder, &cat, c, &settings);
            assert_eq!(
                shared.as_ref().as_ref().unwrap(),
                &alone,
                "{}",
                cat.candidate_id(c)
            );
        }
        assert_eq!(
            cache.trends.lock().unwrap().len(),
            1,
            "one trend for the star"
        );
        cache.forget(star);
        assert!(cache.trends.lock().unwrap().is_empty() && cache.curves.lock().unwrap().is_empty());
    }
}
