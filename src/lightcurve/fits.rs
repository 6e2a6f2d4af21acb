//! FITS binary tables through CFITSIO (the `fitsio` crate, with CFITSIO
//! built from source): the first extension by default, columns by synonym.

use std::path::Path;

use fitsio::FitsFile;
use fitsio::hdu::HduInfo;
use fitsio::tables::ColumnDataType;

use super::{LcColumns, LcError, resolve_columns};

type Columns = (Vec<f64>, Vec<f64>, Option<Vec<f64>>);

pub(super) fn read_table(path: &Path, cols: &LcColumns) -> Result<Columns, LcError> {
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

fn read_table_unguarded(path: &Path, cols: &LcColumns) -> Result<Columns, LcError> {
    let name = path.display().to_string();
    let err = |e: fitsio::errors::Error| LcError::Fits {
        path: name.clone(),
        message: describe(&e),
    };
    let mut f = open_plain(path).map_err(err)?;
    let hdu = match cols.hdu.as_deref() {
        None => f.hdu(1).map_err(err)?,
        Some(h) => match h.parse::<usize>() {
            Ok(i) => f.hdu(i).map_err(err)?,
            Err(_) => f.hdu(h).map_err(err)?,
        },
    };
    let (header, shapes, rows) = match &hdu.info {
        HduInfo::TableInfo {
            column_descriptions,
            num_rows,
        } => (
            column_descriptions
                .iter()
                .map(|c| c.name.clone())
                .collect::<Vec<String>>(),
            column_descriptions
                .iter()
                .map(|c| (c.data_type.repeat, bytes_per_value(&c.data_type.typ)))
                .collect::<Vec<_>>(),
            *num_rows,
        ),
        _ => {
            return Err(LcError::Fits {
                path: name,
                message: "the extension is not a table; choose one with --hdu".into(),
            });
        }
    };
    let (t, fl, e) = resolve_columns(&name, &header, cols)?;
    let used: Vec<usize> = [Some(t), Some(fl), e].into_iter().flatten().collect();
    check_shape(&name, path, &header, &shapes, rows, &used)?;
    let time: Vec<f64> = hdu.read_col(&mut f, &header[t]).map_err(err)?;
    let flux: Vec<f64> = hdu.read_col(&mut f, &header[fl]).map_err(err)?;
    let flux_err = match e {
        Some(e) => Some(hdu.read_col::<f64>(&mut f, &header[e]).map_err(err)?),
        None => None,
    };
    Ok((time, flux, flux_err))
}

/// A FITS error in words: CFITSIO's own message and status code, never a
/// debug dump of the error structure.
fn describe(e: &fitsio::errors::Error) -> String {
    match e {
        fitsio::errors::Error::Fits(f) => format!("{} (CFITSIO status {})", f.message, f.status),
        fitsio::errors::Error::Index(i) => i.message.clone(),
        other => other.to_string(),
    }
}

/// Opens a FITS file by its plain path. CFITSIO's usual open reads
/// brackets, `+` and `*` in a name as filters ("extended file-name syntax"),
/// so a folder named `run[1]` would fail; such paths go through
/// `fits_open_diskfile`, which takes the name literally (CFITSIO User's
/// Guide, section 10.2, from memory). Paths without those characters use the
/// usual open, which also reads gzipped files.
fn open_plain(path: &Path) -> Result<FitsFile, fitsio::errors::Error> {
    let Some(text) = path.to_str() else {
        return Err(fitsio::errors::Error::Message(
            "the path is not valid UTF-8".into(),
        ));
    };
    if !text.contains(['[', ']', '(', ')', '+', '*', '?', '#', '$']) {
        return FitsFile::open(path);
    }
    let c = std::ffi::CString::new(text)?;
    let mut fptr = std::ptr::null_mut();
    let mut status = 0;
    // SAFETY: `c` is a valid NUL-terminated string that outlives the call;
    // CFITSIO writes a file pointer (or leaves it null) and a status.
    unsafe {
        fitsio::sys::ffdkopn(&mut fptr, c.as_ptr(), 0, &mut status);
    }
    fitsio::errors::check_status(status)?;
    // SAFETY: CFITSIO returned status 0, so `fptr` is an open file that we
    // now own; FitsFile closes it on drop.
    unsafe { FitsFile::from_raw(fptr, fitsio::FileOpenMode::READONLY) }
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

/// Writes a light curve as a FITS binary table (used by tests and the demo
/// tools): columns TIME, FLUX, FLUX_ERR in the first extension.
pub fn write_table(path: &Path, time: &[f64], flux: &[f64], err: &[f64]) -> Result<(), LcError> {
    use fitsio::tables::{ColumnDescription, ConcreteColumnDescription};
    let name = path.display().to_string();
    let e = |e: fitsio::errors::Error| LcError::Fits {
        path: name.clone(),
        message: e.to_string(),
    };
    let _ = std::fs::remove_file(path);
    let mut f = FitsFile::create(path).open().map_err(e)?;
    let desc: Vec<ConcreteColumnDescription> = ["TIME", "FLUX", "FLUX_ERR"]
        .iter()
        .map(|n| {
            ColumnDescription::new(*n)
                .with_type(ColumnDataType::Double)
                .create()
        })
        .collect::<Result<_, _>>()
        .map_err(e)?;
    let hdu = f.create_table("LIGHTCURVE", &desc).map_err(e)?;
    hdu.write_col(&mut f, "TIME", time).map_err(e)?;
    hdu.write_col(&mut f, "FLUX", flux).map_err(e)?;
    hdu.write_col(&mut f, "FLUX_ERR", err).map_err(e)?;
    Ok(())
}
