//! One place, two star ids. Rows of two star ids at the same position
//! (within [`SAME_PLACE_ARCSEC`]) are one star under two catalogues' ids,
//! or two stars no survey aperture tells apart: either way one light. A
//! false positive the catalogue names at one id means that light holds an
//! eclipsing binary's, and the candidates of the other id are held as its
//! siblings (docs/science.md §1.1, §3.4). Stars are not joined: that would
//! add multiplicity from a position match alone.

use super::Checks;
use super::echo::{real_position, separation_arcsec};
use crate::catalogue::{CandidateId, Catalogue, Field, StarId};

/// Two catalogue positions this close are one star, or stars no survey
/// aperture parts (common practice, no source: the usual radius of a
/// cross-match between catalogues; survey pixels are 4–21″).
pub const SAME_PLACE_ARCSEC: f64 = 2.0;

/// Every row of another star id within [`SAME_PLACE_ARCSEC`] of one of
/// `targets`: (the first such target, the row, how far apart in ″). One
/// pass over the catalogue, each row looking only at the targets of its
/// few bands of declination (an archive table can call a third of its
/// rows false positives). None without positions.
pub(super) fn ties(
    cat: &Catalogue,
    targets: &[CandidateId],
) -> Vec<(CandidateId, CandidateId, f64)> {
    let (Some(ra), Some(dec)) = (cat.column(Field::RaDeg), cat.column(Field::DecDeg)) else {
        return Vec::new();
    };
    // The targets with a position, by declination.
    let mut near: Vec<Target> = targets
        .iter()
        .map(|&c| (dec.get(c as usize), ra.get(c as usize), c))
        .filter(|&(d, r, _)| real_position(r, d))
        .map(|(dec, ra, c)| Target {
            dec,
            ra,
            c,
            star: cat.star_of(c),
            cos_dec: dec.to_radians().cos(),
        })
        .collect();
    if near.is_empty() {
        return Vec::new();
    }
    near.sort_by(|a, b| a.dec.total_cmp(&b.dec));
    let reach = SAME_PLACE_ARCSEC / 3600.0;
    let beyond = ra_bound();
    // Bands of declination `reach` wide, and where each starts in `near`
    // (sorted by declination, so each band's targets lie together). A row's
    // targets within reach lie in the bands from that of its declination
    // less `reach` to that of its declination plus `reach`: the band is a
    // floor of the declination's sum and quotient, which never decrease as
    // it grows, so a target not below `d - reach` is in no band below
    // `band(d - reach)` (and likewise above). Five bands were read, two
    // each side: 40% more targets.
    let bands = (180.0 / reach).ceil() as usize + 1;
    let band = |d: f64| (((d + 90.0) / reach).floor().max(0.0) as usize).min(bands - 1);
    let mut start = vec![0u32; bands + 1];
    for f in &near {
        start[band(f.dec) + 1] += 1;
    }
    for i in 1..start.len() {
        start[i] += start[i - 1];
    }
    // The rows are read in the file's order, the targets near each at
    // random places: asked for some rows ahead (where the band starts in
    // `near`, then its first targets), the memory serves many at once.
    let ask = |c: usize, targets: bool| {
        if let Some(d) = (c < dec.len()).then(|| dec.get(c)) {
            let b = band(d - reach);
            if targets {
                crate::prefetch::value(&near, start[b] as usize);
            } else {
                crate::prefetch::value(&start, b);
            }
        }
    };
    // Every row is looked at alone: a part of the rows on each core.
    crate::parallel::in_parts(cat.len(), |rows| {
        rows.filter_map(|c| {
            ask(c + 16, false);
            ask(c + 8, true);
            let (r, d) = (ra.get(c), dec.get(c));
            if !real_position(r, d) {
                return None;
            }
            let c = c as CandidateId;
            let star: StarId = cat.star_of(c);
            let (lo, hi) = (start[band(d - reach)], start[band(d + reach) + 1]);
            let mut cos_dec = None;
            near[lo as usize..hi as usize]
                .iter()
                .skip_while(|f| f.dec < d - reach)
                .take_while(|f| f.dec <= d + reach)
                .filter(|f| f.star != star)
                .filter(|f| {
                    let cos_dec = *cos_dec.get_or_insert_with(|| d.to_radians().cos());
                    !apart_in_ra(f, r, cos_dec, beyond)
                })
                .map(|f| (f.c, c, separation_arcsec(f.ra, f.dec, r, d)))
                .find(|&(_, _, apart)| apart <= SAME_PLACE_ARCSEC)
        })
        .collect::<Vec<_>>()
    })
    .concat()
}

/// A target of [`ties`] with its position (degrees), star and the cosine
/// of its declination.
struct Target {
    dec: f64,
    ra: f64,
    c: CandidateId,
    star: StarId,
    cos_dec: f64,
}

/// Whether a row at right ascension `ra` (degrees) whose declination has
/// cosine `cos_dec` lies farther than [`SAME_PLACE_ARCSEC`] from target
/// `t` by the difference in right ascension alone: a test without a
/// sine, so that the separation is computed for the few rows it passes.
/// By the haversine formula (Sinnott 1984, Sky & Telescope 68, 159; from
/// memory), hav θ = hav Δδ + cos δ₁ cos δ₂ hav Δα ≥ cos δ₁ cos δ₂ (Δα/π)²
/// (sin x ≥ 2x/π for 0 ≤ x ≤ π/2), with Δα the difference folded into
/// [0, π]: past hav R ([`ra_bound`]), θ is past R.
fn apart_in_ra(t: &Target, ra: f64, cos_dec: f64, beyond: f64) -> bool {
    // Folded into [0, 360) by a remainder only where it is past 360°: the
    // remainder is a library call, and this test runs for every target
    // near a row in declination (dozens a row at 10M rows).
    let mut d = (t.ra - ra).abs();
    if d >= 360.0 {
        d = d.rem_euclid(360.0);
    }
    let d = d.min(360.0 - d).to_radians() / std::f64::consts::PI;
    t.cos_dec * cos_dec * d * d > beyond
}

/// The bound of [`apart_in_ra`]: sin²(R/2) for R = [`SAME_PLACE_ARCSEC`],
/// with a margin of 1% so that rounding never parts a pair the separation
/// would join.
fn ra_bound() -> f64 {
    let half = (SAME_PLACE_ARCSEC / 3600.0 / 2.0).to_radians().sin();
    half * half * 1.01
}

/// Holds each star whose rows sit within [`SAME_PLACE_ARCSEC`] of a
/// candidate of another star id that is a false positive (the catalogue
/// calls it one, or its checks show one's signs: `Checks::
/// shows_false_positive`), and says so. Run again after the light curves;
/// a star already held stays as it was.
/// `fps`: those false positives.
pub(super) fn flag(cat: &Catalogue, out: &mut Checks, fps: &[CandidateId]) {
    let held: Vec<(CandidateId, String)> = ties(cat, fps)
        .into_iter()
        .map(|(fp, c, apart)| {
            let why = format!(
                "{}, on star {} {apart:.1}″ from this star's {}, is {}: one place, one light (one star under two ids, or stars no aperture parts)",
                crate::sanitize::clean(cat.candidate_id(fp)),
                crate::sanitize::clean(cat.star_id(cat.star_of(fp))),
                crate::sanitize::clean(cat.candidate_id(c)),
                super::false_positive_words(out, fp),
            );
            (c, why)
        })
        .collect();
    out.hold_for_another_id(cat, held, |n, listed| {
        format!(
            "{n} star{} within {SAME_PLACE_ARCSEC}″ of a false positive under another star id ({listed}): held back, as one light with it; check the star ids (docs/science.md §3.4)",
            if n == 1 { "" } else { "s" },
        )
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    /// What `ties` finds, by comparing every row with every target in
    /// declination order (the order `ties` reads them in).
    fn every_pair(
        cat: &Catalogue,
        targets: &[CandidateId],
    ) -> Vec<(CandidateId, CandidateId, f64)> {
        let (ra, dec) = (
            cat.column(Field::RaDeg).unwrap(),
            cat.column(Field::DecDeg).unwrap(),
        );
        let mut near: Vec<CandidateId> = targets.to_vec();
        near.sort_by(|&a, &b| dec.get(a as usize).total_cmp(&dec.get(b as usize)));
        (0..cat.len() as CandidateId)
            .filter_map(|c| {
                let (r, d) = (ra.get(c as usize), dec.get(c as usize));
                near.iter()
                    .filter(|&&t| (dec.get(t as usize) - d).abs() <= SAME_PLACE_ARCSEC / 3600.0)
                    .filter(|&&t| cat.star_of(t) != cat.star_of(c))
                    .map(|&t| {
                        (
                            t,
                            c,
                            separation_arcsec(ra.get(t as usize), dec.get(t as usize), r, d),
                        )
                    })
                    .find(|&(_, _, apart)| apart <= SAME_PLACE_ARCSEC)
            })
            .collect()
    }

    #[test]
    fn the_bands_find_what_comparing_every_pair_finds() {
        // Invented: 3,000 rows in pairs of stars 0–3″ apart in declination
        // and up to 1.5″ in right ascension, some on band edges and at the
        // poles; every third row a target.
        let mut state = 0x2545_f491_4f6c_dd1du64;
        let mut next = || {
            state ^= state << 13;
            state ^= state >> 7;
            state ^= state << 17;
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut text = String::from("star,candidate,period,epoch,depth,duration,ra,dec\n");
        for i in 0..1500 {
            let dec = match i % 5 {
                0 => 89.9995 + next() * 0.0005,
                1 => -90.0 + next() * 0.0005,
                // On an edge of a band of 2″.
                2 => -90.0 + (next() * 180.0 * 1800.0).floor() / 1800.0,
                _ => next() * 170.0 - 85.0,
            };
            let ra = if i % 7 == 0 {
                next() * 1e-4
            } else {
                next() * 360.0
            };
            let off = next() * 3.0 / 3600.0;
            // Apart in right ascension too, across 0°/360° for some.
            let ra2 = (ra + (next() - 0.5) * 3.0 / 3600.0).rem_euclid(360.0);
            for (j, (r, d)) in [(ra, dec), (ra2, (dec + off).min(90.0))].iter().enumerate() {
                text.push_str(&format!("S{i}x{j},C{i}x{j},3.5,100,800,3,{r},{d}\n"));
            }
        }
        let cat = Catalogue::from_text("invented.csv", &text);
        let targets: Vec<CandidateId> = (0..cat.len() as CandidateId).step_by(3).collect();
        let found = ties(&cat, &targets);
        assert!(found.len() > 500, "{}", found.len());
        assert_eq!(found, every_pair(&cat, &targets));
    }

    #[test]
    fn a_row_set_apart_by_right_ascension_is_beyond_the_radius() {
        // Invented pairs within a few arcseconds, at every declination (the
        // poles too), across right ascension 0°/360° and written past it: the cheap test
        // never parts a pair the haversine formula joins.
        let mut rng = crate::demo::Rng::new(5);
        let (mut parted, mut joined) = (0, 0);
        for i in 0..200_000 {
            let dec = rng.uniform(-90.0, 90.0);
            let ra = if i % 3 == 0 {
                rng.uniform(0.0, 0.001)
            } else {
                rng.uniform(0.0, 360.0)
            };
            let cos = dec.to_radians().cos().max(1e-9);
            let (dr, dd) = (
                rng.uniform(-0.5, 0.5) * 12.0 / 3600.0 / cos,
                rng.uniform(-0.5, 0.5) * 4.0 / 3600.0,
            );
            let (ra2, dec2) = ((ra + dr).rem_euclid(360.0), (dec + dd).clamp(-90.0, 90.0));
            // Some written past 360° or below 0° (the same place).
            let ra2 = match i % 7 {
                0 => ra2 + 360.0,
                1 => ra2 - 720.0,
                _ => ra2,
            };
            let t = Target {
                dec,
                ra,
                c: 0,
                star: 0,
                cos_dec: dec.to_radians().cos(),
            };
            let apart = separation_arcsec(ra, dec, ra2, dec2);
            if apart_in_ra(&t, ra2, dec2.to_radians().cos(), ra_bound()) {
                assert!(
                    apart > SAME_PLACE_ARCSEC,
                    "{ra} {dec} {ra2} {dec2}: {apart}"
                );
                parted += 1;
            } else if apart <= SAME_PLACE_ARCSEC {
                joined += 1;
            }
        }
        // The test does its work: many pairs far apart in right ascension
        // are parted by it, and many pairs within the radius are met.
        assert!(parted > 50_000 && joined > 10_000, "{parted} {joined}");
    }
}
