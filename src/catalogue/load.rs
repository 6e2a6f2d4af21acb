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

mod ids;
mod merge;
mod number;
mod records;
mod row;
mod unit_rules;

pub(super) use ids::IdIndex;
use ids::*;
use merge::*;
pub use number::parse_number;
use number::*;
use records::*;
use row::*;
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
