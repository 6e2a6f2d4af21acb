//! What the catalogue already knows: a disposition column that names a
//! candidate a false positive, an archive's false-positive flag column set
//! for it, or the candidate's own `fpp` saying it is more likely a false
//! positive than a planet (docs/science.md §3.5). Such a
//! candidate is flagged `known-fp` (blocking): it counts towards no system,
//! and its star is one known to host a false positive, whose other
//! candidates the odds hold back too (`odds::live`).

use super::Checks;
use crate::catalogue::{CandidateId, Catalogue, Field, SkippedRow, StarId};
use crate::flags::Flag;

/// Dispositions that name an astrophysical false positive, after
/// [`normalise`]: the archives' words and their codes (from memory of the
/// exoplanet archives' candidate tables and of the follow-up working
/// groups' codes: `NEB` nearby, `BEB` background, `HEB` hierarchical
/// eclipsing binary, `SB1`/`SB2` spectroscopic binary, `NPC`/`NFP` a
/// signal on a nearby star), and the kinds of false positive themselves.
/// Read anywhere in the cell as whole words (`likely EB`, `PC; BEB?`,
/// `false positive (centroid offset)`, `FP - EB`), unless the same clause
/// negates them ([`NEGATIONS`]: `no EB`, `EB ruled out`). Its star is one
/// known to host a false positive (docs/science.md §1.1).
const FALSE_POSITIVE: [&str; 21] = [
    "false positive",
    "fp",
    "eclipsing binary",
    "eb",
    "neb",
    "beb",
    "heb",
    "blend",
    "blended binary",
    "spectroscopic binary",
    "sb",
    "sb1",
    "sb2",
    "stellar eclipse",
    "centroid offset",
    "ephemeris match",
    "npc",
    "nfp",
    "brown dwarf",
    "not a planet",
    "refuted",
];

/// Words that, in the clause of a false-positive word, say the opposite
/// (`no EB`, `non-EB`, `EB ruled out`, `EB unlikely`, `blend excluded`):
/// that clause names none. `not a planet` is itself a false positive's
/// phrase, read before this.
const NEGATIONS: [&str; 7] = [
    "no", "not", "non", "ruled", "excluded", "unlikely", "without",
];

/// Dispositions that name a signal that is no transit at all: a false
/// alarm, the instrument, noise, the star's own variability (`FA`, `IS`,
/// `V`: from memory of the TOI tables' codes). The candidate counts for
/// nothing, but says nothing of its star, as a vetter's rejection as
/// `artefact` (docs/science.md §3.5).
const NOT_A_TRANSIT: [&str; 12] = [
    "false alarm",
    "fa",
    "instrumental",
    "is",
    "systematics",
    "noise",
    "artefact",
    "artifact",
    "stellar variability",
    "variable star",
    "v",
    "not transit like",
];

/// Dispositions, after [`normalise`], that leave a candidate to the checks
/// without a word of warning: planets and candidates as the archives write
/// them (from memory), and an empty cell.
const PLANET_OR_CANDIDATE: [&str; 18] = [
    "",
    "candidate",
    "planet candidate",
    "pc",
    "apc",
    "vpc",
    "vpc+",
    "cpc",
    "ppc",
    "ambiguous planet candidate",
    "cp",
    "kp",
    "confirmed",
    "confirmed planet",
    "known planet",
    "planet",
    "validated",
    "not dispositioned",
];

/// What a disposition cell says.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Said {
    FalsePositive,
    NotATransit,
    PlanetOrCandidate,
    /// A word this module does not know: vetted as a candidate, and said.
    Unknown,
    /// A repeated entry of another signal (`FP - duplicate`): counts for
    /// nothing, as the copy it is, and names nothing of its star.
    Duplicate,
}

/// Words that call an entry a repeat of another (`FP (duplicate)`, `dup
/// of 101.01`): the archive retires the copy, and says nothing of the
/// signal itself (docs/science.md §3.5).
const DUPLICATE: [&str; 6] = [
    "duplicate",
    "duplicated",
    "dup",
    "dupe",
    "repeat",
    "repeated",
];

/// Whether a disposition cell calls its entry a repeat of another, by a
/// whole word of [`DUPLICATE`].
fn names_a_duplicate(cell: &str) -> bool {
    normalise(cell)
        .split(|c: char| !c.is_ascii_alphanumeric())
        .any(|w| DUPLICATE.contains(&w))
}

fn said(cell: &str) -> Said {
    if names_a_duplicate(cell) {
        Said::Duplicate
    } else if says_false_positive(cell) {
        Said::FalsePositive
    } else if begins_with_one(&normalise(cell), &NOT_A_TRANSIT) {
        Said::NotATransit
    } else if crate::catalogue::is_missing(cell.as_bytes())
        || PLANET_OR_CANDIDATE.contains(&normalise(cell).as_str())
    {
        // Missing (`NA`, `null`...) says nothing, as an empty cell.
        Said::PlanetOrCandidate
    } else {
        Said::Unknown
    }
}

/// A disposition cell in one spelling: lower case, `_` and `-` as spaces,
/// runs of spaces as one, trimmed.
fn normalise(cell: &str) -> String {
    cell.to_ascii_lowercase()
        .replace(['_', '-'], " ")
        .split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
}

/// Whether a disposition cell names a false positive: one of
/// [`FALSE_POSITIVE`] as whole words in a clause of the cell (clauses are
/// parted by `;`, `,`, `/`, `|`, `+` and brackets) that no word of
/// [`NEGATIONS`] turns around (`not a planet` is read first, as itself).
/// Planet and candidate dispositions
/// (`CONFIRMED`, `CANDIDATE`, `PC`, `KP`...), empty cells and anything else
/// unknown do not: the candidate is then vetted as any other; nor does a
/// cell that calls its entry a duplicate ([`names_a_duplicate`]).
pub fn says_false_positive(cell: &str) -> bool {
    if names_a_duplicate(cell) {
        return false;
    }
    normalise(cell)
        .split([';', ',', '/', '|', '+', '(', ')', '[', ']', ':'])
        .any(|clause| {
            let words: Vec<&str> = clause
                .split(|c: char| !(c.is_ascii_alphanumeric()))
                .filter(|w| !w.is_empty())
                .collect();
            let has = |phrase: &str| {
                let p: Vec<&str> = phrase.split(' ').collect();
                words.windows(p.len()).any(|w| w == p.as_slice())
            };
            has("not a planet")
                || (FALSE_POSITIVE.iter().any(|p| has(p))
                    && !words.iter().any(|w| NEGATIONS.contains(w)))
        })
}

/// Whether a normalised cell is one of `words`, or begins with one and goes
/// on after a space or a mark.
fn begins_with_one(n: &str, words: &[&str]) -> bool {
    words.iter().any(|w| {
        n == *w
            || n.strip_prefix(w)
                .is_some_and(|rest| rest.starts_with([' ', '(', ':', ',', ';', '/', '?']))
    })
}

/// What a false-positive flag's cell says.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum FlagCell {
    /// A number from 0.5 to 1 (a 1, or a probability that makes a false
    /// positive the likelier: [`FPP_EVEN`]); `true`, `yes`, `y`, `t` (a FITS
    /// or VOTable logical); or a disposition's word for a false positive
    /// (`EB`, [`says_false_positive`]).
    Set,
    /// A number from 0 to below 0.5 (`0`), `false`, `no`, `n`, `f`, `-`,
    /// or a missing cell.
    Unset,
    /// Anything else (a number below 0 or above 1 is no yes or no: a
    /// column named `fp` of another quantity is not read as flags): read
    /// as not set, and named in a note.
    Unknown,
}

fn flag_cell(cell: &str) -> FlagCell {
    let c = cell.trim();
    if crate::catalogue::is_missing(c.as_bytes()) {
        return FlagCell::Unset;
    }
    if let Ok(v) = c.parse::<f64>() {
        return if (FPP_EVEN..=1.0).contains(&v) {
            FlagCell::Set
        } else if (0.0..FPP_EVEN).contains(&v) {
            FlagCell::Unset
        } else {
            FlagCell::Unknown
        };
    }
    match c.to_ascii_lowercase().as_str() {
        "true" | "yes" | "y" | "t" => FlagCell::Set,
        "false" | "no" | "n" | "f" | "-" | "none" => FlagCell::Unset,
        _ if says_false_positive(c) => FlagCell::Set,
        _ => FlagCell::Unknown,
    }
}

fn flag_is_set(cell: &str) -> bool {
    flag_cell(cell) == FlagCell::Set
}

/// The `fpp` at and above which a candidate is more likely a false positive
/// than a planet (odds 1:1): a definition, not a tuning.
pub const FPP_EVEN: f64 = 0.5;

/// A star known to host a false positive that no loaded row shows: a row
/// the loader skipped says so (docs/science.md §3.5), or a vetter rejected
/// as a false positive a candidate of it that the catalogue no longer has
/// (§1.1). What it says holds all the same.
#[derive(Clone, Debug, PartialEq)]
pub struct UnseenFp {
    pub star: StarId,
    /// What says so, where, for people.
    pub why: String,
    /// Held as another id of a star that hosts the false positive (a split
    /// family, one place: docs/science.md §3.4), not by its own rows or
    /// decisions: its own other ids are not looked for (one step, in every
    /// command and in the browser alike).
    pub by_tie: bool,
}

/// What a skipped row's cells say of a false positive, read as a loaded
/// row's are: a disposition that names one, a set false-positive flag, or
/// an fpp of at least [`FPP_EVEN`]. `disposition` and `fpp` are the
/// headers mapped to those fields; `fpp_scale` divides the fpp (100 for a
/// column in percent).
fn skipped_row_says(
    row: &SkippedRow,
    disposition: Option<&str>,
    fpp: Option<&str>,
    fpp_scale: f64,
) -> Option<String> {
    row.cells.iter().find_map(|(h, v)| {
        let clean = || crate::sanitize::clean(v.trim()).into_owned();
        let h_clean = crate::sanitize::clean(h);
        if Some(h.as_str()) == fpp {
            let p: f64 = crate::catalogue::bounded_number(v.as_bytes())? / fpp_scale;
            (FPP_EVEN..=1.0)
                .contains(&p)
                .then(|| format!("fpp {}", clean()))
        } else if Some(h.as_str()) == disposition || crate::catalogue::names_a_disposition(h) {
            says_false_positive(v).then(|| format!("{h_clean} `{}`", clean()))
        } else if crate::catalogue::names_an_fp_flag(h) {
            flag_is_set(v).then(|| format!("{h_clean} {}", clean()))
        } else if crate::catalogue::names_an_fp_probability(h) {
            let p = crate::catalogue::bounded_number(v.as_bytes())?;
            let p = if p > 1.0 || header_says_percent(h) {
                p / 100.0
            } else {
                p
            };
            (FPP_EVEN..=1.0)
                .contains(&p)
                .then(|| format!("{h_clean} {}", clean()))
        } else {
            None
        }
    })
}

/// The stars that skipped rows call the host of a false positive, by star
/// (the first such row of each), and a note naming them.
fn skipped_rows(cat: &Catalogue, out: &mut Checks) {
    let mapped = |f: Field| {
        cat.columns
            .iter()
            .find(|u| u.field == f.name())
            .map(|u| u.header.as_str())
    };
    let (disposition, fpp) = (mapped(Field::Disposition), mapped(Field::Fpp));
    // A skipped row's fpp as the file gave it: in percent where the column is.
    let in_percent = cat
        .columns
        .iter()
        .any(|u| u.field == Field::Fpp.name() && u.unit == crate::catalogue::FPP_PERCENT);
    let fpp_scale = if in_percent { 100.0 } else { 1.0 };
    let mut found: Vec<UnseenFp> = cat
        .skipped
        .iter()
        .filter_map(|skip| {
            let row = skip.row.as_deref()?;
            // A row that names no star belongs to its candidate family's.
            let (star, by_family) = match cat.find_star(&row.star) {
                Some(s) if !crate::catalogue::names_no_star(&row.star) => (s, false),
                _ => (cat.star_of_family(&row.candidate)?, true),
            };
            let said = skipped_row_says(row, disposition, fpp, fpp_scale)?;
            Some(UnseenFp {
                star,
                by_tie: false,
                why: format!(
                    "line {} says {said} and was skipped ({}){}",
                    skip.line,
                    crate::sanitize::clean(&skip.reason),
                    if by_family {
                        format!(
                            "; it names no star, and its candidate `{}` is of this star's family",
                            crate::sanitize::clean(&row.candidate)
                        )
                    } else {
                        String::new()
                    }
                ),
            })
        })
        .collect();
    found.sort_by_key(|u| u.star);
    found.dedup_by_key(|u| u.star);
    if found.is_empty() {
        return;
    }
    let listed: Vec<String> = found
        .iter()
        .take(3)
        .map(|u| {
            format!(
                "star {}: {}",
                crate::sanitize::clean(cat.star_id(u.star)),
                u.why
            )
        })
        .collect();
    out.notes.push(format!(
        "{} star{} host{} a false positive only a skipped row names ({}{}): {} candidates are held back; fix those rows, or see `starsift summary` (docs/science.md §3.5)",
        found.len(),
        if found.len() == 1 { "" } else { "s" },
        if found.len() == 1 { "s" } else { "" },
        listed.join("; "),
        if found.len() > 3 { "; …" } else { "" },
        if found.len() == 1 { "its" } else { "their" },
    ));
    out.unseen_fp = found;
}

/// Whether a header states percent: `%`, `percent` or `pct`.
fn header_says_percent(h: &str) -> bool {
    let h = h.to_ascii_lowercase();
    h.contains('%') || h.contains("percent") || h.contains("pct")
}

/// The columns beside the mapped `fpp` that are false-positive
/// probabilities too (`crate::catalogue::names_an_fp_probability`: a
/// nearby star's `nfpp`, a second tool's `fpp_vespa`...), each with the
/// divisor of its values: 100 where the header states percent, or where
/// its values are by their range (`crate::catalogue::percent_by_range`, the
/// mapped column's rule), else 1.
fn probability_columns(cat: &Catalogue, headers: &[&str]) -> Vec<(usize, f64)> {
    (0..headers.len())
        .filter(|&i| crate::catalogue::names_an_fp_probability(headers[i]))
        .map(|i| {
            let (lo, hi) = (0..cat.len() as CandidateId)
                .filter_map(|c| crate::catalogue::bounded_number(cat.extra(i, c).as_bytes()))
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
                    (lo.min(v), hi.max(v))
                });
            let percent =
                header_says_percent(headers[i]) || crate::catalogue::percent_by_range(lo, hi);
            (i, if percent { 100.0 } else { 1.0 })
        })
        .collect()
}

/// Flags every candidate the catalogue itself calls a false positive.
pub(super) fn flag(cat: &Catalogue, out: &mut Checks) {
    skipped_rows(cat, out);
    let columns = cat.disposition_columns();
    let headers: Vec<&str> = cat.extra_headers().collect();
    let flag_columns: Vec<usize> = (0..headers.len())
        .filter(|&i| crate::catalogue::names_an_fp_flag(headers[i]))
        .collect();
    let probabilities = probability_columns(cat, &headers);
    let fpp = cat.column(Field::Fpp);
    if columns.is_empty() && flag_columns.is_empty() && probabilities.is_empty() && fpp.is_none() {
        return;
    }
    // A table holds a handful of distinct dispositions: each is read once,
    // and counted (column, cell) → (what it says, rows).
    let mut seen: hashbrown::HashMap<(usize, &str), (Said, usize)> = hashbrown::HashMap::new();
    let mut flag_seen: hashbrown::HashMap<(usize, &str), (FlagCell, usize)> =
        hashbrown::HashMap::new();
    for c in 0..cat.len() as CandidateId {
        for &i in &columns {
            let cell = cat.extra(i, c);
            let entry = seen.entry((i, cell)).or_insert_with(|| (said(cell), 0));
            entry.1 += 1;
            let (flag, what) = match entry.0 {
                Said::FalsePositive => (Flag::KnownFp, "a known false positive"),
                Said::NotATransit => (Flag::KnownArtefact, "no transit at all"),
                Said::Duplicate => (
                    Flag::KnownArtefact,
                    "a repeated entry of another signal, which counts once",
                ),
                _ => continue,
            };
            out.add(
                c,
                flag,
                false,
                format!(
                    "the catalogue's {} says `{}`: {what}",
                    headers[i],
                    crate::sanitize::clean(cell.trim())
                ),
            );
        }
        for &i in &flag_columns {
            let cell = cat.extra(i, c);
            let what = flag_seen
                .entry((i, cell))
                .or_insert_with(|| (flag_cell(cell), 0));
            what.1 += 1;
            if what.0 == FlagCell::Set {
                // The "not transit-like" flag names no false positive of the star.
                let not_transit = crate::catalogue::names_a_not_transit_flag(headers[i]);
                out.add(
                    c,
                    if not_transit {
                        Flag::KnownArtefact
                    } else {
                        Flag::KnownFp
                    },
                    false,
                    format!(
                        "the catalogue's {} is {}: flagged a false positive",
                        headers[i],
                        crate::sanitize::clean(cell.trim())
                    ),
                );
            }
        }
        for &(i, scale) in &probabilities {
            let cell = cat.extra(i, c).trim();
            let Some(p) = crate::catalogue::bounded_number(cell.as_bytes()) else {
                continue;
            };
            if (FPP_EVEN..=1.0).contains(&(p / scale)) {
                out.add(
                    c,
                    Flag::KnownFp,
                    false,
                    format!(
                        "the catalogue's {} is {}{}: more likely a false positive than a planet",
                        crate::sanitize::clean(headers[i]),
                        crate::sanitize::clean(cell),
                        if scale == 100.0 { " %" } else { "" }
                    ),
                );
            }
        }
        if let Some(p) = fpp.map(|col| col.get(c as usize))
            && (FPP_EVEN..=1.0).contains(&p)
        {
            out.add(
                c,
                Flag::KnownFp,
                false,
                format!("the catalogue's fpp is {p}: more likely a false positive than a planet"),
            );
        }
    }
    // Words read as neither: said once per column, most rows first.
    for &i in &columns {
        let unknown = seen
            .iter()
            .filter(|((col, _), (what, _))| *col == i && *what == Said::Unknown)
            .map(|((_, cell), (_, n))| (*cell, *n));
        out.notes.extend(unknown_note(
            headers[i],
            unknown,
            "neither a false positive nor a planet or candidate",
            "those rows are vetted as candidates",
        ));
    }
    for &i in &flag_columns {
        let unknown = flag_seen
            .iter()
            .filter(|((col, _), (what, _))| *col == i && *what == FlagCell::Unknown)
            .map(|((_, cell), (_, n))| (*cell, *n));
        out.notes.extend(unknown_note(
            headers[i],
            unknown,
            "neither set (1, true, yes) nor unset (0, false, no)",
            "those rows are read as not flagged",
        ));
    }
}

/// The note that names the values of an earlier verdict's column read as
/// `neither`, most rows first, five at most, and what was done with their
/// rows; `None` when there are none.
fn unknown_note<'a>(
    header: &str,
    unknown: impl Iterator<Item = (&'a str, usize)>,
    neither: &str,
    done: &str,
) -> Option<String> {
    let mut unknown: Vec<(&str, usize)> = unknown.collect();
    if unknown.is_empty() {
        return None;
    }
    unknown.sort_unstable_by(|a, b| b.1.cmp(&a.1).then(a.0.cmp(b.0)));
    let rows: usize = unknown.iter().map(|u| u.1).sum();
    let listed: Vec<String> = unknown
        .iter()
        .take(5)
        .map(|(cell, n)| format!("`{}` ({n})", crate::sanitize::clean(cell.trim())))
        .collect();
    Some(format!(
        "the catalogue's {} holds {} value{} read as {neither} ({rows} rows: {}{}): {done} (docs/science.md §3.5)",
        crate::sanitize::clean(header),
        unknown.len(),
        if unknown.len() == 1 { "" } else { "s" },
        listed.join(", "),
        if unknown.len() > 5 { ", …" } else { "" }
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn false_positive_flag_columns() {
        for h in [
            "koi_fpflag_ss",
            "KOI_FPFLAG_CO",
            "fp_flag",
            "my_fpflag",
            // A survey's own yes/no columns, named by what they mark.
            "is_eb",
            "isEB",
            "EB",
            "eb_flag",
            "EBflag",
            "flag_eb",
            "false_positive",
            "False Positive",
            "FalsePositive",
            "is_fp",
            "known_FP",
            "likely_neb",
            "BEB",
            "eclipsing_binary",
            "Eclipsing Binary Flag",
        ] {
            assert!(crate::catalogue::names_an_fp_flag(h), "{h}");
        }
        for h in [
            "fpp",
            "flag",
            "quality_flag",
            "disposition",
            // A binary host may have planets; other words are not a mark.
            "binary",
            "is_binary",
            "eb_period",
            "ebv",
            "E(B-V)",
            "web",
            "isolated",
            "fp_prob",
            "flagged",
        ] {
            assert!(!crate::catalogue::names_an_fp_flag(h), "{h}");
        }
        for set in ["1", " 1 ", "1.0", "true", "Y", "T", "True", "EB", "0.9"] {
            assert_eq!(flag_cell(set), FlagCell::Set, "{set}");
        }
        for unset in ["0", "0.0", "", "nan", "NA", "no", "false", "F", "-", "0.2"] {
            assert_eq!(flag_cell(unset), FlagCell::Unset, "{unset}");
        }
        for unknown in ["maybe", "?", "PC", "2", "98.5", "-1"] {
            assert_eq!(flag_cell(unknown), FlagCell::Unknown, "{unknown}");
        }
    }

    #[test]
    fn disposition_columns_by_header() {
        use crate::catalogue::names_a_disposition as named;
        for h in [
            "disposition",
            "koi_pdisposition",
            "TFOPWG Disposition",
            "tfopwg_disp",
            "classification",
            "Vetting Status",
            "vetting",
        ] {
            assert!(named(h), "{h}");
        }
        for h in [
            "class",
            "lum_class",
            "status",
            "comments",
            "pet",
            "dispersion",
        ] {
            assert!(!named(h), "{h}");
        }
    }

    #[test]
    fn false_positive_probability_columns() {
        use crate::catalogue::names_an_fp_probability as named;
        for h in [
            "fpp",
            "FPP",
            "FPP (%)",
            "fpp_vespa",
            "vespa_fpp",
            "NFPP",
            "false_positive_probability",
            "False Positive Prob.",
            "fp_prob",
        ] {
            assert!(named(h), "{h}");
        }
        // Errors and limits are not the value; other probabilities are not
        // a false positive's.
        for h in ["fpp_err", "e_fpp", "FPP upper", "fppx", "prob", "koi_score"] {
            assert!(!named(h), "{h}");
        }
    }

    #[test]
    fn missing_and_known_words_say_nothing_others_are_unknown() {
        for quiet in [
            "",
            " ",
            "NA",
            "null",
            "N/A",
            "CANDIDATE",
            "Confirmed",
            "PC",
            "not-dispositioned",
            "VPC",
            "VPC-",
            "VPC+",
            "CPC",
            "PPC",
        ] {
            assert_eq!(said(quiet), Said::PlanetOrCandidate, "{quiet}");
        }
        for unknown in ["RETRACTED", "under review", "?"] {
            assert_eq!(said(unknown), Said::Unknown, "{unknown}");
        }
        assert_eq!(said("FALSE POSITIVE"), Said::FalsePositive);
        // No transit at all: counts for nothing, names nothing of the star.
        for artefact in [
            "FA",
            "False Alarm",
            "IS",
            "V",
            "instrumental systematics",
            "not-transit-like",
        ] {
            assert_eq!(said(artefact), Said::NotATransit, "{artefact}");
        }
        for neither in ["VALIDATED", "isolated", "var"] {
            assert_ne!(said(neither), Said::NotATransit, "{neither}");
        }
    }

    #[test]
    fn dispositions_that_name_a_false_positive() {
        for yes in [
            "FALSE POSITIVE",
            "false_positive",
            "  False-Positive ",
            "FP",
            "fp",
            "EB",
            "eclipsing binary",
            "Blend",
            "false positive (centroid offset)",
            "FALSE POSITIVE: secondary eclipse",
            "FP - EB",
            "fp/eb",
            "EB?",
            "REFUTED",
            // Follow-up codes (from memory): nearby, background and
            // hierarchical EBs, spectroscopic binaries, a nearby star's signal.
            "NEB",
            "BEB?",
            "HEB",
            "SB1",
            "SB2",
            "NPC",
            // Hedged, or after a planet's word: the doubt is enough.
            "likely EB",
            "possible FP",
            "probable eclipsing binary",
            "PC; EB?",
            "PC (possible BEB)",
            "APC / NEB",
            "KP, but not a planet",
            "brown dwarf",
            "Stellar Eclipse",
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
            // Negated in its clause.
            "no EB",
            "non-EB",
            "PC (EB ruled out)",
            "PC; blend unlikely",
            "VPC+",
            "debris",
            // A retired copy says nothing of the signal.
            "FP - duplicate",
            "FALSE POSITIVE (dup of 101.01)",
        ] {
            assert!(!says_false_positive(no), "{no}");
        }
    }
}
