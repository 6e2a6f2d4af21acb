//! The built-in demo: an invented survey (the Halcyon Wide Transit Search,
//! star ids `HWT#####`), embedded in the binary so `starsift` runs anywhere,
//! and the generator that makes it and the large synthetic bench catalogues.

mod generate;
mod rng;

use std::path::PathBuf;

pub use generate::{DEMO_SEED, DEMO_TARGETS, demo_lightcurve_csv, write_big, write_demo};
pub use rng::Rng;

use crate::catalogue::{Catalogue, LoadError, LoadOptions, Source};
use crate::survey::SurveyFacts;

/// The name the demo is reported under.
pub const NAME: &str = "built-in demo (demo-catalogue/catalogue.csv)";
pub const CATALOGUE_CSV: &str = include_str!("../demo-catalogue/catalogue.csv");
pub const SURVEY_TOML: &str = include_str!("../demo-catalogue/survey.toml");

/// Loads the embedded demo catalogue.
pub fn catalogue() -> Result<Catalogue, LoadError> {
    Catalogue::load(
        Source::Bytes {
            name: NAME,
            data: CATALOGUE_CSV.as_bytes(),
        },
        &LoadOptions::default(),
    )
}

/// The embedded demo's survey facts.
pub fn survey() -> SurveyFacts {
    // The embedded file is tested to parse; a failure here is a build defect.
    SurveyFacts::from_toml(SURVEY_TOML, "demo-catalogue/survey.toml").unwrap_or_default()
}

/// The demo folder in the source tree, when the binary runs from it (light
/// curves are read from there).
pub fn source_dir() -> Option<PathBuf> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("demo-catalogue");
    dir.join("catalogue.csv").is_file().then_some(dir)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn embedded_survey_parses() {
        let s = SurveyFacts::from_toml(SURVEY_TOML, "survey.toml").unwrap();
        assert_eq!(s.targets_searched, Some(DEMO_TARGETS));
        assert_eq!(s.fp_fraction_singles, Some(0.1));
    }
}
