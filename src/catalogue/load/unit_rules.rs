//! The unit rules: the conversions a table's stated units imply, and the
//! depth unit (flag, table, header name, else the median rule).

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

/// The median ratio of `durations_h` to the central transit duration of a
/// small planet across a Sun-like star at each period (Winn 2010 via
/// `science::durations_h`), over up to 10,000 rows spread through the
/// table; `None` without rows to compare.
pub(super) fn duration_ratio(periods: &[f64], durations_h: &[f64]) -> Option<f64> {
    let step = (periods.len() / 10_000).max(1);
    let mut ratios: Vec<f64> = (0..periods.len())
        .step_by(step)
        .filter_map(|r| {
            let (p, t) = (periods[r], durations_h[r]);
            let a = crate::science::a_over_rstar(p, 1.0, 1.0);
            let (central, _) = crate::science::durations_h(p, a, 0.0, 0.0)?;
            (t.is_finite() && central > 0.0).then(|| t / central)
        })
        .collect();
    median(&mut ratios)
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
