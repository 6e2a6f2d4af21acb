//! Output that streams: rows written as they are computed, through one
//! reused buffer, so a command's memory does not grow with its output. The
//! bytes are those of the general writers (the `csv` crate's, serde_json's
//! pretty printer), which the tests hold them to.

use std::io::{self, Write};

use serde::Serialize;
use serde_json::Value;

use super::{Shortest, exact_in};
use crate::prefetch::each_ahead;

/// CSV written row by row into one reused buffer, for the long outputs:
/// numbers straight from [`Shortest`]/`itoa`, no allocation per cell. The bytes
/// are those of [`csv_writer`] (RFC 4180 as the `csv` crate writes it by
/// default: a field is quoted only when it holds a comma, a quote, CR or
/// LF, a quote inside doubled; `\n` ends a row). Rows of one empty field,
/// which that writer spells `""`, are never written here.
pub struct CsvOut<'a> {
    /// Where full buffers go; none when the rows are kept in `buf`.
    out: Option<&'a mut dyn Write>,
    buf: Vec<u8>,
    floats: Shortest,
    recent: Recent,
    /// Whether the next field is the first of its row.
    first: bool,
}

/// The text of numbers written lately, by their bits: the odds, priors and
/// boosts of a catalogue take a few values a million times over, and
/// copying their text costs a fraction of making it again.
struct Recent {
    bits: [u64; RECENT],
    text: [[u8; 24]; RECENT],
    len: [u8; RECENT],
}

/// Slots of [`Recent`], one per value, chosen by the value's bits.
const RECENT: usize = 32;

impl Recent {
    fn new() -> Recent {
        Recent {
            // A NaN's bits: never asked for (only finite values are written).
            bits: [u64::MAX; RECENT],
            text: [[0; 24]; RECENT],
            len: [0; RECENT],
        }
    }

    /// The text [`exact_in`] gives `v` (finite), made at most once per slot
    /// and value.
    fn exact(&mut self, floats: &mut Shortest, v: f64) -> &[u8] {
        let bits = v.to_bits();
        let slot = (bits.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> 59) as usize;
        if self.bits[slot] != bits {
            // The text is at most 24 bytes.
            let s = exact_in(floats, Some(v)).as_bytes();
            self.text[slot][..s.len()].copy_from_slice(s);
            self.len[slot] = s.len() as u8;
            self.bits[slot] = bits;
        }
        &self.text[slot][..self.len[slot] as usize]
    }
}

impl<'a> CsvOut<'a> {
    pub fn new(out: &'a mut dyn Write) -> CsvOut<'a> {
        CsvOut {
            out: Some(out),
            buf: Vec::with_capacity(1 << 17),
            floats: Shortest::new(),
            recent: Recent::new(),
            first: true,
        }
    }

    /// Rows appended to `buf` and kept there ([`CsvOut::into_bytes`]).
    fn keeping(buf: Vec<u8>) -> CsvOut<'static> {
        CsvOut {
            out: None,
            buf,
            floats: Shortest::new(),
            recent: Recent::new(),
            first: true,
        }
    }

    fn into_bytes(self) -> Vec<u8> {
        self.buf
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

    /// A field of `items` joined by `sep` (a list of flag names), quoted
    /// when it must be.
    pub fn list<'s>(&mut self, items: impl IntoIterator<Item = &'s str>, sep: &str) {
        self.text_with(|b| {
            for (i, item) in items.into_iter().enumerate() {
                if i > 0 {
                    b.extend_from_slice(sep.as_bytes());
                }
                b.extend_from_slice(item.as_bytes());
            }
        });
    }

    /// A text field built in place by `write`, quoted when it must be.
    fn text_with(&mut self, write: impl FnOnce(&mut Vec<u8>)) {
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
        if let Some(v) = v.filter(|v| v.is_finite()) {
            let s = self.recent.exact(&mut self.floats, v);
            self.buf.extend_from_slice(s);
        }
    }

    /// A value kept as a decimal, as [`CsvOut::exact`] writes its value.
    pub fn decimal(&mut self, d: crate::catalogue::Decimal) {
        self.separate();
        super::push_decimal(&mut self.buf, d, false);
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
        if let Some(out) = self.out.as_mut().filter(|_| self.buf.len() >= 1 << 16) {
            out.write_all(&self.buf)?;
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
        if let Some(out) = self.out.as_mut() {
            out.write_all(&self.buf)?;
            self.buf.clear();
            out.flush()?;
        }
        Ok(())
    }
}

/// A CSV file of a header and a row per item: `row` writes an item's
/// fields, on every core a chunk of items at a time ([`in_order`]); the
/// rows come out in order, as one [`CsvOut`] would write them.
///
/// `ahead` asks the memory for what an item's row will read out of order,
/// some rows before ([`crate::prefetch::each_ahead`]; e.g. the ids of the
/// candidates' stars, in a file whose rows are not grouped by star), or
/// is [`crate::prefetch::nothing`]; the rows are the same either way.
pub fn write_csv_rows<T: Sync, H: AsRef<[u8]>>(
    out: &mut dyn Write,
    header: impl IntoIterator<Item = H>,
    items: &[T],
    ahead: impl Fn(&T, bool) + Sync,
    row: impl Fn(&mut CsvOut, &T) + Sync,
) -> io::Result<()> {
    let mut w = CsvOut::new(out);
    w.row(header)?;
    w.finish()?;
    in_order(items, out, |part, buf| {
        let mut w = CsvOut::keeping(std::mem::take(buf));
        each_ahead(part, &ahead, |item| {
            row(&mut w, item);
            // Kept in memory: ending a row cannot fail.
            let _ = w.end_row();
        });
        *buf = w.into_bytes();
    })
}

/// Writes, pretty and with a final newline, the JSON object of `head`'s
/// members in order and then `key`: the list of `row` of each item. The
/// bytes are those of [`super::write_json`] given the whole object, which
/// is never held: the rows are serialised a chunk at a time on every core
/// ([`in_order`]), each pretty on its own and indented to its place (JSON
/// text holds no raw line break, so every line break is the printer's).
/// `ahead` as for [`write_csv_rows`].
pub fn write_json_rows<T: Sync, R: Serialize>(
    out: &mut dyn Write,
    head: Vec<(&str, Value)>,
    key: &str,
    items: &[T],
    ahead: impl Fn(&T, bool) + Sync,
    row: impl Fn(&T) -> R + Sync,
) -> io::Result<()> {
    let mut text = empty_list(head, key)?;
    if items.is_empty() {
        text.push(b'\n');
        return out.write_all(&text);
    }
    out.write_all(&opened(text))?;
    let sep = b",\n    ";
    let mut rows = SkipFirst {
        out,
        skip: sep.len(),
    };
    in_order(items, &mut rows, |part, buf| {
        // One row's JSON at a time, in a buffer kept for the chunk.
        let mut one = Vec::with_capacity(1024);
        each_ahead(part, &ahead, |item| {
            buf.extend_from_slice(sep);
            one.clear();
            // Serialising into memory fails only for a map with non-string
            // keys, which no row has.
            let _ = serde_json::to_writer_pretty(&mut one, &row(item));
            indented(buf, &one, b"    ");
        });
    })?;
    out.write_all(b"\n  ]\n}\n")?;
    out.flush()
}

/// The pretty JSON object of `head`'s members and then `key`, an empty
/// list.
fn empty_list(head: Vec<(&str, Value)>, key: &str) -> io::Result<Vec<u8>> {
    let mut object: serde_json::Map<String, Value> =
        head.into_iter().map(|(k, v)| (k.to_string(), v)).collect();
    object.insert(key.to_string(), Value::Array(Vec::new()));
    Ok(serde_json::to_vec_pretty(&Value::Object(object))?)
}

/// [`empty_list`]'s text up to its first row: the list is last, its `[]`
/// and the closing brace cut.
fn opened(mut text: Vec<u8>) -> Vec<u8> {
    text.truncate(text.len() - b"[]\n}".len());
    text.extend_from_slice(b"[\n    ");
    text
}

/// [`write_json_rows`] for rows that come one at a time (a query's), on
/// one thread: the same bytes, no row held, the head written with the
/// first row.
pub struct JsonRows<'a> {
    out: &'a mut dyn Write,
    /// The object with an empty list, until the first row.
    head: Option<Vec<u8>>,
    one: Vec<u8>,
    buf: Vec<u8>,
}

impl<'a> JsonRows<'a> {
    pub fn new(
        out: &'a mut dyn Write,
        head: Vec<(&str, Value)>,
        key: &str,
    ) -> io::Result<JsonRows<'a>> {
        Ok(JsonRows {
            out,
            head: Some(empty_list(head, key)?),
            one: Vec::with_capacity(1024),
            buf: Vec::with_capacity(1 << 16),
        })
    }

    pub fn row<R: Serialize>(&mut self, row: &R) -> io::Result<()> {
        match self.head.take() {
            Some(text) => self.buf.extend_from_slice(&opened(text)),
            None => self.buf.extend_from_slice(b",\n    "),
        }
        self.one.clear();
        serde_json::to_writer_pretty(&mut self.one, row)?;
        indented(&mut self.buf, &self.one, b"    ");
        if self.buf.len() >= 1 << 16 {
            self.out.write_all(&self.buf)?;
            self.buf.clear();
        }
        Ok(())
    }

    pub fn finish(mut self) -> io::Result<()> {
        match self.head.take() {
            Some(text) => {
                self.buf.extend_from_slice(&text);
                self.buf.push(b'\n');
            }
            None => self.buf.extend_from_slice(b"\n  ]\n}\n"),
        }
        self.out.write_all(&self.buf)?;
        self.out.flush()
    }
}

/// `text` appended to `buf` with `indent` after each of its line breaks
/// (rows nested in the document), a line at a time.
fn indented(buf: &mut Vec<u8>, text: &[u8], indent: &[u8]) {
    let mut from = 0;
    for at in memchr::memchr_iter(b'\n', text) {
        buf.extend_from_slice(&text[from..=at]);
        buf.extend_from_slice(indent);
        from = at + 1;
    }
    buf.extend_from_slice(&text[from..]);
}

/// Every item made into bytes by `one`, with `sep` between them, on every
/// core a chunk at a time ([`in_order`]), written in order. `ahead` as
/// for [`write_csv_rows`].
pub fn write_joined_rows<T: Sync>(
    out: &mut dyn Write,
    items: &[T],
    sep: &[u8],
    ahead: impl Fn(&T, bool) + Sync,
    one: impl Fn(&T, &mut Vec<u8>) + Sync,
) -> io::Result<()> {
    let mut rows = SkipFirst {
        out,
        skip: sep.len(),
    };
    in_order(items, &mut rows, |part, buf| {
        each_ahead(part, &ahead, |item| {
            buf.extend_from_slice(sep);
            one(item, buf);
        })
    })
}

/// A writer that drops the first `skip` bytes written through it (the
/// comma before the first row).
struct SkipFirst<'a> {
    out: &'a mut dyn Write,
    skip: usize,
}

impl Write for SkipFirst<'_> {
    fn write(&mut self, b: &[u8]) -> io::Result<usize> {
        let cut = self.skip.min(b.len());
        self.skip -= cut;
        self.out.write_all(&b[cut..])?;
        Ok(b.len())
    }

    fn flush(&mut self) -> io::Result<()> {
        self.out.flush()
    }
}

/// Rows made into bytes on every core and written in their order: in
/// rounds of one chunk of [`CHUNK`] items per core, each formatted by
/// `format` into a buffer of its own (cleared, reused), then the buffers
/// written one after the other. Memory is a round's output, whatever the
/// number of rows.
pub fn in_order<T: Sync>(
    items: &[T],
    out: &mut dyn Write,
    format: impl Fn(&[T], &mut Vec<u8>) + Sync,
) -> io::Result<()> {
    let n = crate::parallel::workers();
    let mut bufs: Vec<Vec<u8>> = vec![Vec::new(); n];
    let format = &format;
    for round in items.chunks(CHUNK * n) {
        std::thread::scope(|scope| {
            let mut parts = round.chunks(CHUNK).zip(bufs.iter_mut());
            let first = parts.next();
            let handles: Vec<_> = parts
                .map(|(p, b)| {
                    scope.spawn(move || {
                        b.clear();
                        format(p, b);
                    })
                })
                .collect();
            if let Some((p, b)) = first {
                b.clear();
                format(p, b);
            }
            for h in handles {
                h.join().unwrap_or_else(|e| std::panic::resume_unwind(e));
            }
        });
        for b in &bufs[..round.len().div_ceil(CHUNK)] {
            out.write_all(b)?;
        }
    }
    out.flush()
}

/// Items per chunk of [`in_order`]: large enough that starting threads
/// costs nothing measurable, small enough that a round's output stays in
/// the low megabytes.
const CHUNK: usize = 8192;

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
            w.list(["one", "two"], ";");
            w.list(["needs", " quotes"], ",");
            w.end_row().unwrap();
            w.finish().unwrap();
        }
        let extra = b"one;two,\"needs, quotes\"\n";
        assert_eq!(got[..got.len() - extra.len()], want[..]);
        assert_eq!(&got[got.len() - extra.len()..], extra);
    }

    #[test]
    fn numbers_written_again_are_written_as_ryu_writes_them() {
        // Ryu (the ryu crate) is the reference for every value, whether
        // its text was made now or kept from before: values repeated, and
        // more different values than the kept slots, so slots are reused.
        let mut values: Vec<Option<f64>> = Vec::new();
        let mut x = 0x2545_f491_4f6c_dd1d_u64;
        for i in 0..5000 {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            values.push(match i % 7 {
                0 => Some(0.1),
                1 => Some(f64::from_bits(x >> 2)),
                2 => Some((x % 1000) as f64 / 8.0),
                3 => None,
                4 => Some(f64::NAN),
                5 => Some(-((x % 50) as f64) * 1e-300),
                _ => Some(1.0 / 3.0),
            });
        }
        let mut got = Vec::new();
        {
            let mut w = CsvOut::new(&mut got);
            for v in &values {
                w.exact(*v);
            }
            w.end_row().unwrap();
            w.finish().unwrap();
        }
        let ryu = |v: &Option<f64>| match v {
            Some(v) if v.is_finite() => {
                let mut b = ryu::Buffer::new();
                let s = b.format_finite(*v);
                s.strip_suffix(".0").unwrap_or(s).to_string()
            }
            _ => String::new(),
        };
        let want: Vec<String> = values.iter().map(ryu).collect();
        assert_eq!(String::from_utf8(got).unwrap(), want.join(",") + "\n");
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
        let row = |&i: &usize| Row {
            id: ["a", "b\"q\"", "ü\n"][i % 3],
            odds: [Some(0.1), None, Some(f64::NAN), Some(1e300)][i % 4],
            flags: ["echo", "odd-even"][..i % 3].to_vec(),
            k: (i % 2 == 0).then_some(i as u32),
            found: (0..i % 2)
                .map(|j| serde_json::json!({"flag": "x", "n": j}))
                .collect(),
        };
        for n in [0, 1, 7, 20_000] {
            let head = vec![
                ("catalogue", Value::from("c.csv")),
                ("table", serde_json::json!([{"k": 1, "x": [1.5, null]}])),
                ("empty", serde_json::json!([])),
            ];
            let mut whole = serde_json::Map::new();
            for (k, v) in head.clone() {
                whole.insert(k.to_string(), v);
            }
            let items: Vec<usize> = (0..n).collect();
            let list: Vec<Value> = items
                .iter()
                .map(|i| serde_json::to_value(row(i)).unwrap())
                .collect();
            whole.insert("candidates".into(), Value::Array(list));
            let mut want = Vec::new();
            write_json(&mut want, &Value::Object(whole)).unwrap();
            let mut got = Vec::new();
            write_json_rows(
                &mut got,
                head,
                "candidates",
                &items,
                crate::prefetch::nothing,
                row,
            )
            .unwrap();
            assert_eq!(
                String::from_utf8(got).unwrap(),
                String::from_utf8(want).unwrap()
            );
        }
    }
}
