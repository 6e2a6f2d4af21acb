//! What the catalogue already knows: a disposition column that names a
//! candidate a false positive, or the candidate's own `fpp` saying it is
//! more likely a false positive than a planet (docs/science.md §3.5). Such a
//! candidate is flagged `known-fp` (blocking): it counts towards no system,
//! and its star is one known to host a false positive, whose other
//! candidates the odds hold back too (`odds::live`).

use super::Checks;
use crate::catalogue::{CandidateId, Catalogue, Field};
use crate::flags::Flag;

/// Dispositions that name a false positive, after [`normalise`]: the
/// archives' words and their two-letter codes (from memory of the exoplanet
/// archives' candidate tables), and the kinds of false positive themselves.
/// A cell that begins with one of the long forms counts too (`false
/// positive (centroid offset)`).
const FALSE_POSITIVE: [&str; 8] = [
    "false positive",
    "fp",
    "false alarm",
    "fa",
    "eclipsing binary",
    "eb",
    "blend",
    "not a planet",
];

/// A disposition cell in one spelling: lower case, `_` and `-` as spaces,
/// runs of spaces as one, trimmed.
fn normalise(cell: &str) -> String {
    cell.to_ascii_lowercase()
        .replace(['_', '-'], " ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
}

/// Whether a disposition cell names a false positive. Planet and candidate
/// dispositions (`CONFIRMED`, `CANDIDATE`, `PC`, `KP`...), empty cells and
/// anything else unknown do not: the candidate is then vetted as any other.
pub fn says_false_positive(cell: &str) -> bool {
    let n = normalise(cell);
    FALSE_POSITIVE.iter().any(|fp| {
        n == *fp
            || (fp.len() > 2
                && n.strip_prefix(fp)
                    .is_some_and(|rest| rest.starts_with([' ', '(', ':', ',', ';'])))
    })
}

/// The `fpp` at and above which a candidate is more likely a false positive
/// than a planet (odds 1:1): a definition, not a tuning.
pub const FPP_EVEN: f64 = 0.5;

/// Flags every candidate the catalogue itself calls a false positive.
pub(super) fn flag(cat: &Catalogue, out: &mut Checks) {
    let columns = cat.disposition_columns();
    let headers: Vec<&str> = cat.extra_headers().collect();
    let fpp = cat.column(Field::Fpp);
    if columns.is_empty() && fpp.is_none() {
        return;
    }
    for c in 0..cat.len() as CandidateId {
        for &i in &columns {
            let cell = cat.extra(i, c);
            if says_false_positive(cell) {
                out.add(
                    c,
                    Flag::KnownFp,
                    false,
                    format!(
                        "the catalogue's {} says `{}`: a known false positive",
                        headers[i],
                        crate::sanitize::clean(cell.trim())
                    ),
                );
            }
        }
        if let Some(p) = fpp.map(|col| col[c as usize]) {
            if (FPP_EVEN..=1.0).contains(&p) {
                out.add(
                    c,
                    Flag::KnownFp,
                    false,
                    format!(
                        "the catalogue's fpp is {p}: more likely a false positive than a planet"
                    ),
                );
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dispositions_that_name_a_false_positive() {
        for yes in [
            "FALSE POSITIVE",
            "false_positive",
            "  False-Positive ",
            "FP",
            "fp",
            "FA",
            "False Alarm",
            "EB",
            "eclipsing binary",
            "Blend",
            "false positive (centroid offset)",
            "FALSE POSITIVE: secondary eclipse",
        ] {
            assert!(says_false_positive(yes), "{yes}");
        }
        for no in [
            "",
            "CANDIDATE",
            "CONFIRMED",
            "PC",
            "APC",
            "KP",
            "CP",
            "NOT DISPOSITIONED",
            "fpx",
            "blended light considered",
            "ebb",
            "false positives ruled out",
        ] {
            assert!(!says_false_positive(no), "{no}");
        }
    }
}
