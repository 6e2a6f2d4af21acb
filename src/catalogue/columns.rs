//! Canonical catalogue fields, the built-in header synonyms and the units
//! a header's names state; the column-map files and the mapping of one
//! catalogue's header onto the fields are in `mapping`.

use std::fmt;

use serde::Serialize;

mod mapping;
pub use mapping::{ColumnMap, ColumnUse, Mapping};

/// A canonical catalogue field. Units live in the names (DESIGN.md, Inputs).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Field {
    Star,
    Candidate,
    PeriodD,
    Epoch,
    DepthPpm,
    DurationH,
    Snr,
    Impact,
    Ror,
    StarRadiusRsun,
    StarMassMsun,
    StarTeffK,
    StarLogg,
    RaDeg,
    DecDeg,
    Mag,
    Fpp,
    Lightcurve,
    PeriodErrD,
    EpochErrD,
    Contamination,
    /// The catalogue's own planet radius, Earth radii (a stated unit such
    /// as `R_Jupiter` is converted): read where the star's radius is
    /// unknown, and by the `big-radius` check beside the checks' own.
    PlanetRadiusRearth,
    /// A disposition the catalogue already gives (text: `FALSE POSITIVE`,
    /// `PC`...): kept as it is among the extra columns, read by the checks.
    Disposition,
    /// What a pipeline measured in the candidate's own light curve: the
    /// depth at phase 0.5 (an occultation or a secondary eclipse), ppm, and
    /// its error; read by `checks::reported`.
    SecondaryDepthPpm,
    SecondaryDepthErrPpm,
    /// The significance of the difference between the odd and the even
    /// transits' depths, σ (a pipeline's, from the light curve).
    OddEvenSigma,
    /// How far from the target's catalogue position the dimming light is
    /// (the centroid of the in- minus out-of-transit image), arcsec, and
    /// its error (a pipeline's, from the pixels).
    CentroidOffsetArcsec,
    CentroidOffsetErrArcsec,
}

/// Every field, in the order summaries list them.
pub const FIELDS: [Field; 28] = [
    Field::Star,
    Field::Candidate,
    Field::PeriodD,
    Field::Epoch,
    Field::DepthPpm,
    Field::DurationH,
    Field::Snr,
    Field::Impact,
    Field::Ror,
    Field::StarRadiusRsun,
    Field::StarMassMsun,
    Field::StarTeffK,
    Field::StarLogg,
    Field::RaDeg,
    Field::DecDeg,
    Field::Mag,
    Field::Fpp,
    Field::Lightcurve,
    Field::PeriodErrD,
    Field::EpochErrD,
    Field::Contamination,
    Field::PlanetRadiusRearth,
    Field::Disposition,
    Field::SecondaryDepthPpm,
    Field::SecondaryDepthErrPpm,
    Field::OddEvenSigma,
    Field::CentroidOffsetArcsec,
    Field::CentroidOffsetErrArcsec,
];

/// The fields a row cannot do without.
pub const REQUIRED: [Field; 6] = [
    Field::Star,
    Field::Candidate,
    Field::PeriodD,
    Field::Epoch,
    Field::DepthPpm,
    Field::DurationH,
];

/// The numeric fields, in storage order: `Field::num_slot` indexes this.
pub const NUMERIC: [Field; 24] = [
    Field::PeriodD,
    Field::Epoch,
    Field::DepthPpm,
    Field::DurationH,
    Field::Snr,
    Field::Impact,
    Field::Ror,
    Field::StarRadiusRsun,
    Field::StarMassMsun,
    Field::StarTeffK,
    Field::StarLogg,
    Field::RaDeg,
    Field::DecDeg,
    Field::Mag,
    Field::Fpp,
    Field::PeriodErrD,
    Field::EpochErrD,
    Field::Contamination,
    Field::PlanetRadiusRearth,
    Field::SecondaryDepthPpm,
    Field::SecondaryDepthErrPpm,
    Field::OddEvenSigma,
    Field::CentroidOffsetArcsec,
    Field::CentroidOffsetErrArcsec,
];

impl Field {
    /// The canonical name, as used in column-map files, filters and exports.
    pub fn name(self) -> &'static str {
        match self {
            Field::Star => "star",
            Field::Candidate => "candidate",
            Field::PeriodD => "period_d",
            Field::Epoch => "epoch",
            Field::DepthPpm => "depth_ppm",
            Field::DurationH => "duration_h",
            Field::Snr => "snr",
            Field::Impact => "impact",
            Field::Ror => "ror",
            Field::StarRadiusRsun => "star_radius_rsun",
            Field::StarMassMsun => "star_mass_msun",
            Field::StarTeffK => "star_teff_k",
            Field::StarLogg => "star_logg",
            Field::RaDeg => "ra_deg",
            Field::DecDeg => "dec_deg",
            Field::Mag => "mag",
            Field::Fpp => "fpp",
            Field::Lightcurve => "lightcurve",
            Field::PeriodErrD => "period_err_d",
            Field::EpochErrD => "epoch_err_d",
            Field::Contamination => "contamination",
            Field::PlanetRadiusRearth => "planet_radius_rearth",
            Field::Disposition => "disposition",
            Field::SecondaryDepthPpm => "secondary_depth_ppm",
            Field::SecondaryDepthErrPpm => "secondary_depth_err_ppm",
            Field::OddEvenSigma => "odd_even_sigma",
            Field::CentroidOffsetArcsec => "centroid_offset_arcsec",
            Field::CentroidOffsetErrArcsec => "centroid_offset_err_arcsec",
        }
    }

    /// Header names (lower case) that map to this field without a column map.
    ///
    /// To add a synonym, add it here and to the table in DEVELOPERS.md; the
    /// test `synonyms_are_unambiguous` keeps two fields from sharing one.
    pub fn synonyms(self) -> &'static [&'static str] {
        match self {
            // Archive spellings last (the exoplanet archives' candidate
            // tables: `tid`/`toi`, `kepid`/`kepoi_name`, the K2 table's
            // `hostname`/`epic_candname`, `pl_*`, `koi_*`, `st_*`; their
            // threshold-crossing event tables: `ticid`, `tce_*`; from memory
            // of their column lists).
            Field::Star => &[
                "star",
                "star_id",
                "host",
                "host_id",
                "target",
                "target_id",
                "tid",
                "tic_id",
                "kepid",
                "ticid",
                "hostname",
                "epic_hostname",
            ],
            Field::Candidate => &[
                "candidate",
                "candidate_id",
                "cand",
                "cand_id",
                "name",
                "id",
                "toi",
                "kepoi_name",
                "epic_candname",
            ],
            Field::PeriodD => &[
                "period",
                "period_d",
                "period_days",
                "per",
                "pl_orbper",
                "koi_period",
                "tce_period",
            ],
            Field::Epoch => &[
                "epoch",
                "t0",
                "tc",
                "epoch_bjd",
                "pl_tranmid",
                "koi_time0",
                "koi_time0bk",
                "tce_time0",
                "tce_time0bk",
                "tce_time0bt",
            ],
            // The unit-suffixed depth names fix the unit; see `DepthUnit`.
            Field::DepthPpm => &[
                "depth",
                "depth_ppm",
                "depth_frac",
                "depth_fraction",
                "depth_pct",
                "depth_percent",
                "pl_trandep",
                "koi_depth",
                "tce_depth",
            ],
            Field::DurationH => &[
                "duration",
                "duration_h",
                "duration_hours",
                "dur",
                "t14",
                "pl_trandurh",
                "pl_trandur",
                "koi_duration",
                "tce_duration",
            ],
            Field::Snr => &["snr", "koi_model_snr", "planet_snr", "tce_model_snr"],
            Field::Impact => &["impact", "b", "pl_imppar", "koi_impact", "tce_impact"],
            Field::Ror => &["ror", "rp_rs", "pl_ratror", "koi_ror", "tce_ror"],
            Field::StarRadiusRsun => &[
                "star_radius",
                "star_radius_rsun",
                "rstar",
                "st_rad",
                "koi_srad",
                "stellar_radius",
                "tce_sradius",
            ],
            Field::StarMassMsun => &[
                "star_mass",
                "star_mass_msun",
                "mstar",
                "st_mass",
                "koi_smass",
                "stellar_mass",
                "tce_smass",
            ],
            Field::StarTeffK => &[
                "teff",
                "star_teff",
                "star_teff_k",
                "st_teff",
                "koi_steff",
                "stellar_eff_temp",
                "tce_steff",
            ],
            Field::StarLogg => &[
                "logg",
                "star_logg",
                "st_logg",
                "stellar_logg",
                "koi_slogg",
                "tce_slogg",
            ],
            Field::RaDeg => &["ra", "ra_deg"],
            Field::DecDeg => &["dec", "dec_deg"],
            Field::Mag => &[
                "mag",
                "kepmag",
                "koi_kepmag",
                "tmag",
                "tess_mag",
                "st_tmag",
                "sy_tmag",
            ],
            Field::Fpp => &["fpp", "fpp_prob", "false_positive_probability"],
            Field::Lightcurve => &["lightcurve", "lc"],
            Field::PeriodErrD => &[
                "period_err",
                "period_err_d",
                "period_unc",
                "pl_orbpererr1",
                "koi_period_err1",
                "tce_period_err",
            ],
            Field::EpochErrD => &[
                "epoch_err",
                "epoch_err_d",
                "t0_err",
                "pl_tranmiderr1",
                "koi_time0bk_err1",
                "tce_time0_err",
                "tce_time0bk_err",
                "tce_time0bt_err",
            ],
            Field::Contamination => &["contamination", "dilution"],
            // Names that say Earth radii, or that archives use for them
            // (`Planet Radius (R_Earth)` reads as `planet_radius` with its
            // unit); a bare `rp` or `radius` is left out: tables use it in
            // Jupiter radii as often.
            Field::PlanetRadiusRearth => &[
                "planet_radius_rearth",
                "planet_radius",
                "radius_rearth",
                "rp_rearth",
                "prad",
                "pl_rade",
                "koi_prad",
                "tce_prad",
            ],
            Field::Disposition => &[
                "disposition",
                "disp",
                "koi_disposition",
                "koi_pdisposition",
                "tfopwg_disp",
            ],
            Field::SecondaryDepthPpm => &[
                "secondary_depth_ppm",
                "secondary_depth",
                "sec_depth_ppm",
                "sec_depth",
                "occultation_depth_ppm",
                "occultation_depth",
                "secondary_eclipse_depth",
                "depth_secondary",
            ],
            Field::SecondaryDepthErrPpm => &[
                "secondary_depth_err_ppm",
                "secondary_depth_err",
                "sec_depth_err_ppm",
                "sec_depth_err",
                "occultation_depth_err_ppm",
                "occultation_depth_err",
                "secondary_eclipse_depth_err",
                "depth_secondary_err",
            ],
            // `tce_bin_oedp_stat`: the odd/even depth comparison statistic
            // of the Kepler pipeline's threshold-crossing event tables, in σ
            // (the archive's name, from memory).
            Field::OddEvenSigma => &[
                "odd_even_sigma",
                "odd_even_z",
                "odd_even_significance",
                "oe_sigma",
                "tce_bin_oedp_stat",
            ],
            // `*_dikco_msky`: the Kepler pipeline's offset of the difference
            // image's centroid from the target's catalogue position, in the
            // archive's tables of events and of candidates (the names from
            // memory).
            Field::CentroidOffsetArcsec => &[
                "centroid_offset_arcsec",
                "centroid_offset",
                "tce_dikco_msky",
                "koi_dikco_msky",
            ],
            Field::CentroidOffsetErrArcsec => &[
                "centroid_offset_err_arcsec",
                "centroid_offset_err",
                "tce_dikco_msky_err",
                "koi_dikco_msky_err",
            ],
        }
    }

    /// The unit shown beside the field in summaries.
    pub fn unit(self) -> &'static str {
        match self {
            Field::PeriodD | Field::PeriodErrD | Field::EpochErrD => "d",
            Field::Epoch => "light-curve time",
            Field::DepthPpm => "ppm",
            Field::DurationH => "h",
            Field::StarRadiusRsun => "R_sun",
            Field::StarMassMsun => "M_sun",
            Field::StarTeffK => "K",
            Field::StarLogg => "log10(cm s^-2)",
            Field::RaDeg | Field::DecDeg => "deg",
            Field::Mag => "mag",
            Field::Fpp | Field::Contamination => "fraction",
            Field::Ror => "R_p/R_star",
            Field::PlanetRadiusRearth => "R_earth",
            Field::SecondaryDepthPpm | Field::SecondaryDepthErrPpm => "ppm",
            Field::OddEvenSigma => "sigma",
            Field::CentroidOffsetArcsec | Field::CentroidOffsetErrArcsec => "arcsec",
            _ => "",
        }
    }

    /// The position of a numeric field in `NUMERIC`, `None` for text fields.
    pub fn num_slot(self) -> Option<usize> {
        // A match, not a search: the loader asks this for every row.
        Some(match self {
            Field::PeriodD => 0,
            Field::Epoch => 1,
            Field::DepthPpm => 2,
            Field::DurationH => 3,
            Field::Snr => 4,
            Field::Impact => 5,
            Field::Ror => 6,
            Field::StarRadiusRsun => 7,
            Field::StarMassMsun => 8,
            Field::StarTeffK => 9,
            Field::StarLogg => 10,
            Field::RaDeg => 11,
            Field::DecDeg => 12,
            Field::Mag => 13,
            Field::Fpp => 14,
            Field::PeriodErrD => 15,
            Field::EpochErrD => 16,
            Field::Contamination => 17,
            Field::PlanetRadiusRearth => 18,
            Field::SecondaryDepthPpm => 19,
            Field::SecondaryDepthErrPpm => 20,
            Field::OddEvenSigma => 21,
            Field::CentroidOffsetArcsec => 22,
            Field::CentroidOffsetErrArcsec => 23,
            Field::Star | Field::Candidate | Field::Lightcurve | Field::Disposition => return None,
        })
    }

    pub fn from_name(name: &str) -> Option<Field> {
        FIELDS.iter().copied().find(|f| f.name() == name)
    }

    pub fn from_header(header: &str) -> Option<Field> {
        let find = |h: &str| FIELDS.iter().copied().find(|f| f.synonyms().contains(&h));
        find(&header.trim().to_ascii_lowercase())
            .or_else(|| find(&loose(header)))
            .or_else(|| name_unit(header).map(|(f, _)| f))
    }
}

/// A field whose header names its unit as a last word and is not a
/// synonym as written: a time field stored in days or hours
/// (`duration_days`, `duration_min`, `period_hours`, `t14_d`), or the depth
/// in parts per thousand or millimagnitudes (`depth_ppt`, `depth_mmag`: the
/// depth's other units, `ppm`, `frac`, `pct`, are synonyms of their own).
/// The field and the unit, for the unit rules to convert
/// (`units::conversion`, `units::depth_unit`, `units::magnitude_scale`).
pub fn name_unit(header: &str) -> Option<(Field, &'static str)> {
    const TIME: [(&str, &str); 11] = [
        ("days", "days"),
        ("day", "days"),
        ("d", "days"),
        ("hours", "hours"),
        ("hour", "hours"),
        ("hrs", "hours"),
        ("hr", "hours"),
        ("h", "hours"),
        ("minutes", "min"),
        ("mins", "min"),
        ("min", "min"),
    ];
    const DEPTH: [(&str, &str); 2] = [("ppt", "ppt"), ("mmag", "mmag")];
    let name = loose(header);
    let (stem, last) = name.rsplit_once('_')?;
    let field = FIELDS
        .iter()
        .copied()
        .find(|f| f.synonyms().contains(&stem))?;
    let units: &[(&str, &'static str)] = match field {
        Field::PeriodD | Field::PeriodErrD | Field::EpochErrD | Field::DurationH => &TIME,
        Field::DepthPpm => &DEPTH,
        _ => return None,
    };
    units.iter().find(|(w, _)| *w == last).map(|u| (field, u.1))
}

/// A header's name and the unit it states in brackets, as archive exports
/// write them: `Period (days)`, `Epoch (BJD) err`, `Depth [ppm]`. The first
/// bracketed part is the unit; the name is the rest.
pub fn header_unit(header: &str) -> (String, Option<String>) {
    // `log(g)` names the quantity, not its unit (`Stellar log(g) (cm/s^2)`).
    let spelled;
    let header = match header.to_ascii_lowercase().find("log(g)") {
        Some(i) => {
            spelled = format!("{}logg{}", &header[..i], &header[i + 6..]);
            spelled.as_str()
        }
        None => header,
    };
    let open = header.find(['(', '[']);
    let close = open.and_then(|o| {
        let want = if header.as_bytes()[o] == b'(' {
            ')'
        } else {
            ']'
        };
        header[o..].find(want).map(|c| o + c)
    });
    match (open, close) {
        (Some(o), Some(c)) => (
            format!("{} {}", &header[..o], &header[c + 1..]),
            Some(header[o + 1..c].trim().to_string()).filter(|u| !u.is_empty()),
        ),
        _ => (header.to_string(), None),
    }
}

/// A header in one spelling, for matching the synonyms when it is not one
/// as written: its bracketed unit left out, lower case, every run of
/// characters other than letters and digits one `_` (`TIC ID` → `tic_id`,
/// `Period (days) err` → `period_err`).
fn loose(header: &str) -> String {
    let (name, _) = header_unit(header);
    let mut out = String::with_capacity(name.len());
    for c in name.trim().chars() {
        if c.is_ascii_alphanumeric() {
            out.push(c.to_ascii_lowercase());
        } else if !out.is_empty() && !out.ends_with('_') {
            out.push('_');
        }
    }
    out.trim_end_matches('_').to_string()
}

impl fmt::Display for Field {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// The unit of an `fpp` column given in percent (`ColumnUse::unit`): its
/// values are stored as fractions.
pub const FPP_PERCENT: &str = "percent (stored as a fraction)";

/// Whether a column of probabilities whose values span `lo`..=`hi` is in
/// percent by its values alone: some above 1 (a probability cannot exceed
/// 1), none above 100 or below 0 (docs/science.md §3.5).
pub fn percent_by_range(lo: f64, hi: f64) -> bool {
    hi > 1.0 && hi <= 100.0 && lo >= 0.0
}

/// The unit transit depths arrive in. Stored depths are always ppm.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum DepthUnit {
    Ppm,
    Fraction,
    Percent,
}

impl DepthUnit {
    pub fn to_ppm(self) -> f64 {
        match self {
            DepthUnit::Ppm => 1.0,
            DepthUnit::Fraction => 1e6,
            DepthUnit::Percent => 1e4,
        }
    }

    pub fn name(self) -> &'static str {
        match self {
            DepthUnit::Ppm => "ppm",
            DepthUnit::Fraction => "fraction",
            DepthUnit::Percent => "percent",
        }
    }

    pub fn parse(s: &str) -> Option<DepthUnit> {
        match s.to_ascii_lowercase().as_str() {
            "ppm" => Some(DepthUnit::Ppm),
            "fraction" | "frac" => Some(DepthUnit::Fraction),
            "percent" | "pct" | "%" => Some(DepthUnit::Percent),
            _ => None,
        }
    }

    /// The unit a header name itself states, if any (`depth_ppm`, `depth_frac`...).
    pub fn from_header(header: &str) -> Option<DepthUnit> {
        let h = header.trim().to_ascii_lowercase();
        if h.ends_with("ppm") {
            Some(DepthUnit::Ppm)
        } else if h.ends_with("frac") || h.ends_with("fraction") {
            Some(DepthUnit::Fraction)
        } else if h.ends_with("pct") || h.ends_with("percent") {
            Some(DepthUnit::Percent)
        } else {
            None
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn synonyms_are_unambiguous() {
        let mut seen = std::collections::HashMap::new();
        for f in FIELDS {
            assert!(f.synonyms().contains(&f.name()), "{f} lacks its own name");
            for s in f.synonyms() {
                assert_eq!(*s, s.to_ascii_lowercase());
                if let Some(other) = seen.insert(*s, f) {
                    panic!("synonym {s} maps to both {other} and {f}");
                }
            }
        }
    }

    #[test]
    fn headers_map_case_insensitively() {
        let header: Vec<String> = [
            "Host_ID",
            "CAND",
            "Per",
            "T0",
            "Depth_PPM",
            "T14",
            "Extra col",
        ]
        .map(String::from)
        .to_vec();
        let m = Mapping::resolve("x.csv", &header, &ColumnMap::default()).unwrap();
        assert_eq!(m.by_field[&Field::Star], 0);
        assert_eq!(m.by_field[&Field::Candidate], 1);
        assert_eq!(m.by_field[&Field::DurationH], 5);
        assert_eq!(m.extras, vec![(6, "Extra col".to_string())]);
    }

    #[test]
    fn column_map_errors_name_the_line() {
        let err = ColumnMap::from_toml("star = \"a\"\nperiod = \"p\"\n", "map.toml").unwrap_err();
        let msg = err.to_string();
        assert!(msg.contains("map.toml:2"), "{msg}");
        assert!(msg.contains("`period` is not a canonical field"), "{msg}");
        let err = ColumnMap::from_toml("star = \n", "map.toml").unwrap_err();
        assert!(err.to_string().contains("map.toml:1"), "{err}");
    }

    #[test]
    fn numeric_slots_follow_the_storage_order() {
        for (i, f) in NUMERIC.iter().enumerate() {
            assert_eq!(f.num_slot(), Some(i), "{f}");
        }
        assert_eq!(
            FIELDS.iter().filter(|f| f.num_slot().is_some()).count(),
            NUMERIC.len()
        );
    }

    #[test]
    fn depth_unit_from_header() {
        assert_eq!(DepthUnit::from_header("depth_ppm"), Some(DepthUnit::Ppm));
        assert_eq!(
            DepthUnit::from_header("Depth_Frac"),
            Some(DepthUnit::Fraction)
        );
        assert_eq!(
            DepthUnit::from_header("depth_percent"),
            Some(DepthUnit::Percent)
        );
        assert_eq!(DepthUnit::from_header("depth"), None);
    }
}
