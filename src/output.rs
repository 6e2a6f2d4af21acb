//! Output for people (aligned tables) and for scripts (CSV, JSON). Every cell
//! that came from an input file passes through [`crate::sanitize::clean`].

mod stream;
pub mod votable;

pub use stream::{CsvOut, write_json_rows};

use std::io::{self, Write};

use crate::sanitize::clean;

/// The `--format` of a headless command.
#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    Table,
    Csv,
    Json,
}

/// Column alignment in a table for people.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Align {
    Left,
    Right,
}

/// A plain text table: a header row, aligned columns, two spaces between.
#[derive(Debug, Default)]
pub struct Table {
    columns: Columns,
    rows: Vec<Vec<String>>,
}

impl Table {
    pub fn new(columns: &[(&str, Align)]) -> Table {
        Table {
            columns: Columns::new(columns),
            rows: Vec::new(),
        }
    }

    /// Adds a row; cells are sanitised here.
    pub fn row<S: AsRef<str>>(&mut self, cells: &[S]) {
        let cells: Vec<String> = cells
            .iter()
            .map(|c| clean(c.as_ref()).into_owned())
            .collect();
        self.columns.measure_clean(&cells);
        self.rows.push(cells);
    }

    pub fn is_empty(&self) -> bool {
        self.rows.is_empty()
    }

    pub fn write(&self, out: &mut dyn Write, indent: &str) -> io::Result<()> {
        self.columns.write_header(out, indent)?;
        for r in &self.rows {
            self.columns.write_clean(out, indent, r)?;
        }
        Ok(())
    }
}

/// The columns of a table written in two passes over its rows, holding no
/// row: every row is measured (`measure`), then the header and every row
/// written (`write_row`); the result is the same as [`Table`]'s, with
/// memory bounded by one row.
#[derive(Debug, Default)]
pub struct Columns {
    header: Vec<String>,
    align: Vec<Align>,
    width: Vec<usize>,
}

impl Columns {
    pub fn new(columns: &[(&str, Align)]) -> Columns {
        Columns {
            header: columns.iter().map(|(h, _)| h.to_string()).collect(),
            align: columns.iter().map(|(_, a)| *a).collect(),
            width: columns.iter().map(|(h, _)| h.chars().count()).collect(),
        }
    }

    /// Widens the columns to hold a row (cells sanitised as written).
    pub fn measure<S: AsRef<str>>(&mut self, cells: &[S]) {
        for (i, c) in cells.iter().enumerate().take(self.width.len()) {
            let n = clean(c.as_ref()).chars().count();
            self.width[i] = self.width[i].max(n);
        }
    }

    fn measure_clean(&mut self, cells: &[String]) {
        for (i, c) in cells.iter().enumerate().take(self.width.len()) {
            self.width[i] = self.width[i].max(c.chars().count());
        }
    }

    pub fn write_header(&self, out: &mut dyn Write, indent: &str) -> io::Result<()> {
        self.write_clean(out, indent, &self.header)
    }

    /// Writes one row (cells sanitised here).
    pub fn write_row<S: AsRef<str>>(
        &self,
        out: &mut dyn Write,
        indent: &str,
        cells: &[S],
    ) -> io::Result<()> {
        let cells: Vec<std::borrow::Cow<str>> = cells.iter().map(|c| clean(c.as_ref())).collect();
        self.write_clean(out, indent, &cells)
    }

    fn write_clean<S: AsRef<str>>(
        &self,
        out: &mut dyn Write,
        indent: &str,
        cells: &[S],
    ) -> io::Result<()> {
        let n = self.header.len();
        let mut s = String::from(indent);
        for (i, c) in cells.iter().enumerate().take(n) {
            let c = c.as_ref();
            let pad = self.width[i].saturating_sub(c.chars().count());
            let last = i + 1 == n;
            match self.align[i] {
                Align::Right => {
                    s.extend(std::iter::repeat_n(' ', pad));
                    s.push_str(c);
                }
                Align::Left => {
                    s.push_str(c);
                    if !last {
                        s.extend(std::iter::repeat_n(' ', pad));
                    }
                }
            }
            if !last {
                s.push_str("  ");
            }
        }
        writeln!(out, "{}", s.trim_end())
    }
}

/// A CSV writer over `out` with sanitised text cells.
pub fn csv_writer(out: &mut dyn Write) -> csv::Writer<&mut dyn Write> {
    csv::WriterBuilder::new().from_writer(out)
}

/// Writes a JSON value, pretty, with a final newline. serde_json escapes C0
/// controls; text cells are sanitised by the callers for DEL and C1.
pub fn write_json(out: &mut dyn Write, value: &serde_json::Value) -> io::Result<()> {
    serde_json::to_writer_pretty(&mut *out, value)?;
    writeln!(out)
}

/// Writes `bytes` to `path` through a temporary file and a rename, so a
/// reader never sees half a file.
pub fn write_atomically(path: &std::path::Path, bytes: &[u8]) -> io::Result<()> {
    let tmp = path.with_extension(format!("tmp-{}", std::process::id()));
    std::fs::write(&tmp, bytes)?;
    std::fs::rename(&tmp, path)
}

/// A number for people: up to `sig` significant digits, no exponent for
/// everyday magnitudes, `-` for missing.
pub fn num(v: Option<f64>, sig: usize) -> String {
    match v {
        None => "-".into(),
        Some(v) if !v.is_finite() => "-".into(),
        Some(0.0) => "0".into(),
        Some(v) => {
            let mag = v.abs().log10().floor() as i32;
            if !(-4..=9).contains(&mag) {
                return format!("{:.*e}", sig.saturating_sub(1), v);
            }
            let decimals = (sig as i32 - 1 - mag).max(0) as usize;
            let s = format!("{v:.decimals$}");
            if s.contains('.') {
                s.trim_end_matches('0').trim_end_matches('.').to_string()
            } else {
                s
            }
        }
    }
}

/// A number for scripts: full precision (shortest round-trip form), empty
/// for missing.
pub fn exact(v: Option<f64>) -> String {
    exact_in(&mut ryu::Buffer::new(), v).to_string()
}

/// [`exact`] into a reusable buffer, for hot output loops.
pub fn exact_in(b: &mut ryu::Buffer, v: Option<f64>) -> &str {
    match v {
        Some(v) if v.is_finite() => {
            // Ryu's shortest round-trip digits (Adams 2018), without a bare ".0".
            let s = b.format_finite(v);
            s.strip_suffix(".0").unwrap_or(s)
        }
        _ => "",
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_for_people() {
        assert_eq!(num(Some(52.7143), 3), "52.7");
        assert_eq!(num(Some(0.001899), 4), "0.001899");
        assert_eq!(num(Some(156453.0), 3), "156453");
        assert_eq!(num(Some(1.0e-6), 3), "1.00e-6");
        assert_eq!(num(None, 3), "-");
        assert_eq!(num(Some(f64::NAN), 3), "-");
        assert_eq!(exact(Some(0.1)), "0.1");
        assert_eq!(exact(Some(100.0)), "100");
        assert_eq!(exact(Some(-2.5e-7)).parse::<f64>().unwrap(), -2.5e-7);
        assert_eq!(exact(Some(0.9988901220865705)), "0.9988901220865705");
        assert_eq!(exact(None), "");
    }

    #[test]
    fn table_aligns_and_sanitises() {
        let mut t = Table::new(&[("id", Align::Left), ("k", Align::Right)]);
        t.row(&["a\u{1b}b", "1"]);
        t.row(&["long-id", "12"]);
        let mut out = Vec::new();
        t.write(&mut out, "").unwrap();
        let s = String::from_utf8(out).unwrap();
        assert_eq!(s, "id        k\na\\x1bb    1\nlong-id  12\n");
    }
}
