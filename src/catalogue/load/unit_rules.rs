//! The unit rules: the conversions a table's stated units imply, and the
//! depth unit (flag, table, header name, else the median rule), and the
//! sample that tells durations in days from durations in hours.

use super::*;

/// The conversions the units in a table's header imply for the fields
/// stored in days or hours and for the epoch (depth has its own rule, see
/// [`depth_unit`]); a unit that cannot be converted stops the load.
pub(super) fn unit_conversions(
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
pub(super) fn depth_unit(
    path: &str,
    header: &str,
    depths: &crate::catalogue::Column,
    flag: Option<DepthUnit>,
) -> Result<(DepthUnit, String), LoadError> {
    if let Some(u) = flag {
        return Ok((u, "from --depth-unit".into()));
    }
    if let Some(u) = DepthUnit::from_header(header) {
        return Ok((u, "from the header name".into()));
    }
    let mut v: Vec<f64> = depths.iter().filter(|d| d.is_finite()).collect();
    let Some(median) = median(&mut v) else {
        return Ok((DepthUnit::Ppm, "assumed ppm (no rows)".into()));
    };
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

/// Below this median ratio of the durations to a central transit's across
/// a Sun-like star, a duration column read as hours was written in days (a
/// day-valued column read as hours is 1/24 of the truth; real transits sit
/// near 0.3–1.5 of it, by impact and the star's density: common practice,
/// no source).
pub(super) const DAYS_AS_HOURS_RATIO: f64 = 0.125;

/// Above this median ratio, a duration column read as hours was written
/// in minutes (60 times the truth); the mirror of [`DAYS_AS_HOURS_RATIO`]:
/// a giant's transits run a few times a Sun-like star's (common practice,
/// no source).
pub(super) const MINUTES_AS_HOURS_RATIO: f64 = 8.0;

/// Rows for the unit rules ([`DurationSample::duration_ratio`],
/// [`RorSample::ror_in_percent`]): K columns of every `step`-th row from
/// the first, by their place among the rows read (before duplicate ids
/// go), `step` the smallest power of two that keeps at most [`SAMPLE`] of
/// them. The same rows whether the load keeps the columns or only the ids
/// (`summary`), so every command says the same of a table's units.
#[derive(Debug)]
pub(super) struct RowSample<const K: usize> {
    /// The values of the rows taken, in order.
    rows: Vec<[f64; K]>,
    step: usize,
    seen: usize,
}

/// Rows at most in a [`RowSample`].
const SAMPLE: usize = 10_000;

impl<const K: usize> Default for RowSample<K> {
    fn default() -> Self {
        RowSample {
            rows: Vec::new(),
            step: 1,
            seen: 0,
        }
    }
}

/// (period in days, duration in hours) of the rows taken.
pub(super) type DurationSample = RowSample<2>;

impl<const K: usize> RowSample<K> {
    /// Takes the rows that follow those seen (their cells in `columns`).
    pub(super) fn add(&mut self, columns: [&Column; K]) {
        let len = columns.iter().map(|c| c.len()).min().unwrap_or(0);
        let first = (self.step - self.seen % self.step) % self.step;
        for i in (first..len).step_by(self.step) {
            self.rows.push(columns.map(|c| c.get(i)));
        }
        self.seen += len;
        // Every other row taken is at a multiple of the doubled step.
        while self.rows.len() > SAMPLE {
            self.step *= 2;
            let mut i = 0;
            self.rows.retain(|_| {
                i += 1;
                i % 2 == 1
            });
        }
    }
}

/// (radius ratio, depth) of the rows taken, as the table writes them.
pub(super) type RorSample = RowSample<2>;

impl RorSample {
    /// Whether the radius-ratio column is in percent: most rows with a
    /// ratio k and a depth δ (`to_ppm` turns the table's depth into ppm, as
    /// the depth column is) give k/√δ above 10, and most give k above 0.3.
    /// A transit's depth is about k² (Seager & Mallén-Ornelas 2003; limb
    /// darkening makes it up to ~1.2 k², docs/science.md §2), so a fraction
    /// gives k/√δ near 1 and a percentage near 100; 10 is their geometric
    /// middle, which only light diluted a hundredfold would carry a
    /// fraction past. The second test keeps a table whose depths are in the
    /// wrong unit (fractions under a ppm header: k/√δ near 1000) from
    /// shrinking its ratios: as a fraction, 0.3 is a body a third the size
    /// of its star, a binary's rather than most planets', while a planet's
    /// ratio in percent is 0.9 (the Earth across the Sun) and up.
    pub(super) fn ror_in_percent(&self, to_ppm: impl Fn(f64) -> f64) -> bool {
        let (mut above, mut large, mut rows) = (0usize, 0usize, 0usize);
        for &[k, depth] in &self.rows {
            let d = to_ppm(depth);
            if k > 0.0 && d > 0.0 && k.is_finite() && d.is_finite() {
                rows += 1;
                above += usize::from(k > 10.0 * (d * 1e-6).sqrt());
                large += usize::from(k > 0.3);
            }
        }
        2 * above > rows && 2 * large > rows
    }
}

/// (planet radius, depth, star radius) of the rows taken, as the table
/// writes them.
pub(super) type RadiusSample = RowSample<3>;

/// Below this median ratio of a planet-radius column, read as Earth radii,
/// to the radii its depths and stars give, the column is in Jupiter radii:
/// in Earth radii the ratio is near 1, in Jupiter radii near 1/11.2
/// (R_J/R⊕, IAU 2015 Resolution B3); 0.3 is their geometric middle, which
/// only light diluted tenfold in radius (a hundredfold in depth) would
/// carry a column in Earth radii past.
pub(super) const JUPITER_RADII_RATIO: f64 = 0.3;

impl RadiusSample {
    /// The median ratio of the planet radii to R★√δ, the radius of a
    /// uniform disc blocking the depth δ (`to_ppm` turns the table's depth
    /// into ppm, as the depth column is) in Earth radii (docs/science.md
    /// §2); `None` without rows that give all three.
    pub(super) fn radius_ratio(&self, to_ppm: impl Fn(f64) -> f64) -> Option<f64> {
        let mut ratios: Vec<f64> = self
            .rows
            .iter()
            .filter_map(|&[rp, depth, star]| {
                let from_depth = crate::science::radius_from_depth_rearth(to_ppm(depth), star, 0.0);
                let ok = rp > 0.0 && from_depth > 0.0 && star > 0.0;
                (ok && (rp / from_depth).is_finite()).then(|| rp / from_depth)
            })
            .collect();
        median(&mut ratios)
    }
}

impl DurationSample {
    /// The median ratio of the durations to the central transit duration
    /// of a small planet across a Sun-like star at each period (Winn 2010
    /// via `science::durations_h`); `None` without rows to compare.
    pub(super) fn duration_ratio(&self) -> Option<f64> {
        let mut ratios: Vec<f64> = self
            .rows
            .iter()
            .filter_map(|&[p, t]| {
                let a = crate::science::a_over_rstar(p, 1.0, 1.0);
                let (central, _) = crate::science::durations_h(p, a, 0.0, 0.0)?;
                (t.is_finite() && central > 0.0).then(|| t / central)
            })
            .collect();
        median(&mut ratios)
    }
}

/// The middle value of `v` (the upper of the two middle ones for an even
/// count), reordering it; `None` when empty.
fn median(v: &mut [f64]) -> Option<f64> {
    if v.is_empty() {
        return None;
    }
    let mid = v.len() / 2;
    Some(*v.select_nth_unstable_by(mid, f64::total_cmp).1)
}

/// How a column named `dilution` gives the light of other sources in the
/// aperture: tables use the word for three quantities (common practice,
/// no source), told apart by their values.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) enum Dilution {
    /// The others' share of the light, c, as `contamination` is: most
    /// values below 0.5.
    Contamination,
    /// The target's share, 1 − c (a light-curve fit's dilution factor; 1 is
    /// undiluted): every value at most 1, most at least 0.5.
    TargetShare,
    /// The factor that undoes the dilution of a depth, 1/(1 − c): every
    /// value at least 1, some above it.
    DepthFactor,
}

impl Dilution {
    /// The reading of a `dilution` column's values (its finite ones).
    pub(super) fn of(values: impl Iterator<Item = f64>) -> Dilution {
        let mut v: Vec<f64> = values.filter(|v| v.is_finite()).collect();
        let (lo, hi) = v
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &x| {
                (lo.min(x), hi.max(x))
            });
        match median(&mut v) {
            None => Dilution::Contamination,
            Some(_) if lo >= 1.0 && hi > 1.0 => Dilution::DepthFactor,
            Some(m) if hi <= 1.0 && m >= 0.5 => Dilution::TargetShare,
            Some(_) => Dilution::Contamination,
        }
    }

    /// c, the others' share of the light, from a value read this way.
    pub(super) fn contamination(self, v: f64) -> f64 {
        match self {
            Dilution::Contamination => v,
            Dilution::TargetShare => 1.0 - v,
            Dilution::DepthFactor => 1.0 - 1.0 / v,
        }
    }
}

/// A depth as the table writes it, in ppm as the depth column is stored:
/// from magnitudes (`depth_from.0` of them to one), then times
/// `depth_from.1`.
pub(super) fn depth_in_ppm(depth_from: (Option<f64>, f64), d: f64) -> f64 {
    let d = depth_from
        .0
        .map_or(d, |per_mag| units::depth_ppm_of_magnitudes(d * per_mag));
    d * depth_from.1
}

/// The unit a column without one of its own takes, as a factor to its
/// stored unit, whose unit that is, and the stored unit: a centroid
/// offset's error its offset's stated unit; a secondary depth's error its
/// secondary depth's stated unit, else, as the secondary depth itself, the
/// depth column's (`depth_from`: magnitudes per unit, then a factor; a
/// small depth in magnitudes is linear in them, `units::conversion`).
/// `None` for every other field, and where the partner states none.
pub(super) fn borrowed_unit(
    field: Field,
    convert: &[(usize, f64, f64)],
    depth_from: (Option<f64>, f64),
) -> Option<(f64, &'static str, &'static str)> {
    let stated = |f: Field| {
        convert
            .iter()
            .find(|c| Some(c.0) == f.num_slot())
            .map(|c| c.1)
    };
    match field {
        Field::CentroidOffsetErrArcsec => {
            stated(Field::CentroidOffsetArcsec).map(|s| (s, "the offset's", "arcsec"))
        }
        Field::SecondaryDepthPpm | Field::SecondaryDepthErrPpm => {
            let own = (field == Field::SecondaryDepthErrPpm)
                .then(|| stated(Field::SecondaryDepthPpm))
                .flatten();
            Some(match own {
                Some(s) => (s, "the secondary depth's", "ppm"),
                None => {
                    let per_mag = depth_from.0.map_or(1.0, |m| units::ppm_per_magnitude() * m);
                    (per_mag * depth_from.1, "the depth's", "ppm")
                }
            })
        }
        _ => None,
    }
}

/// The units a table's comment lines above its header give its columns,
/// by column name in lower case: an archive's `# COLUMN koi_depth:
/// Transit Depth [ppm]` (the form the exoplanet archives write above
/// their CSV tables, from memory), the unit the last brackets of the line.
/// A column the header itself gives a unit keeps its own
/// (`read_catalogue`).
pub(super) fn comment_units(head: &[u8]) -> std::collections::HashMap<String, String> {
    let mut out = std::collections::HashMap::new();
    for line in head.split(|&b| b == b'\n') {
        let Some(rest) = line.strip_prefix(b"#") else {
            continue;
        };
        let text = String::from_utf8_lossy(rest);
        let text = text.trim();
        let Some(after) = text
            .get(..7)
            .filter(|w| w.eq_ignore_ascii_case("column "))
            .map(|_| &text[7..])
        else {
            continue;
        };
        let Some((name, what)) = after.split_once(':') else {
            continue;
        };
        let unit = what
            .trim_end()
            .strip_suffix(']')
            .and_then(|w| w.rsplit_once('['))
            .map(|(_, u)| u.trim())
            .filter(|u| !u.is_empty());
        if let Some(u) = unit {
            out.insert(name.trim().to_ascii_lowercase(), u.to_string());
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_durations_sample_takes_the_same_rows_however_the_table_is_cut() {
        // 50,000 rows, row i with period i + 1: taken whole, or in parts
        // of every size the chunks make, the rows are every 8th from the
        // first (8 the smallest power of two leaving at most 10,000).
        let periods: Vec<f64> = (0..50_000).map(|i| (i + 1) as f64).collect();
        let durations = vec![3.0; periods.len()];
        let mut whole = DurationSample::default();
        let col = |v: &[f64]| Column::from_values(v);
        whole.add([&col(&periods), &col(&durations)]);
        let want: Vec<f64> = (0..50_000).step_by(8).map(|i| (i + 1) as f64).collect();
        assert_eq!(whole.rows.iter().map(|p| p[0]).collect::<Vec<_>>(), want);
        for cut in [1, 7, 999, 4096, 12_345] {
            let mut parts = DurationSample::default();
            for (p, t) in periods.chunks(cut).zip(durations.chunks(cut)) {
                parts.add([&col(p), &col(t)]);
            }
            assert_eq!(parts.rows, whole.rows, "parts of {cut}");
        }
        // A table of fewer rows than the sample: every row.
        let mut few = DurationSample::default();
        few.add([&col(&periods[..9_000]), &col(&durations[..9_000])]);
        assert_eq!(few.rows.len(), 9_000);
    }

    #[test]
    fn comment_lines_give_units_by_column_name() {
        // The archives' form (from memory), and lines that give none.
        let head = b"# produced by an archive [not a unit]\n\
#\n\
# COLUMN koi_depth:      Transit Depth [ppm]\n\
# column Koi_Prad: Planetary Radius [Earth radii]\n\
# COLUMN koi_model_snr:  Transit Signal-to-Noise\n\
# COLUMN koi_time0bk:    Transit Epoch [BKJD] and more\n\
# COLUMN koi_steff:      Stellar Effective Temperature [K]   \r\n";
        let u = comment_units(head);
        assert_eq!(u.get("koi_depth").map(String::as_str), Some("ppm"));
        assert_eq!(u.get("koi_prad").map(String::as_str), Some("Earth radii"));
        assert_eq!(u.get("koi_steff").map(String::as_str), Some("K"));
        assert_eq!(u.len(), 3, "{u:?}");
    }

    #[test]
    fn radius_ratios_in_percent_are_told_by_their_depths() {
        // δ ≈ k² (Seager & Mallén-Ornelas 2003): 800 ppm is k ≈ 0.028, so
        // 0.028 is a fraction and 2.8 a percentage; 10 (k/√δ) parts them.
        let col = |v: &[f64]| Column::from_values(v);
        let sample = |k: &[f64], d: &[f64]| {
            let mut s = RorSample::default();
            s.add([&col(k), &col(d)]);
            s
        };
        let ppm = |d: f64| d;
        let depths = [800.0, 700.0, 900.0];
        assert!(!sample(&[0.028, 0.026, 0.030], &depths).ror_in_percent(ppm));
        assert!(sample(&[2.8, 2.6, 3.0], &depths).ror_in_percent(ppm));
        // The depths as the table gives them, turned into ppm as the depth
        // column is: percent (× 10⁴), or 0.87 mmag ≈ 800 ppm (Pogson).
        let pct = [0.08, 0.07, 0.09];
        assert!(!sample(&[0.028, 0.026, 0.030], &pct).ror_in_percent(|d| d * 1e4));
        assert!(sample(&[2.8, 2.6, 3.0], &pct).ror_in_percent(|d| d * 1e4));
        let mmag = [0.87, 0.76, 0.98];
        let pogson = |d: f64| crate::catalogue::units::depth_ppm_of_magnitudes(d * 1e-3);
        assert!(!sample(&[0.028, 0.026, 0.030], &mmag).ror_in_percent(pogson));
        // Depths a million times too small (fractions under a ppm header)
        // make fractions look like percentages by k/√δ alone; the ratios
        // themselves (0.03, far below 0.3) keep them fractions.
        let fractions_as_ppm = [0.0008, 0.0007, 0.0009];
        assert!(!sample(&[0.028, 0.026, 0.030], &fractions_as_ppm).ror_in_percent(ppm));
        // Most rows decide; rows without a ratio or a depth say nothing.
        assert!(!sample(&[0.028, 2.6, 0.030, f64::NAN], &[800.0; 4]).ror_in_percent(ppm));
        assert!(!RorSample::default().ror_in_percent(ppm));
    }
}
