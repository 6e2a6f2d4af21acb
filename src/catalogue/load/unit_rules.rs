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
