//! Catalogues in astronomy's table formats: IPAC ASCII tables, VOTables
//! (TABLEDATA, BINARY, BINARY2), FITS binary tables and ECSV, besides
//! CSV/TSV. Each is known by its extension or its first bytes and turned
//! into tab-separated text
//! with the units its header states, which the loader then reads like any
//! other file (one loader, one set of row checks).

mod fits;
mod votable;

use std::path::Path;

use super::LoadError;

/// The layout of a catalogue file.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum TableFormat {
    /// CSV or TSV (the delimiter is found later).
    Delimited,
    Ipac,
    VoTable,
    Fits,
    Ecsv,
}

impl TableFormat {
    pub fn name(self) -> &'static str {
        match self {
            TableFormat::Delimited => "CSV/TSV",
            TableFormat::Ipac => "IPAC table",
            TableFormat::VoTable => "VOTable",
            TableFormat::Fits => "FITS table",
            TableFormat::Ecsv => "ECSV",
        }
    }

    /// True when skipped rows are numbered by table row, not by file line.
    pub fn counts_rows(self) -> bool {
        matches!(self, TableFormat::VoTable | TableFormat::Fits)
    }
}

/// The formats read, for error messages.
pub const FORMATS_READ: &str = "CSV or TSV (.csv, .tsv, .txt), IPAC ASCII (.tbl, .ipac), \
     VOTable (TABLEDATA, BINARY or BINARY2; .vot, .votable, .xml), FITS binary table (.fits, .fit, .fts) and \
     ECSV (.ecsv), each also gzipped";

/// The format of a file, from its name and its first bytes (decompressed).
pub fn detect(path: &str, head: &[u8]) -> Result<TableFormat, LoadError> {
    let lower = path.to_ascii_lowercase();
    let stem = lower.strip_suffix(".gz").unwrap_or(&lower);
    let text = trim_start(head);
    if head.starts_with(b"SIMPLE  =") {
        return Ok(TableFormat::Fits);
    }
    if text.starts_with(b"<?xml") || text.starts_with(b"<VOTABLE") || text.starts_with(b"<vot:") {
        return Ok(TableFormat::VoTable);
    }
    if text.starts_with(b"# %ECSV") {
        return Ok(TableFormat::Ecsv);
    }
    let by_name = [
        (".tbl", TableFormat::Ipac),
        (".ipac", TableFormat::Ipac),
        (".vot", TableFormat::VoTable),
        (".votable", TableFormat::VoTable),
        (".fits", TableFormat::Fits),
        (".fit", TableFormat::Fits),
        (".fts", TableFormat::Fits),
        (".ecsv", TableFormat::Ecsv),
    ];
    if let Some((_, f)) = by_name.iter().find(|(e, _)| stem.ends_with(e)) {
        return Ok(*f);
    }
    if text.starts_with(b"\\") || text.starts_with(b"|") {
        return Ok(TableFormat::Ipac);
    }
    let looks_binary = |magic: &[u8]| head.starts_with(magic);
    let what = if looks_binary(b"PK\x03\x04") {
        Some("a zip archive (a spreadsheet?)")
    } else if looks_binary(b"\x89HDF") {
        Some("an HDF5 file")
    } else if looks_binary(b"PAR1") {
        Some("a Parquet file")
    } else if looks_binary(b"SQLite format 3") {
        Some("an SQLite database")
    } else if head.iter().take(4096).any(|&b| b == 0) {
        Some("binary data")
    } else {
        None
    };
    match what {
        Some(w) => Err(LoadError::Format {
            path: path.to_string(),
            message: format!("this is {w}, not a table starsift reads; it reads {FORMATS_READ}"),
        }),
        None => Ok(TableFormat::Delimited),
    }
}

fn trim_start(b: &[u8]) -> &[u8] {
    let b = b.strip_prefix(b"\xef\xbb\xbf").unwrap_or(b);
    let n = b.iter().take_while(|c| c.is_ascii_whitespace()).count();
    &b[n..]
}

/// A table as text the loader reads, with the unit each column states.
#[derive(Debug, Default)]
pub struct Converted {
    pub text: Vec<u8>,
    pub delimiter: u8,
    /// Per header column, the unit the table states (empty: none).
    pub units: Vec<String>,
}

/// Turns a non-delimited table into text for the loader. `bytes` is the
/// decompressed file (unused for FITS, which CFITSIO reads by path).
pub fn convert(
    format: TableFormat,
    path: &Path,
    bytes: Vec<u8>,
    hdu: Option<&str>,
) -> Result<Converted, LoadError> {
    let name = path.display().to_string();
    match format {
        TableFormat::Delimited => Ok(Converted {
            text: bytes,
            delimiter: b',',
            units: Vec::new(),
        }),
        TableFormat::Ipac => ipac(&name, &bytes),
        TableFormat::Ecsv => ecsv(&name, bytes),
        TableFormat::VoTable => votable::convert(&name, &bytes),
        TableFormat::Fits => fits::convert(path, hdu),
    }
}

/// Appends one tab-separated cell, quoted when it holds a tab, a line
/// end or a quote (RFC 4180 quoting, with a tab as the separator).
pub(super) fn push_cell(out: &mut Vec<u8>, cell: &str, first: bool) {
    push_cell_bytes(out, cell.as_bytes(), first);
}

/// [`push_cell`] for bytes as they are in the file.
fn push_cell_bytes(out: &mut Vec<u8>, cell: &[u8], first: bool) {
    if !first {
        out.push(b'\t');
    }
    if cell
        .iter()
        .any(|&b| matches!(b, b'\t' | b'\n' | b'\r' | b'"'))
    {
        out.push(b'"');
        for &b in cell {
            if b == b'"' {
                out.push(b'"');
            }
            out.push(b);
        }
        out.push(b'"');
    } else {
        out.extend_from_slice(cell);
    }
}

fn bad(path: &str, line: usize, message: String) -> LoadError {
    LoadError::Format {
        path: path.to_string(),
        message: format!("IPAC table: line {line}: {message}"),
    }
}

/// An IPAC ASCII table (IRSA's definition): `\` keyword and comment lines,
/// then up to four `|`-delimited header lines (names, types, units, null
/// values), then fixed-width data lines whose values lie between the `|`
/// marks of the header. Lines keep their numbers: header and keyword lines
/// become `#` comments, so a skipped row names its line in the file.
fn ipac(path: &str, bytes: &[u8]) -> Result<Converted, LoadError> {
    let mut out = Vec::with_capacity(bytes.len() + bytes.len() / 8);
    let mut bars: Vec<usize> = Vec::new();
    let mut names: Vec<String> = Vec::new();
    let mut header_lines = 0;
    let mut units: Vec<String> = Vec::new();
    let mut nulls: Vec<String> = Vec::new();
    let mut pos = 0usize;
    let mut line_no = 0usize;
    while pos <= bytes.len() {
        line_no += 1;
        let end = memchr::memchr(b'\n', &bytes[pos..]).map_or(bytes.len(), |i| pos + i);
        let raw_line = &bytes[pos..end];
        let line_start = pos;
        pos = end + 1;
        let raw_line = raw_line.strip_suffix(b"\r").unwrap_or(raw_line);
        let raw_line = raw_line.strip_prefix(b"\xef\xbb\xbf").unwrap_or(raw_line);
        if raw_line.starts_with(b"\\") {
            out.extend_from_slice(b"#\n");
            continue;
        }
        if !trim_start(raw_line).starts_with(b"|") {
            if raw_line.iter().all(u8::is_ascii_whitespace) {
                out.push(b'\n');
                continue;
            }
            if bars.is_empty() {
                return Err(bad(
                    path,
                    line_no,
                    "data before the header line of | marks and column names".into(),
                ));
            }
            // The header is done: the data lines, on every core.
            let table = Fixed {
                path,
                bars: &bars,
                names: &names,
                nulls: &nulls,
            };
            table.data(&bytes[line_start..], line_no, &mut out)?;
            break;
        }
        let line = String::from_utf8_lossy(raw_line);
        let line: &str = &line;
        {
            header_lines += 1;
            let cells = |line: &str| -> Vec<String> {
                line.trim_end()
                    .trim_matches('|')
                    .split('|')
                    .map(|c| c.trim().to_string())
                    .collect()
            };
            match header_lines {
                1 => {
                    bars = line.match_indices('|').map(|(p, _)| p).collect();
                    if bars.len() < 2 {
                        return Err(bad(
                            path,
                            line_no,
                            "the name line needs | marks around each name".into(),
                        ));
                    }
                    names = cells(line);
                    for (k, n) in names.iter().enumerate() {
                        push_cell(&mut out, n, k == 0);
                    }
                }
                2 => out.push(b'#'),
                3 => {
                    units = cells(line);
                    out.push(b'#');
                }
                4 => {
                    nulls = cells(line);
                    out.push(b'#');
                }
                _ => {
                    return Err(bad(
                        path,
                        line_no,
                        "a fifth header line; an IPAC table has at most four (names, types, units, nulls)".into(),
                    ));
                }
            }
            if header_lines > 1 && cells(line).len() != names.len() {
                return Err(bad(
                    path,
                    line_no,
                    format!(
                        "this header line has {} columns but the name line has {}",
                        cells(line).len(),
                        names.len()
                    ),
                ));
            }
            out.push(b'\n');
        }
    }
    units.resize(names.len(), String::new());
    Ok(Converted {
        text: out,
        delimiter: b'\t',
        units,
    })
}

/// The layout of an IPAC table's data lines.
struct Fixed<'a> {
    path: &'a str,
    bars: &'a [usize],
    names: &'a [String],
    nulls: &'a [String],
}

impl Fixed<'_> {
    /// Converts the data lines (from line `first_line` of the file), in
    /// line-aligned chunks on worker threads, appended in file order.
    fn data(&self, bytes: &[u8], first_line: usize, out: &mut Vec<u8>) -> Result<(), LoadError> {
        let workers = std::thread::available_parallelism()
            .map_or(1, |n| n.get())
            .min(8);
        let want = bytes.len() / workers + 1;
        let mut chunks = Vec::new();
        let (mut start, mut line) = (0usize, first_line);
        while start < bytes.len() {
            let cut = (start + want).min(bytes.len());
            let end = memchr::memchr(b'\n', &bytes[cut..]).map_or(bytes.len(), |i| cut + i + 1);
            chunks.push((&bytes[start..end], line));
            line += memchr::memchr_iter(b'\n', &bytes[start..end]).count();
            start = end;
        }
        let parts: Vec<Result<Vec<u8>, LoadError>> = std::thread::scope(|s| {
            let handles: Vec<_> = chunks
                .iter()
                .map(|&(chunk, line)| s.spawn(move || self.lines(chunk, line)))
                .collect();
            handles
                .into_iter()
                .map(|h| h.join().unwrap_or_else(|e| std::panic::resume_unwind(e)))
                .collect()
        });
        for p in parts {
            out.extend_from_slice(&p?);
        }
        Ok(())
    }

    fn lines(&self, bytes: &[u8], first_line: usize) -> Result<Vec<u8>, LoadError> {
        let mut out = Vec::with_capacity(bytes.len());
        let mut line_no = first_line;
        let mut rest = bytes;
        while !rest.is_empty() {
            let end = memchr::memchr(b'\n', rest).unwrap_or(rest.len());
            let l = &rest[..end];
            rest = rest.get(end + 1..).unwrap_or(&[]);
            let l = l.strip_suffix(b"\r").unwrap_or(l);
            if l.iter().all(u8::is_ascii_whitespace) || l.starts_with(b"\\") {
                out.push(b'\n');
            } else {
                data_row(
                    self.path, line_no, l, self.bars, self.names, self.nulls, &mut out,
                )?;
            }
            line_no += 1;
        }
        Ok(out)
    }
}

/// One fixed-width data line: the value of column k lies strictly between
/// bars k and k+1; a character under a bar, or past the last one, means the
/// columns are misaligned.
fn data_row(
    path: &str,
    line_no: usize,
    b: &[u8],
    bars: &[usize],
    names: &[String],
    nulls: &[String],
    out: &mut Vec<u8>,
) -> Result<(), LoadError> {
    let last = bars[bars.len() - 1];
    for (k, &p) in bars.iter().enumerate() {
        if b.get(p).is_some_and(|c| !c.is_ascii_whitespace()) {
            let column = names.get(k.saturating_sub(1).min(names.len() - 1));
            return Err(bad(
                path,
                line_no,
                format!(
                    "column `{}`: a value crosses the column boundary at character {} (the data \
                     is misaligned with the header's | marks)",
                    column.map_or("", String::as_str),
                    p + 1
                ),
            ));
        }
    }
    if b.len() > last + 1 && b[last + 1..].iter().any(|c| !c.is_ascii_whitespace()) {
        return Err(bad(
            path,
            line_no,
            format!(
                "text after the last column, from character {} (the data is misaligned with the \
                 header's | marks)",
                last + 2
            ),
        ));
    }
    for k in 0..names.len() {
        let (a, z) = (bars[k] + 1, bars[k + 1].min(b.len()));
        let cell = if a < z { b[a..z].trim_ascii() } else { &[] };
        let null = nulls
            .get(k)
            .is_some_and(|n| !n.is_empty() && n.as_bytes() == cell);
        push_cell_bytes(out, if null { &[] } else { cell }, k == 0);
    }
    out.push(b'\n');
    Ok(())
}

/// ECSV (the Enhanced Character Separated Values format, ECSV 1.0): a
/// YAML header in `#` lines names each column's unit and the delimiter
/// (space unless it says otherwise); the data is delimited text the loader
/// reads as it is, with the header's units.
fn ecsv(path: &str, bytes: Vec<u8>) -> Result<Converted, LoadError> {
    let mut yaml = String::new();
    for line in bytes.split(|&b| b == b'\n') {
        let Some(rest) = line.strip_prefix(b"#") else {
            break;
        };
        let rest = String::from_utf8_lossy(rest);
        let rest = rest.trim_end_matches('\r');
        if rest.trim_start().starts_with("%ECSV") {
            continue;
        }
        yaml.push_str(rest.strip_prefix(' ').unwrap_or(rest));
        yaml.push('\n');
    }
    let bad = |message: String| LoadError::Format {
        path: path.to_string(),
        message: format!("ECSV header: {message}"),
    };
    let docs = yaml_rust2::YamlLoader::load_from_str(&yaml).map_err(|e| bad(e.to_string()))?;
    let doc = docs
        .first()
        .ok_or_else(|| bad("no YAML header after # %ECSV".into()))?;
    let delimiter = match doc["delimiter"].as_str() {
        None => b' ',
        Some(d) if d.len() == 1 => d.as_bytes()[0],
        Some(d) => return Err(bad(format!("delimiter `{d}` is not one character"))),
    };
    let columns = doc["datatype"]
        .as_vec()
        .ok_or_else(|| bad("no `datatype` list naming the columns".into()))?;
    let units = columns
        .iter()
        .map(|c| c["unit"].as_str().unwrap_or("").to_string())
        .collect();
    Ok(Converted {
        text: bytes,
        delimiter,
        units,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formats_by_name_and_by_content() {
        assert_eq!(detect("a.tbl", b"x").unwrap(), TableFormat::Ipac);
        assert_eq!(
            detect("a.txt", b"\\fixlen = T\n|a|").unwrap(),
            TableFormat::Ipac
        );
        assert_eq!(
            detect("a.dat", b"<?xml version").unwrap(),
            TableFormat::VoTable
        );
        assert_eq!(detect("a", b"SIMPLE  =  T").unwrap(), TableFormat::Fits);
        assert_eq!(detect("a.csv", b"# %ECSV 1.0").unwrap(), TableFormat::Ecsv);
        assert_eq!(
            detect("a.csv", b"star,candidate").unwrap(),
            TableFormat::Delimited
        );
        let e = detect("a.xlsx", b"PK\x03\x04rest").unwrap_err().to_string();
        assert!(e.contains("a.xlsx") && e.contains("VOTable"), "{e}");
    }

    #[test]
    fn ipac_columns_lie_between_the_bars() {
        // IRSA's IPAC table format: values between the header's | marks.
        let t = "\\ invented\n\
                 |star |cand  |depth |\n\
                 |char |char  |double|\n\
                 |     |      |ppm   |\n\
                 |null |null  |null  |\n \
                 S1    S1.01  1500  \n \
                 S2    null   null  \n";
        let c = ipac("t.tbl", t.as_bytes()).unwrap();
        let text = String::from_utf8(c.text).unwrap();
        assert_eq!(
            text,
            "#\nstar\tcand\tdepth\n#\n#\n#\nS1\tS1.01\t1500\nS2\t\t\n"
        );
        assert_eq!(c.units, ["", "", "ppm"]);
        let misaligned = "|star |cand  |\n S1    S1.01 x\n S2  S2.011  \n";
        let e = ipac("t.tbl", misaligned.as_bytes())
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("t.tbl") && e.contains("line 2") && e.contains("misaligned"),
            "{e}"
        );
        let e = ipac("t.tbl", "|star |cand  |\n S2  S2.011  \n".as_bytes())
            .unwrap_err()
            .to_string();
        assert!(e.contains("line 2") && e.contains("`star`"), "{e}");
    }

    #[test]
    fn ecsv_header_gives_units_and_delimiter() {
        // ECSV 1.0 header layout (astropy APE 6), invented columns.
        let t = "# %ECSV 1.0\n# ---\n# delimiter: ','\n# datatype:\n\
                 # - {name: star, datatype: string}\n\
                 # - {name: duration, unit: d, datatype: float64}\n\
                 # - name: depth\n#   unit: '%'\n#   datatype: float64\n\
                 # meta: !!omap\n# - {origin: invented}\n\
                 # schema: astropy-2.0\nstar,duration,depth\nS1,0.1,0.15\n";
        let c = ecsv("t.ecsv", t.as_bytes().to_vec()).unwrap();
        assert_eq!(c.delimiter, b',');
        assert_eq!(c.units, ["", "d", "%"]);
    }
}
