//! FITS binary tables through CFITSIO (the `fitsio` crate, with CFITSIO
//! built from source): the first extension by default, columns by synonym.

use std::path::Path;

use fitsio::FitsFile;
use fitsio::hdu::HduInfo;
use fitsio::tables::ColumnDataType;

use super::{LcColumns, LcError, Raw, resolve_columns};
use crate::catalogue::units::{days_per, epoch_zero};
use crate::fitsfile::{describe, open_plain};

pub(super) fn read_table(path: &Path, cols: &LcColumns) -> Result<Raw, LcError> {
    // The FITS binding panics on some damaged headers (an unknown TFORM
    // type, for one): that is this file's error, never the process's.
    let what = format!("reading {}", path.display());
    crate::contain::contained(&what, || read_table_unguarded(path, cols)).unwrap_or_else(|why| {
        Err(LcError::Fits {
            path: path.display().to_string(),
            message: why,
        })
    })
}

/// A binary-table extension: its number, column names, per-column (repeat,
/// bytes per value) and row count.
struct TableHdu {
    hdu: fitsio::hdu::FitsHdu,
    number: usize,
    header: Vec<String>,
    shapes: Vec<(usize, usize)>,
    rows: usize,
}

fn as_table(hdu: fitsio::hdu::FitsHdu, number: usize) -> Option<TableHdu> {
    let HduInfo::TableInfo {
        column_descriptions,
        num_rows,
    } = &hdu.info
    else {
        return None;
    };
    let header = column_descriptions.iter().map(|c| c.name.clone()).collect();
    let shapes = column_descriptions
        .iter()
        .map(|c| (c.data_type.repeat, bytes_per_value(&c.data_type.typ)))
        .collect();
    let rows = *num_rows;
    Some(TableHdu {
        hdu,
        number,
        header,
        shapes,
        rows,
    })
}

/// The table to read: `--hdu` if given, else the first table extension that
/// has a time and a flux column (archive files put the light curve in the
/// first extension and images after it, but not every writer does).
fn find_table(
    f: &mut FitsFile,
    name: &str,
    cols: &LcColumns,
) -> Result<(TableHdu, super::Picked), LcError> {
    let err = |e: fitsio::errors::Error| LcError::Fits {
        path: name.to_string(),
        message: describe(&e),
    };
    if let Some(h) = cols.hdu.as_deref() {
        let (hdu, number) = match h.parse::<usize>() {
            Ok(i) => (f.hdu(i).map_err(err)?, i),
            Err(_) => (f.hdu(h).map_err(err)?, 0),
        };
        let t = as_table(hdu, number).ok_or_else(|| LcError::Fits {
            path: name.to_string(),
            message: format!("HDU {h} is not a table; choose a table extension with --hdu"),
        })?;
        let picked = resolve_columns(&format!("{name} (HDU {h})"), &t.header, cols)?;
        return Ok((t, picked));
    }
    let count = f.num_hdus().map_err(err)?;
    let mut first_error = None;
    for i in 1..count {
        let Some(t) = as_table(f.hdu(i).map_err(err)?, i) else {
            continue;
        };
        match resolve_columns(&format!("{name} (HDU {i})"), &t.header, cols) {
            Ok(p) => return Ok((t, p)),
            Err(e) => {
                first_error.get_or_insert(e);
            }
        }
    }
    Err(first_error.unwrap_or_else(|| LcError::Fits {
        path: name.to_string(),
        message: format!(
            "no table extension among its {count} HDUs; a light curve is a binary table"
        ),
    }))
}

fn read_table_unguarded(path: &Path, cols: &LcColumns) -> Result<Raw, LcError> {
    let name = path.display().to_string();
    let err = |e: fitsio::errors::Error| LcError::Fits {
        path: name.clone(),
        message: describe(&e),
    };
    let mut f = open_plain(path).map_err(err)?;
    let (t, p) = find_table(&mut f, &name, cols)?;
    let used: Vec<usize> = [Some(p.time), Some(p.flux), p.err, p.quality]
        .into_iter()
        .flatten()
        .collect();
    check_shape(&name, path, &t.header, &t.shapes, t.rows, &used)?;
    let hdu = &t.hdu;
    let mut time: Vec<f64> = hdu.read_col(&mut f, &t.header[p.time]).map_err(err)?;
    let flux: Vec<f64> = hdu.read_col(&mut f, &t.header[p.flux]).map_err(err)?;
    let err_col = match p.err {
        Some(e) => Some(hdu.read_col::<f64>(&mut f, &t.header[e]).map_err(err)?),
        None => None,
    };
    let quality = match p.quality {
        Some(q) => Some(
            hdu.read_col::<i64>(&mut f, &t.header[q])
                .map_err(err)?
                .into_iter()
                .map(|v| u64::try_from(v).unwrap_or(u64::MAX))
                .collect(),
        ),
        None => None,
    };
    let clock = time_reference(&mut f, hdu, p.time + 1);
    if clock.scale != 1.0 || clock.zero != 0.0 {
        time.iter_mut()
            .for_each(|v| *v = *v * clock.scale + clock.zero);
    }
    let mut notes = Vec::new();
    if let Some(n) = clock.note {
        notes.push(n);
    }
    let mut raw = Raw {
        time,
        flux,
        err: err_col,
        quality,
        time_zero: clock.zero,
        columns: format!("HDU {}: {}", t.number, p.describe(&t.header)),
        notes,
    };
    raw.read_magnitudes(&p);
    Ok(raw)
}

/// How a table's time column becomes days on an absolute scale.
#[derive(Debug, PartialEq)]
struct Clock {
    /// Days per unit of the column.
    scale: f64,
    /// Days added after scaling (the reference date).
    zero: f64,
    note: Option<String>,
}

/// A keyword of the table's header, else of the primary header (both
/// places are used by archives).
fn key<T: fitsio::headers::ReadsKey>(
    f: &mut FitsFile,
    hdu: &fitsio::hdu::FitsHdu,
    name: &str,
) -> Option<T> {
    if let Ok(v) = hdu.read_key::<T>(f, name) {
        return Some(v);
    }
    let primary = f.primary_hdu().ok()?;
    primary.read_key::<T>(f, name).ok()
}

/// The time reference of a table (FITS 4.0 §9.2; the time-keyword paper,
/// Rots et al. 2015, A&A 574, A36): the reference date from `BJDREFI` +
/// `BJDREFF` or `BJDREF` (also `JDREF*`, and `MJDREF*` + 2400000.5), else an
/// offset written in the column's unit (`BJD - 2457000, days`); the unit
/// from `TUNITn`, else `TIMEUNIT` (days when neither says).
fn time_reference(f: &mut FitsFile, hdu: &fitsio::hdu::FitsHdu, column: usize) -> Clock {
    let tunit: Option<String> = key(f, hdu, &format!("TUNIT{column}"));
    let timeunit: Option<String> = key(f, hdu, "TIMEUNIT");
    let timesys: Option<String> = key(f, hdu, "TIMESYS");
    let pair = |f: &mut FitsFile, i: &str, fr: &str, whole: &str| -> Option<f64> {
        match (key::<f64>(f, hdu, i), key::<f64>(f, hdu, fr)) {
            (Some(a), b) => Some(a + b.unwrap_or(0.0)),
            (None, _) => key::<f64>(f, hdu, whole),
        }
    };
    let zero = pair(f, "BJDREFI", "BJDREFF", "BJDREF")
        .or_else(|| pair(f, "JDREFI", "JDREFF", "JDREF"))
        .or_else(|| pair(f, "MJDREFI", "MJDREFF", "MJDREF").map(|m| m + 2_400_000.5));
    clock_from(
        tunit.as_deref(),
        timeunit.as_deref(),
        timesys.as_deref(),
        zero,
    )
}

/// [`time_reference`] from the keyword values (pure, for tests).
fn clock_from(
    tunit: Option<&str>,
    timeunit: Option<&str>,
    timesys: Option<&str>,
    zero: Option<f64>,
) -> Clock {
    // The unit's words ("d", "BJD - 2457000, days", "s"): the first that
    // names a time unit, else the first word; days when none does.
    let unit_text = tunit.or(timeunit).unwrap_or("d");
    let scale = unit_text
        .split(',')
        .find_map(days_per)
        .or_else(|| unit_text.split_whitespace().next().and_then(days_per))
        .unwrap_or(1.0);
    // "BJD - 2457000", "BJD-2454833, days": a zero written in the unit.
    let in_unit = tunit.and_then(epoch_zero);
    let zero = zero.filter(|z| z.is_finite()).or(in_unit).unwrap_or(0.0);
    let note = match timesys.map(|s| s.trim().to_ascii_uppercase()) {
        Some(s) if !s.is_empty() && s != "TDB" && zero != 0.0 => Some(format!(
            "times are in {s}, not TDB; they differ from barycentric dynamical time by up to \
             about a minute, which matters only for ephemerides at that precision"
        )),
        _ => None,
    };
    Clock { scale, zero, note }
}

/// Bytes one value of a column type takes in a binary table (FITS 4.0,
/// Table 18); 0 for the types a light curve cannot use.
fn bytes_per_value(t: &ColumnDataType) -> usize {
    use ColumnDataType::*;
    match t {
        Byte | SignedByte | Logical => 1,
        Short | UnsignedShort => 2,
        Int | Float => 4,
        Long | UnsignedLong | Double | LongLong | UnsignedLongLong => 8,
        Bit | Text | String => 0,
    }
}

/// How much larger than the file a gzipped FITS file can grow: deflate's
/// largest ratio is about 1032:1 (zlib technical details, from memory).
const GZIP_MAX_RATIO: u64 = 1100;

/// Checks, before any column is read, that the columns used hold one number
/// per row and that the row count the header claims fits in the file, so a
/// damaged header cannot make the reader allocate more than the file holds.
fn check_shape(
    name: &str,
    path: &Path,
    header: &[String],
    shapes: &[(usize, usize)],
    rows: usize,
    used: &[usize],
) -> Result<(), LcError> {
    let bad = |message: String| LcError::Fits {
        path: name.to_string(),
        message,
    };
    let mut row_bytes = 0u64;
    for &i in used {
        let (repeat, size) = shapes[i];
        if repeat != 1 || size == 0 {
            return Err(bad(format!(
                "column {} holds {} (repeat {repeat}); a light curve needs one number per row \
                 (choose another column with --time-column, --flux-column or --err-column)",
                header[i],
                if size == 0 {
                    "text or bits"
                } else {
                    "a vector per row"
                }
            )));
        }
        row_bytes += size as u64;
    }
    let file_len = std::fs::metadata(path).map(|m| m.len()).unwrap_or(0);
    let lower = name.to_ascii_lowercase();
    let room = if lower.ends_with(".gz") {
        file_len.saturating_mul(GZIP_MAX_RATIO)
    } else {
        file_len
    };
    let need = (rows as u64).saturating_mul(row_bytes);
    if need > room {
        return Err(bad(format!(
            "the table header claims {rows} rows ({need} bytes of the columns used) but the \
             file holds {file_len} bytes; it is truncated or its NAXIS2 is wrong"
        )));
    }
    Ok(())
}

/// A new FITS file at `path` (replacing one there) with a `LIGHTCURVE`
/// binary table of these columns, and the error mapping for its writes.
fn new_table(
    path: &Path,
    columns: &[(&str, ColumnDataType)],
) -> Result<(FitsFile, fitsio::hdu::FitsHdu), LcError> {
    use fitsio::tables::{ColumnDescription, ConcreteColumnDescription};
    let e = write_error(path);
    let _ = std::fs::remove_file(path);
    let mut f = FitsFile::create(path).open().map_err(&e)?;
    let desc: Vec<ConcreteColumnDescription> = columns
        .iter()
        .map(|(n, t)| ColumnDescription::new(*n).with_type(*t).create())
        .collect::<Result<_, _>>()
        .map_err(&e)?;
    let hdu = f.create_table("LIGHTCURVE", &desc).map_err(&e)?;
    Ok((f, hdu))
}

fn write_error(path: &Path) -> impl Fn(fitsio::errors::Error) -> LcError {
    let name = path.display().to_string();
    move |e| LcError::Fits {
        path: name.clone(),
        message: e.to_string(),
    }
}

/// Writes a light curve as a FITS binary table (used by tests and the demo
/// tools): columns TIME, FLUX, FLUX_ERR in the first extension.
pub fn write_table(path: &Path, time: &[f64], flux: &[f64], err: &[f64]) -> Result<(), LcError> {
    let e = write_error(path);
    let columns = ["TIME", "FLUX", "FLUX_ERR"].map(|n| (n, ColumnDataType::Double));
    let (mut f, hdu) = new_table(path, &columns)?;
    hdu.write_col(&mut f, "TIME", time).map_err(&e)?;
    hdu.write_col(&mut f, "FLUX", flux).map_err(&e)?;
    hdu.write_col(&mut f, "FLUX_ERR", err).map_err(&e)?;
    Ok(())
}

/// An archive-style light-curve segment, for tests and the demo tools: the
/// layout archives deliver (a primary header, a `LIGHTCURVE` binary table
/// with TIME counted from BJDREFI + BJDREFF in days, float32 fluxes — the
/// systematics-corrected `PDCSAP_FLUX` and the aperture `SAP_FLUX` — with
/// their errors and a 32-bit `QUALITY` column, then an aperture image).
#[derive(Clone, Debug, Default)]
pub struct ArchiveSegment {
    /// TIME column values, days from the reference.
    pub time: Vec<f64>,
    pub pdcsap_flux: Vec<f32>,
    pub pdcsap_flux_err: Vec<f32>,
    pub sap_flux: Vec<f32>,
    pub quality: Vec<i32>,
    /// BJDREFI and BJDREFF.
    pub bjdref: (i64, f64),
}

/// Writes an [`ArchiveSegment`] (see there for the layout).
pub fn write_archive_segment(path: &Path, seg: &ArchiveSegment) -> Result<(), LcError> {
    use fitsio::images::{ImageDescription, ImageType};
    let e = write_error(path);
    let columns = [
        ("TIME", ColumnDataType::Double),
        ("PDCSAP_FLUX", ColumnDataType::Float),
        ("PDCSAP_FLUX_ERR", ColumnDataType::Float),
        ("SAP_FLUX", ColumnDataType::Float),
        ("QUALITY", ColumnDataType::Int),
    ];
    let (mut f, hdu) = new_table(path, &columns)?;
    let e = &e;
    hdu.write_col(&mut f, "TIME", &seg.time).map_err(e)?;
    hdu.write_col(&mut f, "PDCSAP_FLUX", &seg.pdcsap_flux)
        .map_err(e)?;
    hdu.write_col(&mut f, "PDCSAP_FLUX_ERR", &seg.pdcsap_flux_err)
        .map_err(e)?;
    hdu.write_col(&mut f, "SAP_FLUX", &seg.sap_flux)
        .map_err(e)?;
    hdu.write_col(&mut f, "QUALITY", &seg.quality).map_err(e)?;
    let unit = format!("BJD - {}, days", seg.bjdref.0);
    hdu.write_key(&mut f, "TUNIT1", unit).map_err(e)?;
    hdu.write_key(&mut f, "BJDREFI", seg.bjdref.0).map_err(e)?;
    hdu.write_key(&mut f, "BJDREFF", seg.bjdref.1).map_err(e)?;
    hdu.write_key(&mut f, "TIMEUNIT", "d".to_string())
        .map_err(e)?;
    hdu.write_key(&mut f, "TIMESYS", "TDB".to_string())
        .map_err(e)?;
    let image = ImageDescription {
        data_type: ImageType::Long,
        dimensions: &[11, 11],
    };
    f.create_image("APERTURE", &image).map_err(e)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn time_reference_from_keywords_or_the_unit() {
        // FITS time keywords (Rots et al. 2015, A&A 574, A36, §4): the
        // reference in BJDREFI + BJDREFF; the unit in TUNITn or TIMEUNIT.
        let c = clock_from(
            Some("BJD - 2457000, days"),
            Some("d"),
            Some("TDB"),
            Some(2457000.0),
        );
        assert_eq!((c.scale, c.zero, c.note), (1.0, 2457000.0, None));
        // The zero written only in the unit.
        assert_eq!(
            clock_from(Some("BJD-2454833"), None, None, None).zero,
            2454833.0
        );
        // Seconds.
        assert_eq!(
            clock_from(Some("s"), None, None, None).scale,
            1.0 / 86_400.0
        );
        // No reference: times as they are.
        assert_eq!(clock_from(None, None, None, None).zero, 0.0);
        assert!(
            clock_from(None, Some("d"), Some("UTC"), Some(2.4e6))
                .note
                .is_some()
        );
    }
}
