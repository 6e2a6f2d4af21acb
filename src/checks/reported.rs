//! What the catalogue reports of a candidate's own light curve and pixels:
//! a pipeline's depth at phase 0.5 (with its error), the significance of
//! the difference between its odd and even transits, and how far from the
//! target the dimming light is. The light curve's evidence where starsift
//! has no light curve to read; judged by the same physics as a light curve
//! starsift reads itself (docs/science.md §4.2, §4.3, §4.8): a secondary
//! eclipse deeper than any planet's occultation is an eclipsing binary
//! (`secondary`, which holds the star); odd and even transits that differ
//! are `odd-even` (which holds the candidate); dimming light away from the
//! target is another star's (`echo`, as a neighbour's copy of an eclipse:
//! no planet of this star, which holds only the candidate). And a person's
//! word: a comment column that names a false positive (`possible EB`) is a
//! warning, never a hold (free text can say anything of anything).

use super::{CheckSettings, Checks, OCCULTATION_CEILING_FACTOR, derive};
use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::flags::Flag;
use crate::lightcurve::analysis::FLAG_Z;
use crate::science;

/// a/R★ of candidate `c` (k its radius ratio): from its star, else from
/// its transit's duration at its impact parameter (b = 0 where unknown:
/// the largest a/R★, the lowest occultation ceiling).
pub(super) fn a_rstar_of(cat: &Catalogue, c: CandidateId, k: f64) -> Option<f64> {
    derive(cat, c, &CheckSettings::default())
        .a_rstar
        .or_else(|| {
            science::a_rstar_from_duration(
                cat.value(Field::PeriodD, c)?,
                cat.value(Field::DurationH, c)?,
                k,
                cat.value(Field::Impact, c).unwrap_or(0.0).min(1.0 + k),
            )
        })
}

/// The largest depth a planet's occultation can have behind a transit of
/// `depth_ppm` at `a_rstar`: reflected light at geometric albedo 1 plus
/// the bolometric dayside heat, (5/3)·k²·(R★/a)² (docs/science.md §4.3).
pub(super) fn occultation_ceiling_ppm(depth_ppm: f64, a_rstar: f64) -> f64 {
    OCCULTATION_CEILING_FACTOR * depth_ppm / (a_rstar * a_rstar)
}

/// Flags what the catalogue's light-curve columns show; nothing when it
/// has none (one look at the columns).
pub(super) fn flag(cat: &Catalogue, out: &mut Checks) {
    let secondary = cat.column(Field::SecondaryDepthPpm);
    let odd_even = cat.column(Field::OddEvenSigma);
    let offset = cat
        .column(Field::CentroidOffsetArcsec)
        .zip(cat.column(Field::CentroidOffsetErrArcsec));
    let headers: Vec<&str> = cat.extra_headers().collect();
    let comments: Vec<usize> = (0..headers.len())
        .filter(|&i| names_comments(headers[i]))
        .collect();
    if secondary.is_none() && odd_even.is_none() && offset.is_none() && comments.is_empty() {
        return;
    }
    // The offset's unit as said: arcseconds, or the table's own (pixels).
    let per = cat
        .columns
        .iter()
        .find(|u| u.field == Field::CentroidOffsetArcsec.name() && u.unit != "arcsec")
        .map_or("″".to_string(), |u| {
            format!(" {}", crate::sanitize::clean(&u.unit))
        });
    for c in 0..cat.len() as CandidateId {
        if let Some(z) = odd_even.map(|z| z.get(c as usize).abs())
            && z >= FLAG_Z
        {
            out.add(
                    c,
                    Flag::OddEven,
                    false,
                    format!(
                        "the catalogue's odd and even transits differ in depth at {z:.1}σ ≥ {FLAG_Z} (its pipeline's, from the light curve)"
                    ),
                );
        }
        if let Some((flag, soft, why)) = secondary.and_then(|_| secondary_finding(cat, c)) {
            out.add(c, flag, soft, why);
        }
        for &i in &comments {
            let cell = cat.extra(i, c);
            if crate::checks::known::says_false_positive(cell) {
                out.add(
                    c,
                    Flag::KnownFp,
                    true,
                    format!(
                        "the catalogue's {} says `{}`: read it before trusting the verdict",
                        headers[i],
                        crate::sanitize::clean(cell.trim())
                    ),
                );
            }
        }
        if let Some((off, err)) = offset.map(|(o, e)| (o.get(c as usize), e.get(c as usize)))
            && err > 0.0
            && off.abs() >= FLAG_Z * err
        {
            out.add(
                    c,
                    Flag::Echo,
                    false,
                    format!(
                        "the catalogue puts the dimming light {:.1}{per} ± {err:.1}{per} from the target ({:.1}σ ≥ {FLAG_Z}; its pipeline's, from the pixels): light from another star",
                        off.abs(),
                        off.abs() / err
                    ),
                );
        }
    }
}

/// The finding of the catalogue's depth at phase 0.5 above a planet's
/// occultation ceiling: firm when it clears the ceiling by three times its
/// error (as for two catalogue entries that are one binary's eclipses,
/// docs/science.md §3.1), the error given or the transit's depth over its
/// SNR; a warning when neither is known.
fn secondary_finding(cat: &Catalogue, c: CandidateId) -> Option<(Flag, bool, String)> {
    let d2 = cat.value(Field::SecondaryDepthPpm, c)?;
    let d1 = cat.value(Field::DepthPpm, c).filter(|d| *d > 0.0)?;
    let k = cat
        .value(Field::Ror, c)
        .filter(|k| *k > 0.0)
        .unwrap_or((d1 * 1e-6).sqrt());
    let a_rstar = a_rstar_of(cat, c, k)?;
    let ceiling = occultation_ceiling_ppm(d1, a_rstar);
    // Its error as given, else the transit's own noise: a dip as long as
    // the transit is measured to the transit depth's error, depth / SNR.
    let given = cat
        .value(Field::SecondaryDepthErrPpm, c)
        .filter(|e| *e > 0.0);
    let from_snr = cat
        .value(Field::Snr, c)
        .filter(|s| *s > 0.0)
        .map(|s| d1 / s);
    let err = given.or(from_snr);
    let whose = if given.is_some() {
        ""
    } else {
        " (the error the transit's depth over its SNR)"
    };
    let above = format!(
        "above the {ceiling:.0} ppm a planet's occultation can reach at a/R★ = {a_rstar:.1} (albedo 1 plus dayside heat)"
    );
    match err {
        Some(e) if d2 - 3.0 * e > ceiling => Some((
            Flag::Secondary,
            false,
            format!(
                "the catalogue's depth at phase 0.5 (its pipeline's, from the light curve), {d2:.0} ± {e:.0} ppm{whose}, is {above} by more than 3σ: an eclipsing binary"
            ),
        )),
        None if d2 > ceiling => Some((
            Flag::Secondary,
            true,
            format!(
                "the catalogue's depth at phase 0.5, {d2:.0} ppm, is {above}; with no error and no SNR given it cannot be told from noise (give `secondary_depth_err_ppm`)"
            ),
        )),
        _ => None,
    }
}

/// Whether a kept column's header names people's comments: a word
/// `comment(s)`, `remark(s)` or `notes` (`Comments`, `tfop_comments`).
fn names_comments(header: &str) -> bool {
    header
        .to_ascii_lowercase()
        .split(|c: char| !c.is_ascii_alphanumeric())
        .any(|w| matches!(w, "comment" | "comments" | "remark" | "remarks" | "notes"))
}
