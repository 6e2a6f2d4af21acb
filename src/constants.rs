//! Physical and astronomical constants, each with its source. SI units.

/// Nominal solar radius, m. IAU 2015 Resolution B3 (Prša et al. 2016, AJ 152, 41).
pub const R_SUN_M: f64 = 6.957e8;
/// Nominal solar mass parameter GM☉, m³ s⁻². IAU 2015 Resolution B3.
pub const GM_SUN: f64 = 1.3271244e20;
/// Nominal solar effective temperature, K. IAU 2015 Resolution B3.
pub const TEFF_SUN_K: f64 = 5772.0;
/// Nominal solar luminosity, W. IAU 2015 Resolution B3.
pub const L_SUN_W: f64 = 3.828e26;
/// Nominal total solar irradiance, W m⁻². IAU 2015 Resolution B3.
pub const S_SUN_W_M2: f64 = 1361.0;
/// Nominal Earth equatorial radius, m. IAU 2015 Resolution B3.
pub const R_EARTH_M: f64 = 6.3781e6;
/// Nominal Earth polar radius, m. IAU 2015 Resolution B3.
pub const R_EARTH_POLAR_M: f64 = 6.3568e6;
/// Nominal Jupiter equatorial radius, m. IAU 2015 Resolution B3.
pub const R_JUPITER_M: f64 = 7.1492e7;
/// Nominal Jupiter polar radius, m. IAU 2015 Resolution B3.
pub const R_JUPITER_POLAR_M: f64 = 6.6854e7;
/// Nominal terrestrial mass parameter GM⊕, m³ s⁻². IAU 2015 Resolution B3
/// (value from memory, docs/science.md §5 [M]).
pub const GM_EARTH: f64 = 3.986004e14;
/// Nominal Jovian mass parameter GM_J, m³ s⁻². IAU 2015 Resolution B3
/// (value from memory, docs/science.md §5 [M]).
pub const GM_JUPITER: f64 = 1.2668653e17;
/// Astronomical unit, m, exact. IAU 2012 Resolution B2.
pub const AU_M: f64 = 149_597_870_700.0;
/// Solar to Earth mass ratio. JPL DE405 (docs/science.md §5).
pub const M_SUN_PER_M_EARTH: f64 = 332_946.05;
/// Solar to Jupiter mass ratio. JPL DE405 (docs/science.md §5).
pub const M_SUN_PER_M_JUPITER: f64 = 1047.3486;
/// Newtonian constant of gravitation, m³ kg⁻¹ s⁻². CODATA 2018 (from memory).
pub const G: f64 = 6.67430e-11;
/// Stefan–Boltzmann constant, W m⁻² K⁻⁴. CODATA 2018 (exact since the 2019 SI).
pub const SIGMA_SB: f64 = 5.670374419e-8;
/// Seconds per day.
pub const DAY_S: f64 = 86_400.0;
/// Sidereal year, days (from memory; docs/science.md §2 uses it as the Earth check).
pub const SIDEREAL_YEAR_D: f64 = 365.256363;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn derived_values_match_methods_section_5() {
        // docs/science.md §5 derived checks [D]: R☉/au = 0.00465047.
        assert!((R_SUN_M / AU_M - 0.00465047).abs() < 5e-9);
        // L☉/(4π au²) = 1361.17 W m⁻², consistent with the nominal S☉ = 1361.
        let s = L_SUN_W / (4.0 * std::f64::consts::PI * AU_M * AU_M);
        assert!((s - 1361.17).abs() < 0.01, "{s}");
        // 4πR☉²σT⁴ = 3.82799e26 W, consistent with the nominal L☉ = 3.828e26.
        let l = 4.0 * std::f64::consts::PI * R_SUN_M * R_SUN_M * SIGMA_SB * TEFF_SUN_K.powi(4);
        assert!((l / 3.82799e26 - 1.0).abs() < 2e-6, "{l}");
        // Earth transit depth (R⊕/R☉)² = 84.05 ppm; Jupiter 1.0560 %.
        assert!(((R_EARTH_M / R_SUN_M).powi(2) * 1e6 - 84.05).abs() < 0.01);
        assert!(((R_JUPITER_M / R_SUN_M).powi(2) * 100.0 - 1.0560).abs() < 1e-4);
        // GM☉/GM⊕ should equal the DE405 mass ratio to 6 digits.
        assert!((GM_SUN / GM_EARTH / M_SUN_PER_M_EARTH - 1.0).abs() < 1e-6);
    }
}
