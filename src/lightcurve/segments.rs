//! A star's light curve as a set of segments: finding every file of a star
//! (`DIR/<star>.<ext>`, `DIR/<star>_<part>.<ext>`, every file of
//! `DIR/<star>/`, or the `;`-separated paths of the catalogue's `lightcurve`
//! cell), cleaning and normalising each by its own median (archive segments
//! sit at their own flux levels), and stitching them in time.

use std::collections::HashMap;
use std::path::{Path, PathBuf};

use super::{
    LcError, LightCurve, MAX_SPAN_D, Raw, Segment, check_span, estimated_errors, median_of,
};

/// Fewest usable samples a segment needs to be normalised and kept.
const MIN_SAMPLES: usize = 10;

/// A segment whose median flux is less than this many point-to-point
/// scatters above zero is refused as centred on zero.
const ZERO_CENTRED_SIGMAS: f64 = 3.0;

/// File extensions a light-curve file may have.
pub const EXTENSIONS: [&str; 10] = [
    ".csv", ".csv.gz", ".tsv", ".tsv.gz", ".fits", ".fits.gz", ".fit", ".fit.gz", ".fts", ".fts.gz",
];

/// The name without a light-curve extension, or `None` for other files.
fn stem_of(name: &str) -> Option<&str> {
    let lower = name.to_ascii_lowercase();
    EXTENSIONS
        .iter()
        .filter(|e| lower.ends_with(*e))
        .max_by_key(|e| e.len())
        .map(|e| &name[..name.len() - e.len()])
}

/// The light-curve files of a folder by the names they may belong to: the
/// whole stem, and every prefix of it that ends before a `_` (so
/// `S7_s03.fits` is listed under `S7_s03` and `S7`). Built once per folder.
#[derive(Debug, Default)]
pub struct DirIndex {
    by_name: HashMap<String, Vec<PathBuf>>,
    /// The files by the zero-padded numbers in their names (see
    /// [`file_numbers`]), as the archives name light curves by the star's
    /// catalogue number.
    by_number: HashMap<String, Vec<PathBuf>>,
}

/// The fewest digits of a zero-padded catalogue number in a file name: the
/// archives pad the star's number to 9 digits or more
/// (`kplr005706966-…_llc.fits`, `ktwo201367065-c01_llc.fits`,
/// `tess…-0000000025155310-…_lc.fits`; from memory of the archives'
/// naming).
const PADDED_DIGITS: usize = 9;

/// The numbers a file's stem carries as runs of [`PADDED_DIGITS`] digits or
/// more, each without its leading zeros.
fn file_numbers(stem: &str) -> impl Iterator<Item = &str> {
    stem.split(|c: char| !c.is_ascii_digit())
        .filter(|run| run.len() >= PADDED_DIGITS)
        .map(|run| run.trim_start_matches('0'))
        .filter(|n| !n.is_empty())
}

/// The catalogue number that ends a star id (`KIC 5706966` → `5706966`,
/// `25155310` → itself), without leading zeros; `None` when the id does not
/// end in one.
pub fn star_number(id: &str) -> Option<&str> {
    let id = id.trim_end();
    let digits = id.bytes().rev().take_while(u8::is_ascii_digit).count();
    let n = id[id.len() - digits..].trim_start_matches('0');
    (!n.is_empty()).then_some(n)
}

impl DirIndex {
    pub fn build(dir: &Path) -> DirIndex {
        let mut by_name: HashMap<String, Vec<PathBuf>> = HashMap::new();
        let mut by_number: HashMap<String, Vec<PathBuf>> = HashMap::new();
        let Ok(entries) = std::fs::read_dir(dir) else {
            return DirIndex::default();
        };
        for e in entries.flatten() {
            let name = e.file_name();
            let Some(name) = name.to_str() else { continue };
            let Some(stem) = stem_of(name) else { continue };
            if !e.file_type().is_ok_and(|t| t.is_file() || t.is_symlink()) {
                continue;
            }
            for (i, _) in stem.match_indices('_') {
                by_name
                    .entry(stem[..i].to_string())
                    .or_default()
                    .push(e.path());
            }
            by_name.entry(stem.to_string()).or_default().push(e.path());
            for n in file_numbers(stem) {
                by_number.entry(n.to_string()).or_default().push(e.path());
            }
        }
        for v in by_name.values_mut().chain(by_number.values_mut()) {
            v.sort();
            v.dedup();
        }
        DirIndex { by_name, by_number }
    }

    /// The files whose names carry the number `n` zero-padded, as the
    /// archives name a star's light curves.
    pub fn numbered(&self, n: &str) -> &[PathBuf] {
        self.by_number.get(n).map_or(&[], Vec::as_slice)
    }

    /// The light-curve files of the folder that are no star's: neither
    /// their stem nor any `_` prefix of it is a star id (`is_star`), and no
    /// number in their name a star's (`is_number`), in name order.
    pub fn unclaimed(
        &self,
        is_star: &dyn Fn(&str) -> bool,
        is_number: &dyn Fn(&str) -> bool,
    ) -> Vec<PathBuf> {
        let mut files: Vec<&PathBuf> = self.by_name.values().flatten().collect();
        files.sort();
        files.dedup();
        files
            .into_iter()
            .filter(|p| {
                let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("");
                let stem = stem_of(name).unwrap_or(name);
                let named = stem
                    .match_indices('_')
                    .map(|(i, _)| &stem[..i])
                    .chain(std::iter::once(stem))
                    .any(is_star);
                !named && !file_numbers(stem).any(is_number)
            })
            .cloned()
            .collect()
    }

    /// The files of star `id`: `<id>.<ext>` and `<id>_<part>.<ext>`, except
    /// those whose name (or a longer `_` prefix of it) is another star's id.
    fn files(&self, id: &str, is_star: &dyn Fn(&str) -> bool) -> Vec<PathBuf> {
        let Some(list) = self.by_name.get(id) else {
            return Vec::new();
        };
        list.iter()
            .filter(|p| {
                let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("");
                let stem = stem_of(name).unwrap_or(name);
                if stem == id {
                    return true;
                }
                let longer_owner = stem
                    .match_indices('_')
                    .map(|(i, _)| &stem[..i])
                    .chain(std::iter::once(stem))
                    .filter(|s| s.len() > id.len())
                    .any(is_star);
                !longer_owner
            })
            .cloned()
            .collect()
    }
}

/// Every file of a star's light curve: the catalogue's `lightcurve` paths
/// (`;`-separated, relative to the catalogue's folder) if it names any,
/// else the star's files in `dir` (see [`DirIndex`]) and in `dir/<star>/`.
/// `is_star` tells whether a name is a star id of the catalogue.
pub fn locate_all(
    star: &str,
    from_catalogue: Option<&str>,
    catalogue_dir: Option<&Path>,
    dir: Option<(&Path, &DirIndex)>,
    is_star: &dyn Fn(&str) -> bool,
) -> Result<Vec<PathBuf>, LcError> {
    let mut tried = Vec::new();
    if let Some(cell) = from_catalogue {
        let mut found = Vec::new();
        for rel in cell.split(';').map(str::trim).filter(|r| !r.is_empty()) {
            let p = match catalogue_dir {
                Some(d) if Path::new(rel).is_relative() => d.join(rel),
                _ => PathBuf::from(rel),
            };
            if p.is_file() {
                found.push(p);
            } else if p.is_dir() {
                found.extend(folder_files(&p));
            } else {
                tried.push(p.display().to_string());
            }
        }
        if !found.is_empty() && tried.is_empty() {
            return Ok(found);
        }
        if !found.is_empty() {
            return Err(LcError::NotFound {
                star: star.to_string(),
                tried: format!(
                    "the catalogue's lightcurve cell names files that are missing: {}",
                    tried.join(", ")
                ),
            });
        }
    }
    // A star id is used as a file name only when it cannot leave the folder.
    let safe = !star.contains(['/', '\\']) && star != ".." && star != "." && !star.is_empty();
    if let (Some((d, index)), true) = (dir, safe) {
        let mut found = index.files(star, is_star);
        let sub = d.join(star);
        if sub.is_dir() {
            found.extend(folder_files(&sub));
        }
        // Else the archives' names: the star's number, zero-padded.
        if found.is_empty()
            && let Some(n) = star_number(star)
        {
            found.extend(index.numbered(n).iter().cloned());
        }
        if !found.is_empty() {
            return Ok(found);
        }
        tried.push(format!(
            "{0}/{star}.<ext>, {0}/{star}_<part>.<ext>, {0}/{star}/, names holding the star's number zero-padded to 9 digits or more (ext: {1})",
            d.display(),
            EXTENSIONS.join(" ")
        ));
    }
    if tried.is_empty() {
        tried.push("nothing: no lightcurve column and no --lightcurves folder".into());
    }
    Err(LcError::NotFound {
        star: star.to_string(),
        tried: tried.join(", "),
    })
}

/// The light-curve files of a folder, by name.
fn folder_files(dir: &Path) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .map(|it| {
            it.flatten()
                .map(|e| e.path())
                .filter(|p| p.is_file())
                .filter(|p| {
                    p.file_name()
                        .and_then(|n| n.to_str())
                        .is_some_and(|n| stem_of(n).is_some())
                })
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

/// One segment after cleaning.
struct Cleaned {
    time: Vec<f64>,
    flux: Vec<f64>,
    err: Vec<f64>,
    info: Segment,
    estimated: bool,
}

/// Drops the samples with a non-finite value, a negative error or a quality
/// flag that meets `mask`; sorts by time; divides by the median flux.
/// `Ok(None)` when fewer than [`MIN_SAMPLES`] remain (the reason goes in
/// `notes`).
fn clean(
    source: String,
    raw: Raw,
    mask: u64,
    notes: &mut Vec<String>,
) -> Result<Option<Cleaned>, LcError> {
    let n = raw.time.len().min(raw.flux.len());
    let n = raw.err.as_ref().map_or(n, |e| n.min(e.len()));
    let mut dropped_quality = 0;
    let mut rows: Vec<(f64, f64, f64)> = Vec::with_capacity(n);
    for i in 0..n {
        let (t, f) = (raw.time[i], raw.flux[i]);
        let e = raw.err.as_ref().map_or(0.0, |e| e[i]);
        if raw.quality.as_ref().is_some_and(|q| q[i] & mask != 0) {
            dropped_quality += 1;
            continue;
        }
        if t.is_finite() && f.is_finite() && e.is_finite() && e >= 0.0 {
            rows.push((t, f, e));
        }
    }
    let dropped = n - rows.len() - dropped_quality;
    if rows.len() < MIN_SAMPLES {
        notes.push(format!(
            "{source}: left out, only {} usable samples ({dropped} with a missing value, \
             {dropped_quality} flagged by quality)",
            rows.len()
        ));
        return Ok(None);
    }
    if !rows.windows(2).all(|w| w[0].0 <= w[1].0) {
        rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    }
    check_span(&source, &raw.time, &rows)?;
    let mut flux: Vec<f64> = rows.iter().map(|r| r.1).collect();
    let median = median_of(&mut flux.clone());
    // A flux centred on zero (a relative flux f/f₀ − 1, a difference image's
    // flux) has a median within its own noise of 0, of either sign:
    // dividing by it would scale every depth by chance. Real photometry's
    // median stands hundreds of its point-to-point scatters above zero; 3
    // is common practice, no source (docs/science.md §4.5).
    let scatter = super::point_to_point_sigma(&flux);
    if median.abs() < ZERO_CENTRED_SIGMAS * scatter {
        return Err(LcError::Bad {
            path: source,
            message: format!(
                "the flux is centred on zero (median {median:.3e}, within \
                 {ZERO_CENTRED_SIGMAS} point-to-point scatters of {scatter:.3e} of 0): it looks \
                 like a relative flux (f/f₀ − 1) or a difference, which cannot be normalised; \
                 give the flux itself (--flux-column)"
            ),
        });
    }
    if median.is_nan() || median <= 0.0 {
        return Err(LcError::Bad {
            path: source,
            message: format!("median flux {median} is not positive; cannot normalise"),
        });
    }
    flux.iter_mut().for_each(|v| *v /= median);
    let time: Vec<f64> = rows.iter().map(|r| r.0).collect();
    let (err, estimated) = match raw.err {
        Some(_) => (rows.iter().map(|r| r.2 / median).collect(), false),
        None => (estimated_errors(&flux), true),
    };
    let info = Segment {
        source,
        samples: time.len(),
        dropped,
        dropped_quality,
        normalised_by: median,
        first: time[0],
        last: time[time.len() - 1],
        columns: raw.columns,
    };
    Ok(Some(Cleaned {
        time,
        flux,
        err,
        info,
        estimated,
    }))
}

impl LightCurve {
    /// Cleans each segment on its own (see [`clean`]), then stitches them in
    /// time. Segments that overlap in time are merged into one stretch for
    /// detrending; otherwise each is its own, so a trend never bridges the
    /// gap between two. `mask`: quality bits that drop a sample (all when
    /// `None`).
    pub fn from_segments(
        parts: Vec<(String, Raw)>,
        mask: Option<u64>,
    ) -> Result<LightCurve, LcError> {
        let mask = mask.unwrap_or(u64::MAX);
        let first_source = parts.first().map(|p| p.0.clone()).unwrap_or_default();
        let count = parts.len();
        let mut notes = Vec::new();
        let mut time_zero = 0.0;
        let mut cleaned = Vec::with_capacity(count);
        for (source, raw) in parts {
            if raw.time_zero != 0.0 {
                time_zero = raw.time_zero;
            }
            notes.extend(raw.notes.iter().map(|n| format!("{source}: {n}")));
            if let Some(c) = clean(source, raw, mask, &mut notes)? {
                cleaned.push(c);
            }
        }
        if cleaned.is_empty() {
            return Err(LcError::Bad {
                path: first_source,
                message: format!(
                    "no usable samples in {} ({})",
                    if count == 1 {
                        "the file".to_string()
                    } else {
                        format!("any of its {count} segments")
                    },
                    notes.join("; ")
                ),
            });
        }
        cleaned.sort_by(|a, b| a.info.first.total_cmp(&b.info.first));
        let (first, last) = (
            cleaned[0].info.first,
            cleaned.iter().map(|c| c.info.last).fold(f64::MIN, f64::max),
        );
        if last - first > MAX_SPAN_D {
            let far = cleaned
                .last()
                .map(|c| c.info.source.clone())
                .unwrap_or_default();
            return Err(LcError::Bad {
                path: far,
                message: format!(
                    "its segments span {:.0} days (from {first} to {last}); a light curve spans \
                     at most {MAX_SPAN_D:.0} days, so one segment's times are wrong",
                    last - first
                ),
            });
        }
        let total: usize = cleaned.iter().map(|c| c.time.len()).sum();
        let (mut time, mut flux, mut err) = (
            Vec::with_capacity(total),
            Vec::with_capacity(total),
            Vec::with_capacity(total),
        );
        let mut breaks: Vec<usize> = Vec::new();
        let mut stretch_end = f64::NEG_INFINITY;
        let mut stretch_start = 0;
        let mut segments = Vec::with_capacity(cleaned.len());
        let mut estimated = false;
        for c in cleaned {
            if c.info.first > stretch_end {
                sort_stretch(&mut time, &mut flux, &mut err, stretch_start);
                stretch_start = time.len();
                breaks.push(stretch_start);
            }
            stretch_end = stretch_end.max(c.info.last);
            time.extend(c.time);
            flux.extend(c.flux);
            err.extend(c.err);
            estimated |= c.estimated;
            segments.push(c.info);
        }
        sort_stretch(&mut time, &mut flux, &mut err, stretch_start);
        let source = if segments.len() == 1 {
            segments[0].source.clone()
        } else {
            format!("{} segments, first {}", segments.len(), segments[0].source)
        };
        Ok(LightCurve {
            time,
            flux,
            flux_err: err,
            source,
            dropped: segments.iter().map(|s| s.dropped).sum(),
            dropped_quality: segments.iter().map(|s| s.dropped_quality).sum(),
            normalised_by: segments[0].normalised_by,
            err_estimated: estimated,
            segments,
            breaks,
            time_zero,
            notes,
        })
    }

    /// The sample ranges detrending treats on their own.
    pub fn stretches(&self) -> impl Iterator<Item = std::ops::Range<usize>> + '_ {
        let n = self.time.len();
        let starts: &[usize] = if self.breaks.is_empty() {
            &[0]
        } else {
            &self.breaks
        };
        starts.iter().enumerate().map(move |(i, &a)| {
            let b = starts.get(i + 1).copied().unwrap_or(n);
            a..b
        })
    }

    /// A short label for a pane title: the file name (or the segment count),
    /// the samples used and those dropped.
    pub fn label(&self) -> String {
        let what = match self.segments.as_slice() {
            [one] => Path::new(&one.source)
                .file_name()
                .map_or(one.source.clone(), |f| f.to_string_lossy().into_owned()),
            many => format!("{} segments", many.len()),
        };
        let dropped = self.dropped + self.dropped_quality;
        if dropped == 0 {
            format!("{what} · {} samples", self.time.len())
        } else {
            format!("{what} · {} samples · {dropped} dropped", self.time.len())
        }
    }

    /// "5120 samples used; 210 dropped (12 missing values, 198 flagged by
    /// quality)", for people.
    pub fn describe_use(&self) -> String {
        format!(
            "{} samples used; {} dropped ({} missing values, {} flagged by quality)",
            self.time.len(),
            self.dropped + self.dropped_quality,
            self.dropped,
            self.dropped_quality
        )
    }
}

/// Sorts the samples from `start` on by time, when segments overlapped.
fn sort_stretch(time: &mut [f64], flux: &mut [f64], err: &mut [f64], start: usize) {
    if time[start..].windows(2).all(|w| w[0] <= w[1]) {
        return;
    }
    let mut rows: Vec<(f64, f64, f64)> = (start..time.len())
        .map(|i| (time[i], flux[i], err[i]))
        .collect();
    rows.sort_by(|a, b| a.0.total_cmp(&b.0));
    for (k, r) in rows.into_iter().enumerate() {
        (time[start + k], flux[start + k], err[start + k]) = r;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn raw(t0: f64, n: usize, level: f64) -> Raw {
        Raw {
            time: (0..n).map(|i| t0 + i as f64 * 0.01).collect(),
            flux: vec![level; n],
            err: Some(vec![level * 1e-3; n]),
            quality: Some((0..n).map(|i| if i % 10 == 3 { 8 } else { 0 }).collect()),
            ..Raw::default()
        }
    }

    #[test]
    fn segments_are_normalised_each_by_its_own_median_and_stitched_in_time() {
        let lc = LightCurve::from_segments(
            vec![
                ("b".into(), raw(50.0, 100, 900.0)),
                ("a".into(), raw(0.0, 100, 1200.0)),
            ],
            None,
        )
        .unwrap();
        assert_eq!(lc.segments.len(), 2);
        assert_eq!(lc.segments[0].source, "a", "time order");
        assert_eq!(lc.breaks, vec![0, 90]);
        assert_eq!(lc.time.len(), 180);
        assert_eq!(lc.dropped_quality, 20);
        assert!(lc.flux.iter().all(|&f| f == 1.0));
        assert!(lc.time.windows(2).all(|w| w[0] < w[1]));
        // A mask of bit 1 only keeps the samples flagged with bit 8.
        let kept =
            LightCurve::from_segments(vec![("a".into(), raw(0.0, 100, 5.0))], Some(1)).unwrap();
        assert_eq!(kept.time.len(), 100);
    }

    #[test]
    fn a_flux_centred_on_zero_is_refused_not_divided_by_its_median() {
        // A relative flux (f/f₀ − 1) with 1e-3 noise and a 1 % transit: its
        // median is a chance value near zero.
        let mut r = raw(0.0, 400, 1.0);
        let mut x = 7u64;
        for (i, f) in r.flux.iter_mut().enumerate() {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let u = (x >> 11) as f64 / (1u64 << 53) as f64 - 0.5;
            *f = 2e-5 + 3.5e-3 * u - if i % 100 < 4 { 0.01 } else { 0.0 };
        }
        let err = LightCurve::from_segments(vec![("rel.csv".into(), r.clone())], None)
            .unwrap_err()
            .to_string();
        assert!(
            err.contains("rel.csv") && err.contains("centred on zero"),
            "{err}"
        );
        // The same light curve as a flux (1 added) is read.
        r.flux.iter_mut().for_each(|f| *f += 1.0);
        assert!(LightCurve::from_segments(vec![("flux.csv".into(), r)], None).is_ok());
    }

    #[test]
    fn overlapping_segments_share_one_stretch() {
        let lc = LightCurve::from_segments(
            vec![
                ("a".into(), raw(0.0, 100, 10.0)),
                ("b".into(), raw(0.5, 100, 20.0)),
            ],
            None,
        )
        .unwrap();
        assert_eq!(lc.breaks, vec![0]);
        assert!(lc.time.windows(2).all(|w| w[0] <= w[1]));
    }

    #[test]
    fn archive_names_give_a_star_its_files_by_number() {
        // Invented numbers, in the archives' naming (from memory).
        for (stem, n) in [
            ("kplr005706966-2009131105131_llc", "5706966"),
            (
                "tess2018206045859-s0001-0000000025155310-0120-s_lc",
                "25155310",
            ),
            ("ktwo201367065-c01_llc", "201367065"),
        ] {
            assert!(file_numbers(stem).any(|x| x == n), "{stem}");
        }
        assert_eq!(star_number("KIC 5706966"), Some("5706966"));
        assert_eq!(star_number("TIC 0025155310"), Some("25155310"));
        assert_eq!(star_number("SYN-A"), None);
        // A short run (a sector, a camera) is no star's number.
        assert_eq!(file_numbers("s0001-0120").count(), 0);
    }

    #[test]
    fn a_star_does_not_take_a_longer_ids_files() {
        let d = std::env::temp_dir().join(format!("starsift-seg-{}", std::process::id()));
        std::fs::create_dir_all(d.join("S1")).unwrap();
        for f in [
            "S1.csv",
            "S1_a.fits",
            "S1_2.csv",
            "S1_2_x.csv",
            "S10.csv",
            "notes.txt",
        ] {
            std::fs::write(d.join(f), "").unwrap();
        }
        std::fs::write(d.join("S1").join("part.fits.gz"), "").unwrap();
        let index = DirIndex::build(&d);
        let stars = |s: &str| ["S1", "S1_2", "S10"].contains(&s);
        let names = |v: Vec<PathBuf>| -> Vec<String> {
            v.iter()
                .map(|p| p.strip_prefix(&d).unwrap().display().to_string())
                .collect()
        };
        let s1 = locate_all("S1", None, None, Some((&d, &index)), &stars).unwrap();
        assert_eq!(names(s1), ["S1.csv", "S1_a.fits", "S1/part.fits.gz"]);
        let s12 = locate_all("S1_2", None, None, Some((&d, &index)), &stars).unwrap();
        assert_eq!(names(s12), ["S1_2.csv", "S1_2_x.csv"]);
        let _ = std::fs::remove_dir_all(&d);
    }
}
