//! The pass over the light curves: every candidate whose star has one gets
//! its light-curve diagnostics' flags, and a `big-radius` where the light
//! curve's own depth says the body is a star whatever the catalogue says.

use super::Checks;
use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::flags::Flag;
use crate::lightcurve::analysis::Measure;
use crate::science;
use crate::transit_model::DEFAULT_LD;

/// What a pass over the light curves found besides the flags.
#[derive(Clone, Debug, Default)]
pub struct LightcurveRun {
    /// Stars with a light curve.
    pub stars: usize,
    /// (star id, error) for each light curve that could not be read.
    pub errors: Vec<(String, String)>,
    /// One plain notice when most candidates are not recovered and the
    /// epochs sit a common zero away from the light-curve times.
    pub notice: Option<String>,
    /// What the light curves read held, summed over stars.
    pub totals: LightcurveTotals,
}

/// Segments and samples of the light curves read, and the samples dropped.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize)]
pub struct LightcurveTotals {
    pub segments: usize,
    pub samples: usize,
    /// Dropped for a missing or non-finite value.
    pub dropped_missing: usize,
    /// Dropped for a set quality flag.
    pub dropped_quality: usize,
}

impl LightcurveTotals {
    /// "12 segments, 51200 samples used; 830 dropped (40 missing values,
    /// 790 flagged by quality)".
    pub fn describe(&self) -> String {
        format!(
            "{} segments, {} samples used; {} dropped ({} missing values, {} flagged by quality)",
            self.segments,
            self.samples,
            self.dropped_missing + self.dropped_quality,
            self.dropped_missing,
            self.dropped_quality
        )
    }
}

/// Runs the light-curve diagnostics of every candidate whose star has a
/// light curve and adds their flags. Stars without one are passed over; a
/// star whose light curve cannot be read is reported, and its candidates
/// are flagged `not-recovered` (the data were there, unseen).
pub fn run_lightcurves(
    cat: &Catalogue,
    finder: &crate::lightcurve::Finder,
    detrend: &crate::lightcurve::analysis::DetrendSettings,
    checks: &mut Checks,
) -> LightcurveRun {
    run_lightcurves_counted(cat, finder, detrend, checks, |_, _| {})
}

/// [`run_lightcurves`], star by star (each star's curve is dropped when
/// done), calling `progress(done, total)` over the stars that have a light
/// curve.
pub fn run_lightcurves_counted(
    cat: &Catalogue,
    finder: &crate::lightcurve::Finder,
    detrend: &crate::lightcurve::analysis::DetrendSettings,
    checks: &mut Checks,
    mut progress: impl FnMut(usize, usize),
) -> LightcurveRun {
    use crate::lightcurve::analysis::Recovery;
    use crate::lightcurve::timezero::{EpochAndSpan, offset_notice};
    let cache = crate::lightcurve::Cache::default();
    let mut errors = Vec::new();
    let mut spans = Vec::new();
    let mut totals = LightcurveTotals::default();
    let stars: Vec<u32> = (0..cat.star_count() as u32)
        .filter(|&s| finder.has(cat, s))
        .collect();
    let total = stars.len();
    let mut last = std::time::Instant::now();
    for (done, &star) in stars.iter().enumerate() {
        let span = match cache.curve(finder, cat, star).as_ref() {
            Ok(lc) => {
                totals.segments += lc.segments.len();
                totals.samples += lc.time.len();
                totals.dropped_missing += lc.dropped;
                totals.dropped_quality += lc.dropped_quality;
                (lc.time[0], lc.time[lc.time.len() - 1])
            }
            Err(_) => (f64::NAN, f64::NAN),
        };
        for &c in cat.members(star) {
            match cache.diagnostics(finder, cat, c, detrend).as_ref() {
                Ok(d) => {
                    checks.add_lightcurve(c, &d.findings);
                    if !checks.flags[c as usize].contains(Flag::BigRadius) {
                        let limit = checks.big_radius_rearth;
                        if let Some(why) = measured_radius_too_big(cat, c, &d.depth, limit) {
                            checks.add(c, Flag::BigRadius, false, why);
                        }
                    }
                    checks.shapes.insert(c, d.shape);
                    spans.push(EpochAndSpan {
                        epoch: cat.value(Field::Epoch, c).unwrap_or(f64::NAN),
                        first: span.0,
                        last: span.1,
                        not_recovered: !matches!(d.recovery, Recovery::Shown | Recovery::Hidden),
                    });
                }
                // A light curve that is there but cannot be read is evidence
                // unseen: the transit is not shown in the data, and the
                // candidate is held (`not-recovered`, docs/science.md §4).
                Err(e) => {
                    checks.add(
                        c,
                        Flag::NotRecovered,
                        false,
                        format!(
                            "its star's light curve could not be read ({}): the transit is not \
                             seen in the data; mend or remove the file, or pass --no-lightcurves \
                             to vet from the catalogue alone",
                            crate::sanitize::clean(e)
                        ),
                    );
                    if errors.last().is_none_or(|(s, _)| s != cat.star_id(star)) {
                        errors.push((cat.star_id(star).to_string(), e.clone()));
                    }
                }
            }
        }
        cache.forget(star);
        if last.elapsed().as_millis() >= 200 || done + 1 == total {
            progress(done + 1, total);
            last = std::time::Instant::now();
        }
    }
    // The light curves' signs of a false positive hold its star under its
    // other ids too.
    super::hold_other_ids(cat, checks);
    checks.sort_findings();
    let notice = match (offset_notice(&spans), folder_notice(cat, finder, total)) {
        (Some(a), Some(b)) => Some(format!("{a}; {b}")),
        (a, b) => a.or(b),
    };
    LightcurveRun {
        stars: total,
        errors,
        notice,
        totals,
    }
}

/// What `--lightcurves DIR` held that no star claimed: a folder whose files
/// are named otherwise than by the catalogue's star ids gives the verdicts
/// no light curve, and that must not pass unsaid. `stars`: the stars that
/// had a light curve.
fn folder_notice(
    cat: &Catalogue,
    finder: &crate::lightcurve::Finder,
    stars: usize,
) -> Option<String> {
    let dir = finder.dir.as_deref()?;
    let index = finder
        .index
        .get_or_init(|| crate::lightcurve::DirIndex::build(dir));
    // The stars' numbers, gathered only if some file is no star's by name.
    let numbers: std::cell::OnceCell<std::collections::HashSet<&str>> = Default::default();
    let is_number = |n: &str| {
        numbers
            .get_or_init(|| {
                (0..cat.star_count() as u32)
                    .filter_map(|s| crate::lightcurve::star_number(cat.star_id(s)))
                    .collect()
            })
            .contains(n)
    };
    let unclaimed = index.unclaimed(&|name| cat.has_star_id(name), &is_number);
    let shown = crate::sanitize::clean(&dir.display().to_string()).into_owned();
    let Some(first) = unclaimed.first() else {
        return (stars == 0).then(|| {
            format!(
                "{shown} holds no light curve of a star of the catalogue (.csv, .tsv, .fits, each also .gz): the verdicts use no light curve"
            )
        });
    };
    let first = first.file_name()?.to_string_lossy().into_owned();
    let first = crate::sanitize::clean(&first).into_owned();
    let named = "a star's files are `<star>.<ext>`, `<star>_<part>.<ext>`, in `<star>/`, or hold its number zero-padded to 9 digits or more";
    let files = |n: usize| format!("{n} light-curve file{}", if n == 1 { "" } else { "s" });
    Some(if stars == 0 {
        format!(
            "no light curve in {shown} is a star's of the catalogue ({named}; the folder holds {}, e.g. `{first}`): the verdicts use no light curve",
            files(unclaimed.len())
        )
    } else {
        format!(
            "{} in {shown} belong{} to no star of the catalogue (e.g. `{first}`; {named}): not used",
            files(unclaimed.len()),
            if unclaimed.len() == 1 { "s" } else { "" },
        )
    })
}

/// The smallest radius the light curve's own depth allows, where it is
/// above `limit_rearth`: the measured depth 3σ below its value, read as an
/// undiluted central transit (dilution and a grazing path only make the
/// body larger for a given depth; limb darkening makes a central transit
/// deepest), k from it by Mandel & Agol 2002 (`science::ror_from_depth`),
/// around the catalogue's R★ (docs/science.md §4.7). A catalogue whose
/// depth is wrong (units, another signal's) no longer hides a star-sized
/// eclipse in the data.
pub fn measured_radius_too_big(
    cat: &Catalogue,
    c: CandidateId,
    depth: &Measure,
    limit_rearth: f64,
) -> Option<String> {
    let r_star = cat.value(Field::StarRadiusRsun, c)?;
    let low = depth.value - 3.0 * depth.err;
    if !(low > 0.0 && r_star > 0.0) {
        return None;
    }
    let r = science::radius_rearth(science::ror_from_depth(low, 0.0, 0.0, DEFAULT_LD), r_star);
    (r > limit_rearth).then(|| {
        format!(
            "the light curve's depth, {:.0} ± {:.0} ppm, makes R ≥ {r:.1} R⊕ around this \
             {r_star} R☉ star (3σ below the depth, central and undiluted: the smallest it \
             allows) > {limit_rearth} R⊕: likely a star, whatever the catalogue's depth",
            depth.value, depth.err
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_ten_per_cent_eclipse_around_the_sun_is_at_least_31_earth_radii() {
        // By hand from Mandel & Agol 2002's small-planet depth at b = 0,
        // δ = k²/(1 − u₁/3 − u₂/6) with u = (0.4, 0.26): δ = 100,020 − 3 × 35
        // = 99,915 ppm gives k = 0.28682, and with the IAU 2015 nominal R☉
        // and R⊕ (6.957e8 m, 6.3781e6 m) R = 31.28 R⊕ (docs/science.md §4.7).
        let cat = Catalogue::from_text(
            "invented.csv",
            "star,candidate,period_d,epoch,depth_ppm,duration_h,star_radius_rsun\n\
             S,S-1,7.4,1002.9,1200,3.4,1.0\n",
        );
        let depth = Measure {
            value: 100_020.0,
            err: 35.0,
        };
        let why = measured_radius_too_big(&cat, 0, &depth, 22.4).unwrap();
        assert!(why.contains("R ≥ 31.3 R⊕"), "{why}");
        // Below the limit, or without the star's radius: nothing said.
        assert!(measured_radius_too_big(&cat, 0, &depth, 31.5).is_none());
        let bare = Catalogue::from_text(
            "invented.csv",
            "star,candidate,period_d,epoch,depth_ppm,duration_h\nS,S-1,7.4,1002.9,1200,3.4\n",
        );
        assert!(measured_radius_too_big(&bare, 0, &depth, 22.4).is_none());
    }
}
