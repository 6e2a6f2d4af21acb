//! Output that streams: rows written as they are computed, through one
//! reused buffer, so a command's memory does not grow with its output. The
//! bytes are those of the general writers (the `csv` crate's, serde_json's
//! pretty printer), which the tests hold them to.

use std::cell::RefCell;
use std::io::{self, Write};

use serde::ser::{Serialize, SerializeMap, Serializer};
use serde_json::Value;

use super::exact_in;

/// CSV written row by row into one reused buffer, for the long outputs:
/// numbers straight from `ryu`/`itoa`, no allocation per cell. The bytes
/// are those of [`csv_writer`] (RFC 4180 as the `csv` crate writes it by
/// default: a field is quoted only when it holds a comma, a quote, CR or
/// LF, a quote inside doubled; `\n` ends a row). Rows of one empty field,
/// which that writer spells `""`, are never written here.
pub struct CsvOut<'a> {
    out: &'a mut dyn Write,
    buf: Vec<u8>,
    ryu: ryu::Buffer,
    /// Whether the next field is the first of its row.
    first: bool,
}

impl<'a> CsvOut<'a> {
    pub fn new(out: &'a mut dyn Write) -> CsvOut<'a> {
        CsvOut {
            out,
            buf: Vec::with_capacity(1 << 17),
            ryu: ryu::Buffer::new(),
            first: true,
        }
    }

    fn separate(&mut self) {
        if !self.first {
            self.buf.push(b',');
        }
        self.first = false;
    }

    /// A text field, quoted when it must be.
    pub fn text(&mut self, s: impl AsRef<[u8]>) {
        self.separate();
        let s = s.as_ref();
        if s.iter().any(|&b| matches!(b, b',' | b'"' | b'\r' | b'\n')) {
            self.buf.push(b'"');
            for &b in s {
                if b == b'"' {
                    self.buf.push(b'"');
                }
                self.buf.push(b);
            }
            self.buf.push(b'"');
        } else {
            self.buf.extend_from_slice(s);
        }
    }

    /// A text field built in place by `write` (a list, a sentence).
    pub fn text_with(&mut self, write: impl FnOnce(&mut Vec<u8>)) {
        self.separate();
        let start = self.buf.len();
        write(&mut self.buf);
        let needs = self.buf[start..]
            .iter()
            .any(|&b| matches!(b, b',' | b'"' | b'\r' | b'\n'));
        if needs {
            let raw = self.buf.split_off(start);
            self.first = true;
            self.text(raw);
        }
    }

    /// A number as [`exact`] writes it (empty when missing or not finite).
    pub fn exact(&mut self, v: Option<f64>) {
        self.separate();
        let s = exact_in(&mut self.ryu, v);
        self.buf.extend_from_slice(s.as_bytes());
    }

    /// A whole number.
    pub fn int(&mut self, n: impl itoa::Integer) {
        self.separate();
        self.buf
            .extend_from_slice(itoa::Buffer::new().format(n).as_bytes());
    }

    /// Ends the row; the buffer goes out once it holds 64 KiB.
    pub fn end_row(&mut self) -> io::Result<()> {
        self.buf.push(b'\n');
        self.first = true;
        if self.buf.len() >= 1 << 16 {
            self.out.write_all(&self.buf)?;
            self.buf.clear();
        }
        Ok(())
    }

    /// A whole row of text fields (a header).
    pub fn row<S: AsRef<[u8]>>(&mut self, cells: impl IntoIterator<Item = S>) -> io::Result<()> {
        for c in cells {
            self.text(c);
        }
        self.end_row()
    }

    /// Writes what is left and flushes.
    pub fn finish(mut self) -> io::Result<()> {
        self.out.write_all(&self.buf)?;
        self.buf.clear();
        self.out.flush()
    }
}

/// Writes, pretty and with a final newline, the JSON object of `head`'s
/// members in order and then `key`: the list of `rows`, each serialised as
/// it comes. The bytes are those of [`super::write_json`] given the whole
/// object, without holding it.
pub fn write_json_rows<R: Serialize>(
    out: &mut dyn Write,
    head: Vec<(&str, Value)>,
    key: &str,
    rows: impl Iterator<Item = R>,
) -> io::Result<()> {
    let mut out = io::BufWriter::with_capacity(1 << 17, out);
    let object = Object {
        head,
        key,
        rows: RefCell::new(Some(rows)),
    };
    serde_json::to_writer_pretty(&mut out, &object)?;
    writeln!(out)?;
    out.flush()
}

struct Object<'a, I> {
    head: Vec<(&'a str, Value)>,
    key: &'a str,
    /// Taken once, when the list is written.
    rows: RefCell<Option<I>>,
}

impl<I: Iterator<Item = R>, R: Serialize> Serialize for Object<'_, I> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut map = s.serialize_map(Some(self.head.len() + 1))?;
        for (k, v) in &self.head {
            map.serialize_entry(k, v)?;
        }
        map.serialize_entry(self.key, &Rows(&self.rows))?;
        map.end()
    }
}

struct Rows<'a, I>(&'a RefCell<Option<I>>);

impl<I: Iterator<Item = R>, R: Serialize> Serialize for Rows<'_, I> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let rows = self.0.borrow_mut().take();
        s.collect_seq(rows.into_iter().flatten())
    }
}

#[cfg(test)]
mod tests {
    use super::super::{csv_writer, exact, write_json};
    use super::*;

    #[test]
    fn csv_out_writes_what_the_csv_crate_writes() {
        // The csv crate is the reference: the same rows through both.
        let rows: Vec<Vec<&str>> = vec![
            vec!["star", "candidate", "note"],
            vec!["S1", "S1-1", "plain"],
            vec!["S2", "", "a, b"],
            vec!["S\"3", "x\ny", "cr\rhere"],
            vec!["", "", ""],
            vec!["ünï", "tab\there", "\"\""],
        ];
        let mut want = Vec::new();
        {
            let mut w = csv_writer(&mut want);
            for r in &rows {
                w.write_record(r).unwrap();
            }
            w.write_record([exact(Some(0.1)), exact(None), 42.to_string()])
                .unwrap();
            w.flush().unwrap();
        }
        let mut got = Vec::new();
        {
            let mut w = CsvOut::new(&mut got);
            for r in &rows {
                w.row(r).unwrap();
            }
            w.exact(Some(0.1));
            w.exact(None);
            w.int(42u32);
            w.end_row().unwrap();
            w.text_with(|b| b.extend_from_slice(b"one;two"));
            w.text_with(|b| b.extend_from_slice(b"needs, quotes"));
            w.end_row().unwrap();
            w.finish().unwrap();
        }
        let extra = b"one;two,\"needs, quotes\"\n";
        assert_eq!(got[..got.len() - extra.len()], want[..]);
        assert_eq!(&got[got.len() - extra.len()..], extra);
    }

    #[test]
    fn json_rows_write_what_serde_json_writes_of_the_whole() {
        // serde_json's pretty printer of the whole object is the reference,
        // with rows of every kind: numbers (a NaN is null), text, nested
        // lists and objects, none at all.
        #[derive(serde::Serialize)]
        struct Row<'a> {
            id: &'a str,
            odds: Option<f64>,
            flags: Vec<&'a str>,
            k: Option<u32>,
            found: Vec<Value>,
        }
        let rows = |n: usize| {
            (0..n).map(|i| Row {
                id: ["a", "b\"q\"", "ü\n"][i % 3],
                odds: [Some(0.1), None, Some(f64::NAN), Some(1e300)][i % 4],
                flags: vec!["echo", "odd-even"][..i % 3].to_vec(),
                k: (i % 2 == 0).then_some(i as u32),
                found: (0..i % 2)
                    .map(|j| serde_json::json!({"flag": "x", "n": j}))
                    .collect(),
            })
        };
        for n in [0, 1, 7] {
            let head = vec![
                ("catalogue", Value::from("c.csv")),
                ("table", serde_json::json!([{"k": 1, "x": [1.5, null]}])),
                ("empty", serde_json::json!([])),
            ];
            let mut whole = serde_json::Map::new();
            for (k, v) in head.clone() {
                whole.insert(k.to_string(), v);
            }
            let list: Vec<Value> = rows(n).map(|r| serde_json::to_value(r).unwrap()).collect();
            whole.insert("candidates".into(), Value::Array(list));
            let mut want = Vec::new();
            write_json(&mut want, &Value::Object(whole)).unwrap();
            let mut got = Vec::new();
            write_json_rows(&mut got, head, "candidates", rows(n)).unwrap();
            assert_eq!(
                String::from_utf8(got).unwrap(),
                String::from_utf8(want).unwrap()
            );
        }
    }
}
