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

/// Rows for [`duration_ratio`], by their place among the rows read (before
/// duplicate ids go): every `step`-th from the first, `step` the smallest
/// power of two that keeps at most [`SAMPLE`] of them. The same rows
/// whether the load keeps the columns or only the ids (`summary`), so
/// every command says the same of a table's durations.
#[derive(Debug)]
pub(super) struct DurationSample {
    /// (period in days, duration in hours) of the rows taken, in order.
    pairs: Vec<(f64, f64)>,
    step: usize,
    seen: usize,
}

/// Rows at most in a [`DurationSample`].
const SAMPLE: usize = 10_000;

impl Default for DurationSample {
    fn default() -> Self {
        DurationSample {
            pairs: Vec::new(),
            step: 1,
            seen: 0,
        }
    }
}

impl DurationSample {
    /// Takes the rows that follow those seen (their periods and durations).
    pub(super) fn add(&mut self, periods: &Column, durations_h: &Column) {
        let first = (self.step - self.seen % self.step) % self.step;
        for i in (first..periods.len().min(durations_h.len())).step_by(self.step) {
            self.pairs.push((periods.get(i), durations_h.get(i)));
        }
        self.seen += periods.len();
        // Every other row taken is at a multiple of the doubled step.
        while self.pairs.len() > SAMPLE {
            self.step *= 2;
            let mut i = 0;
            self.pairs.retain(|_| {
                i += 1;
                i % 2 == 1
            });
        }
    }

    /// The median ratio of the durations to the central transit duration
    /// of a small planet across a Sun-like star at each period (Winn 2010
    /// via `science::durations_h`); `None` without rows to compare.
    pub(super) fn duration_ratio(&self) -> Option<f64> {
        let mut ratios: Vec<f64> = self
            .pairs
            .iter()
            .filter_map(|&(p, t)| {
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
        whole.add(&col(&periods), &col(&durations));
        let want: Vec<f64> = (0..50_000).step_by(8).map(|i| (i + 1) as f64).collect();
        assert_eq!(whole.pairs.iter().map(|p| p.0).collect::<Vec<_>>(), want);
        for cut in [1, 7, 999, 4096, 12_345] {
            let mut parts = DurationSample::default();
            for (p, t) in periods.chunks(cut).zip(durations.chunks(cut)) {
                parts.add(&col(p), &col(t));
            }
            assert_eq!(parts.pairs, whole.pairs, "parts of {cut}");
        }
        // A table of fewer rows than the sample: every row.
        let mut few = DurationSample::default();
        few.add(&col(&periods[..9_000]), &col(&durations[..9_000]));
        assert_eq!(few.pairs.len(), 9_000);
    }
}
