//! Plain text tables for people: a header row, aligned columns, two spaces
//! between, cells sanitised. [`Table`] holds its rows (the short tables);
//! [`write_table_rows`] holds none, for a row per candidate.

use std::borrow::Cow;
use std::io::{self, Write};

use super::Align;
use super::stream::in_order;
use crate::parallel::in_parts;
use crate::prefetch::each_ahead;
use crate::sanitize::clean;

/// A table that holds its rows until written.
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
        self.columns.widen(&cells);
        self.rows.push(cells);
    }

    pub fn is_empty(&self) -> bool {
        self.rows.is_empty()
    }

    pub fn write(&self, out: &mut dyn Write, indent: &str) -> io::Result<()> {
        let mut line = String::new();
        self.columns.line(indent, &self.columns.header, &mut line);
        for r in &self.rows {
            self.columns.line(indent, r, &mut line);
        }
        out.write_all(line.as_bytes())
    }
}

/// A table of `rows`, each made into `N` cells by `fill` (into cleared,
/// reused strings), written in two passes holding no row: every row is
/// measured, then the header and every row written. Both passes run on
/// every core, a part of the rows each, and the rows come out in order;
/// the bytes are those of a [`Table`] given the same rows. `ahead` as for
/// [`super::write_csv_rows`].
pub fn write_table_rows<T: Sync, const N: usize>(
    out: &mut dyn Write,
    columns: &[(&str, Align); N],
    rows: &[T],
    ahead: impl Fn(&T, bool) + Sync,
    fill: impl Fn(&T, &mut [String; N]) + Sync,
) -> io::Result<()> {
    let mut cols = Columns::new(columns);
    let blank = || -> [String; N] { std::array::from_fn(|_| String::new()) };
    let filled = |r: &T, cells: &mut [String; N]| {
        cells.iter_mut().for_each(String::clear);
        fill(r, cells);
    };
    for widths in in_parts(rows.len(), |part| {
        let (mut cells, mut widths) = (blank(), [0; N]);
        each_ahead(&rows[part], &ahead, |r| {
            filled(r, &mut cells);
            for (w, c) in widths.iter_mut().zip(&cells) {
                *w = (*w).max(width(&clean(c)));
            }
        });
        widths
    }) {
        for (w, part) in cols.width.iter_mut().zip(widths) {
            *w = (*w).max(part);
        }
    }
    let mut line = String::new();
    cols.line("", &cols.header, &mut line);
    out.write_all(line.as_bytes())?;
    in_order(rows, out, |part, buf| {
        let (mut cells, mut line) = (blank(), String::new());
        each_ahead(part, &ahead, |r| {
            filled(r, &mut cells);
            let clean: [Cow<str>; N] = std::array::from_fn(|i| clean(&cells[i]));
            cols.line("", &clean, &mut line);
        });
        buf.extend_from_slice(line.as_bytes());
    })
}

/// A table whose rows come twice (a query run twice) and are held by
/// none: every row measured, then the header and every row written. The
/// bytes are those of a [`Table`] given the same rows.
pub struct Measured {
    columns: Columns,
    line: String,
}

impl Measured {
    pub fn new(columns: &[(&str, Align)]) -> Measured {
        Measured {
            columns: Columns::new(columns),
            line: String::new(),
        }
    }

    /// Widens the columns to hold a row (the first pass).
    pub fn measure<S: AsRef<str>>(&mut self, cells: &[S]) {
        for (w, c) in self.columns.width.iter_mut().zip(cells) {
            *w = (*w).max(width(&clean(c.as_ref())));
        }
    }

    pub fn header(&mut self, out: &mut dyn Write) -> io::Result<()> {
        self.columns.line("", &self.columns.header, &mut self.line);
        self.flush(out, 0)
    }

    /// Writes a row (the second pass), a buffer at a time.
    pub fn row<S: AsRef<str>>(&mut self, cells: &[S], out: &mut dyn Write) -> io::Result<()> {
        let clean: Vec<Cow<str>> = cells.iter().map(|c| clean(c.as_ref())).collect();
        self.columns.line("", &clean, &mut self.line);
        self.flush(out, 1 << 16)
    }

    pub fn finish(&mut self, out: &mut dyn Write) -> io::Result<()> {
        self.flush(out, 0)
    }

    fn flush(&mut self, out: &mut dyn Write, past: usize) -> io::Result<()> {
        if self.line.len() >= past {
            out.write_all(self.line.as_bytes())?;
            self.line.clear();
        }
        Ok(())
    }
}

/// Characters a cell takes (its text is sanitised, so one column each).
fn width(s: &str) -> usize {
    if s.is_ascii() {
        s.len()
    } else {
        s.chars().count()
    }
}

#[derive(Debug, Default)]
struct Columns {
    header: Vec<String>,
    align: Vec<Align>,
    width: Vec<usize>,
}

impl Columns {
    fn new(columns: &[(&str, Align)]) -> Columns {
        Columns {
            header: columns.iter().map(|(h, _)| h.to_string()).collect(),
            align: columns.iter().map(|(_, a)| *a).collect(),
            width: columns.iter().map(|(h, _)| width(h)).collect(),
        }
    }

    /// Widens the columns to hold sanitised cells.
    fn widen(&mut self, cells: &[String]) {
        for (w, c) in self.width.iter_mut().zip(cells) {
            *w = (*w).max(width(c));
        }
    }

    /// Appends one line of sanitised cells to `s`: each padded to its
    /// column, two spaces between, the line's end trimmed.
    fn line<S: AsRef<str>>(&self, indent: &str, cells: &[S], s: &mut String) {
        let n = self.header.len();
        let start = s.len();
        s.push_str(indent);
        for (i, c) in cells.iter().enumerate().take(n) {
            let c = c.as_ref();
            let pad = self.width[i].saturating_sub(width(c));
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
        let kept = s[start..].trim_end().len();
        s.truncate(start + kept);
        s.push('\n');
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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

    #[test]
    fn rows_written_in_parts_are_the_table_of_the_same_rows() {
        // Enough rows for several rounds of parts, cells of every kind:
        // wide ones late, non-ASCII, to be sanitised, empty last cells.
        let cols = [
            ("star", Align::Left),
            ("n", Align::Right),
            ("note", Align::Left),
        ];
        let rows: Vec<u32> = (0..50_000).collect();
        let fill = |&r: &u32, c: &mut [String; 3]| {
            c[0].push_str(["S", "ünï", "tab\there"][r as usize % 3]);
            c[1].push_str(&(r * r % 997).to_string());
            if r == 49_000 {
                c[1].push_str("123456789");
            }
            c[2].push_str(["", "a note", " trailing "][r as usize % 3]);
        };
        let mut want = Table::new(&cols);
        for r in &rows {
            let mut c: [String; 3] = Default::default();
            fill(r, &mut c);
            want.row(&c);
        }
        let mut a = Vec::new();
        want.write(&mut a, "").unwrap();
        let mut b = Vec::new();
        write_table_rows(&mut b, &cols, &rows, crate::prefetch::nothing, fill).unwrap();
        assert_eq!(String::from_utf8(b).unwrap(), String::from_utf8(a).unwrap());
    }
}
