//! The orbits no planet can have, from the catalogue's period, duration
//! and star (docs/science.md §2).

use super::{Checks, Derived};
use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::flags::Flag;
use crate::science;

/// The densest a planet can be, g cm⁻³, for the Roche limit's period
/// (`science::least_planet_density`): a body of 13 Jupiter masses, the
/// deuterium-burning limit commonly taken as a planet's largest mass, at
/// Jupiter's radius (giants of that mass are about that size) has 17
/// g cm⁻³, and rocky planets measured are below 15 g cm⁻³ (all from
/// memory); 30 leaves room for a compressed iron world none has shown
/// (common practice, no source). Denser bodies of a Jupiter's size are
/// brown dwarfs. Orbits shorter than 2.05 h.
const DENSEST_PLANET_G_CM3: f64 = 30.0;

/// The orbits no planet can have: one so short that only a body denser
/// than any planet survives its star's tides there; a transit of half the
/// period or more (T₁₄ ≤ P/2 for every circular orbit); and an orbit
/// inside the catalogue's star (its density below the least that lets a
/// body of this size clear its surface in this period). Firm
/// `density-mismatch`: the signal is no planet of this star as the
/// catalogue gives it, whatever b is (docs/science.md §2).
pub(super) fn flag(cat: &Catalogue, c: CandidateId, d: &Derived, out: &mut Checks) {
    let period = cat.value(Field::PeriodD, c).unwrap_or(f64::NAN);
    let least = science::least_planet_density(period);
    if least > DENSEST_PLANET_G_CM3 {
        out.add(c, Flag::DensityMismatch, false, format!(
            "an orbit of {:.2} h: a body survives its star's tides there only at a mean density above {least:.0} g/cm³ (the Roche limit), beyond any planet's ({DENSEST_PLANET_G_CM3:.0} g/cm³)",
            period * 24.0
        ));
    }
    if d.transit_too_long {
        let t14 = cat.value(Field::DurationH, c).unwrap_or(f64::NAN);
        out.add(c, Flag::DensityMismatch, false, format!(
            "the transit lasts {t14:.2} h, half its {:.2} h period or more: no orbit outside a star gives a transit that long (T₁₄ ≤ P/2)",
            period * 24.0
        ));
    }
    if let (Some(least), Some(star)) = (d.least_density_orbit, d.density_star)
        && star < least
    {
        out.add(c, Flag::DensityMismatch, false, format!(
            "an orbit of {period:.4} d lies inside the catalogue star: its density {star:.0} kg/m³ is below the {least:.0} kg/m³ a star needs for this body to orbit it that fast without touching it (a/R★ = {:.2})",
            science::a_over_rstar(period, d.star_mass_msun.unwrap_or(f64::NAN), d.star_radius_rsun.unwrap_or(f64::NAN))
        ));
    }
}
