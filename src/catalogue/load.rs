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
use super::formats::{self, TableFormat};
use super::pool::StrPool;
use super::units;
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
    /// Per header column, the unit the table's own header states (IPAC,
    /// VOTable, FITS, ECSV); set by the format readers, empty for CSV.
    pub header_units: Vec<String>,
    /// The FITS extension holding the catalogue (default: the first table).
    pub hdu: Option<String>,
    /// Bytes of the file read so far, for a progress display.
    pub progress: Option<std::sync::Arc<std::sync::atomic::AtomicU64>>,
}

/// A reader that adds the bytes it reads to a shared counter.
struct Counted<R> {
    inner: R,
    read: std::sync::Arc<std::sync::atomic::AtomicU64>,
}

impl<R: Read> Read for Counted<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.read
            .fetch_add(n as u64, std::sync::atomic::Ordering::Relaxed);
        Ok(n)
    }
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

/// The first bytes of a file, decompressed when it is gzipped: enough to
/// tell its format.
fn peek(p: &Path) -> Result<Vec<u8>, LoadError> {
    let io = |source| LoadError::Io {
        path: p.display().to_string(),
        source,
    };
    let mut head = Vec::with_capacity(8192);
    File::open(p)
        .map_err(io)?
        .take(8192)
        .read_to_end(&mut head)
        .map_err(io)?;
    if head.starts_with(&GZIP_MAGIC) {
        let mut plain = Vec::with_capacity(8192);
        // A gzip stream cut at 8 kB ends early; what came out is enough.
        let _ = MultiGzDecoder::new(File::open(p).map_err(io)?)
            .take(8192)
            .read_to_end(&mut plain);
        return Ok(plain);
    }
    Ok(head)
}

/// Loads an IPAC, VOTable, FITS or ECSV catalogue through its conversion
/// to delimited text (see `formats`).
fn load_converted(
    p: &Path,
    format: TableFormat,
    opts: &LoadOptions,
) -> Result<Catalogue, LoadError> {
    let name = p.display().to_string();
    let io = |source| LoadError::Io {
        path: name.clone(),
        source,
    };
    let bytes = if format == TableFormat::Fits {
        Vec::new()
    } else {
        let mut raw = Vec::new();
        File::open(p)
            .and_then(|mut f| f.read_to_end(&mut raw))
            .map_err(io)?;
        if raw.starts_with(&GZIP_MAGIC) {
            let mut plain = Vec::with_capacity(raw.len() * 4);
            MultiGzDecoder::new(&raw[..])
                .read_to_end(&mut plain)
                .map_err(io)?;
            raw = plain;
        }
        raw
    };
    let converted = formats::convert(format, p, bytes, opts.hdu.as_deref())?;
    if let (Some(read), Ok(m)) = (&opts.progress, std::fs::metadata(p)) {
        read.store(m.len(), std::sync::atomic::Ordering::Relaxed);
    }
    let o = LoadOptions {
        delimiter: Some(converted.delimiter),
        header_units: converted.units,
        ..opts.clone()
    };
    let size = converted.text.len() as u64;
    let text = std::io::Cursor::new(converted.text);
    let mut cat = read_catalogue(name.clone(), text, converted.delimiter, &o, Some(size)).map_err(
        |e| match e {
            LoadError::MissingColumn {
                path,
                field,
                synonyms,
                header,
            } if format != TableFormat::Ipac && format != TableFormat::Ecsv => LoadError::Format {
                path,
                message: format!(
                    "{}: no column for required field `{field}` (looked for: {synonyms}); \
                     columns are: {header}. Name the column with --columns FILE (field = \"name\")",
                    format.name()
                ),
            },
            other => other,
        },
    )?;
    cat.format = format.name();
    if format.counts_rows() {
        for s in &mut cat.skipped {
            s.line = s.line.saturating_sub(1);
        }
    }
    Ok(cat)
}

impl Catalogue {
    /// Loads a catalogue: CSV or TSV (optionally gzipped), or an IPAC,
    /// VOTable, FITS or ECSV table, known by its name or its first bytes.
    pub fn load(source: Source<'_>, opts: &LoadOptions) -> Result<Catalogue, LoadError> {
        if let Source::Path(p) = source {
            let format = formats::detect(&p.display().to_string(), &peek(p)?)?;
            if format != TableFormat::Delimited {
                return load_converted(p, format, opts);
            }
        }
        let (name, mut size_hint, raw): (String, Option<u64>, Box<dyn Read + Send + '_>) =
            match source {
                Source::Path(p) => {
                    let name = p.display().to_string();
                    let file = File::open(p).map_err(|source| LoadError::Io {
                        path: name.clone(),
                        source,
                    })?;
                    let size = file.metadata().ok().map(|m| m.len());
                    let reader: Box<dyn Read + Send> = match &opts.progress {
                        Some(read) => Box::new(Counted {
                            inner: file,
                            read: std::sync::Arc::clone(read),
                        }),
                        None => Box::new(file),
                    };
                    (name, size, reader)
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
        // Classic Mac line ends: a CR alone, and no LF in the first read.
        let head = text.fill_buf().map_err(io_err)?;
        let cr_only =
            memchr::memchr(b'\r', head).is_some() && memchr::memchr(b'\n', head).is_none();
        let delimiter = match opts.delimiter {
            Some(d) => d,
            None => {
                delimiter_for(&ext_name).unwrap_or_else(|| sniff(text.fill_buf().unwrap_or(&[])))
            }
        };
        if cr_only {
            return read_catalogue(name, CrAsLf(text), delimiter, opts, size_hint);
        }
        read_catalogue(name, text, delimiter, opts, size_hint)
    }
}

/// Reads a CR as a line end (LF), for files whose lines end in a CR alone.
struct CrAsLf<R>(R);

impl<R: Read> Read for CrAsLf<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.0.read(buf)?;
        for b in &mut buf[..n] {
            if *b == b'\r' {
                *b = b'\n';
            }
        }
        Ok(n)
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
/// (A CR ends a line too: some files end lines with a CR alone.)
fn sniff(head: &[u8]) -> u8 {
    let line = head
        .split(|&b| b == b'\n' || b == b'\r')
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
    let conversions = unit_conversions(&name, &header_fields, &mapping, opts)?;
    let mut layout = Layout::new(header_fields, mapping, delimiter, opts.index_only);
    layout.convert = conversions
        .iter()
        .map(|(f, c)| (f.num_slot().unwrap_or(0), c.scale, c.offset))
        .collect();
    layout.convert_text = conversions.into_iter().map(|(f, c)| (f, c.text)).collect();
    let mut merger = Merger::new(name, &layout, first_line);
    if eof {
        // Everything is in memory already: no threads for a small file.
        let chunk = Chunk {
            seq: 0,
            bytes: buf,
            plain: false,
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
            let mut carry = buf;
            let mut eof = eof;
            let mut need_more = false;
            loop {
                if !eof && (need_more || carry.len() < CHUNK_BYTES) {
                    need_more = false;
                    match fill(&mut text, &mut carry, CHUNK_BYTES) {
                        Ok(e) => eof = e,
                        Err(e) => {
                            // The merger knows the line: it is where this
                            // chunk would have started.
                            let err = LoadError::Read {
                                path: path.clone(),
                                line: 0,
                                message: e.to_string(),
                            };
                            let _ = reader_tx.send((seq, Err(err)));
                            return;
                        }
                    }
                }
                // One search tells the cut and whether the workers can take
                // the chunk as plain text (no quote, no CR).
                let plain = memchr::memchr2(b'"', b'\r', &carry).is_none();
                let cut = if eof {
                    carry.len()
                } else {
                    let end = if plain {
                        memchr::memrchr(b'\n', &carry).map(|i| i + 1)
                    } else {
                        last_record_end(&carry, delimiter)
                    };
                    match end {
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
                let chunk = Chunk {
                    seq,
                    bytes: chunk,
                    plain,
                };
                if chunk_tx.send(chunk).is_err() {
                    return;
                }
                seq += 1;
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
                    Err(mut e) => {
                        if let LoadError::Read { line, .. } = &mut e {
                            *line = merger.next_line;
                        }
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

/// Where the record that csv-core reports at byte `at` really starts: past
/// the line ends and comment lines it passes over first.
fn record_start(b: &[u8], mut at: usize) -> usize {
    loop {
        match b.get(at) {
            Some(b'\r' | b'\n') => at += 1,
            Some(b'#') => {
                at = memchr::memchr(b'\n', &b[at..]).map_or(b.len(), |i| at + i + 1);
            }
            _ => return at.min(b.len()),
        }
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
    bytes: Vec<u8>,
    /// Known to hold no quote and no CR (else `plain_text` tells).
    plain: bool,
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
    match number_at(b, 0) {
        Some((v, end)) if end == b.len() => Some(v),
        _ => None,
    }
}

/// A decimal `[+-]digits[.digits][e[+-]digits]` as read by [`number_scan`].
struct Decimal {
    neg: bool,
    /// The digits as an integer (wrapped when there are more than 19).
    m: u64,
    digits: usize,
    /// The power of ten: the exponent less the fraction's digits.
    exp: i32,
}

/// Reads the decimal that starts at `b[p]` up to the first byte that
/// cannot continue it: (the decimal, that byte's position). `None` when no
/// digit starts it, an exponent has no digit or more than six.
#[inline(always)]
fn number_scan(b: &[u8], p: usize) -> Option<(Decimal, usize)> {
    let (neg, mut i) = match b.get(p) {
        Some(b'-') => (true, p + 1),
        Some(b'+') => (false, p + 1),
        _ => (false, p),
    };
    let n = b.len();
    let int_start = i;
    let mut m;
    (i, m) = decimal_digits(b, i, 0);
    let mut digits = i - int_start;
    let mut exp: i32 = 0;
    if i < n && b[i] == b'.' {
        let start = i + 1;
        (i, m) = decimal_digits(b, start, m);
        digits += i - start;
        exp = -((i - start) as i32);
    }
    if digits == 0 {
        return None;
    }
    if i < n && (b[i] == b'e' || b[i] == b'E') {
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
        if i == start || b.get(i).is_some_and(u8::is_ascii_digit) {
            return None;
        }
        exp += if eneg { -e } else { e };
    }
    Some((
        Decimal {
            neg,
            m,
            digits,
            exp,
        },
        i,
    ))
}

/// The number of [`fast_f64`]'s form that starts at `b[p]`, read up to the
/// first byte that cannot continue it: (its value, that byte's position).
/// `None` when no number starts there or it is outside the fast path (more
/// than 19 digits, m > 2^53, |e| > 22, more than six exponent digits).
#[inline(always)]
fn number_at(b: &[u8], p: usize) -> Option<(f64, usize)> {
    let (d, end) = number_scan(b, p)?;
    if d.digits > 19 || d.m > (1u64 << 53) || !(-22..=22).contains(&d.exp) {
        return None;
    }
    let v = if d.exp < 0 {
        d.m as f64 / POW10[(-d.exp) as usize]
    } else {
        d.m as f64 * POW10[d.exp as usize]
    };
    Some((if d.neg { -v } else { v }, end))
}

/// `end`, or one byte less when `b[start..end]` ends in a CR (of a CRLF).
fn before_cr(b: &[u8], start: usize, end: usize) -> usize {
    if end > start && b[end - 1] == b'\r' {
        end - 1
    } else {
        end
    }
}

/// Where the text cell that starts at `b[p]` ends: the next delimiter or
/// line end, or the end of `b`. Eight bytes at a time (SWAR: a word's
/// matching bytes become a bit mask), as cells are short.
#[inline]
fn text_end(b: &[u8], mut p: usize, delimiter: u8) -> usize {
    const ONES: u64 = 0x0101_0101_0101_0101;
    while let Some(word) = b.get(p..p + 8) {
        let w = u64::from_le_bytes(word.try_into().unwrap_or([0; 8]));
        let hits =
            zero_bytes(w ^ (ONES * delimiter as u64)) | zero_bytes(w ^ (ONES * b'\n' as u64));
        if hits != 0 {
            return p + (hits.trailing_zeros() / 8) as usize;
        }
        p += 8;
    }
    while p < b.len() && b[p] != delimiter && b[p] != b'\n' {
        p += 1;
    }
    p
}

/// Appends the decimal digits of `b` from `i` to the mantissa `m`
/// (wrapping: callers bound the digit count); returns where they stop.
/// (Eight digits at a time by SWAR multiplications was tried: slower, as
/// most runs here are a few digits long.)
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
    /// What `quick_row` does with each column, by column index.
    roles: Vec<Role>,
    /// Unit conversions a table's header asks for: (slot, scale, offset);
    /// stored = raw × scale + offset, applied before the row rules.
    convert: Vec<(usize, f64, f64)>,
    /// The same conversions in words, by field, for the summary.
    convert_text: Vec<(Field, String)>,
}

/// A column as `Layout::quick_row` reads it.
#[derive(Clone, Copy)]
enum Role {
    /// The star or candidate id.
    Id,
    /// A numeric field, parsed into this slot of the scratch row.
    Number(usize),
    /// A numeric field whose value nothing reads (`index_only`): it is
    /// only checked to be a number, else read as `Number` is.
    Checked(usize),
    /// Any other column: only its bounds are kept.
    Text,
}

/// The high bit of every zero byte of `x`, exactly (no false hits: the low
/// seven bits are added without carries between bytes).
fn zero_bytes(x: u64) -> u64 {
    const LOW7: u64 = 0x7f7f_7f7f_7f7f_7f7f;
    !(((x & LOW7) + LOW7) | x | LOW7)
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
    /// Line ends in the chunk: lines here count from 0 at its start.
    newlines: u64,
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
        let checked: Vec<bool> = num_cols
            .iter()
            .zip(&kept)
            .map(|(&(slot, _), &kept)| !kept && !REQUIRED.contains(&NUMERIC[slot]))
            .collect();
        let roles = (0..header.len())
            .map(|c| {
                if Some(c) == col(Field::Star) || Some(c) == col(Field::Candidate) {
                    Role::Id
                } else if let Some(j) = num_cols.iter().position(|n| n.1 == c) {
                    if checked[j] {
                        Role::Checked(num_cols[j].0)
                    } else {
                        Role::Number(num_cols[j].0)
                    }
                } else {
                    Role::Text
                }
            })
            .collect();
        Layout {
            roles,
            convert: Vec::new(),
            convert_text: Vec::new(),
            checked,
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
                p.newlines = 0;
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
                newlines: 0,
            },
        };
        let mut scratch = vec![f64::NAN; NUMERIC.len()];
        // Field bounds are u32 (chunks are a few MB; a longer one takes the
        // general path).
        if chunk.bytes.len() <= u32::MAX as usize && (chunk.plain || plain_text(&chunk.bytes)) {
            // No quotes and no bare CR: every line is a record and every
            // delimiter ends a field. A row in the plainest form is read in
            // one pass, each cell parsed as it is found; any other row is
            // cut at its delimiters and read by the general rules.
            let bytes = &chunk.bytes[..];
            let mut rec = SplitRecord {
                line: bytes,
                bounds: Vec::with_capacity(self.header.len()),
            };
            // One UTF-8 check of the whole chunk (it nearly always passes)
            // makes each id's a check of its two ends.
            let text = std::str::from_utf8(bytes).ok();
            let id = |(a, b): (u32, u32)| match text {
                Some(t) => t.get(a as usize..b as usize),
                None => std::str::from_utf8(&bytes[a as usize..b as usize]).ok(),
            };
            let (mut line, mut start) = (0u64, 0usize);
            while start < bytes.len() {
                let end = match self.quick_row(bytes, start, &mut rec, &mut scratch) {
                    Some(end) => {
                        let ids = (id(rec.bounds[self.star_col]), id(rec.bounds[self.cand_col]));
                        if let (Some(star), Some(cand)) = ids {
                            let row = self
                                .validate(&rec, line, &mut scratch)
                                .map(|()| (star, cand));
                            self.push_row(&mut part, &rec, line, &scratch, hasher, row);
                        } else {
                            // Not UTF-8: the general rules say so.
                            self.add(&mut part, &rec, line, &mut scratch, hasher);
                        }
                        end
                    }
                    None => {
                        let end = memchr::memchr(b'\n', &bytes[start..])
                            .map_or(bytes.len(), |i| start + i);
                        self.split_line(bytes, start, end, &mut rec);
                        let text = &bytes[start..rec.bounds.last().map_or(start, |b| b.1 as usize)];
                        if !(text.starts_with(b"#") || text.iter().all(u8::is_ascii_whitespace)) {
                            self.add(&mut part, &rec, line, &mut scratch, hasher);
                        }
                        end
                    }
                };
                line += 1;
                start = end + 1;
            }
            // Every line but perhaps the last ended in a line end.
            part.newlines = line.saturating_sub(u64::from(!bytes.ends_with(b"\n")));
            return part;
        }
        let mut rdr = csv::ReaderBuilder::new()
            .delimiter(self.delimiter)
            .comment(Some(b'#'))
            .flexible(true)
            .has_headers(false)
            .from_reader(&chunk.bytes[..]);
        let mut rec = ByteRecord::new();
        // The line of a record's first byte, by counting line ends up to it:
        // csv-core's own count leaves out blank lines, comments and CRLFs.
        let (mut counted_to, mut line) = (0usize, 0u64);
        // Reading from memory fails only on a broken record: that ends the chunk.
        while let Ok(true) = rdr.read_byte_record(&mut rec) {
            if let Some(p) = rec.position() {
                let at = record_start(&chunk.bytes, p.byte() as usize).max(counted_to);
                line += count_newlines(&chunk.bytes[counted_to..at]);
                counted_to = at;
            }
            if rec.len() == 1 && rec[0].iter().all(u8::is_ascii_whitespace) {
                continue; // blank line
            }
            self.add(&mut part, &rec, line, &mut scratch, hasher);
        }
        part.newlines = count_newlines(&chunk.bytes);
        part
    }

    /// Reads the record that starts at `start` of a plain-text chunk when
    /// it is in the plainest form: one cell per header column, ids with no
    /// blank at either end, numbers that [`number_at`] reads exactly
    /// or empty or a missing token. Fills `rec.bounds` (line ends and a CR
    /// before them excluded) and the numbers' slots of `scratch`; returns
    /// where the record's line ends (its `\n`, or the chunk's end). `None`
    /// for any other row, which the general reader then takes, with its
    /// messages; so a row read here reads the same as there.
    fn quick_row(
        &self,
        b: &[u8],
        start: usize,
        rec: &mut SplitRecord,
        scratch: &mut [f64],
    ) -> Option<usize> {
        rec.bounds.clear();
        let last = self.roles.len().checked_sub(1)?;
        let mut p = start;
        for (c, role) in self.roles.iter().enumerate() {
            let stop =
                |q: usize| q == b.len() || b[q] == self.delimiter || b[q] == b'\n' || b[q] == b'\r';
            // A value nothing reads needs only to be a number: any decimal
            // of `number_scan`'s form is one (some read as inf, which is
            // missing, never bad).
            let checked = match role {
                Role::Checked(_) => number_scan(b, p).map(|(_, q)| q).filter(|&q| stop(q)),
                _ => None,
            };
            let mut end = match (*role, checked) {
                (_, Some(q)) => q,
                (Role::Number(slot) | Role::Checked(slot), None) => match number_at(b, p) {
                    Some((v, q)) if stop(q) => {
                        scratch[slot] = v;
                        q
                    }
                    Some(_) => return None,
                    None => {
                        let q = before_cr(b, p, text_end(b, p, self.delimiter));
                        if !MISSING_TOKENS.contains(&&b[p..q]) {
                            return None;
                        }
                        scratch[slot] = f64::NAN;
                        q
                    }
                },
                (Role::Id | Role::Text, None) => before_cr(b, p, text_end(b, p, self.delimiter)),
            };
            if let Role::Id = role {
                let id = &b[p..end];
                let plain = |c: &u8| !c.is_ascii_whitespace();
                if !(id.first().is_some_and(plain) && id.last().is_some_and(plain)) {
                    return None;
                }
            }
            rec.bounds.push((p as u32, end as u32));
            if c < last {
                if b.get(end) != Some(&self.delimiter) {
                    return None;
                }
            } else {
                if b.get(end) == Some(&b'\r') {
                    end += 1;
                }
                return match b.get(end) {
                    None | Some(b'\n') => Some(end),
                    Some(_) => None,
                };
            }
            p = end + 1;
        }
        None
    }

    /// Cuts the line `b[start..end]` (`end` at its `\n` or the chunk's end)
    /// at its delimiters into `rec.bounds`, a CR before the line end left out.
    fn split_line(&self, b: &[u8], start: usize, end: usize, rec: &mut SplitRecord) {
        rec.bounds.clear();
        let end = before_cr(b, start, end);
        let line = &b[..end];
        let mut p = start;
        loop {
            let q = text_end(line, p, self.delimiter);
            rec.bounds.push((p as u32, q as u32));
            if q >= end {
                return;
            }
            p = q + 1;
        }
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
        let row = self.row(rec, line, scratch);
        self.push_row(part, rec, line, scratch, hasher, row);
    }

    /// Appends a row read as (star, candidate) with its numbers in
    /// `scratch`, or records why it was skipped.
    fn push_row(
        &self,
        part: &mut Part,
        rec: &impl Record,
        line: u64,
        scratch: &[f64],
        hasher: &hashbrown::DefaultHashBuilder,
        row: Result<(&str, &str), Skip>,
    ) {
        part.rows_seen += 1;
        match row {
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
    fn validate(&self, rec: &impl Record, line: u64, scratch: &mut [f64]) -> Result<(), Skip> {
        for &(slot, scale, offset) in &self.convert {
            scratch[slot] = scratch[slot] * scale + offset;
        }
        let scratch = &*scratch;
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
    /// The file's line at the start of the next part (parts number their
    /// lines from their own start).
    next_line: u64,
}

impl Merger {
    fn new(name: String, layout: &Layout, first_line: u64) -> Merger {
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
            next_line: first_line,
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
        let base = self.next_line;
        self.next_line += part.newlines;
        for skip in &mut part.skipped {
            skip.line += base;
        }
        self.skipped.append(&mut part.skipped);
        self.candidates.append(&part.candidates);
        self.candidate_hash.extend_from_slice(&part.candidate_hash);
        self.row_stars.append(&part.stars);
        self.star_hash.extend_from_slice(&part.star_hash);
        let line = |l: &u32| u32::try_from(base + *l as u64).unwrap_or(u32::MAX);
        self.lines.extend(part.lines.iter().map(line));
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
        // Candidate ids and star ids are grouped by hash on two threads at
        // once, then checked by text on both (star ids repeat: most of the
        // work). Duplicate ids are rare; when there are some, their rows go
        // and the stars are grouped again without them.
        let (cands, stars) = std::thread::scope(|s| {
            let stars = s.spawn(|| Grouped::new(&self.star_hash));
            let cands = Grouped::new(&self.candidate_hash);
            let stars = stars
                .join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e));
            (cands, stars)
        });
        let (cand_ids, star_ids) = (&self.candidates, &self.row_stars);
        let same_cand = |a: u32, b: u32| cand_ids.get(a as usize) == cand_ids.get(b as usize);
        let same_star = |a: u32, b: u32| star_ids.get(a as usize) == star_ids.get(b as usize);
        let cands_agree = all_blocks(self.candidate_hash.len(), |r| cands.agrees(r, &same_cand));
        let stars_agree = all_blocks(self.star_hash.len(), |r| stars.agrees(r, &same_star));
        let (candidate_lookup, first_of) =
            cands.settle(cands_agree, &self.candidate_hash, same_cand);
        let grouping = StarGrouping::number(stars.settle(stars_agree, &self.star_hash, same_star));
        let dups: Vec<(u32, u32)> = (first_of.iter().enumerate())
            .filter(|&(r, &f)| f as usize != r)
            .map(|(r, &f)| (r as u32, f))
            .collect();
        drop(first_of);
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
        // The stars' ids and the star → members rows, on two threads.
        let (stars, (member_start, members)) = std::thread::scope(|s| {
            let ids = s.spawn(|| {
                let mut stars = StrPool::with_capacity(first_rows.len(), row_stars.byte_len() / 2);
                for &r in &first_rows {
                    stars.push(row_stars.get(r as usize));
                }
                stars
            });
            let members = star_members(&star_of, first_rows.len());
            let stars = ids.join().unwrap_or_else(|e| std::panic::resume_unwind(e));
            (stars, members)
        });
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
            let stated = opts
                .header_units
                .get(index)
                .map(|u| u.trim())
                .filter(|u| !u.is_empty());
            if *field == Field::DepthPpm {
                let slot = Field::DepthPpm.num_slot().unwrap_or(0);
                let depths = num[slot].as_deref_mut().unwrap_or(&mut []);
                let (du, why, extra) = match (opts.depth_unit, stated.map(units::depth_unit)) {
                    (None, Some(Some((du, extra)))) => (
                        du,
                        format!("from the table's unit `{}`", stated.unwrap_or("")),
                        extra,
                    ),
                    (None, Some(None)) => {
                        return Err(LoadError::Format {
                            path: name,
                            message: format!(
                                "column `{}`: the table gives depth in `{}`, which starsift does \
                                 not convert (ppm, %, ppt, fraction); say which with --depth-unit",
                                header[index],
                                stated.unwrap_or("")
                            ),
                        });
                    }
                    _ => {
                        let (du, why) = depth_unit(&name, &header[index], depths, opts.depth_unit)?;
                        (du, why, 1.0)
                    }
                };
                let factor = du.to_ppm() * extra;
                if factor != 1.0 {
                    depths.iter_mut().for_each(|d| *d *= factor);
                }
                unit = format!("{} (stored as ppm)", du.name());
                if extra != 1.0 {
                    unit = format!("{} (stored as ppm)", stated.unwrap_or(""));
                }
                how = format!("{how}; unit {why}");
            } else if let Some(u) = stated {
                how = match layout.convert_text.iter().find(|(f, _)| f == field) {
                    Some((_, text)) => format!("{how}; {text}"),
                    None => format!("{how}; table unit {u}"),
                };
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
            format: TableFormat::Delimited.name(),
        })
    }
}

/// Star → members as compressed rows: where each star's members start in
/// the list of members (one more entry at the end), and the list, in file
/// order within a star (a counting sort by star).
fn star_members(star_of: &[StarId], stars: usize) -> (Vec<u32>, Vec<CandidateId>) {
    let mut member_start = vec![0u32; stars + 1];
    for &s in star_of {
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
    (member_start, members)
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
        let same = |a: u32, b: u32| rows.get(a as usize) == rows.get(b as usize);
        StarGrouping::number(IdIndex::build(hashes, same))
    }

    /// Stars numbered from (index, first row of each row).
    fn number((mut lookup, mut star_of): (IdIndex, Vec<u32>)) -> StarGrouping {
        // star_of holds each row's first row; number the stars in row order,
        // in place: a first row comes before the rows that repeat it.
        let mut first_rows = Vec::with_capacity(lookup.keys.len());
        for r in 0..star_of.len() {
            let first = star_of[r] as usize;
            star_of[r] = if first == r {
                first_rows.push(r as u32);
                (first_rows.len() - 1) as StarId
            } else {
                star_of[first]
            };
        }
        // The index names each star by its first row: make it the star id.
        lookup.rename(|row| star_of[row as usize]);
        StarGrouping {
            star_of,
            first_rows,
            lookup,
        }
    }
}

/// Ids found by hash, in one sorted array of keys. A key is an id's hash
/// with its low bits replaced by the row (or star id) it names, so that one
/// sort of 8-byte keys orders rows by hash and, within a hash, by row.
#[derive(Debug, Default)]
pub(super) struct IdIndex {
    keys: Vec<u64>,
    /// How many low bits of a key hold the id.
    id_bits: u32,
}

impl IdIndex {
    fn mask(&self) -> u64 {
        (1u64 << self.id_bits) - 1
    }

    /// Groups rows by id: the index of each id's first row, and for every
    /// row the first row whose text is the same (`same` says), itself when
    /// it is the first. Rows whose keys share a hash part are taken as one
    /// id, then checked in row order, so that one side of every comparison
    /// is read in sequence; a collision (two texts, one hash part; rare)
    /// sends the build through the slower path that compares within each
    /// hash part.
    fn build(hashes: &[u64], same: impl Fn(u32, u32) -> bool) -> (IdIndex, Vec<u32>) {
        let grouped = Grouped::new(hashes);
        let agreed = grouped.agrees(0..hashes.len(), &same);
        grouped.settle(agreed, hashes, same)
    }

    /// `build` when some hash part is shared by different texts: within
    /// each run of one hash part, every row is compared with the distinct
    /// texts before it.
    fn build_comparing(
        mut self,
        keys: &[u64],
        mut first_of: Vec<u32>,
        same: impl Fn(u32, u32) -> bool,
    ) -> (IdIndex, Vec<u32>) {
        let (bits, mask) = (self.id_bits, self.mask());
        let mut i = 0;
        while i < keys.len() {
            let hash = keys[i] >> bits;
            let run_start = self.keys.len();
            while i < keys.len() && keys[i] >> bits == hash {
                let row = (keys[i] & mask) as u32;
                // Rows ascend within a run, so an equal earlier entry is the first.
                let earlier = self.keys[run_start..].iter().map(|k| (k & mask) as u32);
                match earlier.clone().find(|&r| same(r, row)) {
                    Some(first) => first_of[row as usize] = first,
                    None => {
                        first_of[row as usize] = row;
                        self.keys.push(keys[i]);
                    }
                }
                i += 1;
            }
        }
        self.keys.shrink_to_fit();
        (self, first_of)
    }

    /// Renames every id (a row, when built) by `to`.
    fn rename(&mut self, to: impl Fn(u32) -> u32) {
        let mask = self.mask();
        for k in &mut self.keys {
            *k = (*k & !mask) | to((*k & mask) as u32) as u64;
        }
    }

    pub(super) fn find(&self, h: u64, eq: impl Fn(u32) -> bool) -> Option<u32> {
        let (bits, mask) = (self.id_bits, self.mask());
        let hash = h >> bits;
        let start = self.keys.partition_point(|&k| k >> bits < hash);
        self.keys[start..]
            .iter()
            .take_while(|&&k| k >> bits == hash)
            .map(|&k| (k & mask) as u32)
            .find(|&id| eq(id))
    }
}

/// Rows grouped by hash alone, for `IdIndex::build`: the index of each
/// hash's first row, and each row's first row of the same hash.
struct Grouped {
    index: IdIndex,
    first_of: Vec<u32>,
}

impl Grouped {
    fn new(hashes: &[u64]) -> Grouped {
        let id_bits = (usize::BITS - hashes.len().leading_zeros()).max(1);
        let keys = sorted_keys(hashes, id_bits);
        let mut index = IdIndex {
            keys: Vec::with_capacity(keys.len()),
            id_bits,
        };
        let mask = index.mask();
        let mut first_of: Vec<u32> = (0..hashes.len() as u32).collect();
        let mut i = 0;
        while i < keys.len() {
            let (hash, first) = (keys[i] >> id_bits, (keys[i] & mask) as u32);
            index.keys.push(keys[i]);
            i += 1;
            while i < keys.len() && keys[i] >> id_bits == hash {
                first_of[(keys[i] & mask) as usize] = first;
                i += 1;
            }
        }
        Grouped { index, first_of }
    }

    /// True when each of these rows that is grouped with an earlier row
    /// has its text (`same` says), in row order: one side of every
    /// comparison is then read in sequence.
    fn agrees(&self, rows: std::ops::Range<usize>, same: &impl Fn(u32, u32) -> bool) -> bool {
        (self.first_of[rows.clone()].iter().zip(rows))
            .all(|(&f, r)| f as usize == r || same(f, r as u32))
    }

    /// The index and first rows: as grouped when the texts `agreed`, else
    /// by the slower path that compares within each hash part (a collision:
    /// two texts, one hash part; rare).
    fn settle(
        self,
        agreed: bool,
        hashes: &[u64],
        same: impl Fn(u32, u32) -> bool,
    ) -> (IdIndex, Vec<u32>) {
        let Grouped {
            mut index,
            first_of,
        } = self;
        if agreed {
            index.keys.shrink_to_fit();
            return (index, first_of);
        }
        // The keys again (they are not kept meanwhile: memory).
        let keys = sorted_keys(hashes, index.id_bits);
        index.keys.clear();
        index.build_comparing(&keys, first_of, same)
    }
}

/// True when `test` passes for every block of `0..n`, tried on two threads
/// (blocks handed out in turn, so uneven blocks still share the work).
fn all_blocks(n: usize, test: impl Fn(std::ops::Range<usize>) -> bool + Sync) -> bool {
    use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
    const BLOCK: usize = 1 << 15;
    let next = AtomicUsize::new(0);
    let failed = AtomicBool::new(false);
    let work = || {
        loop {
            let start = next.fetch_add(1, Ordering::Relaxed) * BLOCK;
            if start >= n || failed.load(Ordering::Relaxed) {
                return;
            }
            if !test(start..(start + BLOCK).min(n)) {
                failed.store(true, Ordering::Relaxed);
            }
        }
    };
    std::thread::scope(|s| {
        s.spawn(work);
        work();
    });
    !failed.load(Ordering::Relaxed)
}

/// The keys of `hashes` (each hash with its low `id_bits` bits replaced by
/// its row), sorted. A radix sort on the top bits of the hash (which is
/// uniform, and seeded afresh in every process): one scatter by the top 8
/// bits, whose 256 write positions stay in cache and in the TLB, then each
/// bucket (in cache) by the next 11 bits through a small buffer, then one
/// insertion pass over the bucket for the key or two that share those bits.
fn sorted_keys(hashes: &[u64], id_bits: u32) -> Vec<u64> {
    let key = |(row, &h): (usize, &u64)| (h >> id_bits << id_bits) | row as u64;
    if hashes.len() < 1 << 12 {
        let mut keys: Vec<u64> = hashes.iter().enumerate().map(key).collect();
        keys.sort_unstable();
        return keys;
    }
    const TOP: u32 = 8;
    const NEXT: u32 = 11;
    let top = |k: u64| (k >> (64 - TOP)) as usize;
    let next = |k: u64| ((k >> (64 - TOP - NEXT)) & ((1 << NEXT) - 1)) as usize;
    let mut start = vec![0usize; (1 << TOP) + 1];
    for &h in hashes {
        start[top(h) + 1] += 1;
    }
    for i in 1..start.len() {
        start[i] += start[i - 1];
    }
    let mut out = vec![0u64; hashes.len()];
    let mut fill = start.clone();
    for k in hashes.iter().enumerate().map(key) {
        let b = top(k);
        out[fill[b]] = k;
        fill[b] += 1;
    }
    let mut buf = Vec::new();
    let mut count = vec![0usize; (1 << NEXT) + 1];
    for w in start.windows(2) {
        let bucket = &mut out[w[0]..w[1]];
        count.fill(0);
        for &k in bucket.iter() {
            count[next(k) + 1] += 1;
        }
        for i in 1..count.len() {
            count[i] += count[i - 1];
        }
        buf.clear();
        buf.resize(bucket.len(), 0);
        for &k in bucket.iter() {
            let d = next(k);
            buf[count[d]] = k;
            count[d] += 1;
        }
        bucket.copy_from_slice(&buf);
        nearly_sorted(bucket);
    }
    out
}

/// Sorts keys already in order but for short runs: by insertion, which
/// costs one step per key plus one per key out of place. A run longer than
/// a uniform hash would give (many ids with one hash prefix) is sorted
/// whole instead, so no input costs more than O(n log n).
fn nearly_sorted(v: &mut [u64]) {
    let mut moves = 0usize;
    for i in 1..v.len() {
        let x = v[i];
        let mut j = i;
        while j > 0 && v[j - 1] > x {
            v[j] = v[j - 1];
            j -= 1;
        }
        v[j] = x;
        moves += i - j;
        if moves > 8 * v.len() + 64 {
            v.sort_unstable();
            return;
        }
    }
}

/// The conversions the units in a table's header imply for the fields
/// stored in days or hours and for the epoch (depth has its own rule, see
/// [`depth_unit`]); a unit that cannot be converted stops the load.
fn unit_conversions(
    name: &str,
    header: &[String],
    mapping: &Mapping,
    opts: &LoadOptions,
) -> Result<Vec<(Field, units::Conversion)>, LoadError> {
    let mut out = Vec::new();
    for (field, &index) in &mapping.by_field {
        let Some(u) = opts.header_units.get(index).map(|u| u.trim()) else {
            continue;
        };
        let c = units::conversion(*field, u).map_err(|m| LoadError::Format {
            path: name.to_string(),
            message: format!("column `{}` ({field}): {m}", header[index]),
        })?;
        if let Some(c) = c {
            out.push((*field, c));
        }
    }
    Ok(out)
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
    fn text_end_finds_what_a_byte_loop_finds() {
        let mut rng = crate::demo::Rng::new(3);
        let alphabet = b",\n0a.\x80\xff\t\x00\x7f";
        for len in [0, 1, 7, 8, 9, 15, 16, 17, 100, 1000] {
            let bytes: Vec<u8> = (0..len)
                .map(|_| alphabet[rng.below(alphabet.len() as u64) as usize])
                .collect();
            for delimiter in [b',', b'\t'] {
                for p in 0..=len {
                    let want = (p..len)
                        .find(|&i| bytes[i] == delimiter || bytes[i] == b'\n')
                        .unwrap_or(len);
                    assert_eq!(text_end(&bytes, p, delimiter), want, "{bytes:?} from {p}");
                }
            }
        }
    }

    /// Parses `text` (rows after a header of `header`) as one chunk, as the
    /// loader does: by the one-pass reader when `plain`, else by the
    /// general (csv-core) reader, which a quote in a trailing comment forces.
    /// The delimiter is a tab when the header has one, else a comma.
    fn parse_rows(header: &str, text: &[u8], plain: bool, index_only: bool) -> Part {
        let delimiter = if header.contains('\t') { b'\t' } else { b',' };
        let header: Vec<String> = (header.split(delimiter as char))
            .map(str::to_string)
            .collect();
        let mapping = Mapping::resolve("t.csv", &header, &ColumnMap::default()).expect("header");
        let layout = Layout::new(header, mapping, delimiter, index_only);
        let mut bytes = text.to_vec();
        if !plain {
            bytes.extend_from_slice(b"\n#\"\n");
        }
        let chunk = Chunk {
            seq: 0,
            bytes,
            plain: false,
        };
        layout.parse(&chunk, &hashbrown::DefaultHashBuilder::default(), None)
    }

    /// A part as comparable text: every kept row and every skip.
    fn part_text(p: &Part) -> Vec<String> {
        let mut out: Vec<String> = (0..p.lines.len())
            .map(|r| {
                let nums: Vec<String> = p
                    .num
                    .iter()
                    .filter_map(|c| c.get(r))
                    .map(|v| format!("{:?}", v.to_bits()))
                    .collect();
                format!(
                    "{} {} {} {}",
                    p.lines[r],
                    p.stars.get(r),
                    p.candidates.get(r),
                    nums.join(" ")
                )
            })
            .collect();
        out.extend(p.skipped.iter().map(|s| format!("{s:?}")));
        out.push(format!("rows {}", p.rows_seen));
        out
    }

    #[test]
    fn one_pass_rows_read_as_the_general_reader_reads_them() {
        // Every kind of cell the one-pass reader takes or hands on.
        let header = "star,candidate,period,epoch,depth_ppm,duration_h,snr,note";
        let text = "S1,S1-a,10.5,100.25,500,3.5,12,x\n\
                    S1,S1-b,2e1,1.5E+2,2.5e-3,1,,\n\
                    S2, S2-a,10,100,500,3,nan,y z\n\
                    S2,S2-b ,10,100,500,3,NaN,\r\n\
                    S3,S3-a,10 ,100,500,3,1,\n\
                    S3,S3-b,12345678901234567890,100,500,3,1,q\n\
                    S4,S4-a,10,100,500,300,1,q\n\
                    S4,S4-b,10,100,-5,3,1,q\n\
                    S5,S5-a,10,100,500,3,1\n\
                    S5,S5-b,10,100,500,3,1,q,extra\n\
                    \n\
                    # a comment\n\
                    \u{e9}toile,\u{e9}-1,1,2,3,4,5,6\r\n\
                    S6,S6-a,10,100,abc,3,1,q\n\
                    S6,S6-b,1e999,100,500,3,1e-999,q\n\
                    S7,,10,100,500,3,1,q\n\
                    S7,S7-a,.5,-.5,+500,3.,1,q\n\
                    S7,S7-b,10,100,500,3,1e1234567,q\n\
                    S8,S8-a,1,2,3,4,5,last";
        for text in [
            text.as_bytes(),
            &[text.as_bytes(), b"\nS9,S9-\xff,1,2,3,4,5,6"].concat(),
        ] {
            for index_only in [false, true] {
                let plain = parse_rows(header, text, true, index_only);
                let general = parse_rows(header, text, false, index_only);
                assert_eq!(part_text(&plain), part_text(&general));
            }
        }
        let plain = parse_rows(header, text.as_bytes(), true, false);
        assert!(
            plain.lines.len() >= 8 && plain.skipped.len() >= 6,
            "{:?}",
            part_text(&plain)
        );
    }

    proptest::proptest! {
        #[test]
        fn one_pass_reader_agrees_on_random_rows(
            rows in proptest::collection::vec(
                (0usize..8, proptest::collection::vec(0usize..24, 8), 0usize..10, proptest::bool::ANY),
                1..30,
            )
        ) {
            const IDS: [&str; 8] = ["S1", "S2", " S3", "S4 ", "", "\u{e9}", "a b", "S1"];
            const NUMS: [&str; 24] = [
                "1", "-2.5", "1e3", "1e999", "", "nan", "NA", "abc", " 4", "5 ",
                "12345678901234567890", ".5", "1.", "+3", "0", "2.5E-2",
                ".", "-", "1.2.3", "-.5", "5-", "123456789012345", "1234567890123456", "inf",
            ];
            let header = "star,candidate,period,epoch,depth_ppm,duration_h,snr,impact";
            let mut text = String::new();
            for (i, (id, cells, shape, crlf)) in rows.iter().enumerate() {
                let mut fields = vec![IDS[*id].to_string(), format!("c{i}")];
                fields.extend(cells[..6].iter().map(|&c| NUMS[c].to_string()));
                match shape {
                    0 => { fields.pop(); }
                    1 => fields.push("x".into()),
                    2 => fields = vec!["# note".into()],
                    3 => fields = vec![String::new()],
                    _ => {}
                }
                text.push_str(&fields.join(","));
                text.push_str(if *crlf { "\r\n" } else { "\n" });
            }
            for index_only in [false, true] {
                let plain = parse_rows(header, text.as_bytes(), true, index_only);
                let general = parse_rows(header, text.as_bytes(), false, index_only);
                proptest::prop_assert_eq!(part_text(&plain), part_text(&general));
                // The same rows as TSV.
                let (header, text) = (header.replace(',', "\t"), text.replace(',', "\t"));
                let plain = parse_rows(&header, text.as_bytes(), true, index_only);
                let general = parse_rows(&header, text.as_bytes(), false, index_only);
                proptest::prop_assert_eq!(part_text(&plain), part_text(&general));
            }
        }
    }

    #[test]
    fn a_checked_decimal_is_a_number() {
        // What the quick check takes (its value unread) must never be a bad cell.
        let take = [
            "0",
            "5038",
            "0.043",
            "-45.64639",
            ".5",
            "5.",
            "-.5",
            "+3",
            "1e3",
            "2.5E-2",
            "1e999",
            "123456789012345678901234567890",
            "1.40e-4",
        ];
        let leave = ["", ".", "-", "e5", "1e", "1e+", "1e1234567", "nan", "--1"];
        for cell in take {
            let row = format!("{cell},rest");
            assert_eq!(
                number_scan(row.as_bytes(), 0).map(|(_, q)| q),
                Some(cell.len()),
                "{cell}"
            );
            assert!(!matches!(parse_cell(cell.as_bytes()), Cell::Bad), "{cell}");
        }
        for cell in leave {
            let row = format!("{cell},rest");
            assert!(
                number_scan(row.as_bytes(), 0).is_none_or(|(_, q)| q != cell.len()),
                "{cell}"
            );
        }
    }

    #[test]
    fn keys_sort_as_a_plain_sort_does() {
        let mut rng = crate::demo::Rng::new(5);
        for n in [0usize, 1, 100, 5000, 70_000] {
            // Few distinct hashes too, so that rows must order equal ones.
            let mut hashes: Vec<u64> = (0..n)
                .map(|i| {
                    if i % 3 == 0 {
                        rng.next_u64()
                    } else {
                        (rng.next_u64() % 7) << 60
                    }
                })
                .collect();
            if n == 5000 {
                // One prefix for all, in falling order: the insertion pass gives up.
                hashes = (0..n as u64).map(|i| (n as u64 - i) << 20).collect();
            }
            let bits = 17;
            let mut want: Vec<u64> = (hashes.iter().enumerate())
                .map(|(i, &h)| (h >> bits << bits) | i as u64)
                .collect();
            want.sort();
            assert_eq!(sorted_keys(&hashes, bits), want, "{n}");
        }
    }

    #[test]
    fn ids_group_by_text_even_when_hashes_collide() {
        // Texts by row, and hashes that collide on purpose: one hash for
        // different texts, and the same text under one hash.
        let texts = ["a", "b", "a", "c", "b", "a", "d"];
        let hashers: [fn(&str) -> u64; 3] = [
            |_| 1 << 40,
            |t| (t.len() as u64) << 40,
            |t| (t.as_bytes()[0] as u64) << 40,
        ];
        for hash in hashers {
            let hashes: Vec<u64> = texts.iter().map(|t| hash(t)).collect();
            let (index, first_of) =
                IdIndex::build(&hashes, |a, b| texts[a as usize] == texts[b as usize]);
            assert_eq!(first_of, [0, 1, 0, 3, 1, 0, 6]);
            for (row, t) in texts.iter().enumerate() {
                let found = index.find(hash(t), |r| texts[r as usize] == *t);
                assert_eq!(found, Some(first_of[row]), "{t}");
            }
            assert_eq!(index.keys.len(), 4);
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
