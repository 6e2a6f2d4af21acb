//! FITS binary tables through CFITSIO (the `fitsio` crate, with CFITSIO
//! built from source): the first extension by default, columns by synonym.

use std::path::Path;

use fitsio::FitsFile;
use fitsio::hdu::HduInfo;

use super::{LcColumns, LcError, resolve_columns};

type Columns = (Vec<f64>, Vec<f64>, Option<Vec<f64>>);

pub(super) fn read_table(path: &Path, cols: &LcColumns) -> Result<Columns, LcError> {
    let name = path.display().to_string();
    let err = |e: fitsio::errors::Error| LcError::Fits {
        path: name.clone(),
        message: e.to_string(),
    };
    let mut f = FitsFile::open(path).map_err(err)?;
    let hdu = match cols.hdu.as_deref() {
        None => f.hdu(1).map_err(err)?,
        Some(h) => match h.parse::<usize>() {
            Ok(i) => f.hdu(i).map_err(err)?,
            Err(_) => f.hdu(h).map_err(err)?,
        },
    };
    let header: Vec<String> = match &hdu.info {
        HduInfo::TableInfo {
            column_descriptions,
            ..
        } => column_descriptions.iter().map(|c| c.name.clone()).collect(),
        _ => {
            return Err(LcError::Fits {
                path: name,
                message: "the extension is not a table; choose one with --hdu".into(),
            });
        }
    };
    let (t, fl, e) = resolve_columns(&name, &header, cols)?;
    let time: Vec<f64> = hdu.read_col(&mut f, &header[t]).map_err(err)?;
    let flux: Vec<f64> = hdu.read_col(&mut f, &header[fl]).map_err(err)?;
    let flux_err = match e {
        Some(e) => Some(hdu.read_col::<f64>(&mut f, &header[e]).map_err(err)?),
        None => None,
    };
    Ok((time, flux, flux_err))
}

/// Writes a light curve as a FITS binary table (used by tests and the demo
/// tools): columns TIME, FLUX, FLUX_ERR in the first extension.
pub fn write_table(path: &Path, time: &[f64], flux: &[f64], err: &[f64]) -> Result<(), LcError> {
    use fitsio::tables::{ColumnDataType, ColumnDescription, ConcreteColumnDescription};
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
