//! Opening FITS files through CFITSIO (the `fitsio` crate) and CFITSIO's
//! errors in words: shared by the light-curve and the catalogue readers.

use std::path::Path;

use fitsio::FitsFile;

/// A FITS error in words: CFITSIO's own message and status code, never a
/// debug dump of the error structure.
pub fn describe(e: &fitsio::errors::Error) -> String {
    match e {
        // 107 and 108: CFITSIO's END_OF_FILE and READ_ERROR (fitsio.h).
        fitsio::errors::Error::Fits(f) if f.status == 107 || f.status == 108 => format!(
            "{} (CFITSIO status {}): the file ends before its header says it does; it is \
             truncated",
            f.message, f.status
        ),
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
pub fn open_plain(path: &Path) -> Result<FitsFile, fitsio::errors::Error> {
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
