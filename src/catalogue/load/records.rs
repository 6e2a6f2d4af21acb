//! Finding records in raw bytes: quote-aware scanning of record ends (as
//! csv-core reads), record-aligned chunk edges, and the two record views
//! the row reader takes (csv's ByteRecord, and split bounds).

use super::*;

/// Quote-aware CSV scanning state, as csv-core reads: a quote opens a quoted
/// field only at the start of a field; `""` inside is an escaped quote.
#[derive(Clone, Copy, PartialEq)]
pub(super) enum Scan {
    RecordStart,
    FieldStart,
    InField,
    InQuoted,
    QuoteInQuoted,
}

/// Byte offsets just past each record end (`\n` outside quotes) in `buf`,
/// which starts at a record boundary; calls `at` for each, stopping when it
/// returns false. `#` lines at a record start are comments.
pub(super) fn scan_record_ends(buf: &[u8], delimiter: u8, mut at: impl FnMut(usize) -> bool) {
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
pub(super) fn record_start(b: &[u8], mut at: usize) -> usize {
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

pub(super) fn first_record_end(buf: &[u8]) -> Option<usize> {
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
pub(super) fn last_record_end(buf: &[u8], delimiter: u8) -> Option<usize> {
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
pub(super) trait Record {
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
pub(super) struct SplitRecord<'a> {
    pub(super) line: &'a [u8],
    /// (start, end) of each field in `line` (the whole chunk).
    pub(super) bounds: Vec<(u32, u32)>,
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
pub(super) fn plain_text(b: &[u8]) -> bool {
    // One pass for both bytes (both are rare in plain catalogues).
    memchr::memchr2_iter(b'"', b'\r', b).all(|i| b[i] == b'\r' && b.get(i + 1) == Some(&b'\n'))
}

pub(super) struct Chunk {
    pub(super) seq: usize,
    pub(super) bytes: Vec<u8>,
    /// Known to hold no quote and no CR (else `plain_text` tells).
    pub(super) plain: bool,
}
