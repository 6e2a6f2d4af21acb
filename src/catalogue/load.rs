//! Reading a catalogue file: CSV or TSV, optionally gzip-compressed, with a
//! UTF-8 BOM, CRLF line ends, `#` comment lines and quoted fields. Bad rows are
//! skipped and listed; only an unreadable file or header stops the load.
//! Messages keep the file's text as it is; output sanitises it (one chokepoint).

use std::fs::File;
use std::hash::BuildHasher;
use std::io::{BufRead, BufReader, Read};
use std::path::Path;
use std::sync::{Mutex, mpsc};

use csv::ByteRecord;
use flate2::read::MultiGzDecoder;

use super::columns::{ColumnMap, ColumnUse, DepthUnit, Field, Mapping, NUMERIC, REQUIRED};
use super::pool::StrPool;
use super::{CandidateId, Catalogue, LoadError, Skip, StarId};

/// How to read a catalogue. The default reads any supported file unaided.
#[derive(Clone, Debug, Default)]
pub struct LoadOptions {
    /// Overrides of the built-in header synonyms.
    pub columns: ColumnMap,
    /// The depth unit, overriding the detection rule.
    pub depth_unit: Option<DepthUnit>,
    /// The field delimiter, overriding detection by extension and sniffing.
    pub delimiter: Option<u8>,
    /// Keep the ids, the star index and the skips, but of the numeric
    /// columns only depth (its unit rule reads it): for `summary`, which
    /// reports no other value. Every cell is still parsed and validated, so
    /// the same rows load and the same rows are skipped; the columns not
    /// kept read as absent (`Catalogue::column` is `None`).
    pub index_only: bool,
}

/// Where catalogue bytes come from.
#[derive(Clone, Copy, Debug)]
pub enum Source<'a> {
    Path(&'a Path),
    /// Bytes in memory (the built-in demo), with the name to report.
    Bytes {
        name: &'a str,
        data: &'a [u8],
    },
}

const GZIP_MAGIC: [u8; 2] = [0x1f, 0x8b];
const BOM: [u8; 3] = [0xef, 0xbb, 0xbf];
/// Smallest median depth that is read as ppm when the header names no unit.
/// A fraction is at most 1, and a percent depth of 50 would be a 50% eclipse,
/// not a transit. Documented in the README (Inputs).
const PPM_MEDIAN_FLOOR: f64 = 50.0;

impl Catalogue {
    pub fn load(source: Source<'_>, opts: &LoadOptions) -> Result<Catalogue, LoadError> {
        let (name, mut size_hint, raw): (String, Option<u64>, Box<dyn Read + Send + '_>) =
            match source {
                Source::Path(p) => {
                    let name = p.display().to_string();
                    let file = File::open(p).map_err(|source| LoadError::Io {
                        path: name.clone(),
                        source,
                    })?;
                    let size = file.metadata().ok().map(|m| m.len());
                    (name, size, Box::new(file))
                }
                Source::Bytes { name, data } => (
                    name.to_string(),
                    Some(data.len() as u64),
                    Box::new(std::io::Cursor::new(data)),
                ),
            };
        let ext_name = name.clone();
        let io_err = |source| LoadError::Io {
            path: name.clone(),
            source,
        };
        let mut raw = BufReader::with_capacity(1 << 16, raw);
        let gz = raw.fill_buf().map_err(io_err)?.starts_with(&GZIP_MAGIC);
        if gz {
            size_hint = None; // the decompressed size is not known ahead
        }
        let decoded: Box<dyn Read + Send + '_> = if gz {
            Box::new(MultiGzDecoder::new(raw))
        } else {
            Box::new(raw)
        };
        let mut text = BufReader::with_capacity(1 << 16, decoded);
        let head = text.fill_buf().map_err(io_err)?;
        if head.starts_with(&BOM) {
            text.consume(BOM.len());
        }
        let delimiter = match opts.delimiter {
            Some(d) => d,
            None => {
                delimiter_for(&ext_name).unwrap_or_else(|| sniff(text.fill_buf().unwrap_or(&[])))
            }
        };
        read_catalogue(name, text, delimiter, opts, size_hint)
    }
}

/// The delimiter an extension implies (`.tsv`, `.tab`, `.csv`, also under `.gz`).
fn delimiter_for(path: &str) -> Option<u8> {
    let lower = path.to_ascii_lowercase();
    let stem = lower.strip_suffix(".gz").unwrap_or(&lower);
    if stem.ends_with(".tsv") || stem.ends_with(".tab") {
        Some(b'\t')
    } else if stem.ends_with(".csv") {
        Some(b',')
    } else {
        None
    }
}

/// Tab if the first non-comment line has more tabs than commas, else comma.
fn sniff(head: &[u8]) -> u8 {
    let line = head
        .split(|&b| b == b'\n')
        .find(|l| !l.starts_with(b"#") && !l.iter().all(u8::is_ascii_whitespace))
        .unwrap_or(&[]);
    let tabs = line.iter().filter(|&&b| b == b'\t').count();
    let commas = line.iter().filter(|&&b| b == b',').count();
    if tabs > commas { b'\t' } else { b',' }
}

/// Bytes handed to one worker at a time: large enough to amortise the
/// hand-over, small enough to keep memory flat.
const CHUNK_BYTES: usize = 2 << 20;
/// The first read, which finds the header; a small file is read whole by it.
const HEAD_BYTES: usize = 64 << 10;

/// Reads the header, then parses the rest in record-aligned chunks on worker
/// threads and merges the parts in file order, so the result is the same as
/// a serial read, row for row.
fn read_catalogue(
    name: String,
    mut text: impl Read + Send,
    delimiter: u8,
    opts: &LoadOptions,
    size_hint: Option<u64>,
) -> Result<Catalogue, LoadError> {
    let io_err = |source| LoadError::Io {
        path: name.clone(),
        source,
    };
    // The header: the first record that is neither a comment nor blank.
    let mut buf: Vec<u8> = Vec::new();
    let mut eof = false;
    let (header_line, header_end) = loop {
        if let Some(found) = find_header(&buf, eof) {
            break found;
        }
        if eof {
            return Err(LoadError::Empty { path: name });
        }
        let want = HEAD_BYTES.max(buf.len());
        eof = fill(&mut text, &mut buf, want).map_err(io_err)?;
    };
    let header_fields = parse_header(&buf[header_end.0..header_end.1], delimiter);
    if header_fields.len() > u16::MAX as usize {
        return Err(LoadError::TooManyColumns {
            path: name,
            line: header_line,
            count: header_fields.len(),
        });
    }
    let mapping = Mapping::resolve(&name, &header_fields, &opts.columns)?;
    let first_line = header_line + count_newlines(&buf[header_end.0..header_end.1]);
    buf.drain(..header_end.1);
    let layout = Layout::new(header_fields, mapping, delimiter, opts.index_only);
    let mut merger = Merger::new(name, &layout);
    if eof {
        // Everything is in memory already: no threads for a small file.
        let chunk = Chunk {
            seq: 0,
            line: first_line,
            bytes: buf,
        };
        let part = layout.parse(&chunk, &merger.hasher, None);
        merger.absorb(part, size_hint);
        return merger.finish(&layout, opts);
    }
    let workers = std::thread::available_parallelism()
        .map_or(2, |n| n.get())
        .clamp(1, 4);

    let (chunk_tx, chunk_rx) = mpsc::sync_channel::<Chunk>(workers * 2);
    // Parsed chunks' buffers go back to the reader: fresh ones would cost a
    // page fault every 4 KB, 128 MB of them for a 128 MB file.
    let (spare_tx, spare_rx) = mpsc::channel::<Vec<u8>>();
    // And absorbed parts' columns go back to the workers, for the same reason.
    let (part_spare_tx, part_spare_rx) = mpsc::channel::<Part>();
    let part_spare_rx = Mutex::new(part_spare_rx);
    let chunk_rx = Mutex::new(chunk_rx);
    // Bounded too, so parsed parts cannot pile up ahead of the merger.
    let (part_tx, part_rx) = mpsc::sync_channel::<(usize, Result<Part, LoadError>)>(workers);
    let mut failure = None;
    std::thread::scope(|s| {
        let reader_tx = part_tx.clone();
        let path = merger.name.clone();
        // The reader: cuts the stream at record boundaries.
        s.spawn(move || {
            let mut seq = 0;
            let mut line = first_line;
            let mut carry = buf;
            let mut eof = eof;
            let mut need_more = false;
            loop {
                if !eof && (need_more || carry.len() < CHUNK_BYTES) {
                    need_more = false;
                    match fill(&mut text, &mut carry, CHUNK_BYTES) {
                        Ok(e) => eof = e,
                        Err(e) => {
                            let err = LoadError::Read {
                                path: path.clone(),
                                line,
                                message: e.to_string(),
                            };
                            let _ = reader_tx.send((seq, Err(err)));
                            return;
                        }
                    }
                }
                let cut = if eof {
                    carry.len()
                } else {
                    match last_record_end(&carry, delimiter) {
                        Some(c) => c,
                        None => {
                            need_more = true; // one record longer than a chunk
                            continue;
                        }
                    }
                };
                if cut == 0 {
                    return;
                }
                let mut rest = spare_rx
                    .try_recv()
                    .unwrap_or_else(|_| Vec::with_capacity(CHUNK_BYTES + CHUNK_BYTES / 4));
                rest.clear();
                rest.extend_from_slice(&carry[cut..]);
                carry.truncate(cut);
                let chunk = std::mem::replace(&mut carry, rest);
                let lines = count_newlines(&chunk);
                if chunk_tx
                    .send(Chunk {
                        seq,
                        line,
                        bytes: chunk,
                    })
                    .is_err()
                {
                    return;
                }
                seq += 1;
                line += lines;
                if eof && carry.is_empty() {
                    return;
                }
            }
        });
        for _ in 0..workers {
            let part_tx = part_tx.clone();
            let chunk_rx = &chunk_rx;
            let layout = &layout;
            let hasher = merger.hasher;
            let spare_tx = spare_tx.clone();
            let spare_parts = &part_spare_rx;
            s.spawn(move || {
                loop {
                    let next = match chunk_rx.lock() {
                        Ok(rx) => rx.recv(),
                        Err(_) => return,
                    };
                    let Ok(chunk) = next else { return };
                    let spare = spare_parts.lock().ok().and_then(|rx| rx.try_recv().ok());
                    let part = layout.parse(&chunk, &hasher, spare);
                    let _ = spare_tx.send(chunk.bytes);
                    if part_tx.send((chunk.seq, Ok(part))).is_err() {
                        return;
                    }
                }
            });
        }
        drop(part_tx);
        // The merger: takes parts in file order. After a failure it keeps
        // draining, so no thread is left blocked.
        let mut waiting = std::collections::BTreeMap::new();
        let mut next = 0;
        for (seq, part) in part_rx {
            if failure.is_some() {
                continue;
            }
            waiting.insert(seq, part);
            while let Some(part) = waiting.remove(&next) {
                match part {
                    Ok(p) => {
                        let spent = merger.absorb(p, size_hint);
                        let _ = part_spare_tx.send(spent);
                    }
                    Err(e) => {
                        failure = Some(e);
                        break;
                    }
                }
                next += 1;
            }
        }
    });
    if let Some(e) = failure {
        return Err(e);
    }
    merger.finish(&layout, opts)
}

/// Reads until `buf` holds `want` more bytes or the stream ends; true at the
/// end. Reads into the spare capacity (`read_to_end` does not zero it first).
fn fill(text: &mut impl Read, buf: &mut Vec<u8>, want: usize) -> std::io::Result<bool> {
    let start = buf.len();
    buf.reserve(want);
    loop {
        let got = buf.len() - start;
        if got >= want {
            return Ok(false);
        }
        match text.by_ref().take((want - got) as u64).read_to_end(buf) {
            Ok(0) => return Ok(true),
            Ok(_) => {}
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
            Err(e) => return Err(e),
        }
    }
}

fn count_newlines(b: &[u8]) -> u64 {
    memchr::memchr_iter(b'\n', b).count() as u64
}

/// The header record: (its 1-based line, (start, end) byte range including
/// its line end). Skips `#` comment lines and blank lines before it.
fn find_header(buf: &[u8], eof: bool) -> Option<(u64, (usize, usize))> {
    let mut pos = 0;
    let mut line = 1;
    loop {
        let nl = memchr::memchr(b'\n', &buf[pos..]).map(|i| pos + i + 1);
        let end = nl.unwrap_or(buf.len());
        let l = &buf[pos..end];
        if l.starts_with(b"#") || l.iter().all(u8::is_ascii_whitespace) {
            nl?; // comment or blank to the end: read more, or the file is empty
            pos = end;
            line += 1;
            continue;
        }
        // A header may hold quoted line breaks: find its real end.
        return match first_record_end(&buf[pos..]) {
            Some(e) => Some((line, (pos, pos + e))),
            None if eof => Some((line, (pos, buf.len()))),
            None => None,
        };
    }
}

fn parse_header(record: &[u8], delimiter: u8) -> Vec<String> {
    let mut rdr = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .has_headers(false)
        .flexible(true)
        .from_reader(record);
    let mut rec = ByteRecord::new();
    match rdr.read_byte_record(&mut rec) {
        Ok(true) => rec
            .iter()
            .map(|h| String::from_utf8_lossy(h).trim().to_string())
            .collect(),
        _ => Vec::new(),
    }
}

/// Quote-aware CSV scanning state, as csv-core reads: a quote opens a quoted
/// field only at the start of a field; `""` inside is an escaped quote.
#[derive(Clone, Copy, PartialEq)]
enum Scan {
    RecordStart,
    FieldStart,
    InField,
    InQuoted,
    QuoteInQuoted,
}

/// Byte offsets just past each record end (`\n` outside quotes) in `buf`,
/// which starts at a record boundary; calls `at` for each, stopping when it
/// returns false. `#` lines at a record start are comments.
fn scan_record_ends(buf: &[u8], delimiter: u8, mut at: impl FnMut(usize) -> bool) {
    let mut st = Scan::RecordStart;
    let mut i = 0;
    while i < buf.len() {
        let b = buf[i];
        st = match st {
            Scan::RecordStart if b == b'#' => match memchr::memchr(b'\n', &buf[i..]) {
                Some(j) => {
                    i += j + 1;
                    if !at(i) {
                        return;
                    }
                    continue;
                }
                None => return,
            },
            Scan::RecordStart | Scan::FieldStart if b == b'"' => Scan::InQuoted,
            Scan::InQuoted if b == b'"' => Scan::QuoteInQuoted,
            Scan::InQuoted => Scan::InQuoted,
            Scan::QuoteInQuoted if b == b'"' => Scan::InQuoted,
            _ if b == b'\n' => {
                if !at(i + 1) {
                    return;
                }
                Scan::RecordStart
            }
            _ if b == delimiter => Scan::FieldStart,
            _ => Scan::InField,
        };
        i += 1;
    }
}

fn first_record_end(buf: &[u8]) -> Option<usize> {
    let mut found = None;
    // The delimiter does not change where a record ends.
    scan_record_ends(buf, b',', |e| {
        found = Some(e);
        false
    });
    found
}

/// The end of the last complete record in `buf`. Without any quote in the
/// buffer every line end is a record end, found at memchr speed.
fn last_record_end(buf: &[u8], delimiter: u8) -> Option<usize> {
    if memchr::memchr(b'"', buf).is_none() {
        return memchr::memrchr(b'\n', buf).map(|i| i + 1);
    }
    let mut last = None;
    scan_record_ends(buf, delimiter, |e| {
        last = Some(e);
        true
    });
    last
}

/// The fields of one record, however it was read.
trait Record {
    fn len(&self) -> usize;
    /// Field i, empty if the record is shorter.
    fn field(&self, i: usize) -> &[u8];
}

impl Record for ByteRecord {
    fn len(&self) -> usize {
        ByteRecord::len(self)
    }

    fn field(&self, i: usize) -> &[u8] {
        self.get(i).unwrap_or(&[])
    }
}

/// A record cut from a chunk without quotes.
struct SplitRecord<'a> {
    line: &'a [u8],
    /// (start, end) of each field in `line` (the whole chunk).
    bounds: Vec<(u32, u32)>,
}

impl Record for SplitRecord<'_> {
    fn len(&self) -> usize {
        self.bounds.len()
    }

    fn field(&self, i: usize) -> &[u8] {
        self.bounds
            .get(i)
            .map_or(&[], |&(a, b)| &self.line[a as usize..b as usize])
    }
}

/// True when a chunk can be split without a CSV state machine: no quote
/// character, and every CR is part of a CRLF.
fn plain_text(b: &[u8]) -> bool {
    // One pass for both bytes (both are rare in plain catalogues).
    memchr::memchr2_iter(b'"', b'\r', b).all(|i| b[i] == b'\r' && b.get(i + 1) == Some(&b'\n'))
}

struct Chunk {
    seq: usize,
    /// Line number of the chunk's first byte.
    line: u64,
    bytes: Vec<u8>,
}

/// What one cell held.
enum Cell {
    Missing,
    Value(f64),
    Bad,
}

/// Cells that mean "no value" in common catalogue exports.
const MISSING_TOKENS: [&[u8]; 9] = [
    b"", b"nan", b"NaN", b"NAN", b"null", b"NULL", b"NA", b"N/A", b"--",
];

fn parse_cell(raw: &[u8]) -> Cell {
    let b = raw.trim_ascii();
    if let Some(v) = fast_f64(b) {
        return Cell::Value(v);
    }
    if MISSING_TOKENS.contains(&b) {
        return Cell::Missing;
    }
    match std::str::from_utf8(b)
        .ok()
        .and_then(|s| s.parse::<f64>().ok())
    {
        Some(v) if v.is_finite() => Cell::Value(v),
        Some(_) => Cell::Missing, // inf: treated like NaN; required fields say so
        None => Cell::Bad,
    }
}

/// True when `parse_cell` would read a value (finite or not) from the
/// cell: `[+-]digits[.digits][e[+-]digits]`, spaces around, at most five
/// exponent digits. A cheap test for cells whose value is not kept; `false`
/// decides nothing (the cell then goes to `parse_cell`).
fn is_number(raw: &[u8]) -> bool {
    let b = raw.trim_ascii();
    let b = match b {
        [b'-' | b'+', rest @ ..] => rest,
        _ => b,
    };
    let digits = |from: usize| from + b[from..].iter().take_while(|c| c.is_ascii_digit()).count();
    let mut i = digits(0);
    if i == 0 {
        return false;
    }
    if b.get(i) == Some(&b'.') {
        let j = digits(i + 1);
        if j == i + 1 {
            return false;
        }
        i = j;
    }
    if matches!(b.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(b.get(i), Some(b'-' | b'+')) {
            i += 1;
        }
        let j = digits(i);
        if j == i || j - i > 5 {
            return false;
        }
        i = j;
    }
    i == b.len()
}

/// A number from a text cell: `Some` for a finite value, `None` for missing
/// tokens, non-finite values or text that is not a number.
pub fn parse_number(raw: &[u8]) -> Option<f64> {
    match parse_cell(raw) {
        Cell::Value(v) => Some(v),
        _ => None,
    }
}

/// Powers of ten exactly representable in f64.
const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// Clinger's fast path (Clinger 1990, "How to read floating point numbers
/// accurately", PLDI): a decimal `[+-]digits[.digits][e[+-]digits]` whose
/// digits fit in a 53-bit integer m and whose power of ten |e| ≤ 22 is exactly
/// m·10^e or m/10^−e, correctly rounded by one IEEE operation. Anything else
/// returns `None` and goes to the standard library's parser.
#[inline]
fn fast_f64(b: &[u8]) -> Option<f64> {
    let (neg, b) = match b {
        [b'-', rest @ ..] => (true, rest),
        [b'+', rest @ ..] => (false, rest),
        _ => (false, b),
    };
    let n = b.len();
    // Up to 19 digits always fit in a u64; more go to the slow path.
    let (mut i, mut m) = decimal_digits(b, 0, 0);
    let mut digits = i;
    let mut exp: i32 = 0;
    if i < n && b[i] == b'.' {
        let start = i + 1;
        (i, m) = decimal_digits(b, start, m);
        digits += i - start;
        exp = -((i - start) as i32);
    }
    if digits == 0 || digits > 19 {
        return None;
    }
    if i < n {
        if b[i] != b'e' && b[i] != b'E' {
            return None;
        }
        i += 1;
        let eneg = match b.get(i) {
            Some(b'-') => {
                i += 1;
                true
            }
            Some(b'+') => {
                i += 1;
                false
            }
            _ => false,
        };
        let start = i;
        let mut e: i32 = 0;
        while i < n && i - start < 6 {
            let d = b[i].wrapping_sub(b'0');
            if d > 9 {
                break;
            }
            e = e * 10 + d as i32;
            i += 1;
        }
        if i == start || i != n {
            return None;
        }
        exp += if eneg { -e } else { e };
    }
    if m > (1u64 << 53) || !(-22..=22).contains(&exp) {
        return None;
    }
    let v = if exp < 0 {
        m as f64 / POW10[(-exp) as usize]
    } else {
        m as f64 * POW10[exp as usize]
    };
    Some(if neg { -v } else { v })
}

/// Appends the decimal digits of `b` from `i` to the mantissa `m`
/// (wrapping: callers bound the digit count); returns where they stop.
#[inline]
fn decimal_digits(b: &[u8], mut i: usize, mut m: u64) -> (usize, u64) {
    while let Some(d) = b.get(i).map(|c| c.wrapping_sub(b'0')).filter(|d| *d <= 9) {
        m = m.wrapping_mul(10).wrapping_add(d as u64);
        i += 1;
    }
    (i, m)
}

/// Where each field is in a row of this catalogue; shared by the workers.
struct Layout {
    header: Vec<String>,
    mapping: Mapping,
    delimiter: u8,
    star_col: usize,
    cand_col: usize,
    /// (slot in NUMERIC, column index), of the columns parsed and
    /// validated, and whether each is kept.
    num_cols: Vec<(usize, usize)>,
    kept: Vec<bool>,
    /// Columns whose values no rule and no caller reads (`index_only`):
    /// each cell is only checked to be a number or missing.
    checked: Vec<bool>,
    lc_col: Option<usize>,
    extra_cols: Vec<usize>,
}

/// The positions of the bytes equal to `a` or `b`, eight bytes at a time
/// (SWAR: a word's matching bytes become a bit mask, walked by trailing
/// zeros). Faster than a SIMD search restarted at every hit when hits are
/// dense, as delimiters are: one every eight bytes or so.
struct Hits2<'a> {
    bytes: &'a [u8],
    at: usize,
    base: usize,
    mask: u64,
    a: u8,
    b: u8,
}

impl<'a> Hits2<'a> {
    fn new(bytes: &'a [u8], a: u8, b: u8) -> Hits2<'a> {
        Hits2 {
            bytes,
            at: 0,
            base: 0,
            mask: 0,
            a,
            b,
        }
    }
}

/// The high bit of every zero byte of `x`, exactly (no false hits: the low
/// seven bits are added without carries between bytes).
fn zero_bytes(x: u64) -> u64 {
    const LOW7: u64 = 0x7f7f_7f7f_7f7f_7f7f;
    !(((x & LOW7) + LOW7) | x | LOW7)
}

impl Iterator for Hits2<'_> {
    type Item = usize;

    fn next(&mut self) -> Option<usize> {
        const ONES: u64 = 0x0101_0101_0101_0101;
        loop {
            if self.mask != 0 {
                let i = self.base + (self.mask.trailing_zeros() / 8) as usize;
                self.mask &= self.mask - 1;
                return Some(i);
            }
            if let Some(word) = self.bytes.get(self.at..self.at + 8) {
                let w = u64::from_le_bytes(word.try_into().unwrap_or([0; 8]));
                self.mask =
                    zero_bytes(w ^ (ONES * self.a as u64)) | zero_bytes(w ^ (ONES * self.b as u64));
                self.base = self.at;
                self.at += 8;
            } else if let Some(&c) = self.bytes.get(self.at) {
                self.at += 1;
                if c == self.a || c == self.b {
                    return Some(self.at - 1);
                }
            } else {
                return None;
            }
        }
    }
}

/// The rows of one chunk, parsed and validated, not yet deduplicated.
struct Part {
    candidates: StrPool,
    candidate_hash: Vec<u64>,
    stars: StrPool,
    star_hash: Vec<u64>,
    lines: Vec<u32>,
    /// One column per `Layout::num_cols` entry.
    num: Vec<Vec<f64>>,
    lightcurve: Option<StrPool>,
    extras: Vec<StrPool>,
    skipped: Vec<Skip>,
    rows_seen: u64,
    bytes: usize,
}

impl Layout {
    fn new(header: Vec<String>, mapping: Mapping, delimiter: u8, index_only: bool) -> Layout {
        let col = |f: Field| mapping.by_field.get(&f).copied();
        let num_cols: Vec<(usize, usize)> = NUMERIC
            .iter()
            .enumerate()
            .filter_map(|(slot, f)| col(*f).map(|c| (slot, c)))
            .collect();
        let kept: Vec<bool> = num_cols
            .iter()
            .map(|&(slot, _)| !index_only || NUMERIC[slot] == Field::DepthPpm)
            .collect();
        Layout {
            checked: num_cols
                .iter()
                .zip(&kept)
                .map(|(&(slot, _), &kept)| !kept && !REQUIRED.contains(&NUMERIC[slot]))
                .collect(),
            kept,
            num_cols,
            star_col: col(Field::Star).unwrap_or(0),
            cand_col: col(Field::Candidate).unwrap_or(0),
            lc_col: col(Field::Lightcurve),
            extra_cols: mapping.extras.iter().map(|(i, _)| *i).collect(),
            header,
            mapping,
            delimiter,
        }
    }

    /// Parses one chunk, into the memory of an absorbed part when one is
    /// given back (fresh memory costs a page fault every 4 KB).
    fn parse(
        &self,
        chunk: &Chunk,
        hasher: &hashbrown::DefaultHashBuilder,
        spare: Option<Part>,
    ) -> Part {
        let mut part = match spare {
            Some(mut p) => {
                p.candidates.clear();
                p.candidate_hash.clear();
                p.stars.clear();
                p.star_hash.clear();
                p.lines.clear();
                p.num.iter_mut().for_each(Vec::clear);
                if let Some(l) = p.lightcurve.as_mut() {
                    l.clear();
                }
                p.extras.iter_mut().for_each(StrPool::clear);
                p.skipped.clear();
                p.rows_seen = 0;
                p.bytes = chunk.bytes.len();
                p
            }
            None => Part {
                candidates: StrPool::with_capacity(chunk.bytes.len() / 100, chunk.bytes.len() / 8),
                candidate_hash: Vec::new(),
                stars: StrPool::with_capacity(chunk.bytes.len() / 100, chunk.bytes.len() / 10),
                star_hash: Vec::new(),
                lines: Vec::new(),
                num: (0..self.num_cols.len())
                    .map(|_| Vec::with_capacity(chunk.bytes.len() / 100))
                    .collect(),
                lightcurve: self.lc_col.map(|_| StrPool::default()),
                extras: vec![StrPool::default(); self.extra_cols.len()],
                skipped: Vec::new(),
                rows_seen: 0,
                bytes: chunk.bytes.len(),
            },
        };
        let mut scratch = vec![f64::NAN; NUMERIC.len()];
        // Field bounds are u32 (chunks are a few MB; a longer one takes the
        // general path).
        if chunk.bytes.len() <= u32::MAX as usize && plain_text(&chunk.bytes) {
            // No quotes and no bare CR: every line is a record and every
            // delimiter ends a field, so one scan, eight bytes at a time,
            // finds every delimiter and line end of the chunk.
            let bytes = &chunk.bytes[..];
            let mut rec = SplitRecord {
                line: bytes,
                bounds: Vec::with_capacity(32),
            };
            let (mut line, mut line_start, mut start) = (chunk.line, 0usize, 0usize);
            let ends = Hits2::new(bytes, self.delimiter, b'\n').chain(std::iter::once(bytes.len()));
            for i in ends {
                if i < bytes.len() && bytes[i] == self.delimiter {
                    rec.bounds.push((start as u32, i as u32));
                    start = i + 1;
                    continue;
                }
                if i == bytes.len() && line_start == bytes.len() {
                    break; // the chunk ended with its last line end
                }
                let end = if i > line_start && bytes[i - 1] == b'\r' {
                    i - 1
                } else {
                    i
                };
                rec.bounds.push((start as u32, end.max(start) as u32));
                let text = &bytes[line_start..end.max(line_start)];
                if !(text.starts_with(b"#") || text.iter().all(u8::is_ascii_whitespace)) {
                    self.add(&mut part, &rec, line, &mut scratch, hasher);
                }
                rec.bounds.clear();
                line += 1;
                line_start = i + 1;
                start = i + 1;
            }
            return part;
        }
        let mut rdr = csv::ReaderBuilder::new()
            .delimiter(self.delimiter)
            .comment(Some(b'#'))
            .flexible(true)
            .has_headers(false)
            .from_reader(&chunk.bytes[..]);
        let mut rec = ByteRecord::new();
        let mut last_line = chunk.line;
        // Reading from memory fails only on a broken record: that ends the chunk.
        while let Ok(true) = rdr.read_byte_record(&mut rec) {
            let line = rec
                .position()
                .map_or(last_line, |p| chunk.line + p.line() - 1);
            last_line = line;
            if rec.len() == 1 && rec[0].iter().all(u8::is_ascii_whitespace) {
                continue; // blank line
            }
            self.add(&mut part, &rec, line, &mut scratch, hasher);
        }
        part
    }

    /// Parses one record into `part`, or records why it was skipped.
    fn add(
        &self,
        part: &mut Part,
        rec: &impl Record,
        line: u64,
        scratch: &mut [f64],
        hasher: &hashbrown::DefaultHashBuilder,
    ) {
        part.rows_seen += 1;
        match self.row(rec, line, scratch) {
            Ok((star, cand)) => {
                part.candidate_hash.push(hasher.hash_one(cand.as_bytes()));
                part.candidates.push(cand);
                part.star_hash.push(hasher.hash_one(star.as_bytes()));
                part.stars.push(star);
                part.lines.push(u32::try_from(line).unwrap_or(u32::MAX));
                for (j, &(slot, _)) in self.num_cols.iter().enumerate() {
                    if self.kept[j] {
                        part.num[j].push(scratch[slot]);
                    }
                }
                if let (Some(pool), Some(col)) = (part.lightcurve.as_mut(), self.lc_col) {
                    pool.push(&String::from_utf8_lossy(rec.field(col).trim_ascii()));
                }
                for (pool, &col) in part.extras.iter_mut().zip(&self.extra_cols) {
                    pool.push(&String::from_utf8_lossy(rec.field(col)));
                }
            }
            Err(skip) => part.skipped.push(skip),
        }
    }

    fn skip(&self, line: u64, col: Option<usize>, reason: String) -> Skip {
        Skip {
            line,
            column: col.map(|c| {
                self.header
                    .get(c)
                    .cloned()
                    .unwrap_or_else(|| format!("#{}", c + 1))
            }),
            reason,
        }
    }

    fn id_cell<'r>(
        &self,
        rec: &'r impl Record,
        col: usize,
        field: Field,
        line: u64,
    ) -> Result<&'r str, Skip> {
        let raw = rec.field(col).trim_ascii();
        let s = std::str::from_utf8(raw)
            .map_err(|_| self.skip(line, Some(col), format!("{field}: not valid UTF-8")))?;
        if s.is_empty() {
            return Err(self.skip(line, Some(col), format!("{field}: empty")));
        }
        Ok(s)
    }

    /// Parses and validates one row into `scratch`; returns its (star, candidate).
    fn row<'r>(
        &self,
        rec: &'r impl Record,
        line: u64,
        scratch: &mut [f64],
    ) -> Result<(&'r str, &'r str), Skip> {
        if rec.len() != self.header.len() {
            return Err(self.skip(
                line,
                None,
                format!(
                    "has {} fields, the header has {}",
                    rec.len(),
                    self.header.len()
                ),
            ));
        }
        let star = self.id_cell(rec, self.star_col, Field::Star, line)?;
        let cand = self.id_cell(rec, self.cand_col, Field::Candidate, line)?;
        for (j, &(slot, col)) in self.num_cols.iter().enumerate() {
            let raw = rec.field(col);
            if self.checked[j] && is_number(raw) {
                continue; // its value is not kept
            }
            scratch[slot] = match parse_cell(raw) {
                Cell::Value(v) => v,
                Cell::Missing => f64::NAN,
                Cell::Bad => {
                    return Err(self.skip(
                        line,
                        Some(col),
                        format!(
                            "{}: `{}` is not a number",
                            NUMERIC[slot],
                            String::from_utf8_lossy(raw.trim_ascii())
                        ),
                    ));
                }
            };
        }
        self.validate(rec, line, scratch)?;
        Ok((star, cand))
    }

    /// The per-row rules: required fields present and numeric, period finite
    /// and positive, duration positive and shorter than the period, depth
    /// positive.
    fn validate(&self, rec: &impl Record, line: u64, scratch: &[f64]) -> Result<(), Skip> {
        let get = |f: Field| scratch[f.num_slot().unwrap_or(0)];
        let col = |f: Field| self.mapping.by_field.get(&f).copied();
        let raw = |f: Field| {
            col(f)
                .map(|c| String::from_utf8_lossy(rec.field(c).trim_ascii()).into_owned())
                .unwrap_or_default()
        };
        for f in [
            Field::PeriodD,
            Field::Epoch,
            Field::DepthPpm,
            Field::DurationH,
        ] {
            if get(f).is_nan() {
                let what = if raw(f).is_empty() {
                    "missing".to_string()
                } else {
                    format!("`{}` is not a finite number", raw(f))
                };
                return Err(self.skip(line, col(f), format!("{f}: {what}")));
            }
        }
        let positive = |f: Field| -> Result<f64, Skip> {
            let v = get(f);
            if v > 0.0 {
                Ok(v)
            } else {
                Err(self.skip(line, col(f), format!("{f}: must be > 0, got {}", raw(f))))
            }
        };
        let period = positive(Field::PeriodD)?;
        positive(Field::DepthPpm)?;
        let dur = positive(Field::DurationH)?;
        if dur / 24.0 >= period {
            return Err(self.skip(
                line,
                col(Field::DurationH),
                format!(
                    "duration_h: {} h is not shorter than the period ({} d = {} h)",
                    raw(Field::DurationH),
                    raw(Field::PeriodD),
                    period * 24.0
                ),
            ));
        }
        Ok(())
    }
}

/// Takes parts in file order and appends them; duplicates and star ids are
/// resolved once at the end, by sorting hashes, which is far cheaper than a
/// hash-table probe per row.
struct Merger {
    name: String,
    candidates: StrPool,
    candidate_hash: Vec<u64>,
    /// The star id of every row, before interning.
    row_stars: StrPool,
    star_hash: Vec<u64>,
    lines: Vec<u32>,
    /// One column per `Layout::num_cols` entry.
    num: Vec<Vec<f64>>,
    lightcurve: Option<StrPool>,
    extras: Vec<StrPool>,
    hasher: hashbrown::DefaultHashBuilder,
    cand_header: String,
    skipped: Vec<Skip>,
    rows_seen: u64,
    reserved: bool,
}

impl Merger {
    fn new(name: String, layout: &Layout) -> Merger {
        Merger {
            name,
            candidates: StrPool::default(),
            candidate_hash: Vec::new(),
            row_stars: StrPool::default(),
            star_hash: Vec::new(),
            lines: Vec::new(),
            num: vec![Vec::new(); layout.num_cols.len()],
            lightcurve: layout.lc_col.map(|_| StrPool::default()),
            extras: vec![StrPool::default(); layout.extra_cols.len()],
            hasher: hashbrown::DefaultHashBuilder::default(),
            cand_header: layout.header[layout.cand_col].clone(),
            skipped: Vec::new(),
            rows_seen: 0,
            reserved: false,
        }
    }

    /// Sizes the columns once from the first part's rows per byte.
    fn reserve(&mut self, part: &Part, size_hint: Option<u64>) {
        self.reserved = true;
        let (Some(size), true) = (size_hint, part.bytes > 0) else {
            return;
        };
        let rows = part.lines.len() as f64 / part.bytes as f64;
        let est = (size as f64 * rows * 1.02) as usize + 16;
        let per_row = |p: &StrPool| p.byte_len() as f64 / part.lines.len().max(1) as f64;
        self.candidates =
            StrPool::with_capacity(est, (est as f64 * per_row(&part.candidates)) as usize);
        self.row_stars = StrPool::with_capacity(est, (est as f64 * per_row(&part.stars)) as usize);
        self.candidate_hash.reserve(est);
        self.star_hash.reserve(est);
        self.lines.reserve(est);
        // Columns not kept (`index_only`) stay empty.
        for (c, p) in self.num.iter_mut().zip(&part.num) {
            if !p.is_empty() {
                c.reserve(est);
            }
        }
    }

    /// Appends a part's rows; returns the part, emptied of its skips, for
    /// its memory to be used again.
    fn absorb(&mut self, mut part: Part, size_hint: Option<u64>) -> Part {
        if !self.reserved {
            self.reserve(&part, size_hint);
        }
        self.rows_seen += part.rows_seen;
        self.skipped.append(&mut part.skipped);
        self.candidates.append(&part.candidates);
        self.candidate_hash.extend_from_slice(&part.candidate_hash);
        self.row_stars.append(&part.stars);
        self.star_hash.extend_from_slice(&part.star_hash);
        self.lines.extend_from_slice(&part.lines);
        for (dst, src) in self.num.iter_mut().zip(&part.num) {
            dst.extend_from_slice(src);
        }
        if let (Some(dst), Some(src)) = (self.lightcurve.as_mut(), part.lightcurve.as_ref()) {
            dst.append(src);
        }
        for (dst, src) in self.extras.iter_mut().zip(&part.extras) {
            dst.append(src);
        }
        part
    }

    /// Removes duplicate rows (row, first row with the same id), with a skip
    /// naming the first line.
    fn remove_rows(&mut self, dups: &[(u32, u32)]) {
        let mut keep = vec![true; self.lines.len()];
        for &(row, first) in dups {
            keep[row as usize] = false;
            self.skipped.push(Skip {
                line: self.lines[row as usize] as u64,
                column: Some(self.cand_header.clone()),
                reason: format!(
                    "candidate: duplicate id `{}` (first on line {})",
                    self.candidates.get(row as usize),
                    self.lines[first as usize]
                ),
            });
        }
        fn retain<T>(v: &mut Vec<T>, keep: &[bool]) {
            let mut i = 0;
            v.retain(|_| {
                i += 1;
                keep[i - 1]
            });
        }
        self.candidates = self.candidates.filter(&keep);
        self.row_stars = self.row_stars.filter(&keep);
        retain(&mut self.candidate_hash, &keep);
        retain(&mut self.star_hash, &keep);
        retain(&mut self.lines, &keep);
        for col in &mut self.num {
            retain(col, &keep);
        }
        if let Some(p) = self.lightcurve.as_mut() {
            *p = p.filter(&keep);
        }
        for p in &mut self.extras {
            *p = p.filter(&keep);
        }
    }

    fn finish(mut self, layout: &Layout, opts: &LoadOptions) -> Result<Catalogue, LoadError> {
        if self.lines.is_empty() && self.skipped.is_empty() {
            return Err(LoadError::NoRows { path: self.name });
        }
        // Candidate ids and star ids are resolved on two threads at once.
        // Duplicate ids are rare; when there are some, their rows go and the
        // stars are grouped again without them.
        let ((candidate_lookup, dups), grouping) = std::thread::scope(|s| {
            let (rows, hashes) = (&self.row_stars, &self.star_hash);
            let stars = s.spawn(move || StarGrouping::build(rows, hashes));
            let cands = &self.candidates;
            let ids = IdIndex::build(&self.candidate_hash, |a, b| {
                cands.get(a as usize) == cands.get(b as usize)
            });
            let grouping = stars
                .join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e));
            (ids, grouping)
        });
        let (candidate_lookup, grouping) = if dups.is_empty() {
            (candidate_lookup, grouping)
        } else {
            self.remove_rows(&dups);
            let cands = &self.candidates;
            let (ids, _) = IdIndex::build(&self.candidate_hash, |a, b| {
                cands.get(a as usize) == cands.get(b as usize)
            });
            (ids, StarGrouping::build(&self.row_stars, &self.star_hash))
        };
        let Merger {
            name,
            mut candidates,
            row_stars,
            num: parsed,
            mut lightcurve,
            extras,
            hasher,
            mut skipped,
            rows_seen,
            ..
        } = self;
        let StarGrouping {
            star_of,
            first_rows,
            lookup: star_lookup,
        } = grouping;
        let mut stars = StrPool::with_capacity(first_rows.len(), row_stars.byte_len() / 2);
        for &r in &first_rows {
            stars.push(row_stars.get(r as usize));
        }
        drop(row_stars);
        // Duplicates were found after their chunk's own skips: restore file order.
        skipped.sort_by_key(|s| s.line);
        let mut num: Vec<Option<Vec<f64>>> = vec![None; NUMERIC.len()];
        for ((&(slot, _), col), &kept) in layout.num_cols.iter().zip(parsed).zip(&layout.kept) {
            if kept {
                num[slot] = Some(col);
            }
        }
        let header = &layout.header;
        let mapping = &layout.mapping;
        let mut columns = Vec::new();
        for (field, &index) in &mapping.by_field {
            let forced = opts.columns.fields.contains_key(field);
            let mut unit = field.unit().to_string();
            let mut how = if forced { "column map" } else { "synonym" }.to_string();
            if *field == Field::DepthPpm {
                let slot = Field::DepthPpm.num_slot().unwrap_or(0);
                let depths = num[slot].as_deref_mut().unwrap_or(&mut []);
                let (du, why) = depth_unit(&name, &header[index], depths, opts.depth_unit)?;
                let factor = du.to_ppm();
                if factor != 1.0 {
                    depths.iter_mut().for_each(|d| *d *= factor);
                }
                unit = format!("{} (stored as ppm)", du.name());
                how = format!("{how}; unit {why}");
            }
            columns.push(ColumnUse {
                field: field.name(),
                header: header[index].clone(),
                index,
                unit,
                how,
            });
        }
        for (index, h, f) in &mapping.shadowed {
            columns.push(ColumnUse {
                field: "",
                header: h.clone(),
                index: *index,
                unit: String::new(),
                how: format!(
                    "also names {f}, which an earlier column feeds; kept as an extra column"
                ),
            });
        }
        // Star → members, as compressed rows (counting sort by star).
        let mut member_start = vec![0u32; stars.len() + 1];
        for &s in &star_of {
            member_start[s as usize + 1] += 1;
        }
        for i in 1..member_start.len() {
            member_start[i] += member_start[i - 1];
        }
        let mut fill = member_start.clone();
        let mut members = vec![0; star_of.len()];
        for (c, &s) in star_of.iter().enumerate() {
            members[fill[s as usize] as usize] = c as CandidateId;
            fill[s as usize] += 1;
        }
        candidates.shrink_to_fit();
        for v in num.iter_mut().flatten() {
            if v.capacity() > v.len() + v.len() / 8 {
                v.shrink_to_fit();
            }
        }
        if let Some(p) = lightcurve.as_mut() {
            p.shrink_to_fit();
        }
        let extra_names = mapping.extras.iter().map(|(_, h)| h.clone());
        Ok(Catalogue {
            source: name,
            candidates,
            stars,
            index: std::sync::Arc::new(super::StarIndex {
                star_of,
                member_start,
                members,
            }),
            num,
            lightcurve,
            extras: extra_names.zip(extras).collect(),
            candidate_lookup,
            star_lookup,
            hasher,
            columns,
            skipped,
            rows_seen,
        })
    }
}

/// Rows grouped into stars: star ids in order of first appearance.
struct StarGrouping {
    star_of: Vec<StarId>,
    /// The first row of each star, by star id.
    first_rows: Vec<u32>,
    lookup: IdIndex,
}

impl StarGrouping {
    fn build(rows: &StrPool, hashes: &[u64]) -> StarGrouping {
        let (mut lookup, repeats) =
            IdIndex::build(hashes, |a, b| rows.get(a as usize) == rows.get(b as usize));
        // lookup.ids holds each star's first row; number stars in row order.
        let mut is_first = vec![false; hashes.len()];
        for &r in &lookup.ids {
            is_first[r as usize] = true;
        }
        let mut star_of = vec![0 as StarId; hashes.len()];
        let mut first_rows = Vec::with_capacity(lookup.ids.len());
        for (r, _) in is_first.iter().enumerate().filter(|(_, f)| **f) {
            star_of[r] = first_rows.len() as StarId;
            first_rows.push(r as u32);
        }
        drop(is_first);
        for id in &mut lookup.ids {
            *id = star_of[*id as usize];
        }
        for &(row, first) in &repeats {
            star_of[row as usize] = star_of[first as usize];
        }
        StarGrouping {
            star_of,
            first_rows,
            lookup,
        }
    }
}

/// (hash, row) pairs sorted by hash then row: a counting sort on the top 16
/// bits of the hash (which is uniform) straight from the hashes, then each
/// small bucket on its own. No intermediate copy of the pairs is made.
fn sorted_pairs(hashes: &[u64]) -> Vec<(u64, u32)> {
    if hashes.len() < 1 << 12 {
        let mut pairs: Vec<(u64, u32)> = hashes
            .iter()
            .enumerate()
            .map(|(i, &h)| (h, i as u32))
            .collect();
        pairs.sort_unstable();
        return pairs;
    }
    const BITS: u32 = 16;
    let bucket = |h: u64| (h >> (64 - BITS)) as usize;
    let mut start = vec![0usize; (1 << BITS) + 1];
    for &h in hashes {
        start[bucket(h) + 1] += 1;
    }
    for i in 1..start.len() {
        start[i] += start[i - 1];
    }
    let mut out = vec![(0u64, 0u32); hashes.len()];
    let mut fill = start.clone();
    for (i, &h) in hashes.iter().enumerate() {
        let b = bucket(h);
        out[fill[b]] = (h, i as u32);
        fill[b] += 1;
    }
    for w in start.windows(2) {
        out[w[0]..w[1]].sort_unstable();
    }
    out
}

/// Ids found by hash: hashes ascending, each with the row or id it names.
#[derive(Debug, Default)]
pub(super) struct IdIndex {
    hashes: Vec<u64>,
    ids: Vec<u32>,
}

impl IdIndex {
    /// Sorts (hash, row) pairs; rows whose text equals an earlier row's (as
    /// `same` says) are returned as (row, earlier row) and left out.
    fn build(hashes: &[u64], same: impl Fn(u32, u32) -> bool) -> (IdIndex, Vec<(u32, u32)>) {
        let pairs = sorted_pairs(hashes);
        let mut index = IdIndex {
            hashes: Vec::with_capacity(pairs.len()),
            ids: Vec::with_capacity(pairs.len()),
        };
        let mut repeats = Vec::new();
        let mut i = 0;
        while i < pairs.len() {
            let h = pairs[i].0;
            let run_start = index.ids.len();
            while i < pairs.len() && pairs[i].0 == h {
                let row = pairs[i].1;
                // Rows ascend within a run, so an equal earlier entry is the first.
                match index.ids[run_start..].iter().find(|&&r| same(r, row)) {
                    Some(&first) => repeats.push((row, first)),
                    None => {
                        index.hashes.push(h);
                        index.ids.push(row);
                    }
                }
                i += 1;
            }
        }
        index.hashes.shrink_to_fit();
        index.ids.shrink_to_fit();
        (index, repeats)
    }

    pub(super) fn find(&self, h: u64, eq: impl Fn(u32) -> bool) -> Option<u32> {
        let start = self.hashes.partition_point(|&x| x < h);
        self.hashes[start..]
            .iter()
            .take_while(|&&x| x == h)
            .zip(&self.ids[start..])
            .find(|(_, id)| eq(**id))
            .map(|(_, id)| *id)
    }
}

/// The depth unit: the flag, else the header's own suffix, else ppm when the
/// median depth is at least [`PPM_MEDIAN_FLOOR`]; anything else is refused.
fn depth_unit(
    path: &str,
    header: &str,
    depths: &[f64],
    flag: Option<DepthUnit>,
) -> Result<(DepthUnit, String), LoadError> {
    if let Some(u) = flag {
        return Ok((u, "from --depth-unit".into()));
    }
    if let Some(u) = DepthUnit::from_header(header) {
        return Ok((u, "from the header name".into()));
    }
    let mut v: Vec<f64> = depths.iter().copied().filter(|d| d.is_finite()).collect();
    if v.is_empty() {
        return Ok((DepthUnit::Ppm, "assumed ppm (no rows)".into()));
    }
    let mid = v.len() / 2;
    let (_, median, _) = v.select_nth_unstable_by(mid, f64::total_cmp);
    let median = *median;
    if median >= PPM_MEDIAN_FLOOR {
        Ok((
            DepthUnit::Ppm,
            format!("detected: median {median} >= {PPM_MEDIAN_FLOOR}, so ppm"),
        ))
    } else {
        Err(LoadError::DepthUnitUnknown {
            path: path.to_string(),
            header: header.to_string(),
            median,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn delimiter_by_extension_and_sniff() {
        assert_eq!(delimiter_for("a/b.TSV"), Some(b'\t'));
        assert_eq!(delimiter_for("b.tsv.gz"), Some(b'\t'));
        assert_eq!(delimiter_for("b.csv.gz"), Some(b','));
        assert_eq!(delimiter_for("b.txt"), None);
        assert_eq!(sniff(b"# a,b,c\nstar\tcandidate\tperiod\n"), b'\t');
        assert_eq!(sniff(b"star,candidate\tx,y\n"), b',');
    }

    #[test]
    fn record_ends_respect_quotes_and_comments() {
        let b = b"a,\"x\ny\",c\n# \"odd\nd,e\"f,g\n\"h\"\"\n\",i\npartial";
        let mut ends = Vec::new();
        scan_record_ends(b, b',', |e| {
            ends.push(e);
            true
        });
        // Records end after `c`, after the comment, after `g` (a quote inside
        // an unquoted field is literal), and after the escaped-quote field.
        assert_eq!(ends, [10, 17, 25, 34]);
        assert_eq!(last_record_end(b, b','), Some(34));
        assert_eq!(last_record_end(b"a,b\nc,d\ne", b','), Some(8));
        assert_eq!(first_record_end(b"\"a\nb\",c\nd"), Some(8));
    }

    #[test]
    fn hits2_finds_what_a_byte_loop_finds() {
        let mut rng = crate::demo::Rng::new(3);
        let alphabet = b",\n0a.\x80\xff\x2c\x0a\x00\x7f";
        for len in [0, 1, 7, 8, 9, 15, 16, 17, 100, 1000] {
            let bytes: Vec<u8> = (0..len)
                .map(|_| alphabet[rng.below(alphabet.len() as u64) as usize])
                .collect();
            let want: Vec<usize> = (0..len)
                .filter(|&i| bytes[i] == b',' || bytes[i] == b'\n')
                .collect();
            assert_eq!(
                Hits2::new(&bytes, b',', b'\n').collect::<Vec<_>>(),
                want,
                "{bytes:?}"
            );
            let tabs: Vec<usize> = (0..len)
                .filter(|&i| bytes[i] == 0x7f || bytes[i] == 0)
                .collect();
            assert_eq!(Hits2::new(&bytes, 0x7f, 0).collect::<Vec<_>>(), tabs);
        }
    }

    #[test]
    fn fast_path_agrees_with_std() {
        for s in [
            "0",
            "-0",
            "1",
            "3.5",
            "-12.25",
            "+7",
            "0.000123",
            "1e3",
            "2.5E-4",
            "123456789.123456",
            "9007199254740993",
            "1e22",
            "1e-22",
            "4.35",
            "0.1",
            "1234.56789",
        ] {
            let std: f64 = s.parse().unwrap();
            match fast_f64(s.as_bytes()) {
                Some(v) => assert_eq!(v.to_bits(), std.to_bits(), "{s}"),
                None => assert!(s == "9007199254740993", "{s} should take the fast path"),
            }
        }
        for s in ["", ".", "-", "1e", "1.2.3", "e5", "1e400", "abc", "1,5"] {
            assert!(fast_f64(s.as_bytes()).is_none(), "{s}");
        }
    }

    proptest::proptest! {
        #[test]
        fn fast_path_is_exact(m in 0u64..(1 << 53), frac in 0usize..12, e in -10i32..10, neg: bool) {
            let digits = m.to_string();
            let s = if frac > 0 && frac < digits.len() {
                format!("{}{}.{}e{}", if neg { "-" } else { "" }, &digits[..digits.len() - frac], &digits[digits.len() - frac..], e)
            } else {
                format!("{}{}e{}", if neg { "-" } else { "" }, digits, e)
            };
            let std: f64 = s.parse().unwrap();
            if let Some(v) = fast_f64(s.as_bytes()) {
                proptest::prop_assert_eq!(v.to_bits(), std.to_bits(), "{}", s);
            }
        }
    }

    proptest::proptest! {
        /// What `is_number` accepts, `parse_cell` reads as a value or as a
        /// non-finite one (missing), never as text that is not a number.
        #[test]
        fn a_checked_number_is_one(cell in "[ ]?[-+]?[0-9]{0,4}[.]?[0-9]{0,3}([eE][-+]?[0-9]{0,6})?[ ]?|[ -~]{0,8}") {
            if is_number(cell.as_bytes()) {
                proptest::prop_assert!(!matches!(parse_cell(cell.as_bytes()), Cell::Bad), "{}", cell);
            }
        }
    }

    #[test]
    fn numbers_are_told_from_text() {
        for yes in ["1", "-2.5", " +3.25e-4 ", "1e400", "0.000123", "5038"] {
            assert!(is_number(yes.as_bytes()), "{yes}");
        }
        for no in [
            "", "nan", "1.", ".5", "1e", "1e123456", "3.5d", "--", "1,5", "0x10",
        ] {
            assert!(!is_number(no.as_bytes()), "{no}");
        }
    }

    #[test]
    fn plain_text_has_no_quote_and_no_bare_cr() {
        assert!(plain_text(b"a,b\r\nc,d\n"));
        assert!(plain_text(b""));
        assert!(!plain_text(b"a,\"b\"\n"));
        assert!(!plain_text(b"a\rb\n"));
        assert!(!plain_text(b"a,b\r"));
    }

    #[test]
    fn cells() {
        assert!(matches!(parse_cell(b" 3.5 "), Cell::Value(v) if v == 3.5));
        assert!(matches!(parse_cell(b"+1e3"), Cell::Value(v) if v == 1000.0));
        assert!(matches!(parse_cell(b"NaN"), Cell::Missing));
        assert!(matches!(parse_cell(b""), Cell::Missing));
        assert!(matches!(parse_cell(b"inf"), Cell::Missing));
        assert!(matches!(parse_cell(b"3.5d"), Cell::Bad));
    }
}
