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

use super::Column;
use super::columns::{
    ColumnMap, ColumnUse, DepthUnit, FPP_PERCENT, Field, Mapping, NUMERIC, REQUIRED, header_unit,
};
use super::formats::{self, TableFormat};
use super::pool::StrPool;
use super::units;
use super::{CandidateId, Catalogue, LoadError, Skip, SkippedRow, StarId};

mod grouping;
mod hosts;
mod ids;
mod merge;
mod number;
mod numbered;
mod records;
mod row;
mod spelling;
mod unit_rules;

pub use hosts::{candidate_family, family_key, family_stars, is_own_star, names_no_star};
pub(super) use ids::IdIndex;
use ids::*;
use merge::*;
use number::*;
pub use number::{bounded_number, is_missing, parse_number};
use records::*;
use row::*;
pub use spelling::{rounded_number, star_key};
use unit_rules::*;

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
    /// A catalogue read from the same file before with `index_only` (the
    /// browser's table): when this read's rows name the same candidates
    /// and stars row by row, its ids and grouping are taken as they are
    /// (shared, not grouped again); else the rows are grouped as ever.
    pub ids_from: Option<std::sync::Arc<Catalogue>>,
    /// The FITS extension holding the catalogue (default: the first table).
    pub hdu: Option<String>,
    /// Bytes of the file read so far, for a progress display.
    pub progress: Option<std::sync::Arc<std::sync::atomic::AtomicU64>>,
    /// Where to leave the hash of the file's bytes as they are read (the
    /// ledger's fingerprint, `crate::fingerprint::Xxh64`, from the same
    /// read as the load).
    pub fingerprint: Option<std::sync::Arc<std::sync::atomic::AtomicU64>>,
}

/// A reader that hashes the bytes it reads (the ledger's fingerprint)
/// and leaves the hash of those read so far in `out`.
struct Hashed<R> {
    inner: R,
    state: crate::fingerprint::Xxh64,
    out: std::sync::Arc<std::sync::atomic::AtomicU64>,
}

impl<R: Read> Read for Hashed<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.state.update(&buf[..n]);
        self.out
            .store(self.state.value(), std::sync::atomic::Ordering::Relaxed);
        Ok(n)
    }
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
        if let Some(out) = &opts.fingerprint {
            let mut h = crate::fingerprint::Xxh64::new();
            h.update(&raw);
            out.store(h.value(), std::sync::atomic::Ordering::Relaxed);
        }
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
                    let file: Box<dyn Read + Send> = match &opts.fingerprint {
                        Some(out) => {
                            out.store(
                                crate::fingerprint::FNV_OFFSET,
                                std::sync::atomic::Ordering::Relaxed,
                            );
                            Box::new(Hashed {
                                inner: file,
                                state: crate::fingerprint::Xxh64::new(),
                                out: std::sync::Arc::clone(out),
                            })
                        }
                        None => Box::new(file),
                    };
                    let reader: Box<dyn Read + Send> = match &opts.progress {
                        Some(read) => Box::new(Counted {
                            inner: file,
                            read: std::sync::Arc::clone(read),
                        }),
                        None => file,
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

/// What every output says of a table of threshold-crossing events
/// ([`Catalogue::events`]).
pub(super) fn events_note() -> String {
    "the rows are threshold-crossing events, not yet candidates: a noisy or variable star's \
     false alarms come several to a star, which the multiplicity model (false positives at \
     random) does not expect, and most events are no planet. An event counts in its star's \
     system only once a vetter keeps it (decision `kept`, after its light curve): until then it \
     is held back, `unlikely` at 1:1, and none is validated"
        .to_string()
}

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
    // A table that numbers each star's signals and names none: read again
    // with a candidate column made from the star and the number.
    if let Some(cols) = numbered::columns(&header_fields, &opts.columns) {
        text.read_to_end(&mut buf).map_err(io_err)?;
        let with = numbered::with_candidates(&name, &buf, delimiter, cols)?;
        drop(buf);
        let mut cat = read_catalogue(name, std::io::Cursor::new(with), delimiter, opts, None)?;
        cat.notes.push(format!(
            "no candidate column: each row's candidate is named <star>.<nn> from its star \
             and `{}`, the number of its signal on that star",
            crate::sanitize::clean(&header_fields[cols.1])
        ));
        if !cat.events {
            cat.events = true;
            cat.notes.push(events_note());
        }
        return Ok(cat);
    }
    let mapping = Mapping::resolve(&name, &header_fields, &opts.columns)?;
    // A delimited table states its units, if at all, in its header's
    // brackets (`Period (days)`); the other formats have their own.
    // A time field's name may say it instead (`duration_days`): only where
    // the name is not a synonym as written (`period_d` is one).
    // Else the comment lines above the header may (`comment_units`).
    let from_comments = comment_units(&buf[..header_end.0]);
    let unit_of = |h: &String| {
        header_unit(h).1.or_else(|| {
            let as_written = h.trim().to_ascii_lowercase();
            super::columns::name_unit(h)
                .filter(|(f, _)| !f.synonyms().contains(&as_written.as_str()))
                .map(|(_, u)| u.to_string())
                .or_else(|| from_comments.get(&as_written).cloned())
        })
    };
    let stated;
    let opts = if opts.header_units.is_empty() && header_fields.iter().any(|h| unit_of(h).is_some())
    {
        stated = LoadOptions {
            header_units: header_fields
                .iter()
                .map(|h| unit_of(h).unwrap_or_default())
                .collect(),
            ..opts.clone()
        };
        &stated
    } else {
        opts
    };
    let first_line = header_line + count_newlines(&buf[header_end.0..header_end.1]);
    buf.drain(..header_end.1);
    let conversions = unit_conversions(&name, &header_fields, &mapping, opts)?;
    let mut layout = Layout::new(header_fields, mapping, delimiter, opts.index_only);
    layout.hash_ids = opts.ids_from.is_none();
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
        merger.absorb(part, &layout, size_hint);
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
                        let spent = merger.absorb(p, &layout, size_hint);
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

#[cfg(test)]
mod tests;
