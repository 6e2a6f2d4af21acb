//! The sky cut into cells for the echo search: bands of declination at
//! least as wide as the echo radius, each cut into cells of right
//! ascension no narrower than two positions within the radius can differ
//! in right ascension there, so that every position within the radius of
//! a signal lies in its band or the two beside it, in the cells
//! [`cells_near`] names.

/// The band of declination `dec` (degrees, a real position's), for bands
/// `width` degrees wide: band k runs from -90° + k·width to one width north.
pub(super) fn band_number(dec: f64, width: f64) -> u32 {
    if width.is_finite() && width < 180.0 {
        ((dec + 90.0) / width).floor() as u32
    } else {
        0
    }
}

/// Signals per cell on average in a band, when the radius allows cells
/// that narrow: a signal is then compared with the few cells around its
/// own, not with whole bands of thousands, and the cells kept stay few
/// beside the signals (common practice, no source).
const PER_CELL: usize = 4;

/// The most two positions within `width` degrees of each other on the sky
/// can differ in right ascension, degrees, when both lie in band `band`
/// or the two beside it (bands `width` wide): 360 where any difference is
/// possible (bands that reach a pole, or a band of the whole sky).
///
/// From the haversine formula (Sinnott 1984, Sky & Telescope 68, 159; from
/// memory), hav θ = hav Δδ + cos δ₁ cos δ₂ hav Δα ≥
/// cos² D hav Δα for |δ₁|, |δ₂| ≤ D, so sin(Δα/2) ≤ sin(θ/2) / cos D. D is
/// taken two bands beyond the neighbours' edges, and the result widened a
/// little, so rounding in a band or cell number never parts a pair.
pub(super) fn reach(width: f64, band: u32) -> f64 {
    if !width.is_finite() || width >= 180.0 {
        return 360.0;
    }
    let lo = -90.0 + (f64::from(band) - 3.0) * width;
    let hi = -90.0 + (f64::from(band) + 4.0) * width;
    let d = lo.abs().max(hi.abs()).min(90.0);
    let s = (width.to_radians() / 2.0).sin() / d.to_radians().cos();
    if !s.is_finite() || s >= 1.0 {
        return 360.0;
    }
    let r = 2.0 * s.asin().to_degrees() * (1.0 + 1e-6) + 1e-9;
    if r < 180.0 { r } else { 360.0 }
}

/// How many cells a band of `count` signals is cut into: about
/// [`PER_CELL`] signals each, none narrower than `reach` (so the cells
/// beside a cell hold every signal within the radius of it).
pub(super) fn cells_in_band(count: usize, reach: f64) -> u32 {
    let widest = if reach < 360.0 {
        (360.0 / reach).floor()
    } else {
        1.0
    };
    let want = (count / PER_CELL) as f64;
    want.min(widest).clamp(1.0, f64::from(1u32 << 30)) as u32
}

/// The cell of right ascension `ra`, degrees, in a band of `cells` cells.
pub(super) fn cell_number(ra: f64, cells: u32) -> u32 {
    if cells <= 1 {
        return 0;
    }
    let x = ra.rem_euclid(360.0);
    ((x / (360.0 / f64::from(cells))).floor() as u32).min(cells - 1)
}

/// The cells of a band of `to` cells that hold every signal within the
/// radius of a signal in cell `number` of a band of `from` cells (the same
/// band or one beside it, whose `reach` is given): one range of cell
/// numbers, or two where the range wraps past 360°.
pub(super) fn cells_near(reach: f64, number: u32, from: u32, to: u32) -> [(u32, u32); 2] {
    const NONE: (u32, u32) = (1, 0);
    let all = [(0, to - 1), NONE];
    if to <= 1 || reach >= 360.0 {
        return all;
    }
    let own = 360.0 / f64::from(from);
    let lo = f64::from(number) * own - reach;
    let hi = f64::from(number + 1) * own + reach;
    if hi - lo >= 360.0 {
        return all;
    }
    let width = 360.0 / f64::from(to);
    let (a, b) = ((lo / width).floor() as i64, (hi / width).floor() as i64);
    let to = i64::from(to);
    if b - a + 1 >= to {
        return all;
    }
    let (a, b) = (a.rem_euclid(to) as u32, b.rem_euclid(to) as u32);
    if a <= b {
        [(a, b), NONE]
    } else {
        [(a, to as u32 - 1), (0, b)]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_cells_beside_a_cell_hold_every_position_within_the_radius() {
        // Pairs of positions a chosen angle apart (the destination point
        // from the spherical cosine and sine rules, from memory; each pair
        // kept only if the haversine separation agrees), at every declination, across
        // right ascension 0° and around the poles, in bands cut into
        // cells for a range of signal counts: the second position's cell
        // is always among those searched from the first's.
        let mut x = 7u64;
        let mut next = move || {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut checked = 0;
        for radius in [0.5f64, 120.0, 3600.0, 40000.0] {
            let width = (radius * (1.0 + 1e-6) / 3600.0).max(1e-7);
            for _ in 0..20000 {
                let dec1: f64 = match (next() * 4.0) as u32 {
                    0 => 90.0 - next() * 0.2,
                    1 => -90.0 + next() * 0.2,
                    _ => -90.0 + 180.0 * next(),
                };
                let ra1 = if next() < 0.3 {
                    360.0 - next() * 0.1
                } else {
                    360.0 * next()
                };
                let theta = (radius / 3600.0 * next()).to_radians();
                let phi = std::f64::consts::TAU * next();
                let (d1, a1) = (dec1.to_radians(), ra1.to_radians());
                let d2 = (d1.sin() * theta.cos() + d1.cos() * theta.sin() * phi.cos()).asin();
                let a2 = a1
                    + (phi.sin() * theta.sin() * d1.cos()).atan2(theta.cos() - d1.sin() * d2.sin());
                let (ra2, dec2) = (a2.to_degrees().rem_euclid(360.0), d2.to_degrees());
                if super::super::separation_arcsec(ra1, dec1, ra2, dec2) > radius {
                    continue;
                }
                let (b1, b2) = (band_number(dec1, width), band_number(dec2, width));
                assert!(b1.abs_diff(b2) <= 1, "{dec1} {dec2}");
                let reach1 = reach(width, b1);
                let count = |c: f64| (c * 1e7) as usize;
                let (m1, m2) = (
                    cells_in_band(count(next()), reach1),
                    cells_in_band(count(next()), reach(width, b2)),
                );
                let (c1, c2) = (cell_number(ra1, m1), cell_number(ra2, m2));
                let near = cells_near(reach1, c1, m1, m2);
                assert!(
                    near.iter().any(|&(lo, hi)| (lo..=hi).contains(&c2)),
                    "radius {radius}: ({ra1}, {dec1}) cell {c1}/{m1}, ({ra2}, {dec2}) cell {c2}/{m2}: {near:?}"
                );
                checked += 1;
            }
        }
        assert!(checked > 70000, "{checked}");
    }
}
