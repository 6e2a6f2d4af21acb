//! Reading a catalogue file: CSV or TSV, optionally gzip-compressed, with a
//! UTF-8 BOM, CRLF line ends, `#` comment lines and quoted fields. Bad rows are
//! skipped and listed; only an unreadable file or header stops the load.

use std::fs::File;
use std::hash::BuildHasher;
use std::io::{BufRead, BufReader, Read};
use std::path::Path;

use csv::ByteRecord;
use flate2::read::MultiGzDecoder;

use super::columns::{ColumnMap, ColumnUse, DepthUnit, Field, Mapping, NUMERIC};
use super::pool::StrPool;
use super::{Catalogue, CandidateId, LoadError, Skip, StarId};

/// How to read a catalogue. The default reads any supported file unaided.
#[derive(Clone, Debug, Default)]
pub struct LoadOptions {
    /// Overrides of the built-in header synonyms.
    pub columns: ColumnMap,
    /// The depth unit, overriding the detection rule.
    pub depth_unit: Option<DepthUnit>,
    /// The field delimiter, overriding detection by extension and sniffing.
    pub delimiter: Option<u8>,
}

/// Where catalogue bytes come from.
#[derive(Clone, Copy, Debug)]
pub enum Source<'a> {
    Path(&'a Path),
    /// Bytes in memory (the built-in demo), with the name to report.
    Bytes { name: &'a str, data: &'a [u8] },
}

const GZIP_MAGIC: [u8; 2] = [0x1f, 0x8b];
const BOM: [u8; 3] = [0xef, 0xbb, 0xbf];
/// Smallest median depth that is read as ppm when the header names no unit.
/// A fraction is at most 1, and a percent depth of 50 would be a 50% eclipse,
/// not a transit. Documented in the README (Inputs).
const PPM_MEDIAN_FLOOR: f64 = 50.0;

impl Catalogue {
    pub fn load(source: Source<'_>, opts: &LoadOptions) -> Result<Catalogue, LoadError> {
        let (name, ext_name, raw): (String, String, Box<dyn Read + Send>) = match source {
            Source::Path(p) => {
                let name = p.display().to_string();
                let file = File::open(p).map_err(|source| LoadError::Io {
                    path: name.clone(),
                    source,
                })?;
                (name.clone(), name, Box::new(file))
            }
            Source::Bytes { name, data } => {
                (name.to_string(), name.to_string(), Box::new(std::io::Cursor::new(data.to_vec())))
            }
        };
        let io_err = |source| LoadError::Io {
            path: name.clone(),
            source,
        };
        let mut raw = BufReader::with_capacity(1 << 16, raw);
        let gz = raw.fill_buf().map_err(io_err)?.starts_with(&GZIP_MAGIC);
        let decoded: Box<dyn Read + Send> = if gz {
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
            None => delimiter_for(&ext_name).unwrap_or_else(|| sniff(text.fill_buf().unwrap_or(&[]))),
        };
        read_catalogue(name, text, delimiter, opts)
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

fn read_catalogue(
    name: String,
    text: impl Read,
    delimiter: u8,
    opts: &LoadOptions,
) -> Result<Catalogue, LoadError> {
    let mut rdr = csv::ReaderBuilder::new()
        .delimiter(delimiter)
        .comment(Some(b'#'))
        .flexible(true)
        .has_headers(false)
        .buffer_capacity(1 << 18)
        .from_reader(text);
    let mut rec = ByteRecord::new();
    let path = name.clone();
    let read_err = |e: csv::Error, line: u64| LoadError::Read {
        path: path.clone(),
        line,
        message: e.to_string(),
    };
    let header_line;
    loop {
        if !rdr.read_byte_record(&mut rec).map_err(|e| read_err(e, 1))? {
            return Err(LoadError::Empty { path: name });
        }
        // A blank line before the header is not a header.
        if !(rec.len() == 1 && rec[0].iter().all(u8::is_ascii_whitespace)) {
            header_line = rec.position().map_or(1, |p| p.line());
            break;
        }
    }
    if rec.len() > u16::MAX as usize {
        return Err(LoadError::TooManyColumns {
            path: name,
            line: header_line,
            count: rec.len(),
        });
    }
    let header: Vec<String> = rec.iter().map(|h| String::from_utf8_lossy(h).trim().to_string()).collect();
    let mapping = Mapping::resolve(&name, &header, &opts.columns)?;
    let mut b = Builder::new(name, header, mapping);
    let mut last_line = header_line;
    loop {
        match rdr.read_byte_record(&mut rec) {
            Ok(true) => {}
            Ok(false) => break,
            Err(e) => return Err(read_err(e, last_line + 1)),
        }
        let line = rec.position().map_or(last_line + 1, |p| p.line());
        last_line = line;
        if rec.len() == 1 && rec[0].iter().all(u8::is_ascii_whitespace) {
            continue; // blank line
        }
        b.rows_seen += 1;
        if let Err(skip) = b.add_row(&rec, line) {
            b.skipped.push(skip);
        }
    }
    b.finish(opts)
}

/// What one cell held.
enum Cell {
    Missing,
    Value(f64),
    Bad,
}

/// Cells that mean "no value" in common catalogue exports.
const MISSING_TOKENS: [&[u8]; 9] = [b"", b"nan", b"NaN", b"NAN", b"null", b"NULL", b"NA", b"N/A", b"--"];

fn parse_cell(raw: &[u8]) -> Cell {
    let b = raw.trim_ascii();
    if MISSING_TOKENS.contains(&b) {
        return Cell::Missing;
    }
    match std::str::from_utf8(b).ok().and_then(|s| s.parse::<f64>().ok()) {
        Some(v) if v.is_finite() => Cell::Value(v),
        Some(_) => Cell::Missing, // inf: treat like NaN, checked below for required fields
        None => Cell::Bad,
    }
}

struct Builder {
    name: String,
    header: Vec<String>,
    mapping: Mapping,
    star_col: usize,
    cand_col: usize,
    /// (slot in NUMERIC, column index)
    num_cols: Vec<(usize, usize)>,
    lc_col: Option<usize>,
    candidates: StrPool,
    stars: StrPool,
    star_of: Vec<StarId>,
    lines: Vec<u32>,
    num: Vec<Option<Vec<f64>>>,
    lightcurve: Option<StrPool>,
    extras: Vec<(usize, String, StrPool)>,
    candidate_lookup: hashbrown::HashTable<CandidateId>,
    star_lookup: hashbrown::HashTable<StarId>,
    hasher: hashbrown::DefaultHashBuilder,
    scratch: Vec<f64>,
    skipped: Vec<Skip>,
    rows_seen: u64,
}

impl Builder {
    fn new(name: String, header: Vec<String>, mapping: Mapping) -> Builder {
        let col = |f: Field| mapping.by_field.get(&f).copied();
        let num_cols: Vec<(usize, usize)> = NUMERIC
            .iter()
            .enumerate()
            .filter_map(|(slot, f)| col(*f).map(|c| (slot, c)))
            .collect();
        let mut num = vec![None; NUMERIC.len()];
        for (slot, _) in &num_cols {
            num[*slot] = Some(Vec::new());
        }
        let extras = mapping
            .extras
            .iter()
            .map(|(i, h)| (*i, h.clone(), StrPool::default()))
            .collect();
        Builder {
            star_col: col(Field::Star).unwrap_or(0),
            cand_col: col(Field::Candidate).unwrap_or(0),
            lc_col: col(Field::Lightcurve),
            lightcurve: col(Field::Lightcurve).map(|_| StrPool::default()),
            num_cols,
            num,
            extras,
            name,
            header,
            mapping,
            candidates: StrPool::with_capacity(1024, 16 * 1024),
            stars: StrPool::with_capacity(1024, 16 * 1024),
            star_of: Vec::new(),
            lines: Vec::new(),
            candidate_lookup: hashbrown::HashTable::new(),
            star_lookup: hashbrown::HashTable::new(),
            hasher: hashbrown::DefaultHashBuilder::default(),
            scratch: vec![f64::NAN; NUMERIC.len()],
            skipped: Vec::new(),
            rows_seen: 0,
        }
    }

    fn skip(&self, line: u64, col: Option<usize>, reason: String) -> Skip {
        Skip {
            line,
            column: col.map(|c| self.header.get(c).cloned().unwrap_or_else(|| format!("#{}", c + 1))),
            reason,
        }
    }

    fn id_cell<'r>(&self, rec: &'r ByteRecord, col: usize, field: Field, line: u64) -> Result<&'r str, Skip> {
        let raw = rec.get(col).unwrap_or(&[]).trim_ascii();
        let s = std::str::from_utf8(raw)
            .map_err(|_| self.skip(line, Some(col), format!("{field}: not valid UTF-8")))?;
        if s.is_empty() {
            return Err(self.skip(line, Some(col), format!("{field}: empty")));
        }
        Ok(s)
    }

    fn add_row(&mut self, rec: &ByteRecord, line: u64) -> Result<(), Skip> {
        if rec.len() != self.header.len() {
            return Err(self.skip(
                line,
                None,
                format!("has {} fields, the header has {}", rec.len(), self.header.len()),
            ));
        }
        let star = self.id_cell(rec, self.star_col, Field::Star, line)?;
        let cand = self.id_cell(rec, self.cand_col, Field::Candidate, line)?;
        for &(slot, col) in &self.num_cols {
            let raw = &rec[col];
            self.scratch[slot] = match parse_cell(raw) {
                Cell::Value(v) => v,
                Cell::Missing => f64::NAN,
                Cell::Bad => {
                    return Err(self.skip(
                        line,
                        Some(col),
                        format!(
                            "{}: `{}` is not a number",
                            NUMERIC[slot],
                            crate::sanitize::clean_bytes(raw.trim_ascii())
                        ),
                    ));
                }
            };
        }
        self.validate(rec, line)?;
        let h = self.hasher.hash_one(cand.as_bytes());
        if let Some(&first) = self
            .candidate_lookup
            .find(h, |&c| self.candidates.get(c as usize) == cand)
        {
            return Err(self.skip(
                line,
                Some(self.cand_col),
                format!(
                    "candidate: duplicate id `{}` (first on line {})",
                    crate::sanitize::clean(cand),
                    self.lines[first as usize]
                ),
            ));
        }
        // Commit the row.
        let c = self.candidates.push(cand) as CandidateId;
        let candidates = &self.candidates;
        self.candidate_lookup
            .insert_unique(h, c, |&x| self.hasher.hash_one(candidates.get(x as usize).as_bytes()));
        let hs = self.hasher.hash_one(star.as_bytes());
        let s = match self.star_lookup.find(hs, |&s| self.stars.get(s as usize) == star) {
            Some(&s) => s,
            None => {
                let s = self.stars.push(star) as StarId;
                let stars = &self.stars;
                self.star_lookup
                    .insert_unique(hs, s, |&x| self.hasher.hash_one(stars.get(x as usize).as_bytes()));
                s
            }
        };
        self.star_of.push(s);
        self.lines.push(u32::try_from(line).unwrap_or(u32::MAX));
        for &(slot, _) in &self.num_cols {
            if let Some(col) = self.num[slot].as_mut() {
                col.push(self.scratch[slot]);
            }
        }
        if let (Some(pool), Some(col)) = (self.lightcurve.as_mut(), self.lc_col) {
            pool.push(&String::from_utf8_lossy(rec[col].trim_ascii()));
        }
        for (col, _, pool) in &mut self.extras {
            pool.push(&String::from_utf8_lossy(&rec[*col]));
        }
        Ok(())
    }

    /// The per-row rules of the foundation issue: required fields present and
    /// numeric, period finite and positive, duration positive and shorter than
    /// the period, depth positive.
    fn validate(&self, rec: &ByteRecord, line: u64) -> Result<(), Skip> {
        let get = |f: Field| self.scratch[f.num_slot().unwrap_or(0)];
        let col = |f: Field| self.mapping.by_field.get(&f).copied();
        let raw = |f: Field| {
            col(f)
                .and_then(|c| rec.get(c))
                .map(|b| crate::sanitize::clean_bytes(b.trim_ascii()))
                .unwrap_or_default()
        };
        for f in [Field::PeriodD, Field::Epoch, Field::DepthPpm, Field::DurationH] {
            if get(f).is_nan() {
                let what = if raw(f).is_empty() {
                    "missing".to_string()
                } else {
                    format!("`{}` is not a finite number", raw(f))
                };
                return Err(self.skip(line, col(f), format!("{f}: {what}")));
            }
        }
        let period = get(Field::PeriodD);
        if period <= 0.0 {
            return Err(self.skip(line, col(Field::PeriodD), format!("period_d: must be > 0, got {}", raw(Field::PeriodD))));
        }
        let depth = get(Field::DepthPpm);
        if depth <= 0.0 {
            return Err(self.skip(line, col(Field::DepthPpm), format!("depth: must be > 0, got {}", raw(Field::DepthPpm))));
        }
        let dur = get(Field::DurationH);
        if dur <= 0.0 {
            return Err(self.skip(line, col(Field::DurationH), format!("duration_h: must be > 0, got {}", raw(Field::DurationH))));
        }
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

    fn finish(self, opts: &LoadOptions) -> Result<Catalogue, LoadError> {
        let Builder {
            name,
            header,
            mapping,
            mut candidates,
            mut stars,
            star_of,
            mut num,
            mut lightcurve,
            extras,
            candidate_lookup,
            star_lookup,
            hasher,
            skipped,
            rows_seen,
            ..
        } = self;
        if star_of.is_empty() && skipped.is_empty() {
            return Err(LoadError::NoRows { path: name });
        }
        let mut columns = Vec::new();
        for (field, &index) in &mapping.by_field {
            let forced = opts.columns.fields.contains_key(field);
            let mut unit = field.unit().to_string();
            let mut how = if forced { "column map" } else { "synonym" }.to_string();
            if *field == Field::DepthPpm {
                let slot = Field::DepthPpm.num_slot().unwrap_or(0);
                let depths = num[slot].as_mut().map(Vec::as_mut_slice).unwrap_or(&mut []);
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
                how: format!("also names {f}, which an earlier column feeds; kept as an extra column"),
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
        stars.shrink_to_fit();
        for v in num.iter_mut().flatten() {
            v.shrink_to_fit();
        }
        if let Some(p) = lightcurve.as_mut() {
            p.shrink_to_fit();
        }
        Ok(Catalogue {
            source: name,
            candidates,
            stars,
            star_of,
            num,
            lightcurve,
            extras: extras.into_iter().map(|(_, h, p)| (h, p)).collect(),
            member_start,
            members,
            candidate_lookup,
            star_lookup,
            hasher,
            columns,
            skipped,
            rows_seen,
        })
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
        Ok((DepthUnit::Ppm, format!("detected: median {median} >= {PPM_MEDIAN_FLOOR}, so ppm")))
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
    fn cells() {
        assert!(matches!(parse_cell(b" 3.5 "), Cell::Value(v) if v == 3.5));
        assert!(matches!(parse_cell(b"+1e3"), Cell::Value(v) if v == 1000.0));
        assert!(matches!(parse_cell(b"NaN"), Cell::Missing));
        assert!(matches!(parse_cell(b""), Cell::Missing));
        assert!(matches!(parse_cell(b"inf"), Cell::Missing));
        assert!(matches!(parse_cell(b"3.5d"), Cell::Bad));
    }
}
