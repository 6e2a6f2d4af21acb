//! A VOTable's first table (IVOA VOTable 1.4), read through the `quick-xml`
//! crate: FIELD names, datatypes and units, `VALUES null` markers, and the
//! rows, as TABLEDATA (TR/TD) or as a base64 BINARY or BINARY2 stream.

use quick_xml::events::{BytesStart, Event};
use quick_xml::reader::Reader;

use super::{Converted, push_cell};
use crate::catalogue::LoadError;

struct Column {
    name: String,
    unit: String,
    null: Option<String>,
    /// The VOTable datatype (`double`, `char`...) and arraysize, for the
    /// binary serialisations.
    datatype: String,
    arraysize: Option<String>,
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
    // BINARY (false) or BINARY2 (true), and the base64 text of its STREAM.
    let mut binary: Option<bool> = None;
    let (mut in_stream, mut stream) = (false, Vec::new());
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
                        datatype: attr(&e, b"datatype").unwrap_or_default(),
                        arraysize: attr(&e, b"arraysize"),
                    });
                    in_field = !empty;
                }
                b"VALUES" if in_field => {
                    if let (Some(c), Some(n)) = (columns.last_mut(), attr(&e, b"null")) {
                        c.null = Some(n);
                    }
                }
                b"FITS" if in_table => {
                    return Err(bad(
                        line_at(bytes, at),
                        "the table's data is FITS serialised; starsift reads TABLEDATA, BINARY \
                         and BINARY2 (save the table with one of those, e.g. from TOPCAT or astropy)"
                            .into(),
                    ));
                }
                b"BINARY" | b"BINARY2" if in_table => {
                    binary = Some(e.local_name().as_ref() == b"BINARY2");
                }
                b"STREAM" if binary.is_some() => {
                    if attr(&e, b"href").is_some() {
                        return Err(bad(
                            line_at(bytes, at),
                            "the table's data is in an external stream (href); starsift reads \
                             the data inside the file"
                                .into(),
                        ));
                    }
                    in_stream = true;
                    stream.clear();
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
            Event::Text(t) if in_stream => {
                stream.extend(t.iter().filter(|b| !b.is_ascii_whitespace()))
            }
            Event::End(e) => match e.local_name().as_ref() {
                b"TD" if in_td => {
                    in_td = false;
                    ends.push(row.len());
                }
                b"FIELD" => in_field = false,
                b"STREAM" if in_stream => {
                    in_stream = false;
                    use base64::Engine as _;
                    let data = base64::engine::general_purpose::STANDARD
                        .decode(&stream)
                        .map_err(|e| bad(line_at(bytes, at), format!("the base64 stream: {e}")))?;
                    if !header_done {
                        write_header(&columns, &mut out);
                        header_done = true;
                    }
                    rows += decode_rows(&data, &columns, binary == Some(true), &mut out)
                        .map_err(|m| bad(line_at(bytes, at), m))?;
                }
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

/// Bytes of one value of a VOTable datatype (VOTable 1.4, §2.1, Table 1);
/// `bit` is counted apart.
fn value_size(datatype: &str) -> Option<usize> {
    Some(match datatype {
        "boolean" | "unsignedByte" | "char" => 1,
        "short" | "unicodeChar" => 2,
        "int" | "float" => 4,
        "long" | "double" | "floatComplex" => 8,
        "doubleComplex" => 16,
        _ => return None,
    })
}

/// The rows of a BINARY or BINARY2 stream (VOTable 1.4, §5.4–5.5): per row,
/// BINARY2's null flags (one bit per field, most significant first), then
/// each field big-endian, a variable-length array after a 4-byte count.
/// Written as tab-separated rows; returns how many.
fn decode_rows(
    data: &[u8],
    columns: &[Column],
    binary2: bool,
    out: &mut Vec<u8>,
) -> Result<usize, String> {
    let flag_bytes = if binary2 {
        columns.len().div_ceil(8)
    } else {
        0
    };
    let mut pos = 0usize;
    let mut rows = 0usize;
    let take = |pos: &mut usize, n: usize| -> Result<std::ops::Range<usize>, String> {
        let end = pos
            .checked_add(n)
            .filter(|&e| e <= data.len())
            .ok_or_else(|| format!("the binary stream ends inside a value (byte {pos})"))?;
        let r = *pos..end;
        *pos = end;
        Ok(r)
    };
    let mut text = String::new();
    let mut b = ryu::Buffer::new();
    while pos < data.len() {
        let flags = data[take(&mut pos, flag_bytes)?].to_vec();
        for (k, c) in columns.iter().enumerate() {
            let null = binary2 && flags[k / 8] & (0x80 >> (k % 8)) != 0;
            let count = match c.arraysize.as_deref().map(str::trim) {
                None | Some("") | Some("1") => 1,
                Some(a) if a.ends_with('*') => {
                    let r = take(&mut pos, 4)?;
                    u32::from_be_bytes([
                        data[r.start],
                        data[r.start + 1],
                        data[r.start + 2],
                        data[r.start + 3],
                    ]) as usize
                }
                Some(a) => a
                    .split('x')
                    .map(|d| d.trim().parse::<usize>().unwrap_or(1))
                    .product(),
            };
            text.clear();
            if c.datatype == "bit" {
                take(&mut pos, count.div_ceil(8))?;
            } else {
                let size = value_size(&c.datatype).ok_or_else(|| {
                    format!(
                        "FIELD {}: datatype `{}` is not one VOTable defines",
                        c.name, c.datatype
                    )
                })?;
                let r = take(&mut pos, size.saturating_mul(count))?;
                let v = &data[r];
                match c.datatype.as_str() {
                    "char" => text.push_str(
                        String::from_utf8_lossy(v)
                            .split('\0')
                            .next()
                            .unwrap_or("")
                            .trim(),
                    ),
                    "unicodeChar" => {
                        let units: Vec<u16> = v
                            .chunks(2)
                            .map(|p| u16::from_be_bytes([p[0], p[1]]))
                            .collect();
                        text.push_str(
                            String::from_utf16_lossy(&units)
                                .split('\0')
                                .next()
                                .unwrap_or("")
                                .trim(),
                        );
                    }
                    _ => {
                        for (i, x) in v.chunks(size).enumerate() {
                            if i > 0 {
                                text.push(' ');
                            }
                            match c.datatype.as_str() {
                                "boolean" => text.push(match x[0] {
                                    b'T' | b't' | b'1' => 'T',
                                    b'F' | b'f' | b'0' => 'F',
                                    _ => ' ',
                                }),
                                "unsignedByte" => text.push_str(&x[0].to_string()),
                                "short" => {
                                    text.push_str(&i16::from_be_bytes([x[0], x[1]]).to_string())
                                }
                                "int" => text.push_str(
                                    &i32::from_be_bytes([x[0], x[1], x[2], x[3]]).to_string(),
                                ),
                                "long" => text.push_str(
                                    &i64::from_be_bytes(x[..8].try_into().unwrap_or([0; 8]))
                                        .to_string(),
                                ),
                                "float" => {
                                    let f = f32::from_be_bytes([x[0], x[1], x[2], x[3]]);
                                    if f.is_finite() {
                                        text.push_str(b.format_finite(f));
                                    }
                                }
                                "double" => {
                                    let f = f64::from_be_bytes(x[..8].try_into().unwrap_or([0; 8]));
                                    if f.is_finite() {
                                        text.push_str(b.format_finite(f));
                                    }
                                }
                                _ => {} // complex numbers: no catalogue field reads them
                            }
                        }
                    }
                }
            }
            let is_null = null || c.null.as_deref().is_some_and(|n| n == text.trim());
            push_cell(out, if is_null { "" } else { text.trim() }, k == 0);
        }
        out.push(b'\n');
        rows += 1;
    }
    Ok(rows)
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

    #[test]
    fn binary2_streams_decode_with_their_null_flags() {
        // VOTable 1.4 §5.5 (BINARY2): per row a null-flag byte for two
        // fields, a variable char array after its 4-byte count, a double.
        use base64::Engine as _;
        let mut data = Vec::new();
        data.push(0x00);
        data.extend(2u32.to_be_bytes());
        data.extend(b"S1");
        data.extend(3.5f64.to_be_bytes());
        data.push(0x40); // the second field is null
        data.extend(2u32.to_be_bytes());
        data.extend(b"S2");
        data.extend(0f64.to_be_bytes());
        let b64 = base64::engine::general_purpose::STANDARD.encode(&data);
        let x = format!(
            "<VOTABLE><RESOURCE><TABLE><FIELD name=\"star\" datatype=\"char\" arraysize=\"*\"/>\
             <FIELD name=\"period\" datatype=\"double\" unit=\"d\"/><DATA><BINARY2>\
             <STREAM encoding=\"base64\">{b64}</STREAM></BINARY2></DATA></TABLE></RESOURCE></VOTABLE>"
        );
        let c = convert("t.vot", x.as_bytes()).unwrap();
        assert_eq!(
            String::from_utf8(c.text).unwrap(),
            "star\tperiod\nS1\t3.5\nS2\t\n"
        );
        // A stream cut inside a value is an error naming the file.
        let cut = base64::engine::general_purpose::STANDARD.encode(&data[..12]);
        let x = x.replace(&b64, &cut);
        let e = convert("t.vot", x.as_bytes()).unwrap_err().to_string();
        assert!(
            e.contains("t.vot") && e.contains("ends inside a value"),
            "{e}"
        );
    }
}
