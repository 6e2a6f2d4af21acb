//! A catalogue as a FITS binary table (FITS 4.0 §7.3), read through CFITSIO:
//! the first table extension with rows (or `--hdu`), text columns as text,
//! numbers in full precision, units from `TUNITn`.

use std::path::Path;

use fitsio::hdu::HduInfo;
use fitsio::tables::ColumnDataType;

use super::{Converted, push_cell};
use crate::catalogue::LoadError;
use crate::fitsfile::{describe as describe_fits_error, open_plain as open_fits};

pub fn convert(path: &Path, hdu: Option<&str>) -> Result<Converted, LoadError> {
    let what = format!("reading {}", path.display());
    crate::contain::contained(&what, || read(path, hdu)).unwrap_or_else(|why| {
        Err(LoadError::Format {
            path: path.display().to_string(),
            message: format!("FITS: {why}"),
        })
    })
}

/// One column's cells, as read.
enum Cells {
    Text(Vec<String>),
    Number(Vec<f64>),
    Whole(Vec<i64>),
}

fn read(path: &Path, hdu: Option<&str>) -> Result<Converted, LoadError> {
    let name = path.display().to_string();
    let bad = |where_: &str, message: String| LoadError::Format {
        path: name.clone(),
        message: format!("FITS{where_}: {message}"),
    };
    let err = |e: fitsio::errors::Error| bad("", describe_fits_error(&e));
    let mut f = open_fits(path).map_err(err)?;
    let count = f.num_hdus().map_err(err)?;
    let chosen = match hdu {
        Some(h) => Some(match h.parse::<usize>() {
            Ok(i) => (f.hdu(i).map_err(err)?, h.to_string()),
            Err(_) => (f.hdu(h).map_err(err)?, h.to_string()),
        }),
        None => (1..count).find_map(|i| {
            let h = f.hdu(i).ok()?;
            matches!(h.info, HduInfo::TableInfo { .. }).then(|| (h, i.to_string()))
        }),
    };
    let Some((table, label)) = chosen else {
        return Err(bad(
            "",
            format!("no table extension among its {count} HDUs; a catalogue is a binary table"),
        ));
    };
    let HduInfo::TableInfo {
        column_descriptions,
        num_rows,
    } = &table.info
    else {
        return Err(bad(
            &format!(" HDU {label}"),
            "not a table; give the catalogue's table extension with --hdu".into(),
        ));
    };
    let at = format!(" HDU {label}");
    // The rows claimed must fit in the file before anything is allocated.
    let row_bytes: u64 = column_descriptions
        .iter()
        .map(|c| c.data_type.repeat as u64 * width(&c.data_type.typ))
        .sum();
    let file_len = std::fs::metadata(path).map_or(0, |m| m.len());
    let room = if name.to_ascii_lowercase().ends_with(".gz") {
        file_len.saturating_mul(1100)
    } else {
        file_len
    };
    if (*num_rows as u64).saturating_mul(row_bytes) > room {
        return Err(bad(
            &at,
            format!(
                "the header claims {num_rows} rows of {row_bytes} bytes but the file holds \
                 {file_len} bytes; it is truncated or its NAXIS2 is wrong"
            ),
        ));
    }
    let mut names = Vec::new();
    let mut units = Vec::new();
    let mut columns = Vec::new();
    for (i, c) in column_descriptions.iter().enumerate() {
        use ColumnDataType::*;
        let read_err = |e: fitsio::errors::Error| {
            bad(
                &at,
                format!("column {}: {}", c.name, describe_fits_error(&e)),
            )
        };
        let cells = match c.data_type.typ {
            Text | String => Cells::Text(table.read_col(&mut f, &c.name).map_err(read_err)?),
            _ if c.data_type.repeat != 1 => continue, // vectors: not a catalogue field
            Byte | SignedByte | Short | UnsignedShort | Int | Long | LongLong => {
                Cells::Whole(table.read_col(&mut f, &c.name).map_err(read_err)?)
            }
            Float | Double | UnsignedLong | UnsignedLongLong => {
                Cells::Number(table.read_col(&mut f, &c.name).map_err(read_err)?)
            }
            Logical => Cells::Text(
                table
                    .read_col::<bool>(&mut f, &c.name)
                    .map_err(read_err)?
                    .into_iter()
                    .map(|b| if b { "T" } else { "F" }.to_string())
                    .collect(),
            ),
            Bit => continue,
        };
        let unit: Option<std::string::String> =
            table.read_key(&mut f, &format!("TUNIT{}", i + 1)).ok();
        names.push(c.name.clone());
        units.push(unit.unwrap_or_default());
        columns.push(cells);
    }
    let mut out = Vec::with_capacity(*num_rows * 16 * columns.len().max(1));
    for (k, n) in names.iter().enumerate() {
        push_cell(&mut out, n, k == 0);
    }
    out.push(b'\n');
    let mut b = crate::output::Shortest::new();
    for r in 0..*num_rows {
        for (k, col) in columns.iter().enumerate() {
            let text: &str = match col {
                Cells::Text(v) => v.get(r).map_or("", |s| s.trim()),
                Cells::Number(v) => crate::output::exact_in(&mut b, v.get(r).copied()),
                Cells::Whole(v) => {
                    let s = v.get(r).map_or(String::new(), |x| x.to_string());
                    push_cell(&mut out, &s, k == 0);
                    continue;
                }
            };
            push_cell(&mut out, text, k == 0);
        }
        out.push(b'\n');
    }
    Ok(Converted {
        text: out,
        delimiter: b'\t',
        units,
    })
}

/// Bytes per value of a column type (FITS 4.0, Table 18).
fn width(t: &ColumnDataType) -> u64 {
    use ColumnDataType::*;
    match t {
        Bit | Byte | SignedByte | Logical | Text | String => 1,
        Short | UnsignedShort => 2,
        Int | Float => 4,
        Long | UnsignedLong | Double | LongLong | UnsignedLongLong => 8,
    }
}
