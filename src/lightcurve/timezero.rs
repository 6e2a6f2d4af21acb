//! Epochs and light-curve times counted from different zeros: the usual
//! reason a whole catalogue's transits are missing from its light curves
//! (docs/science.md §4.4).

/// Zeros in common use, days: JD − 2400000 (reduced JD), − 2400000.5
/// (modified JD), − 2450000, − 2454833 (one space mission's BJD − 2454833),
/// − 2457000 (another's BJD − 2457000). From memory; each is a convention
/// archives document.
pub const COMMON_ZEROS: [f64; 5] = [
    2_400_000.0,
    2_400_000.5,
    2_450_000.0,
    2_454_833.0,
    2_457_000.0,
];

/// One candidate's part of the evidence: its epoch, the first and last time
/// of its star's light curve, and whether its transit was not recovered.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EpochAndSpan {
    pub epoch: f64,
    pub first: f64,
    pub last: f64,
    pub not_recovered: bool,
}

/// The offset to add to light-curve times, when most candidates are not
/// recovered and the epochs sit a common zero away from the light curves'
/// times: Some((offset, median epoch, median light-curve time)). The offset
/// is positive when the epochs are full dates and the light curves count
/// from a zero, negative for the reverse.
pub fn suggest_offset(rows: &[EpochAndSpan]) -> Option<(f64, f64, f64)> {
    let missing = rows.iter().filter(|r| r.not_recovered).count();
    if rows.is_empty() || missing * 2 < rows.len() {
        return None;
    }
    let mut epochs: Vec<f64> = rows
        .iter()
        .map(|r| r.epoch)
        .filter(|e| e.is_finite())
        .collect();
    let mut mids: Vec<f64> = rows
        .iter()
        .map(|r| 0.5 * (r.first + r.last))
        .filter(|m| m.is_finite())
        .collect();
    let (e, m) = (super::median_of(&mut epochs), super::median_of(&mut mids));
    let gap = e - m;
    // A gap of a few years is an ephemeris propagated over a mission; a
    // gap of more than ~30 years is another zero.
    if gap.is_nan() || gap.abs() <= 10_000.0 {
        return None;
    }
    let best = COMMON_ZEROS
        .iter()
        .flat_map(|&z| [z, -z])
        .min_by(|a, b| (gap - a).abs().total_cmp(&(gap - b).abs()))?;
    ((gap - best).abs() < 5_000.0).then_some((best, e, m))
}

/// The notice for [`suggest_offset`], naming the flag and the survey key.
pub fn offset_notice(rows: &[EpochAndSpan]) -> Option<String> {
    let (offset, e, m) = suggest_offset(rows)?;
    let missing = rows.iter().filter(|r| r.not_recovered).count();
    let how = if offset > 0.0 {
        format!("the epochs look like full dates while the light curves count from {offset}")
    } else {
        format!(
            "the light curves look like full dates while the epochs count from {}",
            -offset
        )
    };
    Some(format!(
        "{missing} of {} candidates with light curves are not recovered; the epochs (median {e:.1}) and \
         the light-curve times (median {m:.1}) differ by {:.1} days: {how}. To compare them, give \
         --lc-time-offset {offset} or put lightcurve_time_offset = {offset} in survey.toml",
        rows.len(),
        e - m
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rows(epoch: f64, first: f64, last: f64, missing: bool, n: usize) -> Vec<EpochAndSpan> {
        vec![
            EpochAndSpan {
                epoch,
                first,
                last,
                not_recovered: missing,
            };
            n
        ]
    }

    #[test]
    fn full_dates_against_a_mission_zero_are_named() {
        // Epochs in BJD (2459012.3), light curves in BJD − 2457000.
        let r = rows(2_459_012.3, 1990.0, 2030.0, true, 10);
        assert_eq!(suggest_offset(&r).map(|s| s.0), Some(2_457_000.0));
        let text = offset_notice(&r).unwrap();
        assert!(text.contains("--lc-time-offset 2457000"), "{text}");
        // The reverse: epochs counted from 2457000, light curves in BJD.
        let r = rows(2012.3, 2_458_990.0, 2_459_030.0, true, 10);
        assert_eq!(suggest_offset(&r).map(|s| s.0), Some(-2_457_000.0));
    }

    #[test]
    fn nothing_is_said_when_the_signals_are_there_or_the_zeros_agree() {
        assert_eq!(
            suggest_offset(&rows(2_459_012.3, 1990.0, 2030.0, false, 10)),
            None
        );
        // Not recovered, but the times are in one system: no offset helps.
        assert_eq!(
            suggest_offset(&rows(2012.3, 1990.0, 2030.0, true, 10)),
            None
        );
    }
}
