//! A VOTable's first table (IVOA VOTable 1.4), TABLEDATA serialisation,
//! read through the `quick-xml` crate: FIELD names and units, `VALUES null`
//! markers, and the TR/TD rows.

use quick_xml::events::{BytesStart, Event};
use quick_xml::reader::Reader;

use super::{Converted, push_cell};
use crate::catalogue::LoadError;

struct Column {
    name: String,
    unit: String,
    null: Option<String>,
}

fn attr(e: &BytesStart, key: &[u8]) -> Option<String> {
    e.attributes()
        .flatten()
        .find(|a| a.key.local_name().as_ref() == key)
        .and_then(|a| a.unescape_value().ok().map(|v| v.into_owned()))
}

/// The line of a byte offset, for messages.
fn line_at(bytes: &[u8], pos: usize) -> usize {
    bytes[..pos.min(bytes.len())]
        .iter()
        .filter(|&&b| b == b'\n')
        .count()
        + 1
}

pub fn convert(path: &str, bytes: &[u8]) -> Result<Converted, LoadError> {
    let bad = |line: usize, message: String| LoadError::Format {
        path: path.to_string(),
        message: format!("VOTable: line {line}: {message}"),
    };
    let mut r = Reader::from_reader(bytes);
    let mut columns: Vec<Column> = Vec::new();
    let mut out: Vec<u8> = Vec::with_capacity(bytes.len() / 2);
    let (mut in_table, mut in_field, mut in_td, mut header_done) = (false, false, false, false);
    let mut tables = 0;
    // The cells of the row being read: their text end to end, and where
    // each ends (no allocation per cell).
    let mut row = String::new();
    let mut ends: Vec<usize> = Vec::new();
    let mut rows = 0usize;
    loop {
        let at = r.buffer_position() as usize;
        let event = r
            .read_event()
            .map_err(|e| bad(line_at(bytes, at), format!("not well-formed XML: {e}")))?;
        let empty = matches!(event, Event::Empty(_));
        let empty_td = matches!(&event, Event::Empty(e) if e.local_name().as_ref() == b"TD");
        match event {
            Event::Start(e) | Event::Empty(e) if !in_td => match e.local_name().as_ref() {
                b"TABLE" => {
                    tables += 1;
                    in_table = tables == 1;
                }
                b"FIELD" if in_table => {
                    columns.push(Column {
                        name: attr(&e, b"name")
                            .or_else(|| attr(&e, b"ID"))
                            .unwrap_or_else(|| format!("col{}", columns.len() + 1)),
                        unit: attr(&e, b"unit").unwrap_or_default(),
                        null: None,
                    });
                    in_field = !empty;
                }
                b"VALUES" if in_field => {
                    if let (Some(c), Some(n)) = (columns.last_mut(), attr(&e, b"null")) {
                        c.null = Some(n);
                    }
                }
                b"BINARY" | b"BINARY2" | b"FITS" if in_table => {
                    return Err(bad(
                        line_at(bytes, at),
                        format!(
                            "the table's data is {} serialised; starsift reads TABLEDATA \
                                 (save the table with TABLEDATA, e.g. from TOPCAT or astropy)",
                            String::from_utf8_lossy(e.local_name().as_ref())
                        ),
                    ));
                }
                b"TR" if in_table => {
                    if !header_done {
                        write_header(&columns, &mut out);
                        header_done = true;
                    }
                    row.clear();
                    ends.clear();
                }
                b"TD" if in_table => in_td = true,
                _ => {}
            },
            Event::Text(t) if in_td => {
                let text = t
                    .unescape()
                    .map_err(|e| bad(line_at(bytes, at), format!("a cell's text: {e}")))?;
                row.push_str(&text);
            }
            Event::CData(t) if in_td => row.push_str(&String::from_utf8_lossy(&t)),
            Event::End(e) => match e.local_name().as_ref() {
                b"TD" if in_td => {
                    in_td = false;
                    ends.push(row.len());
                }
                b"FIELD" => in_field = false,
                b"TR" if in_table => {
                    rows += 1;
                    if ends.len() > columns.len() {
                        return Err(bad(
                            line_at(bytes, at),
                            format!(
                                "row {rows} has {} cells but the table has {} FIELDs",
                                ends.len(),
                                columns.len()
                            ),
                        ));
                    }
                    for (k, c) in columns.iter().enumerate() {
                        let start = if k == 0 {
                            0
                        } else {
                            ends.get(k - 1).copied().unwrap_or(row.len())
                        };
                        let v = ends.get(k).map_or("", |&e| row[start..e].trim());
                        let null = c.null.as_deref().is_some_and(|n| n == v);
                        push_cell(&mut out, if null { "" } else { v }, k == 0);
                    }
                    out.push(b'\n');
                }
                b"TABLE" if in_table => break,
                _ => {}
            },
            Event::Eof => break,
            _ => {}
        }
        // An empty `<TD/>` is a cell with no text.
        if empty_td && in_td {
            in_td = false;
            ends.push(row.len());
        }
    }
    if columns.is_empty() {
        return Err(LoadError::Format {
            path: path.to_string(),
            message: "VOTable: no TABLE with FIELD elements".into(),
        });
    }
    if !header_done {
        write_header(&columns, &mut out);
    }
    Ok(Converted {
        text: out,
        delimiter: b'\t',
        units: columns.into_iter().map(|c| c.unit).collect(),
    })
}

fn write_header(columns: &[Column], out: &mut Vec<u8>) {
    for (k, c) in columns.iter().enumerate() {
        push_cell(out, &c.name, k == 0);
    }
    out.push(b'\n');
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn tabledata_rows_with_units_and_nulls() {
        // VOTable 1.4 (IVOA Recommendation 2019), section 5: TABLEDATA.
        let x = r#"<?xml version="1.0"?>
<VOTABLE version="1.4"><RESOURCE><TABLE>
<FIELD name="star" datatype="char" arraysize="*"/>
<FIELD name="period" datatype="double" unit="d"/>
<FIELD name="n" datatype="int"><VALUES null="-1"/></FIELD>
<DATA><TABLEDATA>
<TR><TD>S&amp;1</TD><TD>3.5</TD><TD>-1</TD></TR>
<TR><TD>S2</TD><TD/><TD>4</TD></TR>
</TABLEDATA></DATA></TABLE></RESOURCE></VOTABLE>"#;
        let c = convert("t.vot", x.as_bytes()).unwrap();
        assert_eq!(
            String::from_utf8(c.text).unwrap(),
            "star\tperiod\tn\nS&1\t3.5\t\nS2\t\t4\n"
        );
        assert_eq!(c.units, ["", "d", ""]);
        let e = convert(
            "t.vot",
            b"<VOTABLE><TABLE><FIELD name='a'/><DATA><TABLEDATA><TR><TD>1</TD><TD>2</TD></TR>",
        )
        .unwrap_err()
        .to_string();
        assert!(
            e.contains("t.vot") && e.contains("row 1 has 2 cells"),
            "{e}"
        );
    }
}
