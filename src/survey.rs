//! Survey facts: how many targets were searched and the false-positive
//! fraction assumed for single-candidate stars, from a small TOML file
//! (`survey.toml` beside the catalogue) or from flags, which win.

use std::path::{Path, PathBuf};

use serde::Deserialize;

/// The facts of the survey that produced a catalogue. Every field is
/// optional: a missing `targets_searched` is never invented.
#[derive(Clone, Debug, Default, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SurveyFacts {
    /// A name for people.
    pub name: Option<String>,
    /// N: the number of target stars searched for transits.
    pub targets_searched: Option<u64>,
    /// f: the assumed false-positive fraction among single-candidate stars.
    pub fp_fraction_singles: Option<f64>,
    /// The time span of the observations, days.
    pub baseline_d: Option<f64>,
    /// The time between samples, minutes.
    pub cadence_min: Option<f64>,
    /// The time system of epochs and light-curve times, for people.
    pub time_system: Option<String>,
    /// Days added to every light-curve time so that it counts from the same
    /// zero as the catalogue's epochs (e.g. 2457000 when the epochs are BJD
    /// and the light curves BJD − 2457000). `--lc-time-offset` wins.
    pub lightcurve_time_offset: Option<f64>,
    /// Days added to every catalogue epoch before it is compared with
    /// light-curve times (e.g. 2457000 when the epochs are BJD − 2457000 and
    /// the light curves' headers make their times full BJD). `--epoch-offset`
    /// wins; give this or `lightcurve_time_offset`, not both.
    pub epoch_offset: Option<f64>,
}

#[derive(Debug, thiserror::Error)]
pub enum SurveyError {
    #[error("{path}: cannot read: {source}")]
    Io {
        path: String,
        #[source]
        source: std::io::Error,
    },
    #[error("{path}:{line}: {message}")]
    Parse {
        path: String,
        line: usize,
        message: String,
    },
}

impl SurveyFacts {
    pub fn from_toml(text: &str, path: &str) -> Result<SurveyFacts, SurveyError> {
        let facts: SurveyFacts = toml::from_str(text).map_err(|e| SurveyError::Parse {
            path: path.to_string(),
            line: e.span().map_or(0, |s| {
                text[..s.start.min(text.len())].matches('\n').count() + 1
            }),
            message: e.message().to_string(),
        })?;
        if facts.lightcurve_time_offset.is_some() && facts.epoch_offset.is_some() {
            let line = text
                .lines()
                .position(|l| l.trim_start().starts_with("epoch_offset"))
                .map_or(0, |i| i + 1);
            return Err(SurveyError::Parse {
                path: path.to_string(),
                line,
                message: "give epoch_offset or lightcurve_time_offset, not both (one shifts \
                          the epochs, the other the light-curve times)"
                    .into(),
            });
        }
        Ok(facts)
    }

    pub fn from_file(path: &Path) -> Result<SurveyFacts, SurveyError> {
        let text = std::fs::read_to_string(path).map_err(|source| SurveyError::Io {
            path: path.display().to_string(),
            source,
        })?;
        SurveyFacts::from_toml(&text, &path.display().to_string())
    }

    /// The `survey.toml` beside a catalogue, if there is one.
    pub fn beside(catalogue: &Path) -> Option<PathBuf> {
        let p = catalogue
            .parent()
            .unwrap_or(Path::new("."))
            .join("survey.toml");
        p.is_file().then_some(p)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_and_reports_lines() {
        let s = SurveyFacts::from_toml(
            "targets_searched = 1000\nfp_fraction_singles = 0.1\n",
            "s.toml",
        )
        .unwrap();
        assert_eq!(s.targets_searched, Some(1000));
        assert_eq!(s.fp_fraction_singles, Some(0.1));
        let e =
            SurveyFacts::from_toml("targets_searched = 1000\ntargets = 5\n", "s.toml").unwrap_err();
        assert!(e.to_string().starts_with("s.toml:2:"), "{e}");
        let e = SurveyFacts::from_toml("targets_searched = \"many\"\n", "s.toml").unwrap_err();
        assert!(e.to_string().starts_with("s.toml:1:"), "{e}");
    }
}
