//! One chunk's rows: the layout of the header (which column feeds which
//! field), the one-pass reader of plain rows, the general reader with its
//! skip messages, and the per-row rules.

use super::*;

/// Where each field is in a row of this catalogue; shared by the workers.
pub(super) struct Layout {
    pub(super) header: Vec<String>,
    pub(super) mapping: Mapping,
    pub(super) delimiter: u8,
    pub(super) star_col: usize,
    pub(super) cand_col: usize,
    /// (slot in NUMERIC, column index), of the columns parsed and
    /// validated, whether each is kept in the catalogue, and whether each
    /// goes into the parts (kept, or read by the merge's rules only: the
    /// period and duration of `index_only`, for the durations' unit).
    pub(super) num_cols: Vec<(usize, usize)>,
    pub(super) kept: Vec<bool>,
    pub(super) in_parts: Vec<bool>,
    /// The places among `num_cols` of the period and the duration.
    pub(super) ephemeris: Option<(usize, usize)>,
    /// The places among `num_cols` of the radius ratio and the depth.
    pub(super) ror_depth: Option<(usize, usize)>,
    /// The places among `num_cols` of the planet radius, the depth and
    /// the star radius.
    pub(super) radius_depth_star: Option<(usize, usize, usize)>,
    /// Columns whose values no rule and no caller reads (`index_only`):
    /// each cell is only checked to be a number or missing.
    pub(super) checked: Vec<bool>,
    pub(super) lc_col: Option<usize>,
    pub(super) extra_cols: Vec<usize>,
    /// Columns that carry earlier verdicts (a disposition, a false-positive
    /// flag, `fpp`): what a skipped row says in them is kept
    /// (`Skip::row`).
    pub(super) evidence_cols: Vec<usize>,
    /// What `quick_row` does with each column, by column index.
    pub(super) roles: Vec<Role>,
    /// Unit conversions a table's header asks for: (slot, scale, offset);
    /// stored = raw × scale + offset, applied before the row rules.
    pub(super) convert: Vec<(usize, f64, f64)>,
    /// The same conversions in words, by field, for the summary.
    pub(super) convert_text: Vec<(Field, String)>,
    /// Whether each row's ids are hashed as they are read, for their
    /// grouping. Not in a read given an earlier read's ids
    /// (`LoadOptions::ids_from`), which takes that read's grouping when
    /// its rows name the same and hashes them only when they do not
    /// (`Merger::hash_rows`): 16 bytes a row at the read's peak.
    pub(super) hash_ids: bool,
}

/// A column as `Layout::quick_row` reads it.
#[derive(Clone, Copy)]
pub(super) enum Role {
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
pub(super) fn zero_bytes(x: u64) -> u64 {
    const LOW7: u64 = 0x7f7f_7f7f_7f7f_7f7f;
    !(((x & LOW7) + LOW7) | x | LOW7)
}

/// The star of a row whose star cell names no star (`hosts`): a star of
/// its own, never one with another row of the same cell; the cell is
/// counted and the first few kept for the note.
#[cold]
#[inline(never)]
fn push_hostless(
    part: &mut Part,
    star: &str,
    cand: &str,
    hasher: Option<&hashbrown::DefaultHashBuilder>,
) {
    part.hostless += 1;
    let written = star.trim();
    if part.hostless_written.len() < 3 && !part.hostless_written.iter().any(|w| w == written) {
        part.hostless_written.push(written.to_string());
    }
    let own = hosts::own_star(cand);
    if let Some(hasher) = hasher {
        part.star_hash.push(hasher.hash_one(own.as_bytes()));
    }
    part.stars.push(&own);
}

/// The rows of one chunk, parsed and validated, not yet deduplicated.
pub(super) struct Part {
    pub(super) candidates: StrPool,
    pub(super) candidate_hash: Vec<u64>,
    pub(super) stars: StrPool,
    pub(super) star_hash: Vec<u64>,
    pub(super) lines: Vec<u32>,
    /// One column per `Layout::num_cols` entry.
    pub(super) num: Vec<Column>,
    pub(super) lightcurve: Option<StrPool>,
    pub(super) extras: Vec<StrPool>,
    pub(super) skipped: Vec<Skip>,
    /// Rows whose star cell named no star (`hosts::names_no_star`), and
    /// the first few different cells that said so.
    pub(super) hostless: usize,
    pub(super) hostless_written: Vec<String>,
    /// Rows whose star is `0` (`hosts::zero_id`): a placeholder unless the
    /// table numbers its stars from 0, which the merge decides.
    pub(super) zeros: usize,
    pub(super) rows_seen: u64,
    pub(super) bytes: usize,
    /// Line ends in the chunk: lines here count from 0 at its start.
    pub(super) newlines: u64,
}

/// A row's numbers as read, by slot in `NUMERIC`: the values, and their
/// codes (`Column::code_of`) when the quick reader read them.
pub(super) struct Cells<'a> {
    pub(super) values: &'a [f64],
    pub(super) codes: Option<&'a [u32]>,
}

impl Layout {
    pub(super) fn new(
        header: Vec<String>,
        mapping: Mapping,
        delimiter: u8,
        index_only: bool,
    ) -> Layout {
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
        // Read by the merge's unit rules even where not kept: the period
        // and duration (the durations' unit), the radius ratio (its unit),
        // the planet radius and its star's (the planet radius's unit).
        const RULES: [Field; 3] = [Field::PeriodD, Field::DurationH, Field::Ror];
        let planet_radius = col(Field::PlanetRadiusRearth).is_some();
        let in_parts: Vec<bool> = num_cols
            .iter()
            .zip(&kept)
            .map(|(&(slot, _), &kept)| {
                let f = NUMERIC[slot];
                kept || RULES.contains(&f)
                    || (planet_radius
                        && [Field::PlanetRadiusRearth, Field::StarRadiusRsun].contains(&f))
            })
            .collect();
        let at = |f: Field| num_cols.iter().position(|&(s, _)| NUMERIC[s] == f);
        let ephemeris = at(Field::PeriodD).zip(at(Field::DurationH));
        let ror_depth = at(Field::Ror).zip(at(Field::DepthPpm));
        let radius_depth_star = match (
            at(Field::PlanetRadiusRearth),
            at(Field::DepthPpm),
            at(Field::StarRadiusRsun),
        ) {
            (Some(r), Some(d), Some(s)) => Some((r, d, s)),
            _ => None,
        };
        let checked: Vec<bool> = num_cols
            .iter()
            .zip(&in_parts)
            .map(|(&(slot, _), &in_parts)| !in_parts && !REQUIRED.contains(&NUMERIC[slot]))
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
            hash_ids: true,
            checked,
            kept,
            in_parts,
            ephemeris,
            ror_depth,
            radius_depth_star,
            num_cols,
            star_col: col(Field::Star).unwrap_or(0),
            cand_col: col(Field::Candidate).unwrap_or(0),
            lc_col: col(Field::Lightcurve),
            extra_cols: mapping.extras.iter().map(|(i, _)| *i).collect(),
            evidence_cols: (0..header.len())
                .filter(|&c| {
                    [Some(Field::Disposition), Some(Field::Fpp)].contains(
                        &mapping
                            .by_field
                            .iter()
                            .find(|(_, i)| **i == c)
                            .map(|(f, _)| *f),
                    ) || crate::catalogue::names_earlier_verdicts(&header[c])
                })
                .collect(),
            header,
            mapping,
            delimiter,
        }
    }

    /// The header a misaligned skipped row's text cells are kept under: read
    /// as a disposition by the checks (the header names one).
    pub const MISALIGNED_CELL: &str = "disposition (a cell of a row whose fields do not line up)";

    /// Parses one chunk, into the memory of an absorbed part when one is
    /// given back (fresh memory costs a page fault every 4 KB).
    pub(super) fn parse(
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
                p.num.iter_mut().for_each(Column::clear);
                if let Some(l) = p.lightcurve.as_mut() {
                    l.clear();
                }
                p.extras.iter_mut().for_each(StrPool::clear);
                p.skipped.clear();
                p.hostless = 0;
                p.hostless_written.clear();
                p.zeros = 0;
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
                    .map(|_| Column::with_capacity(chunk.bytes.len() / 100))
                    .collect(),
                lightcurve: self.lc_col.map(|_| StrPool::default()),
                extras: vec![StrPool::default(); self.extra_cols.len()],
                skipped: Vec::new(),
                hostless: 0,
                hostless_written: Vec::new(),
                zeros: 0,
                rows_seen: 0,
                bytes: chunk.bytes.len(),
                newlines: 0,
            },
        };
        let mut scratch = vec![f64::NAN; NUMERIC.len()];
        // The codes of a quick row's numbers (`Column::code_of`).
        let mut codes = vec![Column::NO_CODE; NUMERIC.len()];
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
                let end = match self.quick_row(bytes, start, &mut rec, &mut scratch, &mut codes) {
                    Some(end) => {
                        let ids = (id(rec.bounds[self.star_col]), id(rec.bounds[self.cand_col]));
                        if let (Some(star), Some(cand)) = ids {
                            let row = self
                                .validate(&rec, line, &mut scratch, 0)
                                .map(|()| (star, cand));
                            let cells = Cells {
                                values: &scratch,
                                codes: Some(&codes),
                            };
                            self.push_row(&mut part, &rec, line, cells, hasher, row);
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
    pub(super) fn quick_row(
        &self,
        b: &[u8],
        start: usize,
        rec: &mut SplitRecord,
        scratch: &mut [f64],
        codes: &mut [u32],
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
                (Role::Number(slot) | Role::Checked(slot), None) => {
                    match number_and_code_at(b, p) {
                        Some((v, code, q)) if stop(q) => {
                            scratch[slot] = v;
                            codes[slot] = code;
                            q
                        }
                        Some(_) => return None,
                        None => {
                            let q = before_cr(b, p, text_end(b, p, self.delimiter));
                            if !MISSING_TOKENS.contains(&&b[p..q]) {
                                return None;
                            }
                            scratch[slot] = f64::NAN;
                            codes[slot] = Column::MISSING;
                            q
                        }
                    }
                }
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
    pub(super) fn split_line(&self, b: &[u8], start: usize, end: usize, rec: &mut SplitRecord) {
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
    pub(super) fn add(
        &self,
        part: &mut Part,
        rec: &impl Record,
        line: u64,
        scratch: &mut [f64],
        hasher: &hashbrown::DefaultHashBuilder,
    ) {
        let row = self.row(rec, line, scratch);
        let cells = Cells {
            values: scratch,
            codes: None,
        };
        self.push_row(part, rec, line, cells, hasher, row);
    }

    /// Appends a row read as (star, candidate) with its numbers in
    /// `scratch`, or records why it was skipped.
    pub(super) fn push_row(
        &self,
        part: &mut Part,
        rec: &impl Record,
        line: u64,
        cells: Cells,
        hasher: &hashbrown::DefaultHashBuilder,
        row: Result<(&str, &str), Skip>,
    ) {
        part.rows_seen += 1;
        match row {
            Ok((star, cand)) => {
                let hasher = self.hash_ids.then_some(hasher);
                if let Some(hasher) = hasher {
                    part.candidate_hash.push(hasher.hash_one(cand.as_bytes()));
                }
                part.candidates.push(cand);
                match hosts::host_cell(star) {
                    hosts::HostCell::NoStar => push_hostless(part, star, cand, hasher),
                    cell => {
                        part.zeros += usize::from(cell == hosts::HostCell::Zero);
                        if let Some(hasher) = hasher {
                            part.star_hash.push(hasher.hash_one(star.as_bytes()));
                        }
                        part.stars.push(star);
                    }
                }
                part.lines.push(u32::try_from(line).unwrap_or(u32::MAX));
                for (j, &(slot, _)) in self.num_cols.iter().enumerate() {
                    if self.in_parts[j] {
                        // A converted value is no longer its text's.
                        let code = match cells.codes {
                            Some(codes) if !self.convert.iter().any(|c| c.0 == slot) => codes[slot],
                            _ => Column::NO_CODE,
                        };
                        part.num[j].push_code(code, cells.values[slot]);
                    }
                }
                if let (Some(pool), Some(col)) = (part.lightcurve.as_mut(), self.lc_col) {
                    pool.push(&String::from_utf8_lossy(rec.field(col).trim_ascii()));
                }
                for (pool, &col) in part.extras.iter_mut().zip(&self.extra_cols) {
                    pool.push(&String::from_utf8_lossy(rec.field(col)));
                }
            }
            Err(mut skip) => {
                skip.row = self.skipped_row(rec);
                part.skipped.push(skip);
            }
        }
    }

    /// What a skipped row said of its star in the columns of earlier
    /// verdicts (`Skip::row`), if it said anything. A row whose cells do not
    /// line up with the header (an unquoted comma in a comment, say) cannot
    /// say which cell is which: where the table has a disposition column,
    /// every text cell of it but the ids is offered as one
    /// ([`Self::MISALIGNED_CELL`]), so that a false positive's word is not lost
    /// with its row (docs/science.md §3.5).
    fn skipped_row(&self, rec: &impl Record) -> Option<Box<SkippedRow>> {
        if self.evidence_cols.is_empty() || self.star_col >= rec.len() {
            return None;
        }
        let star = std::str::from_utf8(rec.field(self.star_col).trim_ascii()).ok()?;
        // A row that names no star may still name its candidate, whose
        // family can name the star (`hosts`).
        let candidate = (self.cand_col < rec.len())
            .then(|| std::str::from_utf8(rec.field(self.cand_col).trim_ascii()).ok())
            .flatten()
            .unwrap_or("");
        if star.is_empty() && candidate.is_empty() {
            return None;
        }
        let text = |v: &[u8]| String::from_utf8_lossy(v).into_owned();
        let cells: Vec<(String, String)> = if rec.len() == self.header.len() {
            self.evidence_cols
                .iter()
                .filter_map(|&c| {
                    let v = rec.field(c).trim_ascii();
                    (!v.is_empty() && !is_missing(v)).then(|| (self.header[c].clone(), text(v)))
                })
                .collect()
        } else if self
            .evidence_cols
            .iter()
            .any(|&c| crate::catalogue::names_a_disposition(&self.header[c]))
        {
            (0..rec.len())
                .filter(|&i| i != self.star_col && i != self.cand_col)
                .filter_map(|i| {
                    let v = rec.field(i).trim_ascii();
                    (!v.is_empty() && !is_missing(v) && parse_number(v).is_none())
                        .then(|| (Self::MISALIGNED_CELL.to_string(), text(v)))
                })
                .collect()
        } else {
            Vec::new()
        };
        (!cells.is_empty()).then(|| {
            Box::new(SkippedRow {
                star: star.to_string(),
                candidate: candidate.to_string(),
                cells,
            })
        })
    }

    pub(super) fn skip(&self, line: u64, col: Option<usize>, reason: String) -> Skip {
        Skip {
            line,
            column: col.map(|c| {
                self.header
                    .get(c)
                    .cloned()
                    .unwrap_or_else(|| format!("#{}", c + 1))
            }),
            reason,
            row: None,
        }
    }

    pub(super) fn id_cell<'r>(
        &self,
        rec: &'r impl Record,
        col: usize,
        field: Field,
        line: u64,
    ) -> Result<&'r str, Skip> {
        let raw = rec.field(col).trim_ascii();
        let s = std::str::from_utf8(raw)
            .map_err(|_| self.skip(line, Some(col), format!("{field}: not valid UTF-8")))?;
        // An empty star cell names no star, as `0` or `NaN` do: the row is
        // read with a star of its own (`hosts`).
        if s.is_empty() && field != Field::Star {
            return Err(self.skip(line, Some(col), format!("{field}: empty")));
        }
        Ok(s)
    }

    /// Parses and validates one row into `scratch`; returns its (star, candidate).
    pub(super) fn row<'r>(
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
        // The slots read as sexagesimal: in degrees already, whatever unit
        // the header states for decimal values.
        let mut sexagesimal_slots = 0u32;
        for (j, &(slot, col)) in self.num_cols.iter().enumerate() {
            let raw = rec.field(col);
            if self.checked[j] && is_number(raw) {
                continue; // its value is not kept
            }
            // Positions may be in sexagesimal (RA in hours): read as degrees.
            let in_hours = match NUMERIC[slot] {
                Field::RaDeg => Some(true),
                Field::DecDeg => Some(false),
                _ => None,
            };
            let angle = || in_hours.and_then(|hours| sexagesimal(raw, hours));
            // An fpp may be a limit (`<0.001`, `>0.99`) or carry its error.
            let bound = || {
                (NUMERIC[slot] == Field::Fpp)
                    .then(|| bounded_number(raw))
                    .flatten()
            };
            scratch[slot] = match parse_cell(raw) {
                Cell::Value(v) => v,
                Cell::Missing => f64::NAN,
                Cell::Bad if let Some(v) = angle() => {
                    sexagesimal_slots |= 1 << slot;
                    v
                }
                Cell::Bad if let Some(v) = bound() => v,
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
        self.validate(rec, line, scratch, sexagesimal_slots)?;
        Ok((star, cand))
    }

    /// The per-row rules: required fields present and numeric, period finite
    /// and positive, duration positive and shorter than the period, depth
    /// positive. The stated units' conversions apply first, except to the
    /// slots in `sexagesimal` (bit `slot`), whose values are degrees.
    pub(super) fn validate(
        &self,
        rec: &impl Record,
        line: u64,
        scratch: &mut [f64],
        sexagesimal: u32,
    ) -> Result<(), Skip> {
        for &(slot, scale, offset) in &self.convert {
            if sexagesimal & (1 << slot) == 0 {
                scratch[slot] = scratch[slot] * scale + offset;
            }
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
