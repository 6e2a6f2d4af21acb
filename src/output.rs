//! Output for people (aligned tables) and for scripts (CSV, JSON). Every cell
//! that came from an input file passes through [`crate::sanitize::clean`].

mod number;
mod stream;
mod table;
pub mod votable;

pub use number::{push_fixed, push_num};
pub use stream::{CsvOut, JsonRows, write_csv_rows, write_joined_rows, write_json_rows};
pub use table::{Measured, Table, write_table_rows};

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
    exact_in(&mut Shortest::new(), v).to_string()
}

/// [`exact`] into a reusable buffer, for hot output loops.
pub fn exact_in(b: &mut Shortest, v: Option<f64>) -> &str {
    match v {
        Some(v) if v.is_finite() => b.format(v),
        _ => "",
    }
}

/// The shortest text that reads back as the same f64, as Ryu spells it
/// (Adams 2018: `0.1`, `1e16`, `5e-324`), without a bare `.0`. The digits
/// come from Żmij (Zverovich 2025, "Faster double-to-string conversion";
/// the `zmij` crate), about twice as fast as Ryu here and the same shortest,
/// correctly rounded digits; it writes a positive exponent `e+16`, which is
/// spelled as Ryu does. Tested against Ryu over random bits and decimals.
pub struct Shortest {
    digits: zmij::Buffer,
    /// The rare text with a positive exponent, its `+` left out.
    spelled: [u8; 32],
}

impl Default for Shortest {
    fn default() -> Self {
        Shortest::new()
    }
}

impl Shortest {
    pub fn new() -> Shortest {
        Shortest {
            digits: zmij::Buffer::new(),
            spelled: [0; 32],
        }
    }

    /// The text of a finite `v`.
    pub fn format(&mut self, v: f64) -> &str {
        let s = self.digits.format_finite(v);
        // A `+` is only ever the sign of an exponent of two or three
        // digits (16 to 308), so third or fourth from the end.
        let b = s.as_bytes();
        let plus = (3..=4)
            .filter_map(|back| b.len().checked_sub(back))
            .find(|&i| b[i] == b'+');
        let Some(plus) = plus else {
            return s.strip_suffix(".0").unwrap_or(s);
        };
        // `1e+16` → `1e16`: at most 24 bytes.
        let (head, exponent) = (&b[..plus], &b[plus + 1..]);
        let n = head.len() + exponent.len();
        self.spelled[..head.len()].copy_from_slice(head);
        self.spelled[head.len()..n].copy_from_slice(exponent);
        std::str::from_utf8(&self.spelled[..n]).unwrap_or_default()
    }
}

/// A coded value's decimal ([`crate::catalogue::Decimal`]) as Ryu spells
/// its `f64` (Adams 2018; serde_json's numbers) when `point_zero`, else as
/// [`Shortest`] does (no bare `.0`): the same bytes, without the search for
/// the digits. Ryu's layout: a whole number plainly, a point inside the
/// digits or `0.` and up to four zeros before them, else `d.ddde-N`
/// (a decimal of eight digits at most needs no other form).
pub fn push_decimal(buf: &mut Vec<u8>, d: crate::catalogue::Decimal, point_zero: bool) {
    // Made in place, then copied once: at most a sign, eight digits, a
    // point and four zeros, or seven zeros and `.0`, or `e-NN`.
    let mut text = [0u8; 24];
    let mut n = 0;
    let mut put = |bytes: &[u8]| {
        text[n..n + bytes.len()].copy_from_slice(bytes);
        n += bytes.len();
    };
    if d.negative {
        put(b"-");
    }
    let (mut m, mut k) = (d.digits, -(d.scale as i32));
    if m == 0 {
        put(if point_zero { b"0.0" } else { b"0" });
    } else {
        while m % 10 == 0 {
            m /= 10;
            k += 1;
        }
        let mut spelled = [0u8; 8];
        let mut start = spelled.len();
        while m > 0 {
            start -= 1;
            spelled[start] = b'0' + (m % 10) as u8;
            m /= 10;
        }
        let digits = &spelled[start..];
        // The value is 0.digits x 10^kk.
        let kk = digits.len() as i32 + k;
        if k >= 0 {
            put(digits);
            put(&b"0000000"[..k as usize]);
            if point_zero {
                put(b".0");
            }
        } else if kk > 0 {
            let (whole, part) = digits.split_at(kk as usize);
            put(whole);
            put(b".");
            put(part);
        } else if kk > -5 {
            put(b"0.");
            put(&b"0000"[..(-kk) as usize]);
            put(digits);
        } else {
            put(&digits[..1]);
            if digits.len() > 1 {
                put(b".");
                put(&digits[1..]);
            }
            put(b"e");
            put(itoa::Buffer::new().format(kk - 1).as_bytes());
        }
    }
    buf.extend_from_slice(&text[..n]);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimals_are_written_as_ryu_writes_their_values() {
        // The ryu crate (Adams 2018) is the reference, through Column's own
        // codes: every scale, both signs, random digits and the edges (0,
        // powers of ten, zeros at the end, the largest digits 2^26 - 1).
        use crate::catalogue::{Column, Decimal};
        let mut digits = vec![
            0,
            1,
            9,
            10,
            100,
            1_000_000,
            10_000_000,
            60_000_000,
            (1 << 26) - 1,
        ];
        let mut rng = crate::demo::Rng::new(11);
        for _ in 0..20_000 {
            // Short and long digit strings alike: one to eight digits.
            let width = 10u64.pow(1 + rng.below(8) as u32);
            digits.push((rng.below(width) % (1 << 26)) as u32);
        }
        let (mut written, mut b) = (Vec::new(), Shortest::new());
        for &m in &digits {
            for scale in 0..16 {
                for negative in [false, true] {
                    let v = m as f64 / 10f64.powi(scale as i32);
                    let v = if negative { -v } else { v };
                    let column = Column::from_values(&[v]);
                    let d = Decimal {
                        negative,
                        digits: m,
                        scale,
                    };
                    // The column keeps it as some decimal of the same value
                    // (all but the largest digits, which are kept whole).
                    let kept = column.decimal(0).unwrap_or(d);
                    assert!(column.decimal(0).is_some() || m == (1 << 26) - 1);
                    assert_eq!(column.get(0).to_bits(), v.to_bits());
                    for (d, point_zero) in [(d, true), (d, false), (kept, false), (kept, true)] {
                        written.clear();
                        push_decimal(&mut written, d, point_zero);
                        let want = if point_zero {
                            ryu::Buffer::new().format_finite(v).to_string()
                        } else {
                            b.format(v).to_string()
                        };
                        assert_eq!(String::from_utf8_lossy(&written), want, "{m} / 10^{scale}");
                    }
                }
            }
        }
        // Kept whole, or missing: no decimal.
        let column = Column::from_values(&[2_458_325.123_456_78, f64::NAN, f64::INFINITY]);
        assert!((0..3).all(|i| column.decimal(i).is_none()));
    }

    #[test]
    fn shortest_writes_what_ryu_writes() {
        // The ryu crate (Adams 2018) is the reference: random bits (every
        // exponent, subnormals), decimals as catalogues write them, and the
        // edges (exponents written as e16, e22, e-324; integers; -0).
        let reference = |v: f64| {
            let mut b = ryu::Buffer::new();
            let s = b.format_finite(v);
            s.strip_suffix(".0").unwrap_or(s).to_string()
        };
        let mut b = Shortest::new();
        let mut values = vec![
            0.0,
            -0.0,
            1.0,
            -1.0,
            0.1,
            1e15,
            1e16,
            1.5e16,
            1e22,
            1e23,
            -1e300,
            f64::MAX,
            f64::MIN_POSITIVE,
            5e-324,
            1e-7,
            123456789012345680.0,
            2459000.12345,
        ];
        let mut rng = crate::demo::Rng::new(0x9e37_79b9);
        for i in 0..400_000 {
            let x = rng.next_u64();
            values.push(if i % 2 == 0 {
                f64::from_bits(x)
            } else {
                (x % 1_000_000_000) as f64 / 10f64.powi((x % 12) as i32)
            });
        }
        for v in values.into_iter().filter(|v| v.is_finite()) {
            assert_eq!(b.format(v), reference(v), "{v:e}");
        }
    }

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
    fn rows_written_as_they_come_are_the_document_and_table_of_all() {
        // Rows of every kind: nested values, text with quotes and line
        // breaks (escaped), wide cells late, text to be sanitised.
        let rows = |n: usize| -> Vec<serde_json::Value> {
            (0..n)
                .map(|i| {
                    let text = ["a \"q\"\nb", "ünï", ""][i % 3];
                    serde_json::json!({
                        "id": i, "text": text,
                        "list": [i, {"x": null}], "empty": {},
                    })
                })
                .collect()
        };
        for n in [0, 1, 2, 3000] {
            let head = || vec![("ledger", serde_json::json!("l.sqlite"))];
            let mut whole = head()
                .into_iter()
                .map(|(k, v)| (k.to_string(), v))
                .collect::<serde_json::Map<_, _>>();
            whole.insert("entries".into(), serde_json::Value::Array(rows(n)));
            let mut want = Vec::new();
            write_json(&mut want, &serde_json::Value::Object(whole)).unwrap();
            let mut got = Vec::new();
            let mut w = JsonRows::new(&mut got, head(), "entries").unwrap();
            for r in rows(n) {
                w.row(&r).unwrap();
            }
            w.finish().unwrap();
            assert_eq!(
                String::from_utf8(got).unwrap(),
                String::from_utf8(want).unwrap(),
                "{n} rows"
            );
        }
        let cols = [
            ("#", Align::Right),
            ("who", Align::Left),
            ("note", Align::Left),
        ];
        let cells = |i: usize| {
            [
                i.to_string(),
                ["ann", "tab\there", "ünï"][i % 3].to_string(),
                if i == 2500 {
                    "a long note, late".into()
                } else {
                    String::new()
                },
            ]
        };
        let mut want = Table::new(&cols);
        let mut t = Measured::new(&cols);
        for i in 0..3000 {
            want.row(&cells(i));
            t.measure(&cells(i));
        }
        let (mut a, mut b) = (Vec::new(), Vec::new());
        want.write(&mut a, "").unwrap();
        t.header(&mut b).unwrap();
        for i in 0..3000 {
            t.row(&cells(i), &mut b).unwrap();
        }
        t.finish(&mut b).unwrap();
        assert_eq!(String::from_utf8(b).unwrap(), String::from_utf8(a).unwrap());
    }
}
