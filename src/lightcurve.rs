//! Light curves: finding a star's file, reading it (CSV/TSV, gzip, FITS
//! binary tables), dropping bad samples, sorting by time and normalising to
//! a median of 1. Detrending, folding and the diagnostics live in
//! [`analysis`]; every type here is `Send`, so the browser can compute on a
//! background thread.

pub mod analysis;
mod candidate;
mod fits;
mod segments;
mod stop;
pub mod timezero;

pub use candidate::{
    Cache, Finder, MASK_WIDEN, ModelParams, Shown, ZOOM_DURATIONS, context, model_params, show,
    signals, star_signals,
};

pub use fits::{ArchiveSegment, write_archive_segment, write_table as write_fits};
pub use segments::{DirIndex, locate_all, star_number};
pub use stop::stoppable;

use std::io::Read;
use std::path::Path;

use flate2::read::MultiGzDecoder;

use crate::catalogue::parse_number;

/// One star's photometry, sorted by time, each segment's flux normalised to
/// its own median of 1.
#[derive(Clone, Debug, PartialEq)]
pub struct LightCurve {
    pub time: Vec<f64>,
    pub flux: Vec<f64>,
    pub flux_err: Vec<f64>,
    /// Where it came from (the file, or the first file and the count).
    pub source: String,
    /// Samples dropped for a missing or non-finite value (all segments).
    pub dropped: usize,
    /// Samples dropped because their quality flag was set (all segments).
    pub dropped_quality: usize,
    /// The median the first segment's flux was divided by (1 if it was
    /// normalised already); each segment's own is in `segments`.
    pub normalised_by: f64,
    /// True when a file had no error column and errors were estimated from
    /// the point-to-point scatter.
    pub err_estimated: bool,
    /// The files read, in time order.
    pub segments: Vec<Segment>,
    /// Where each stretch that detrending treats on its own begins (sample
    /// indices, the first 0): one per segment, or per group of segments that
    /// overlap in time.
    pub breaks: Vec<usize>,
    /// Days the files' headers added to their time column (BJDREFI +
    /// BJDREFF...), so times are absolute; 0 when no file stated a zero.
    pub time_zero: f64,
    /// Plain notes for people: segments left out, times shifted.
    pub notes: Vec<String>,
}

/// One file of a light curve, after cleaning.
#[derive(Clone, Debug, PartialEq)]
pub struct Segment {
    pub source: String,
    /// Samples kept.
    pub samples: usize,
    /// Dropped for a missing or non-finite time, flux or error.
    pub dropped: usize,
    /// Dropped for a set quality flag.
    pub dropped_quality: usize,
    /// The median flux this segment was divided by.
    pub normalised_by: f64,
    /// First and last time kept.
    pub first: f64,
    pub last: f64,
    /// The columns read, for people ("TIME, PDCSAP_FLUX, ...").
    pub columns: String,
}

#[derive(Debug, thiserror::Error)]
pub enum LcError {
    #[error("{path}: cannot read light curve: {source}")]
    Io {
        path: String,
        #[source]
        source: std::io::Error,
    },
    #[error("star {star}: no light curve found (looked for {tried})")]
    NotFound { star: String, tried: String },
    #[error(
        "{path}: no {what} column (looked for {looked}); columns are: {header}. Name it with --{flag} NAME"
    )]
    Column {
        path: String,
        what: &'static str,
        looked: String,
        header: String,
        flag: &'static str,
    },
    #[error("{path}: {message}")]
    Bad { path: String, message: String },
    #[error("{path}: FITS: {message}")]
    Fits { path: String, message: String },
    /// Stopped part way: nobody waits for it any more (`stoppable`).
    #[error("the read stopped: nobody waits for this light curve any more")]
    Stopped,
}

/// Column names (and the FITS extension) to read, overriding the synonyms,
/// and which quality bits drop a sample.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LcColumns {
    pub time: Option<String>,
    pub flux: Option<String>,
    pub flux_err: Option<String>,
    /// FITS extension: a number (1 = the first extension) or a name.
    pub hdu: Option<String>,
    /// The quality-flag column (default: the first of [`QUALITY_NAMES`]).
    pub quality: Option<String>,
    /// The quality bits that drop a sample; `None` drops on any set bit.
    pub quality_mask: Option<u64>,
}

/// Time column names, most specific first.
pub const TIME_NAMES: [&str; 8] = ["time", "t", "bjd", "btjd", "bjd_tdb", "jd", "mjd", "hjd"];
/// Flux column names in order of preference: a pipeline's systematics-
/// corrected flux before its simple aperture flux (archive light curves carry
/// both; the corrected one has the spacecraft's trends removed).
pub const FLUX_NAMES: [&str; 8] = [
    "pdcsap_flux",
    "kspsap_flux",
    "det_flux",
    "flux",
    "f",
    "norm_flux",
    "rel_flux",
    "sap_flux",
];
/// Magnitude column names, read when no flux column is found: ground-based
/// surveys give light curves in (differential) magnitudes, turned into flux
/// by [`flux_from_magnitudes`].
pub const MAG_NAMES: [&str; 7] = [
    "mag",
    "magnitude",
    "dmag",
    "diff_mag",
    "delta_mag",
    "rel_mag",
    "relmag",
];

/// Error column names when the flux column has no error column of its own
/// (`<flux>_err`, `<flux>_error`, `e_<flux>`).
pub const ERR_NAMES: [&str; 5] = ["flux_err", "err", "sigma", "flux_error", "e_flux"];
/// Quality-flag column names: a non-zero value marks a sample the pipeline
/// found corrupt (cosmic ray, momentum dump, scattered light...).
pub const QUALITY_NAMES: [&str; 7] = [
    "quality",
    "sap_quality",
    "pdc_quality",
    "qual",
    "quality_flag",
    "dq",
    "flags",
];

/// The index of the wanted column: the override if given (exact, then any
/// case), else the header matching the earliest synonym, case-insensitively.
fn pick(header: &[String], wanted: Option<&str>, synonyms: &[&str]) -> Option<usize> {
    match wanted {
        Some(w) => header
            .iter()
            .position(|h| h == w)
            .or_else(|| header.iter().position(|h| h.eq_ignore_ascii_case(w))),
        None => synonyms
            .iter()
            .find_map(|s| header.iter().position(|h| h.trim().eq_ignore_ascii_case(s))),
    }
}

/// The columns of a table a light curve is read from.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Picked {
    pub time: usize,
    pub flux: usize,
    /// The flux column holds magnitudes (one of [`MAG_NAMES`]).
    pub magnitude: bool,
    pub err: Option<usize>,
    pub quality: Option<usize>,
}

impl Picked {
    /// The columns in use, for people.
    fn describe(&self, header: &[String]) -> String {
        [Some(self.time), Some(self.flux), self.err, self.quality]
            .into_iter()
            .flatten()
            .map(|i| header[i].trim().to_string())
            .collect::<Vec<_>>()
            .join(", ")
    }
}

/// The columns of a table, or an error naming what is missing. The error
/// column goes with the flux column chosen (`PDCSAP_FLUX_ERR` with
/// `PDCSAP_FLUX`), else the generic names.
fn resolve_columns(path: &str, header: &[String], cols: &LcColumns) -> Result<Picked, LcError> {
    let missing = |what, names: &[&str], flag, wanted: Option<&String>| LcError::Column {
        path: path.to_string(),
        what,
        looked: wanted.map_or(names.join("|"), |w| w.clone()),
        header: header.join(", "),
        flag,
    };
    let t = pick(header, cols.time.as_deref(), &TIME_NAMES)
        .ok_or_else(|| missing("time", &TIME_NAMES, "time-column", cols.time.as_ref()))?;
    let (f, magnitude) = match pick(header, cols.flux.as_deref(), &FLUX_NAMES) {
        Some(f) => (f, false),
        None if cols.flux.is_none() => pick(header, None, &MAG_NAMES)
            .map(|m| (m, true))
            .ok_or_else(|| missing("flux", &FLUX_NAMES, "flux-column", None))?,
        None => {
            return Err(missing(
                "flux",
                &FLUX_NAMES,
                "flux-column",
                cols.flux.as_ref(),
            ));
        }
    };
    let e = match cols.flux_err.as_deref() {
        Some(w) => Some(pick(header, Some(w), &[]).ok_or_else(|| {
            missing(
                "flux error",
                &ERR_NAMES,
                "err-column",
                cols.flux_err.as_ref(),
            )
        })?),
        None => {
            let base = header[f].trim().to_ascii_lowercase();
            let own = [
                format!("{base}_err"),
                format!("{base}_error"),
                format!("e_{base}"),
            ];
            let own: Vec<&str> = own.iter().map(String::as_str).collect();
            let generic: &[&str] = if magnitude {
                &["magerr", "mag_err", "e_mag", "err", "sigma"]
            } else {
                &ERR_NAMES
            };
            pick(header, None, &own).or_else(|| pick(header, None, generic))
        }
    };
    let q = match cols.quality.as_deref() {
        Some(w) => Some(pick(header, Some(w), &[]).ok_or_else(|| {
            missing(
                "quality",
                &QUALITY_NAMES,
                "quality-column",
                cols.quality.as_ref(),
            )
        })?),
        None => pick(header, None, &QUALITY_NAMES),
    };
    Ok(Picked {
        time: t,
        flux: f,
        magnitude,
        err: e,
        quality: q,
    })
}

/// One file's samples as read, before cleaning.
#[derive(Clone, Debug, Default)]
pub struct Raw {
    pub time: Vec<f64>,
    pub flux: Vec<f64>,
    pub err: Option<Vec<f64>>,
    /// Quality flags; a sample whose flags meet the mask is dropped. A flag
    /// that is not a whole number reads as every bit set.
    pub quality: Option<Vec<u64>>,
    /// Days already added to `time` from the file's header (0 for none).
    pub time_zero: f64,
    pub columns: String,
    pub notes: Vec<String>,
}

impl LightCurve {
    /// Reads a light curve by its extension: `.fits`, `.fit`, `.fts` (also
    /// gzipped, read by CFITSIO) or CSV/TSV (optionally `.gz`).
    pub fn read(path: &Path, cols: &LcColumns) -> Result<LightCurve, LcError> {
        let raw = read_raw(path, cols)?;
        LightCurve::from_segments(vec![(path.display().to_string(), raw)], cols.quality_mask)
    }

    /// Cleans raw samples: drops non-finite ones, sorts by time, normalises.
    pub fn from_samples(
        source: String,
        time: Vec<f64>,
        flux: Vec<f64>,
        err: Option<Vec<f64>>,
    ) -> Result<LightCurve, LcError> {
        let raw = Raw {
            time,
            flux,
            err,
            ..Raw::default()
        };
        LightCurve::from_segments(vec![(source, raw)], None)
    }
}

/// Magnitudes as relative flux, in place (Pogson's ratio, m₁ − m₂ =
/// −2.5 log₁₀(F₁/F₂): a dimming is a rise in magnitude): F = 10^(−0.4 (m −
/// m₀)) with m₀ the first finite magnitude (the segment is normalised by
/// its median later), and the error σ_F = 0.4 ln 10 · F · σ_m (first-order
/// propagation; 1 mmag ≈ 921 ppm).
pub fn flux_from_magnitudes(mag: &mut [f64], err: Option<&mut [f64]>) {
    let m0 = mag.iter().copied().find(|m| m.is_finite()).unwrap_or(0.0);
    for m in mag.iter_mut() {
        *m = 10f64.powf(-0.4 * (*m - m0));
    }
    if let Some(err) = err {
        for (e, f) in err.iter_mut().zip(mag.iter()) {
            *e *= 0.4 * std::f64::consts::LN_10 * f;
        }
    }
}

impl Raw {
    /// Reads the flux column as magnitudes where it is one
    /// ([`flux_from_magnitudes`]), and says so.
    pub(crate) fn read_magnitudes(&mut self, picked: &Picked) {
        if picked.magnitude {
            flux_from_magnitudes(&mut self.flux, self.err.as_deref_mut());
            self.notes.push(
                "the light curve is in magnitudes: read as flux, F = 10^(−0.4 (m − m₀))".into(),
            );
        }
    }
}

/// Reads one file's samples by its extension.
pub fn read_raw(path: &Path, cols: &LcColumns) -> Result<Raw, LcError> {
    let lower = path.display().to_string().to_ascii_lowercase();
    let stem = lower.strip_suffix(".gz").unwrap_or(&lower);
    if [".fits", ".fit", ".fts"].iter().any(|e| stem.ends_with(e)) {
        fits::read_table(path, cols)
    } else {
        read_text(path, cols)
    }
}

/// Per-point scatter of one segment's normalised flux, for files without
/// an error column.
fn estimated_errors(f: &[f64]) -> Vec<f64> {
    vec![point_to_point_sigma(f); f.len()]
}

/// The longest time span a light curve may cover, in days (about 270
/// years: every space and ground survey fits many times over). A longer span
/// means a wrong timestamp, and the detrending grid would grow with it.
pub const MAX_SPAN_D: f64 = 1e5;

/// Refuses a light curve whose timestamps span more than [`MAX_SPAN_D`],
/// naming the sample farthest from the median time (its data row, 1-based).
fn check_span(source: &str, raw_time: &[f64], rows: &[(f64, f64, f64)]) -> Result<(), LcError> {
    let (first, last) = (rows[0].0, rows[rows.len() - 1].0);
    if last - first <= MAX_SPAN_D {
        return Ok(());
    }
    let mid = rows[rows.len() / 2].0;
    let far = if mid - first > last - mid {
        first
    } else {
        last
    };
    let row = raw_time.iter().position(|&t| t == far).map_or(0, |i| i + 1);
    Err(LcError::Bad {
        path: source.to_string(),
        message: format!(
            "data row {row}: time {far} lies {:.0} days from the median time {mid}; \
             a light curve spans at most {MAX_SPAN_D:.0} days, so this timestamp is wrong \
             (remove the row or fix its time)",
            (far - mid).abs()
        ),
    })
}

/// Median of a slice (reordered in place): the middle value, or the mean of
/// the two middle values of an even count; NaN when empty.
pub fn median_of(v: &mut [f64]) -> f64 {
    if v.is_empty() {
        return f64::NAN;
    }
    let (len, mid) = (v.len(), v.len() / 2);
    let (below, m, _) = v.select_nth_unstable_by(mid, f64::total_cmp);
    if len % 2 == 1 {
        return *m;
    }
    let lower = below.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    0.5 * (lower + *m)
}

/// Per-point scatter from the median absolute difference of neighbours:
/// σ = 1.4826 · MAD(Δf) / √2 (robust to transits and slow trends; the 1.4826
/// factor makes the MAD of a Gaussian its σ).
pub fn point_to_point_sigma(f: &[f64]) -> f64 {
    let mut d: Vec<f64> = f.windows(2).map(|w| (w[1] - w[0]).abs()).collect();
    1.4826 * median_of(&mut d) / std::f64::consts::SQRT_2
}

fn read_text(path: &Path, cols: &LcColumns) -> Result<Raw, LcError> {
    let name = path.display().to_string();
    let mut raw = Vec::new();
    std::fs::File::open(path)
        .and_then(|mut f| f.read_to_end(&mut raw))
        .map_err(|source| LcError::Io {
            path: name.clone(),
            source,
        })?;
    parse_text(&name, raw, cols)
}

impl LightCurve {
    /// Reads a CSV/TSV light curve (optionally gzipped) from memory.
    pub fn from_text(name: &str, raw: Vec<u8>, cols: &LcColumns) -> Result<LightCurve, LcError> {
        let raw = parse_text(name, raw, cols)?;
        LightCurve::from_segments(vec![(name.to_string(), raw)], cols.quality_mask)
    }
}

/// A quality cell as flag bits: empty is 0 (good), a whole number its bits,
/// true/false as 1/0, anything else every bit (the sample is suspect).
fn quality_bits(cell: &[u8]) -> u64 {
    let t = std::str::from_utf8(cell).unwrap_or("").trim();
    if t.is_empty() {
        return 0;
    }
    if let Ok(v) = t.parse::<u64>() {
        return v;
    }
    match t.to_ascii_lowercase().as_str() {
        "false" | "f" => 0,
        "true" | "t" => 1,
        _ => match parse_number(cell) {
            Some(v) if v >= 0.0 && v.fract() == 0.0 && v < 1.8e19 => v as u64,
            _ => u64::MAX,
        },
    }
}

fn parse_text(name: &str, mut raw: Vec<u8>, cols: &LcColumns) -> Result<Raw, LcError> {
    let name = name.to_string();
    let io = |source| LcError::Io {
        path: name.clone(),
        source,
    };
    if raw.starts_with(&[0x1f, 0x8b]) {
        let mut out = Vec::with_capacity(raw.len() * 3);
        MultiGzDecoder::new(&raw[..])
            .read_to_end(&mut out)
            .map_err(io)?;
        raw = out;
    }
    let lower = name.to_ascii_lowercase();
    let stem = lower.strip_suffix(".gz").unwrap_or(&lower);
    let first = raw
        .split(|&b| b == b'\n')
        .find(|l| !l.starts_with(b"#") && !l.is_empty())
        .unwrap_or(&[]);
    let tab = stem.ends_with(".tsv")
        || (!stem.ends_with(".csv")
            && first.iter().filter(|&&b| b == b'\t').count()
                > first.iter().filter(|&&b| b == b',').count());
    let mut rdr = csv::ReaderBuilder::new()
        .delimiter(if tab { b'\t' } else { b',' })
        .comment(Some(b'#'))
        .flexible(true)
        .from_reader(&raw[..]);
    let header: Vec<String> = rdr
        .byte_headers()
        .map_err(|e| LcError::Bad {
            path: name.clone(),
            message: e.to_string(),
        })?
        .iter()
        .map(|h| {
            String::from_utf8_lossy(h)
                .trim()
                .trim_start_matches('\u{feff}')
                .to_string()
        })
        .collect();
    let p = resolve_columns(&name, &header, cols)?;
    let mut rec = csv::ByteRecord::new();
    let mut out = Raw {
        err: p.err.map(|_| Vec::new()),
        quality: p.quality.map(|_| Vec::new()),
        columns: p.describe(&header),
        ..Raw::default()
    };
    let num = |r: &csv::ByteRecord, i: usize| r.get(i).and_then(parse_number).unwrap_or(f64::NAN);
    while rdr.read_byte_record(&mut rec).map_err(|e| LcError::Bad {
        path: name.clone(),
        message: e.to_string(),
    })? {
        if out.time.len() % stop::ASK_EVERY == stop::ASK_EVERY - 1 {
            stop::check()?;
        }
        out.time.push(num(&rec, p.time));
        out.flux.push(num(&rec, p.flux));
        if let (Some(i), Some(e)) = (p.err, out.err.as_mut()) {
            e.push(num(&rec, i));
        }
        if let (Some(i), Some(q)) = (p.quality, out.quality.as_mut()) {
            q.push(quality_bits(rec.get(i).unwrap_or(b"")));
        }
    }
    out.read_magnitudes(&p);
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cleans_sorts_and_normalises() {
        let t: Vec<f64> = (0..20).rev().map(|i| i as f64).collect();
        let mut f = vec![200.0; 20];
        f[3] = f64::NAN;
        let lc = LightCurve::from_samples("x".into(), t, f, Some(vec![2.0; 20])).unwrap();
        assert_eq!(lc.dropped, 1);
        assert!(lc.time.windows(2).all(|w| w[0] <= w[1]));
        assert_eq!(lc.normalised_by, 200.0);
        assert!(lc.flux.iter().all(|&v| v == 1.0));
        assert!(lc.flux_err.iter().all(|&v| (v - 0.01).abs() < 1e-15));
        assert!(!lc.err_estimated);
    }

    #[test]
    fn magnitudes_become_flux_by_pogsons_ratio() {
        // Pogson's ratio (a definition): 5 mag is a factor 100 in flux, a
        // dimming is a rise in magnitude; 1 mmag of error is 0.4 ln 10 ×
        // 10⁻³ = 9.21 × 10⁻⁴ in relative flux.
        let mut m = vec![12.0, 17.0, 12.001, f64::NAN];
        let mut e = vec![0.001; 4];
        flux_from_magnitudes(&mut m, Some(&mut e));
        assert_eq!(m[0], 1.0);
        assert!((m[1] - 0.01).abs() < 1e-15, "{}", m[1]);
        assert!((1.0 - m[2] - 9.206e-4).abs() < 1e-6, "{}", m[2]);
        assert!(m[3].is_nan());
        assert!((e[0] - 9.2103e-4).abs() < 1e-7, "{}", e[0]);
    }

    #[test]
    fn median_of_an_even_count_is_the_mean_of_the_middle_two() {
        // Definition of the sample median (any statistics handbook).
        assert_eq!(median_of(&mut [4.0, 1.0, 3.0, 2.0]), 2.5);
        assert_eq!(median_of(&mut [5.0, 1.0, 3.0]), 3.0);
        assert!(median_of(&mut []).is_nan());
    }

    #[test]
    fn a_stray_timestamp_is_an_error_naming_its_row_not_a_huge_allocation() {
        let mut t: Vec<f64> = (0..100).map(|i| i as f64 * 0.02).collect();
        t[37] = 1e12;
        let e = LightCurve::from_samples("lc.csv".into(), t, vec![1.0; 100], None).unwrap_err();
        let m = e.to_string();
        assert!(m.contains("lc.csv") && m.contains("data row 38"), "{m}");
    }

    #[test]
    fn scatter_estimate_is_sigma_for_white_noise() {
        let mut rng = crate::demo::Rng::new(3);
        let f: Vec<f64> = (0..50_000).map(|_| 1.0 + 1e-3 * rng.normal()).collect();
        let s = point_to_point_sigma(&f);
        assert!((s / 1e-3 - 1.0).abs() < 0.02, "{s}");
    }

    #[test]
    fn locating_never_leaves_the_folder() {
        let index = DirIndex::build(Path::new("/tmp"));
        let e = locate_all(
            "../etc/passwd",
            None,
            None,
            Some((Path::new("/tmp"), &index)),
            &|_| false,
        )
        .unwrap_err();
        assert!(e.to_string().contains("no light curve"), "{e}");
    }
}
