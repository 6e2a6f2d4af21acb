//! Output for people (aligned tables) and for scripts (CSV, JSON). Every cell
//! that came from an input file passes through [`crate::sanitize::clean`].

mod number;
mod stream;
mod table;
pub mod votable;

pub use number::{push_fixed, push_num};
pub use stream::{CsvOut, write_csv_rows, write_joined_rows, write_json_rows};
pub use table::{Table, write_table_rows};

use std::io::{self, Write};

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
    let mut s = String::new();
    push_num(&mut s, v, sig);
    s
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
}
