//! Merging the parsed chunks in file order: the columns, the unit of
//! depth, the catalogue itself (its ids grouped in `grouping`).

use super::grouping::Ids;
use super::*;

/// Takes parts in file order and appends them; duplicates and star ids are
/// resolved once at the end, by sorting hashes, which is far cheaper than a
/// hash-table probe per row.
pub(super) struct Merger {
    pub(super) name: String,
    pub(super) candidates: StrPool,
    pub(super) candidate_hash: Vec<u64>,
    /// The star id of every row, before interning.
    pub(super) row_stars: StrPool,
    pub(super) star_hash: Vec<u64>,
    pub(super) lines: Vec<u32>,
    /// One column per `Layout::num_cols` entry.
    pub(super) num: Vec<Column>,
    pub(super) lightcurve: Option<StrPool>,
    pub(super) extras: Vec<StrPool>,
    pub(super) hasher: hashbrown::DefaultHashBuilder,
    pub(super) cand_header: String,
    /// The columns of earlier verdicts among the kept ones, with their
    /// headers: (index in `extras`, header) and (index in `num`, header).
    evidence_extras: Vec<(usize, String)>,
    evidence_num: Vec<(usize, String)>,
    pub(super) skipped: Vec<Skip>,
    /// Rows whose star cell named no star, and the first few cells that
    /// said so (`hosts`).
    pub(super) hostless: usize,
    pub(super) hostless_written: Vec<String>,
    pub(super) zeros: usize,
    pub(super) rows_seen: u64,
    pub(super) reserved: bool,
    durations: DurationSample,
    rors: RorSample,
    radii: RadiusSample,
    /// The file's line at the start of the next part (parts number their
    /// lines from their own start).
    pub(super) next_line: u64,
}

impl Merger {
    pub(super) fn new(name: String, layout: &Layout, first_line: u64) -> Merger {
        Merger {
            name,
            candidates: StrPool::default(),
            candidate_hash: Vec::new(),
            row_stars: StrPool::default(),
            star_hash: Vec::new(),
            lines: Vec::new(),
            num: vec![Column::default(); layout.num_cols.len()],
            lightcurve: layout.lc_col.map(|_| StrPool::default()),
            extras: vec![StrPool::default(); layout.extra_cols.len()],
            hasher: hashbrown::DefaultHashBuilder::default(),
            cand_header: layout.header[layout.cand_col].clone(),
            evidence_extras: (layout.extra_cols.iter().enumerate())
                .filter(|(_, c)| layout.evidence_cols.contains(c))
                .map(|(j, &c)| (j, layout.header[c].clone()))
                .collect(),
            evidence_num: (layout.num_cols.iter().enumerate())
                .filter(|&(j, (_, c))| layout.kept[j] && layout.evidence_cols.contains(c))
                .map(|(j, &(_, c))| (j, layout.header[c].clone()))
                .collect(),
            skipped: Vec::new(),
            hostless: 0,
            hostless_written: Vec::new(),
            zeros: 0,
            rows_seen: 0,
            reserved: false,
            durations: DurationSample::default(),
            rors: RorSample::default(),
            radii: RadiusSample::default(),
            next_line: first_line,
        }
    }

    /// Sizes the columns once from the first part's rows per byte.
    pub(super) fn reserve(&mut self, part: &Part, layout: &Layout, size_hint: Option<u64>) {
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
        if layout.hash_ids {
            self.candidate_hash.reserve(est);
            self.star_hash.reserve(est);
        }
        self.lines.reserve(est);
        // Columns not kept (`index_only`) stay empty.
        for (c, &kept) in self.num.iter_mut().zip(&layout.kept) {
            if kept {
                *c = Column::with_capacity(est);
            }
        }
    }

    /// Appends a part's rows; returns the part, emptied of its skips, for
    /// its memory to be used again.
    pub(super) fn absorb(
        &mut self,
        mut part: Part,
        layout: &Layout,
        size_hint: Option<u64>,
    ) -> Part {
        if !self.reserved {
            self.reserve(&part, layout, size_hint);
        }
        self.rows_seen += part.rows_seen;
        let base = self.next_line;
        self.next_line += part.newlines;
        for skip in &mut part.skipped {
            skip.line += base;
        }
        self.skipped.append(&mut part.skipped);
        self.hostless += part.hostless;
        self.zeros += part.zeros;
        for w in part.hostless_written.drain(..) {
            if self.hostless_written.len() < 3 && !self.hostless_written.contains(&w) {
                self.hostless_written.push(w);
            }
        }
        self.candidates.append(&part.candidates);
        self.candidate_hash.extend_from_slice(&part.candidate_hash);
        self.row_stars.append(&part.stars);
        self.star_hash.extend_from_slice(&part.star_hash);
        let line = |l: &u32| u32::try_from(base + *l as u64).unwrap_or(u32::MAX);
        self.lines.extend(part.lines.iter().map(line));
        if let Some((p, t)) = layout.ephemeris {
            self.durations.add([&part.num[p], &part.num[t]]);
        }
        if let Some((r, d)) = layout.ror_depth {
            self.rors.add([&part.num[r], &part.num[d]]);
        }
        if let Some((r, d, s)) = layout.radius_depth_star {
            self.radii.add([&part.num[r], &part.num[d], &part.num[s]]);
        }
        for ((dst, src), _) in (self.num.iter_mut().zip(&part.num))
            .zip(&layout.kept)
            .filter(|(_, k)| **k)
        {
            dst.append(src);
        }
        if let (Some(dst), Some(src)) = (self.lightcurve.as_mut(), part.lightcurve.as_ref()) {
            dst.append(src);
        }
        for (dst, src) in self.extras.iter_mut().zip(&part.extras) {
            dst.append(src);
        }
        part
    }

    /// Whether the candidate ids number each star's candidates (`1`, `2`...
    /// or `b`, `c`...) rather than name them: at least one row in ten
    /// repeats an id of another star. A few repeats across stars are
    /// duplicates (one candidate put on two stars), and go; so does a
    /// repeat within one star, either way.
    pub(super) fn numbered_per_star(&self, dups: &[(u32, u32)]) -> bool {
        let across = dups
            .iter()
            .filter(|&&(r, f)| self.row_stars.get(r as usize) != self.row_stars.get(f as usize))
            .count();
        across > 0 && across * 10 >= self.candidates.len()
    }

    /// What a loaded row says in the columns of earlier verdicts, for its
    /// skip when it is removed as a duplicate (`Skip::row`): a second row
    /// of one candidate (an archive's row per reference, say) may be the
    /// one that calls it a false positive.
    fn row_said(&self, row: usize) -> Option<Box<SkippedRow>> {
        let text = self.evidence_extras.iter().map(|(j, h)| {
            let v = self.extras[*j].get(row).trim();
            (
                h,
                (!v.is_empty() && !is_missing(v.as_bytes())).then(|| v.to_string()),
            )
        });
        let numbers = self.evidence_num.iter().map(|(j, h)| {
            let v = self.num[*j].get(row);
            (h, (!v.is_nan()).then(|| v.to_string()))
        });
        let cells: Vec<(String, String)> = text
            .chain(numbers)
            .filter_map(|(h, v)| Some((h.clone(), v?)))
            .collect();
        (!cells.is_empty()).then(|| {
            Box::new(SkippedRow {
                star: self.row_stars.get(row).to_string(),
                candidate: self.candidates.get(row).to_string(),
                cells,
            })
        })
    }

    /// Removes duplicate rows (row, first row with the same id), with a skip
    /// naming the first line.
    pub(super) fn remove_rows(&mut self, dups: &[(u32, u32)]) {
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
                row: self.row_said(row as usize),
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
            *col = col.filter(&keep);
        }
        if let Some(p) = self.lightcurve.as_mut() {
            *p = p.filter(&keep);
        }
        for p in &mut self.extras {
            *p = p.filter(&keep);
        }
    }

    pub(super) fn finish(
        mut self,
        layout: &Layout,
        opts: &LoadOptions,
    ) -> Result<Catalogue, LoadError> {
        if self.lines.is_empty() && self.skipped.is_empty() {
            return Err(LoadError::NoRows { path: self.name });
        }
        // Complete: the kept columns in two bytes a value where the values
        // allow, before the ids' grouping adds its own memory
        // (`Column::narrow`).
        let mut kept: Vec<&mut Column> = (self.num.iter_mut())
            .zip(&layout.kept)
            .filter_map(|(c, &k)| k.then_some(c))
            .collect();
        crate::parallel::each_mut(&mut kept, |c| c.narrow());
        // A second read of the rows of an earlier one (the browser's read
        // of the values) takes its ids as they are; anything else groups
        // its own.
        let mut ids = match opts.ids_from.as_deref() {
            Some(first) if self.names_as(first) => Ids::of(first),
            _ => {
                self.hash_rows();
                self.group_ids()
            }
        };
        let Merger {
            name,
            num: parsed,
            mut lightcurve,
            extras,
            mut skipped,
            rows_seen,
            durations,
            rors,
            radii,
            ..
        } = self;
        let mut notes = std::mem::take(&mut ids.notes);
        // Duplicates were found after their chunk's own skips: restore file order.
        skipped.sort_by_key(|s| s.line);
        let mut num: Vec<Option<Column>> = vec![None; NUMERIC.len()];
        for ((&(slot, _), col), &kept) in layout.num_cols.iter().zip(parsed).zip(&layout.kept) {
            if kept {
                num[slot] = Some(col);
            }
        }
        let header = &layout.header;
        let mapping = &layout.mapping;
        let mut columns = Vec::new();
        // How the table's depths became ppm: from magnitudes (that many
        // to one), then times a factor; read by the radius ratios' rule.
        let mut depth_from: (Option<f64>, f64) = (None, 1.0);
        // What each column's written values were multiplied by: the
        // header's units first (`Layout::convert`), then the rules below.
        let mut scales = vec![1.0; NUMERIC.len()];
        for &(slot, scale, _) in &layout.convert {
            scales[slot] *= scale;
        }
        let mut scaled = |f: Field, by: f64| {
            if let Some(s) = f.num_slot() {
                scales[s] *= by;
            }
        };
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
                let mut no_depths = Column::default();
                let depths = num[slot].as_mut().unwrap_or(&mut no_depths);
                let per_mag = stated.and_then(units::magnitude_scale);
                let (du, why, extra) = match (opts.depth_unit, stated.map(units::depth_unit)) {
                    (None, Some(Some((du, extra)))) => (
                        du,
                        format!("from the table's unit `{}`", stated.unwrap_or("")),
                        extra,
                    ),
                    // A depth in magnitudes (`Depth (mmag)`): the flux
                    // drop by Pogson's ratio (docs/science.md §2).
                    (None, Some(None)) if let Some(per_mag) = per_mag => {
                        depths.update(|d| units::depth_ppm_of_magnitudes(d * per_mag));
                        scaled(Field::DepthPpm, f64::NAN);
                        depth_from.0 = Some(per_mag);
                        (
                            DepthUnit::Ppm,
                            format!(
                                "from the table's unit `{}`, as a flux drop by Pogson's ratio",
                                stated.unwrap_or("")
                            ),
                            1.0,
                        )
                    }
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
                    depths.update(|d| d * factor);
                    scaled(Field::DepthPpm, factor);
                }
                depth_from.1 = factor;
                unit = format!("{} (stored as ppm)", du.name());
                if extra != 1.0 || per_mag.is_some() {
                    unit = format!("{} (stored as ppm)", stated.unwrap_or(""));
                }
                how = format!("{how}; unit {why}");
            } else if *field == Field::Fpp {
                // A probability in percent: stated so (`FPP (%)`), or seen
                // (values above 1, none above 100), stored as a fraction.
                let slot = Field::Fpp.num_slot().unwrap_or(0);
                if let Some(fpp) = num[slot].as_mut() {
                    let said = stated.is_some_and(units::is_percent);
                    let (lo, hi) = fpp
                        .iter()
                        .filter(|v| v.is_finite())
                        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
                            (lo.min(v), hi.max(v))
                        });
                    let seen = crate::catalogue::percent_by_range(lo, hi);
                    if said || seen {
                        fpp.update(|v| v / 100.0);
                        scaled(*field, 0.01);
                        unit = FPP_PERCENT.to_string();
                        how = if said {
                            format!("{how}; table unit {}", stated.unwrap_or(""))
                        } else {
                            format!("{how}; percent, detected: values up to {hi}, none above 100")
                        };
                    }
                }
            } else if *field == Field::Ror {
                // A radius ratio in percent: stated so (`Rp/Rs (%)`), or
                // seen (about 100 times the square root of its depth).
                let said = stated.is_some_and(units::is_percent);
                let seen = !said && rors.ror_in_percent(|d| depth_in_ppm(depth_from, d));
                if said || seen {
                    if let Some(ror) = Field::Ror.num_slot().and_then(|s| num[s].as_mut()) {
                        ror.update(|v| v / 100.0);
                    }
                    scaled(Field::Ror, 0.01);
                    unit = FPP_PERCENT.to_string();
                    how = match stated {
                        Some(u) if said => format!("{how}; table unit {u}"),
                        _ => format!("{how}; percent, detected from the depths"),
                    };
                }
                if seen {
                    notes.push(format!(
                        "the radius ratios (`{h}`) are read as percent: most are about 100 times \
                         the square root of their depth, as a percentage is (a fraction is about \
                         once it); if they are fractions after all, the depths are wrong \
                         (docs/science.md §2). State the unit in the header (`{h} (%)`) to say so",
                        h = crate::sanitize::clean(header[index].trim())
                    ));
                }
            } else if *field == Field::PlanetRadiusRearth && stated.is_none() {
                // No unit stated: Earth radii, unless the depths and stars
                // show Jupiter radii (`RadiusSample::radius_ratio`).
                let measured = radii.radius_ratio(|d| depth_in_ppm(depth_from, d));
                let h = crate::sanitize::clean(header[index].trim()).into_owned();
                // A name that says nothing of the unit (`koi_prad`,
                // `pl_rade` name Earth radii in their archives).
                let bare = ["planet_radius", "prad"].contains(&h.to_ascii_lowercase().as_str());
                if measured.is_none() && bare {
                    notes.push(format!(
                        "the planet radii (`{h}`) state no unit, and no row gives a depth and a star radius to tell Earth radii from Jupiter radii by: read as Earth radii. State the unit in the header (`{h} (R_Earth)` or `{h} (R_Jupiter)`)"
                    ));
                }
                if let Some(ratio) = measured.filter(|&r| r < JUPITER_RADII_RATIO) {
                    let per = crate::constants::R_JUPITER_M / crate::constants::R_EARTH_M;
                    if let Some(col) = field.num_slot().and_then(|s| num[s].as_mut()) {
                        col.update(|v| v * per);
                    }
                    scaled(*field, per);
                    how = format!(
                        "{how}; Jupiter radii, detected from the depths and stars, × {per:.4} to Earth radii"
                    );
                    notes.push(format!(
                        "the planet radii (`{h}`) are read as Jupiter radii: as Earth radii their median is {ratio:.3} of the radius each depth gives on its star (about 1 in Earth radii, 1/11.2 in Jupiter radii; docs/science.md §2). State the unit in the header (`{h} (R_Earth)`) if they are Earth radii after all"
                    ));
                }
            } else if let (None, Some((factor, whose, to))) =
                (stated, borrowed_unit(*field, &layout.convert, depth_from))
            {
                // No unit of its own: its partner's (`borrowed_unit`).
                if factor != 1.0 {
                    if let Some(col) = field.num_slot().and_then(|s| num[s].as_mut()) {
                        col.update(|v| v * factor);
                    }
                    scaled(*field, factor);
                    how = format!("{how}; {whose} unit, × {factor} to {to}");
                }
            } else if let Some(u) = stated {
                how = match layout.convert_text.iter().find(|(f, _)| f == field) {
                    Some((_, text)) => format!("{how}; {text}"),
                    None => format!("{how}; table unit {u}"),
                };
                // A centroid offset in pixels stays in pixels.
                let offset = [Field::CentroidOffsetArcsec, Field::CentroidOffsetErrArcsec];
                if offset.contains(field) && !units::is_angle(u) {
                    unit = u.to_string();
                }
            }
            columns.push(ColumnUse {
                field: field.name(),
                header: header[index].clone(),
                index,
                unit,
                how,
            });
        }
        // A column named `dilution` may give the others' light, the
        // target's, or the depth's factor: read by its values as c.
        let contamination = mapping.by_field.get(&Field::Contamination).copied();
        if let Some(index) =
            contamination.filter(|&i| header[i].to_ascii_lowercase().contains("dilution"))
            && let Some(col) = Field::Contamination
                .num_slot()
                .and_then(|s| num[s].as_mut())
        {
            let reading = Dilution::of(col.iter());
            if reading != Dilution::Contamination {
                col.update(|v| reading.contamination(v));
                scaled(Field::Contamination, f64::NAN);
                let what = match reading {
                    Dilution::TargetShare => {
                        "the target's share of the light (every value at most 1, most at least 0.5), the others' share c = 1 − dilution"
                    }
                    _ => {
                        "the factor that undoes a depth's dilution (every value at least 1), the others' share c = 1 − 1/dilution"
                    }
                };
                let h = crate::sanitize::clean(header[index].trim()).into_owned();
                notes.push(format!(
                    "`{h}` is read as {what}; name the column `contamination` if it gives the others' share already"
                ));
                if let Some(u) = columns.iter_mut().find(|u| u.index == index) {
                    u.how = format!("{}; read as {what}", u.how);
                }
            }
        }
        // A star's radius, mass or temperature, a radius ratio, a planet's
        // radius, or an ephemeris error, of zero or below is a placeholder
        // for an unknown value (`0`, `-1`), not a value: read as missing,
        // as an empty cell (common practice, no source). Read as values, a
        // mass of 0 made every orbit unstable, and errors of -1 d joined
        // unrelated periods.
        for field in [
            Field::StarRadiusRsun,
            Field::StarMassMsun,
            Field::StarTeffK,
            Field::Ror,
            Field::PlanetRadiusRearth,
            Field::PeriodErrD,
            Field::EpochErrD,
        ] {
            let Some(col) = field.num_slot().and_then(|s| num[s].as_mut()) else {
                continue;
            };
            let unknown = col.not_positive_to_missing();
            if unknown > 0 {
                notes.push(format!(
                    "{unknown} {field} value{} of zero or below (`{}`) read as unknown: a placeholder, not a value",
                    if unknown == 1 { "" } else { "s" },
                    crate::sanitize::clean(&header[mapping.by_field[&field]]),
                ));
            }
        }
        // Durations in days read as hours: said, with what to do.
        if let Some(&index) = mapping.by_field.get(&Field::DurationH) {
            let stated = opts
                .header_units
                .get(index)
                .is_some_and(|u| !u.trim().is_empty());
            let ratio = (!stated).then(|| durations.duration_ratio()).flatten();
            let name = crate::sanitize::clean(&header[index]);
            let bare = crate::sanitize::clean(header[index].trim());
            if let Some(ratio) = ratio.filter(|&r| r < DAYS_AS_HOURS_RATIO) {
                notes.push(format!(
                    "the durations (`{name}`) look like days read as hours: their median is {ratio:.3} of a central transit across a Sun-like star at each period (a day-valued column read as hours is 1/24 of it); if they are days, state it in the header (`{bare} (days)`) and load again",
                ));
            }
            if let Some(ratio) = ratio.filter(|&r| r > MINUTES_AS_HOURS_RATIO) {
                notes.push(format!(
                    "the durations (`{name}`) look like minutes read as hours: their median is {ratio:.1} times a central transit across a Sun-like star at each period (a minute-valued column read as hours is 60 times it), and a transit of half the period or more is no orbit's; if they are minutes, state it in the header (`{bare} (minutes)`) and load again",
                ));
            }
        }
        // A table of threshold-crossing events names its quantities
        // `tce_*` (the archives' prefix, from memory of their column
        // lists): its rows are detections, not yet candidates.
        let events = mapping
            .by_field
            .get(&Field::PeriodD)
            .is_some_and(|&i| header[i].trim().to_ascii_lowercase().starts_with("tce_"));
        if events {
            notes.push(super::events_note());
        }
        for (index, h, f) in &mapping.shadowed {
            columns.push(ColumnUse::shadowed(*index, h, *f));
        }
        for v in num.iter_mut().flatten() {
            v.settle();
        }
        if let Some(p) = lightcurve.as_mut() {
            p.shrink_to_fit();
        }
        let extra_names = mapping.extras.iter().map(|(_, h)| h.clone());
        Ok(Catalogue {
            source: name,
            candidates: ids.candidates,
            stars: ids.stars,
            index: ids.index,
            num,
            written_scales: scales,
            lightcurve,
            extras: extra_names.zip(extras).collect(),
            candidate_lookup: ids.candidate_lookup,
            star_lookup: ids.star_lookup,
            hasher: ids.hasher,
            columns,
            skipped,
            notes,
            star_keys: std::sync::OnceLock::new(),
            families: std::sync::OnceLock::new(),
            rows_seen,
            format: TableFormat::Delimited.name(),
            events,
        })
    }
}
