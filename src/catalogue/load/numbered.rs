//! Tables that number each star's signals instead of naming them. The
//! archives' threshold-crossing event tables give a star id and the number
//! of the signal on that star (`kepid` or `ticid` with `tce_plnt_num`, from
//! memory of their column lists) and no candidate id. Such a table is read
//! with a last column, `candidate_id`, of `<star>.<nn>` (`1234567.01`): the
//! way the archives name a star's candidates, so that its candidate family
//! is its star.

use super::LoadError;
use super::records::first_record_end;
use crate::catalogue::{ColumnMap, Field};

/// Header names (lower case) of a column that numbers each star's signals.
pub const NUMBER_NAMES: [&str; 4] = ["tce_plnt_num", "plnt_num", "planet_num", "planet_number"];

/// The header of the candidate column written for a numbered table.
pub const WRITTEN_HEADER: &str = "candidate_id";

/// Where a table numbers its signals instead of naming them: (star column,
/// number column), when the header has a star column and a number column
/// but nothing that names the candidate (neither a header nor the column
/// map).
pub(super) fn columns(header: &[String], map: &ColumnMap) -> Option<(usize, usize)> {
    let named = |f: Field| {
        map.fields.get(&f).and_then(|want| {
            header
                .iter()
                .position(|h| h == want)
                .or_else(|| header.iter().position(|h| h.eq_ignore_ascii_case(want)))
        })
    };
    if map.fields.contains_key(&Field::Candidate)
        || header
            .iter()
            .any(|h| Field::from_header(h) == Some(Field::Candidate))
    {
        return None;
    }
    let star = named(Field::Star).or_else(|| {
        header
            .iter()
            .position(|h| Field::from_header(h) == Some(Field::Star))
    })?;
    let number = header.iter().position(|h| {
        let h = h.trim().to_ascii_lowercase();
        NUMBER_NAMES.contains(&h.as_str())
    })?;
    Some((star, number))
}

/// The candidate of a row whose star cell is `star` and number cell
/// `number`: `<star>.<nn>`, the number zero-padded to two digits; the cell
/// as written after the dot where it is not a whole number; empty (a row
/// the loader skips, saying why) where either cell is.
pub fn candidate_of(star: &str, number: &str) -> String {
    let (star, number) = (star.trim(), number.trim());
    if star.is_empty() || number.is_empty() {
        return String::new();
    }
    match number.parse::<f64>() {
        Ok(n) if n.is_finite() && n >= 0.0 && n.fract() == 0.0 && n < 1e9 => {
            format!("{star}.{:02}", n as u64)
        }
        _ => format!("{star}.{number}"),
    }
}

/// The table `text` (all of it, from its first byte) with a last column
/// [`WRITTEN_HEADER`]: the header gains its name and every row its
/// candidate ([`candidate_of`]). Every record stays on the line it was on,
/// so the loader's line numbers are those of the file; comment and blank
/// lines become blank lines, and a quoted line break stays inside its
/// field.
pub(super) fn with_candidates(
    path: &str,
    text: &[u8],
    delimiter: u8,
    (star, number): (usize, usize),
) -> Result<Vec<u8>, LoadError> {
    let fail = |e: csv::Error| LoadError::Format {
        path: path.to_string(),
        message: format!("while naming the candidates of a numbered table: {e}"),
    };
    let mut out: Vec<u8> = Vec::with_capacity(text.len() + text.len() / 8);
    let (mut pos, mut first) = (0, true);
    while pos < text.len() {
        let line_end = memchr::memchr(b'\n', &text[pos..]).map_or(text.len(), |i| pos + i + 1);
        let line = text[pos..line_end].trim_ascii();
        if line.is_empty() || line.starts_with(b"#") {
            out.push(b'\n');
            pos = line_end;
            continue;
        }
        // One record, where the loader's reader would end it (a quoted
        // field may hold line breaks).
        let end = first_record_end(&text[pos..]).map_or(text.len(), |e| pos + e);
        let record = &text[pos..end];
        pos = end;
        let mut rec = csv::ByteRecord::new();
        csv::ReaderBuilder::new()
            .delimiter(delimiter)
            .has_headers(false)
            .flexible(true)
            .buffer_capacity(256)
            .from_reader(record)
            .read_byte_record(&mut rec)
            .map_err(fail)?;
        let cell = |i: usize| String::from_utf8_lossy(rec.get(i).unwrap_or_default()).into_owned();
        let candidate = if first {
            WRITTEN_HEADER.to_string()
        } else {
            candidate_of(&cell(star), &cell(number))
        };
        first = false;
        // Written through a writer of its own (which quotes what needs
        // quoting), on as many lines as it was.
        let mut w = csv::WriterBuilder::new()
            .delimiter(delimiter)
            .flexible(true)
            .buffer_capacity(256)
            .terminator(csv::Terminator::Any(b'\n'))
            .from_writer(&mut out);
        w.write_record(rec.iter().chain([candidate.as_bytes()]))
            .map_err(fail)?;
        w.flush().map_err(|e| fail(e.into()))?;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_stars_numbered_signals_are_named_star_dot_number() {
        assert_eq!(candidate_of("1234567", "1"), "1234567.01");
        assert_eq!(candidate_of(" 1234567 ", "12"), "1234567.12");
        assert_eq!(candidate_of("1234567", "2.0"), "1234567.02");
        assert_eq!(candidate_of("1234567", "b"), "1234567.b");
        assert_eq!(candidate_of("1234567", ""), "");
        assert_eq!(candidate_of("", "1"), "");
    }

    #[test]
    fn records_keep_their_lines_and_gain_a_candidate() {
        let text = b"# a comment\nticid,tce_plnt_num,tce_period\n1,1,3.5\n\n# note\n1,2,\"7.9\"\n2,1,\"a\nb\"\n3,1,4\n";
        let out = with_candidates("t.csv", text, b',', (0, 1)).unwrap();
        assert_eq!(
            String::from_utf8(out).unwrap(),
            "\nticid,tce_plnt_num,tce_period,candidate_id\n1,1,3.5,1.01\n\n\n1,2,7.9,1.02\n2,1,\"a\nb\",2.01\n3,1,4,3.01\n"
        );
    }

    #[test]
    fn only_a_table_with_no_candidate_column_is_numbered() {
        let h = |names: &[&str]| names.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        let map = ColumnMap::default();
        assert_eq!(
            columns(&h(&["kepid", "tce_plnt_num", "tce_period"]), &map),
            Some((0, 1))
        );
        assert_eq!(
            columns(&h(&["kepid", "kepoi_name", "tce_plnt_num"]), &map),
            None
        );
        assert_eq!(columns(&h(&["tce_plnt_num", "tce_period"]), &map), None);
    }
}
