//! Units a table's own header states (IPAC's unit line, a VOTable FIELD's
//! `unit`, a FITS `TUNITn`, an ECSV column's `unit`), turned into the
//! conversion to the unit a field is stored in (its name says which:
//! `period_d`, `duration_h`, `depth_ppm`).

use super::{DepthUnit, Field};

/// stored = raw × `scale` + `offset`, and the words for the summary.
#[derive(Clone, Debug, PartialEq)]
pub struct Conversion {
    pub scale: f64,
    pub offset: f64,
    pub text: String,
}

/// Days in one unit of time, for the spellings tables use (IAU style
/// guide and VOUnits 1.0: d, h, min, s, yr; the long forms too). The Julian
/// year is 365.25 d (IAU 2012 units, from memory).
pub fn days_per(unit: &str) -> Option<f64> {
    Some(match unit.trim().to_ascii_lowercase().as_str() {
        "d" | "day" | "days" | "jd" | "bjd" | "bjd_tdb" | "hjd" | "btjd" | "bkjd" => 1.0,
        "h" | "hr" | "hrs" | "hour" | "hours" => 1.0 / 24.0,
        "min" | "mins" | "minute" | "minutes" => 1.0 / 1440.0,
        "s" | "sec" | "second" | "seconds" => 1.0 / 86_400.0,
        "yr" | "a" | "year" | "years" => 365.25,
        _ => return None,
    })
}

/// Earth radii in one unit of a planet's radius, for the spellings tables
/// use (VOUnits 1.0 and astropy: `earthRad`, `jupiterRad`, `solRad`, `km`;
/// archives' brackets: `R_Earth`, `R_Jupiter`, `Rjup`), from the IAU 2015
/// nominal equatorial radii (Resolution B3: R⊕ 6.3781e6 m, R_J 7.1492e7 m,
/// R☉ 6.957e8 m). Spaces and underscores are left out before the match.
pub fn earth_radii_per(unit: &str) -> Option<f64> {
    use crate::constants::{R_EARTH_M, R_JUPITER_M, R_SUN_M};
    let u: String = unit
        .trim()
        .to_ascii_lowercase()
        .chars()
        .filter(|c| !matches!(c, ' ' | '_' | '.'))
        .collect();
    Some(match u.as_str() {
        "re" | "rearth" | "earthrad" | "earthradius" | "earthradii" | "r⊕" | "rgeo" => 1.0,
        "rj" | "rjup" | "rjupiter" | "jupiterrad" | "jupiterradius" | "jupiterradii" => {
            R_JUPITER_M / R_EARTH_M
        }
        "rsun" | "rsol" | "solrad" | "r☉" => R_SUN_M / R_EARTH_M,
        "km" => 1e3 / R_EARTH_M,
        _ => return None,
    })
}

/// Degrees in one unit of a position's stated unit, for the spellings
/// tables use (VOUnits 1.0: `deg`, `h` and `rad`; astropy's `hourangle`):
/// `None` for degrees, a sexagesimal form (`h:m:s`, `hms`, `d:m:s`: its
/// cells are read as sexagesimal whatever the unit says) or no unit. Words
/// that name the frame rather than the unit (`J2000`, `ICRS`, `epoch
/// 2000`, and `decimal`) are passed over. Right ascension only may be in hours: 1 h =
/// 15° (24 h of right ascension make the 360° of a circle, a definition);
/// 1 rad = 180°/π. Anything else is an error that names it, so a position
/// in a unit not read is never taken as degrees.
fn degrees_per(right_ascension: bool, unit: &str) -> Result<Option<f64>, String> {
    let lower = unit.to_ascii_lowercase();
    let words = lower
        .split(|c: char| c == ',' || c == ';' || c.is_whitespace())
        .map(|w| w.trim_matches(['(', ')', '[', ']']).trim_end_matches('.'))
        .filter(|w| !w.is_empty());
    for w in words {
        let frame = matches!(
            w,
            "icrs" | "fk5" | "fk4" | "epoch" | "equinox" | "eq" | "ep" | "decimal"
        ) || w.trim_start_matches(['j', 'b', '=']).parse::<f64>().is_ok()
            || w.starts_with("eq=")
            || w.starts_with("ep=");
        let sexagesimal = matches!(w, "hms" | "dms" | "sexagesimal")
            || (w.contains(':') && w.chars().all(|c| "hdms:.\"".contains(c)));
        if frame || sexagesimal {
            continue;
        }
        return match w {
            "deg" | "degree" | "degrees" | "°" => Ok(None),
            "h" | "hr" | "hrs" | "hour" | "hours" | "hourangle" if right_ascension => {
                Ok(Some(15.0))
            }
            "h" | "hr" | "hrs" | "hour" | "hours" | "hourangle" => Err(format!(
                "unit `{unit}`: a declination is not given in hours"
            )),
            "rad" | "radian" | "radians" => Ok(Some(180.0 / std::f64::consts::PI)),
            _ => Err(format!(
                "unit `{unit}` is not a position unit starsift converts (deg; h for right \
                 ascension; rad; a sexagesimal form such as h:m:s)"
            )),
        };
    }
    Ok(None)
}

/// Whether a stated unit is percent (`%`, `percent`, `pct`): a value
/// read as such is stored as a fraction.
pub fn is_percent(unit: &str) -> bool {
    matches!(
        unit.trim().to_ascii_lowercase().as_str(),
        "%" | "percent" | "pct"
    )
}

/// The depth unit a table states: ppm, percent, parts per thousand or a
/// plain fraction (an empty unit says nothing).
pub fn depth_unit(unit: &str) -> Option<(DepthUnit, f64)> {
    let u = unit.trim().to_ascii_lowercase();
    Some(match u.as_str() {
        "ppm" | "1e-6" | "10**-6" | "10**(-6)" => (DepthUnit::Ppm, 1.0),
        "%" | "percent" | "pct" | "10**-2" | "10**(-2)" | "1e-2" => (DepthUnit::Percent, 1.0),
        "ppt" | "1e-3" | "10**-3" | "10**(-3)" => (DepthUnit::Ppm, 1e3),
        "frac" | "fraction" | "dimensionless" | "1" | "relative flux" => (DepthUnit::Fraction, 1.0),
        _ => return None,
    })
}

/// Magnitudes per unit of a depth stated in magnitudes (`mmag` → 0.001,
/// `mag` → 1), or `None` for any other unit.
pub fn magnitude_scale(unit: &str) -> Option<f64> {
    match unit.trim().to_ascii_lowercase().as_str() {
        "mmag" | "millimag" | "millimagnitude" | "millimagnitudes" => Some(1e-3),
        "mag" | "magnitude" | "magnitudes" => Some(1.0),
        _ => None,
    }
}

/// A transit depth of `dm` magnitudes as a flux drop in ppm, by Pogson's
/// ratio (m₁ − m₂ = −2.5 log₁₀(F₁/F₂), a definition): δ = 1 − 10^(−0.4 Δm).
/// 1 mmag is 920.6 ppm.
pub fn depth_ppm_of_magnitudes(dm: f64) -> f64 {
    (1.0 - 10f64.powf(-0.4 * dm)) * 1e6
}

/// ppm of flux drop per magnitude of a small depth, from Pogson's ratio
/// at 1 mmag: 920,610 (920.6 ppm a mmag). Linear in the magnitudes to
/// within 0.5 % up to 10 mmag (0.9959 there, computed offline in Python).
pub fn ppm_per_magnitude() -> f64 {
    depth_ppm_of_magnitudes(1e-3) * 1e3
}

/// A zero written in a time unit: `BJD - 2457000`, `BJD-2454833, days`,
/// `MJD` (JD − 2400000.5): days to add to reach a full Julian date.
pub fn epoch_zero(unit: &str) -> Option<f64> {
    let u = unit.trim().to_ascii_lowercase();
    if u == "mjd" || u.starts_with("mjd ") || u.starts_with("mjd,") {
        return Some(2_400_000.5);
    }
    let (_, after) = u.split_once('-')?;
    let digits: String = after
        .trim_start()
        .chars()
        .take_while(|c| c.is_ascii_digit() || *c == '.')
        .collect();
    digits.parse::<f64>().ok().filter(|z| *z >= 1000.0)
}

/// Arcseconds per unit of `u`, an angle's stated unit (1″ = 1000 mas,
/// 1′ = 60″, 1° = 3600″, definitions); `None` for a unit that is no angle
/// (pixels), which a centroid offset keeps as written: only the offset's
/// ratio to its error is read.
fn arcsec_per(u: &str) -> Option<f64> {
    Some(match u.trim().to_ascii_lowercase().as_str() {
        "arcsec" | "arcsecond" | "arcseconds" | "as" | "\"" | "″" => 1.0,
        "mas" | "milliarcsec" | "milliarcsecond" | "milliarcseconds" => 1e-3,
        "arcmin" | "arcminute" | "arcminutes" | "'" => 60.0,
        "deg" | "degree" | "degrees" | "°" => 3600.0,
        _ => return None,
    })
}

/// Whether `u`, a centroid offset's stated unit, is an angle starsift
/// converts to arcseconds ([`arcsec_per`]).
pub fn is_angle(u: &str) -> bool {
    arcsec_per(u).is_some()
}

/// The conversion a stated unit implies for a field stored in days or
/// hours (period, its error, the epoch's error, the duration) or for the
/// epoch (a zero in the unit is added). `Ok(None)` when the field keeps its
/// values as they are; `Err` names a unit that cannot be converted.
pub fn conversion(field: Field, unit: &str) -> Result<Option<Conversion>, String> {
    let u = unit.trim();
    if u.is_empty() {
        return Ok(None);
    }
    let time_field = |per_stored: f64, stored: &str| -> Result<Option<Conversion>, String> {
        // The head of "d, days" or "BJD - 2457000, days" names the unit.
        let head = u.split(',').next().unwrap_or(u);
        let days = days_per(head)
            .or_else(|| u.split(',').nth(1).and_then(days_per))
            .ok_or_else(|| {
                format!("unit `{u}` is not a time unit starsift converts (d, h, min, s, yr)")
            })?;
        let scale = days / per_stored;
        Ok((scale != 1.0).then(|| Conversion {
            scale,
            offset: 0.0,
            text: format!("table unit {u}, × {} to {stored}", trim_float(scale)),
        }))
    };
    match field {
        Field::PeriodD | Field::PeriodErrD | Field::EpochErrD => time_field(1.0, "days"),
        Field::DurationH => time_field(1.0 / 24.0, "hours"),
        Field::PlanetRadiusRearth => {
            let scale = earth_radii_per(u).ok_or_else(|| {
                format!(
                    "unit `{u}` is not a radius unit starsift converts (R_Earth, R_Jupiter, \
                     R_Sun, km)"
                )
            })?;
            Ok((scale != 1.0).then(|| Conversion {
                scale,
                offset: 0.0,
                text: format!("table unit {u}, × {} to Earth radii", trim_float(scale)),
            }))
        }
        Field::RaDeg | Field::DecDeg => {
            let scale = degrees_per(field == Field::RaDeg, u)?;
            Ok(scale.map(|scale| Conversion {
                scale,
                offset: 0.0,
                text: format!("table unit {u}, × {} to degrees", trim_float(scale)),
            }))
        }
        // A secondary eclipse's depth and error, in the depth units (small
        // depths in magnitudes nearly linear in them, `ppm_per_magnitude`).
        Field::SecondaryDepthPpm | Field::SecondaryDepthErrPpm => {
            let scale = match (depth_unit(u), magnitude_scale(u)) {
                (Some((du, extra)), _) => du.to_ppm() * extra,
                (None, Some(per_mag)) => ppm_per_magnitude() * per_mag,
                (None, None) => {
                    return Err(format!(
                        "unit `{u}` is not a depth unit starsift converts (ppm, %, ppt, fraction, mmag)"
                    ));
                }
            };
            Ok((scale != 1.0).then(|| Conversion {
                scale,
                offset: 0.0,
                text: format!("table unit {u}, × {} to ppm", trim_float(scale)),
            }))
        }
        // A centroid offset and its error: angles to arcseconds; a unit
        // that is no angle (pixels) is kept as written, since the check
        // reads only their ratio.
        Field::CentroidOffsetArcsec | Field::CentroidOffsetErrArcsec => {
            let scale = arcsec_per(u).unwrap_or(1.0);
            Ok((scale != 1.0).then(|| Conversion {
                scale,
                offset: 0.0,
                text: format!("table unit {u}, × {} to arcsec", trim_float(scale)),
            }))
        }
        Field::Epoch => Ok(epoch_zero(u).map(|zero| Conversion {
            scale: 1.0,
            offset: zero,
            text: format!("table unit {u}, + {} to a full date", trim_float(zero)),
        })),
        _ => Ok(None),
    }
}

fn trim_float(v: f64) -> String {
    let s = format!("{v:.10}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn time_units_convert_to_the_stored_unit() {
        // 1 d = 24 h = 1440 min = 86400 s (SI brochure, 9th ed., Table 8).
        let c = conversion(Field::DurationH, "d").unwrap().unwrap();
        assert_eq!(c.scale, 24.0);
        let c = conversion(Field::DurationH, "min").unwrap().unwrap();
        assert!((c.scale - 1.0 / 60.0).abs() < 1e-15);
        assert_eq!(conversion(Field::DurationH, "hours").unwrap(), None);
        let c = conversion(Field::PeriodD, "h").unwrap().unwrap();
        assert!((c.scale - 1.0 / 24.0).abs() < 1e-15);
        assert_eq!(conversion(Field::PeriodD, "days").unwrap(), None);
        assert!(conversion(Field::PeriodD, "furlong").is_err());
        assert_eq!(conversion(Field::Snr, "furlong").unwrap(), None);
    }

    #[test]
    fn epochs_take_the_zero_their_unit_names() {
        // MJD = JD − 2400000.5 (IAU 1997 resolution B1, from memory).
        let c = conversion(Field::Epoch, "BJD - 2457000, days")
            .unwrap()
            .unwrap();
        assert_eq!((c.scale, c.offset), (1.0, 2_457_000.0));
        assert_eq!(epoch_zero("MJD"), Some(2_400_000.5));
        assert_eq!(conversion(Field::Epoch, "d").unwrap(), None);
    }

    #[test]
    fn positions_convert_to_degrees() {
        // 24 h of right ascension = 360°, so 1 h = 15°; 1 rad = 180°/π
        // (definitions).
        let scale = |f, u| conversion(f, u).map(|c| c.map(|c| c.scale));
        assert_eq!(scale(Field::RaDeg, "h"), Ok(Some(15.0)));
        assert_eq!(scale(Field::RaDeg, "hourangle"), Ok(Some(15.0)));
        assert_eq!(scale(Field::DecDeg, "rad"), Ok(Some(57.295_779_513_082_32)));
        // Degrees, sexagesimal forms and frames keep the values as they are.
        for u in [
            "deg",
            "degrees",
            "J2000",
            "deg; ICRS",
            "h:m:s",
            "\"d:m:s\"",
            "hms",
            "ep=2000",
            "decimal degrees",
            "deg. (J2000)",
        ] {
            assert_eq!(scale(Field::RaDeg, u), Ok(None), "{u}");
        }
        assert!(scale(Field::DecDeg, "h").is_err());
        assert!(scale(Field::RaDeg, "arcsec").is_err());
        assert!(scale(Field::RaDeg, "parsec").is_err());
    }

    #[test]
    fn planet_radii_convert_to_earth_radii() {
        // R_J/R⊕ = 7.1492e7 / 6.3781e6 = 11.209 and R☉/R⊕ = 109.08 (IAU
        // 2015 Resolution B3 nominal equatorial radii, ratios worked by
        // hand); 1 R⊕ = 6378.1 km.
        let c = conversion(Field::PlanetRadiusRearth, "R_Jupiter")
            .unwrap()
            .unwrap();
        assert!((c.scale - 11.209).abs() < 5e-4, "{}", c.scale);
        for u in ["Rjup", "jupiterRad", "R_J"] {
            assert_eq!(earth_radii_per(u), Some(c.scale), "{u}");
        }
        assert!((earth_radii_per("solRad").unwrap() - 109.08).abs() < 5e-3);
        assert!((earth_radii_per("km").unwrap() * 6378.1 - 1.0).abs() < 1e-12);
        for u in ["R_Earth", "Rearth", "earthRad", "R_E"] {
            assert_eq!(
                conversion(Field::PlanetRadiusRearth, u).unwrap(),
                None,
                "{u}"
            );
        }
        assert!(conversion(Field::PlanetRadiusRearth, "furlong").is_err());
    }

    #[test]
    fn depth_units() {
        assert_eq!(depth_unit("%"), Some((DepthUnit::Percent, 1.0)));
        assert_eq!(depth_unit("ppm"), Some((DepthUnit::Ppm, 1.0)));
        assert_eq!(depth_unit("ppt"), Some((DepthUnit::Ppm, 1e3)));
        assert_eq!(depth_unit(""), None);
        assert_eq!(depth_unit("mmag"), None);
    }

    #[test]
    fn a_secondary_depths_stated_unit_converts_to_ppm() {
        // 1 ppt = 1000 ppm, 1 % = 10⁴ ppm (definitions); 1 mmag is 920.6 ppm
        // of flux for small depths (Pogson's ratio, below).
        for (u, ppm) in [("ppt", 1e3), ("%", 1e4), ("fraction", 1e6)] {
            let c = conversion(Field::SecondaryDepthErrPpm, u).unwrap().unwrap();
            assert_eq!(c.scale, ppm, "{u}");
        }
        let c = conversion(Field::SecondaryDepthPpm, "mmag")
            .unwrap()
            .unwrap();
        assert!((c.scale - 920.6).abs() < 0.1, "{}", c.scale);
        assert_eq!(conversion(Field::SecondaryDepthPpm, "ppm").unwrap(), None);
        // 1″ = 1000 mas, 1° = 3600″ (definitions); pixels kept as written.
        let c = conversion(Field::CentroidOffsetErrArcsec, "mas")
            .unwrap()
            .unwrap();
        assert_eq!(c.scale, 1e-3);
        let c = conversion(Field::CentroidOffsetArcsec, "deg")
            .unwrap()
            .unwrap();
        assert_eq!(c.scale, 3600.0);
        assert_eq!(
            conversion(Field::CentroidOffsetArcsec, "pix").unwrap(),
            None
        );
        assert!(conversion(Field::SecondaryDepthPpm, "furlong").is_err());
    }

    #[test]
    fn depths_in_magnitudes_by_pogsons_ratio() {
        // Pogson's ratio (a definition): 5 mag is a factor 100 in flux, so
        // a 5 mag eclipse leaves 1 % of the light: 990,000 ppm. 1 mmag:
        // 1 − 10^(−0.0004) = 920.61 ppm (computed offline in Python).
        assert!((depth_ppm_of_magnitudes(5.0) - 990_000.0).abs() < 1e-6);
        let one = depth_ppm_of_magnitudes(magnitude_scale("mmag").unwrap());
        assert!((one - 920.61).abs() < 0.01, "{one}");
        assert_eq!(magnitude_scale("ppm"), None);
    }
}
