//! Light curves: finding a star's file, reading it (CSV/TSV, gzip, FITS
//! binary tables), dropping bad samples, sorting by time and normalising to
//! a median of 1. Detrending, folding and the diagnostics live in
//! [`analysis`]; every type here is `Send`, so the browser can compute on a
//! background thread.

pub mod analysis;
mod candidate;
mod fits;
pub mod timezero;

pub use candidate::{Cache, Finder, ModelParams, context, model_params, signals, star_signals};

pub use fits::write_table as write_fits;

use std::io::Read;
use std::path::{Path, PathBuf};

use flate2::read::MultiGzDecoder;

use crate::catalogue::parse_number;

/// One star's photometry, sorted by time, flux normalised to a median of 1.
#[derive(Clone, Debug, PartialEq)]
pub struct LightCurve {
    pub time: Vec<f64>,
    pub flux: Vec<f64>,
    pub flux_err: Vec<f64>,
    /// Where it came from.
    pub source: String,
    /// Samples dropped for a missing or non-finite value.
    pub dropped: usize,
    /// The median the flux was divided by (1 if it was normalised already).
    pub normalised_by: f64,
    /// True when the file had no error column and errors were estimated from
    /// the point-to-point scatter.
    pub err_estimated: bool,
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
}

/// Column names (and the FITS extension) to read, overriding the synonyms.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LcColumns {
    pub time: Option<String>,
    pub flux: Option<String>,
    pub flux_err: Option<String>,
    /// FITS extension: a number (1 = the first extension) or a name.
    pub hdu: Option<String>,
}

const TIME_NAMES: [&str; 3] = ["time", "t", "bjd"];
const FLUX_NAMES: [&str; 3] = ["flux", "f", "norm_flux"];
const ERR_NAMES: [&str; 3] = ["flux_err", "err", "sigma"];

/// The index of the wanted column: the override if given (exact, then any
/// case), else the first header matching a synonym, case-insensitively.
fn pick(header: &[String], wanted: Option<&str>, synonyms: &[&str]) -> Option<usize> {
    match wanted {
        Some(w) => header
            .iter()
            .position(|h| h == w)
            .or_else(|| header.iter().position(|h| h.eq_ignore_ascii_case(w))),
        None => header
            .iter()
            .position(|h| synonyms.iter().any(|s| h.trim().eq_ignore_ascii_case(s))),
    }
}

/// The three columns of a table, or an error naming what is missing.
fn resolve_columns(
    path: &str,
    header: &[String],
    cols: &LcColumns,
) -> Result<(usize, usize, Option<usize>), LcError> {
    let missing = |what, names: &[&str], flag, wanted: Option<&String>| LcError::Column {
        path: path.to_string(),
        what,
        looked: wanted.map_or(names.join("|"), |w| w.clone()),
        header: header.join(", "),
        flag,
    };
    let t = pick(header, cols.time.as_deref(), &TIME_NAMES)
        .ok_or_else(|| missing("time", &TIME_NAMES, "time-column", cols.time.as_ref()))?;
    let f = pick(header, cols.flux.as_deref(), &FLUX_NAMES)
        .ok_or_else(|| missing("flux", &FLUX_NAMES, "flux-column", cols.flux.as_ref()))?;
    let e = pick(header, cols.flux_err.as_deref(), &ERR_NAMES);
    if cols.flux_err.is_some() && e.is_none() {
        return Err(missing(
            "flux error",
            &ERR_NAMES,
            "err-column",
            cols.flux_err.as_ref(),
        ));
    }
    Ok((t, f, e))
}

impl LightCurve {
    /// Reads a light curve by its extension: `.fits`, `.fit`, `.fts` (also
    /// gzipped, read by CFITSIO) or CSV/TSV (optionally `.gz`).
    pub fn read(path: &Path, cols: &LcColumns) -> Result<LightCurve, LcError> {
        let name = path.display().to_string();
        let lower = name.to_ascii_lowercase();
        let stem = lower.strip_suffix(".gz").unwrap_or(&lower);
        let (time, flux, err) = if [".fits", ".fit", ".fts"].iter().any(|e| stem.ends_with(e)) {
            fits::read_table(path, cols)?
        } else {
            read_text(path, cols)?
        };
        LightCurve::from_samples(name, time, flux, err)
    }

    /// Cleans raw samples: drops non-finite ones, sorts by time, normalises.
    pub fn from_samples(
        source: String,
        time: Vec<f64>,
        flux: Vec<f64>,
        err: Option<Vec<f64>>,
    ) -> Result<LightCurve, LcError> {
        let n = time.len().min(flux.len());
        let n = err.as_ref().map_or(n, |e| n.min(e.len()));
        let mut rows: Vec<(f64, f64, f64)> = (0..n)
            .map(|i| (time[i], flux[i], err.as_ref().map_or(0.0, |e| e[i])))
            .filter(|(t, f, e)| t.is_finite() && f.is_finite() && e.is_finite() && *e >= 0.0)
            .collect();
        let dropped = n - rows.len();
        if rows.len() < 10 {
            return Err(LcError::Bad {
                path: source,
                message: format!("only {} usable samples ({dropped} dropped)", rows.len()),
            });
        }
        if !rows.windows(2).all(|w| w[0].0 <= w[1].0) {
            rows.sort_by(|a, b| a.0.total_cmp(&b.0));
        }
        check_span(&source, &time, &rows)?;
        let mut f: Vec<f64> = rows.iter().map(|r| r.1).collect();
        let median = median_of(&mut f.clone());
        if median.is_nan() || median <= 0.0 {
            return Err(LcError::Bad {
                path: source,
                message: format!("median flux {median} is not positive; cannot normalise"),
            });
        }
        f.iter_mut().for_each(|v| *v /= median);
        let time: Vec<f64> = rows.iter().map(|r| r.0).collect();
        let (flux_err, err_estimated) = match err {
            Some(_) => (rows.iter().map(|r| r.2 / median).collect(), false),
            None => {
                let s = point_to_point_sigma(&f);
                (vec![s; f.len()], true)
            }
        };
        Ok(LightCurve {
            time,
            flux: f,
            flux_err,
            source,
            dropped,
            normalised_by: median,
            err_estimated,
        })
    }
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

type Samples = (Vec<f64>, Vec<f64>, Option<Vec<f64>>);

fn read_text(path: &Path, cols: &LcColumns) -> Result<Samples, LcError> {
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
        let (t, f, e) = parse_text(name, raw, cols)?;
        LightCurve::from_samples(name.to_string(), t, f, e)
    }
}

fn parse_text(name: &str, mut raw: Vec<u8>, cols: &LcColumns) -> Result<Samples, LcError> {
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
    let (ti, fi, ei) = resolve_columns(&name, &header, cols)?;
    let mut rec = csv::ByteRecord::new();
    let (mut t, mut f, mut e) = (Vec::new(), Vec::new(), Vec::new());
    let num = |r: &csv::ByteRecord, i: usize| r.get(i).and_then(parse_number).unwrap_or(f64::NAN);
    while rdr.read_byte_record(&mut rec).map_err(|e| LcError::Bad {
        path: name.clone(),
        message: e.to_string(),
    })? {
        t.push(num(&rec, ti));
        f.push(num(&rec, fi));
        if let Some(ei) = ei {
            e.push(num(&rec, ei));
        }
    }
    Ok((t, f, ei.map(|_| e)))
}

/// File extensions tried for `<star id>` in a light-curve folder.
pub const EXTENSIONS: [&str; 6] = [".csv", ".csv.gz", ".tsv", ".tsv.gz", ".fits", ".fits.gz"];

/// Where a star's light curve is: the catalogue's `lightcurve` path (relative
/// to the catalogue's folder), else `<dir>/<star id><ext>`.
pub fn locate(
    star: &str,
    from_catalogue: Option<&str>,
    catalogue_dir: Option<&Path>,
    dir: Option<&Path>,
) -> Result<PathBuf, LcError> {
    let mut tried = Vec::new();
    if let Some(rel) = from_catalogue {
        let p = match catalogue_dir {
            Some(d) if Path::new(rel).is_relative() => d.join(rel),
            _ => PathBuf::from(rel),
        };
        if p.is_file() {
            return Ok(p);
        }
        tried.push(p.display().to_string());
    }
    // A star id is used as a file name only when it cannot leave the folder.
    let safe = !star.contains(['/', '\\']) && star != ".." && star != ".";
    if let (Some(d), true) = (dir, safe) {
        for ext in EXTENSIONS {
            let p = d.join(format!("{star}{ext}"));
            if p.is_file() {
                return Ok(p);
            }
            tried.push(p.display().to_string());
        }
    }
    if tried.is_empty() {
        tried.push("nothing: no lightcurve column and no --lightcurves folder".into());
    }
    Err(LcError::NotFound {
        star: star.to_string(),
        tried: tried.join(", "),
    })
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
        let e = locate("../etc/passwd", None, None, Some(Path::new("/tmp"))).unwrap_err();
        assert!(e.to_string().contains("no light curve"), "{e}");
    }
}
