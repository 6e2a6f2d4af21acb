//! The light-curve arguments every vetted command shares: where light
//! curves are, which columns to read, how to count their times, and how
//! to detrend; resolved into the core's `Finder`.

use std::path::{Path, PathBuf};

use super::args::Loaded;
use super::error::CliError;

/// Where light curves are and how to read them.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct LightcurveArgs {
    /// Light curves: a folder of `<star id>.csv|.csv.gz|.tsv|.fits[.gz]`
    /// [default: the paths in the catalogue's `lightcurve` column, and the
    /// demo's own]. Every light curve found is used.
    #[arg(long, value_name = "DIR", num_args = 0..=1, default_missing_value = "")]
    pub lightcurves: Option<String>,
    /// Do not read light curves: the light-curve flags stay unset.
    #[arg(long, conflicts_with = "lightcurves")]
    pub no_lightcurves: bool,
    /// Light-curve time column (default: time|t|bjd).
    #[arg(long, value_name = "NAME")]
    pub time_column: Option<String>,
    /// Light-curve flux column (default: flux|f|norm_flux).
    #[arg(long, value_name = "NAME")]
    pub flux_column: Option<String>,
    /// Light-curve flux error column (default: flux_err|err|sigma).
    #[arg(long, value_name = "NAME")]
    pub err_column: Option<String>,
    /// FITS extension to read: a number (1 = first extension) or a name.
    #[arg(long, value_name = "HDU")]
    pub hdu: Option<String>,
    /// Days added to every light-curve time, so that it counts from the
    /// catalogue epochs' zero (e.g. 2457000 when epochs are BJD and light
    /// curves BJD − 2457000) [default: survey.toml's
    /// lightcurve_time_offset, else 0].
    #[arg(long, value_name = "DAYS", allow_negative_numbers = true)]
    pub lc_time_offset: Option<f64>,
    /// Days added to every catalogue epoch before it is compared with the
    /// light curves (e.g. 2457000 when epochs are BJD − 2457000 and FITS
    /// headers make light-curve times full BJD) [default: survey.toml's
    /// epoch_offset; without either, a FITS header's zero is matched to the
    /// epochs' count automatically].
    #[arg(
        long,
        value_name = "DAYS",
        allow_negative_numbers = true,
        conflicts_with = "lc_time_offset"
    )]
    pub epoch_offset: Option<f64>,
    /// Light-curve quality-flag column (default: quality|sap_quality|
    /// pdc_quality|qual|quality_flag|dq|flags); samples with a flag set are
    /// dropped.
    #[arg(long, value_name = "NAME")]
    pub quality_column: Option<String>,
    /// The quality bits that drop a sample, as a number (decimal, or 0x...
    /// hex); other bits are kept [default: every bit drops].
    #[arg(long, value_name = "BITS", value_parser = parse_bits)]
    pub quality_mask: Option<u64>,
    /// Do not remove slow variability before measuring.
    #[arg(long)]
    pub no_detrend: bool,
    /// Detrending window, as a multiple of the star's longest transit duration.
    #[arg(long, value_name = "FACTOR", default_value_t = 3.0)]
    pub detrend_window: f64,
}

impl LightcurveArgs {
    /// A given `--lightcurves DIR` must be a folder (checked before any
    /// data is read): a mistyped path would give every verdict without its
    /// light curves.
    pub fn check_folder(&self) -> Result<(), CliError> {
        match self.lightcurves.as_deref().filter(|d| !d.is_empty()) {
            Some(d) if !Path::new(d).is_dir() => Err(CliError::Input(format!(
                "--lightcurves {}: no such folder",
                crate::sanitize::clean(d)
            ))),
            _ => Ok(()),
        }
    }

    /// True unless `--no-lightcurves`: every light curve found is used.
    pub fn wanted(&self) -> bool {
        !self.no_lightcurves
    }

    pub fn finder(&self, loaded: &Loaded) -> crate::lightcurve::Finder {
        crate::lightcurve::Finder {
            catalogue_dir: loaded.dir.clone(),
            dir: self
                .lightcurves
                .as_deref()
                .filter(|d| !d.is_empty())
                .map(PathBuf::from),
            columns: crate::lightcurve::LcColumns {
                time: self.time_column.clone(),
                flux: self.flux_column.clone(),
                flux_err: self.err_column.clone(),
                hdu: self.hdu.clone(),
                quality: self.quality_column.clone(),
                quality_mask: self.quality_mask,
            },
            demo: loaded.demo,
            time_offset: self.time_offset(&loaded.survey),
            offset_given: self.time_offset_given(&loaded.survey),
            ..Default::default()
        }
    }

    /// Days added to light-curve times: `--lc-time-offset`, else minus
    /// `--epoch-offset`, else survey.toml's (the same two), else 0.
    fn time_offset(&self, survey: &crate::survey::SurveyFacts) -> f64 {
        self.lc_time_offset
            .or(self.epoch_offset.map(|e| -e))
            .or(survey.lightcurve_time_offset)
            .or(survey.epoch_offset.map(|e| -e))
            .unwrap_or(0.0)
    }

    fn time_offset_given(&self, survey: &crate::survey::SurveyFacts) -> bool {
        self.lc_time_offset.is_some()
            || self.epoch_offset.is_some()
            || survey.lightcurve_time_offset.is_some()
            || survey.epoch_offset.is_some()
    }

    pub fn detrend(&self) -> crate::lightcurve::analysis::DetrendSettings {
        crate::lightcurve::analysis::DetrendSettings {
            enabled: !self.no_detrend,
            window_factor: if self.detrend_window > 0.0 {
                self.detrend_window
            } else {
                3.0
            },
            ..Default::default()
        }
    }
}

/// A bit mask: decimal or `0x` hexadecimal.
fn parse_bits(text: &str) -> Result<u64, String> {
    let t = text.trim();
    let parsed = match t.strip_prefix("0x").or_else(|| t.strip_prefix("0X")) {
        Some(hex) => u64::from_str_radix(hex, 16),
        None => t.parse::<u64>(),
    };
    parsed.map_err(|_| format!("`{text}` is not a bit mask (a whole number, or 0x... hex)"))
}
