//! Rows that give no host: an empty star cell, a missing-value token
//! (`NaN`, `null`), a negative number (`-1`, `-999`), or `0` in a table
//! that does not number its stars from 0, as archives write for a host
//! they do not know. Read as an id, such a cell would make one star of
//! every row that shares it: unrelated signals counted as one system, and
//! validated by its boost. Each such row is instead the star of its
//! candidate family when the catalogue has one (`TOI-901.03` with the star
//! of `TOI-901.01`: archives number the candidates of one star `<star's
//! number>.<n>`), else a star of its own, `host of <candidate>`, never
//! counted with another (docs/science.md §3.4).

use std::hash::BuildHasher;

use super::merge::Merger;
use crate::catalogue::pool::StrPool;

/// Whether a star cell names no star: empty, a missing-value token (any
/// case: `nan`, `null`, `na`, `n/a`, `none`, `unknown`, `-`, `--`, `?`),
/// or a negative number (`-1`, `-999`), alone or as the last word after a
/// catalogue's name (`TIC nan`, `Gaia DR3 -1`: a script that prefixed every
/// id): what tables write for an unknown host (common practice, no source).
/// Archive ids of stars are positive numbers or names. A `0` is one too,
/// unless the table numbers its stars from 0 ([`zero_id`]).
pub fn names_no_star(id: &str) -> bool {
    host_cell(id) == HostCell::NoStar
}

/// What a star cell says of its star (the loader asks this of every row).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum HostCell {
    /// An id.
    Star,
    /// No star ([`names_no_star`]).
    NoStar,
    /// `0`: a star, or a placeholder, as the table decides ([`zero_id`]).
    Zero,
}

/// [`names_no_star`] and [`zero_id`] at once, with one search of the cell.
pub(super) fn host_cell(id: &str) -> HostCell {
    let id = id.trim();
    if id.is_empty() {
        return HostCell::NoStar;
    }
    let word = &id[last_word(id)..];
    if placeholder(word) {
        HostCell::NoStar
    } else if is_zero(word) {
        HostCell::Zero
    } else {
        HostCell::Star
    }
}

/// Where the last word of an id starts: after its last space or `_`.
fn last_word(id: &str) -> usize {
    memchr::memrchr2(b' ', b'_', id.as_bytes()).map_or(0, |a| a + 1)
}

/// Whether a word is a zero: `0`, `00`, `0.0`.
fn is_zero(word: &str) -> bool {
    let w = word.as_bytes();
    w.first().is_some_and(|b| matches!(b, b'0' | b'.'))
        && w.iter().all(|&b| b == b'0' || b == b'.')
        && w.contains(&b'0')
}

/// Whether one word is a missing-value token or a negative number.
fn placeholder(word: &str) -> bool {
    let Some(&first) = word.as_bytes().first() else {
        return false;
    };
    // Nearly every id starts otherwise: one byte decides.
    if !matches!(first, b'-' | b'?' | b'n' | b'N' | b'u' | b'U') {
        return false;
    }
    const TOKENS: [&str; 9] = [
        "nan", "null", "na", "n/a", "none", "unknown", "-", "--", "?",
    ];
    TOKENS.iter().any(|t| word.eq_ignore_ascii_case(t))
        || word.parse::<f64>().is_ok_and(|v| v < 0.0)
}

/// For a star id that is `0` (`0`, `0.0`, `00`), alone or as the last word
/// after a catalogue's name (`TIC 0`), the same id with `1` for the zero:
/// where it is in the table, the table numbers its stars from 0 and `0`
/// is a star; else `0` is a placeholder for an unknown host.
pub fn zero_id(id: &str) -> Option<String> {
    let id = id.trim();
    let at = last_word(id);
    is_zero(&id[at..]).then(|| format!("{}1", &id[..at]))
}

/// The star id given to a row of `candidate` that names no star.
pub fn own_star(candidate: &str) -> String {
    format!("host of {candidate}")
}

/// Whether `star` is the [`own_star`] of `candidate`.
pub fn is_own_star(star: &str, candidate: &str) -> bool {
    star.strip_prefix("host of ") == Some(candidate)
}

/// The family of a candidate id, as written (`TOI-901.01` → `TOI-901`,
/// `K00123.01` → `K00123`, `901.01` → `901`): the id before a final `.`
/// and one to three digits, or `None` for an id with no such ending.
pub fn candidate_family(candidate: &str) -> Option<&str> {
    let (head, n) = candidate.trim().rsplit_once('.')?;
    (!head.is_empty() && (1..=3).contains(&n.len()) && n.bytes().all(|b| b.is_ascii_digit()))
        .then_some(head)
}

/// The family key of a candidate id (`TOI-901.01` → `toi901`, `K00123.01`
/// → `k123`): its [`candidate_family`] in the spelling of a star id's key
/// (`super::star_key`). `false` for an id with no family.
pub fn family_key(candidate: &str, out: &mut Vec<u8>) -> bool {
    let Some(head) = candidate_family(candidate) else {
        return false;
    };
    super::star_key(head, out);
    !out.is_empty()
}

/// For each family key, its one star, or `None` when its candidates sit
/// on more than one star (the family then says nothing).
pub fn family_stars<'a, S: PartialEq + Copy>(
    rows: impl Iterator<Item = (&'a str, S)>,
) -> hashbrown::HashMap<Vec<u8>, Option<S>> {
    family_stars_among(rows, None)
}

/// [`family_stars`] of the families in `wanted` only (all without it): a
/// few rows' families looked up in a large table hold no key of the rest.
pub fn family_stars_among<'a, S: PartialEq + Copy>(
    rows: impl Iterator<Item = (&'a str, S)>,
    wanted: Option<&hashbrown::HashSet<Vec<u8>>>,
) -> hashbrown::HashMap<Vec<u8>, Option<S>> {
    let mut map: hashbrown::HashMap<Vec<u8>, Option<S>> = hashbrown::HashMap::new();
    let mut key = Vec::new();
    for (cand, star) in rows {
        if family_key(cand, &mut key) && wanted.is_none_or(|w| w.contains(key.as_slice())) {
            map.entry_ref(key.as_slice())
                .and_modify(|s| {
                    if *s != Some(star) {
                        *s = None;
                    }
                })
                .or_insert(Some(star));
        }
    }
    map
}

impl Merger {
    /// Places the rows that name no star: those the parse found (`count`,
    /// their star already [`own_star`]), and those whose star is `0` where
    /// the table has no `1` (of `zeros` rows of a `0`). Each joins the star
    /// of its candidate family where it has one, else keeps a star of its
    /// own. Returns the note that says what was read, or `None` when every
    /// row named its star.
    pub(super) fn place_hostless(
        &mut self,
        written: &[String],
        count: usize,
        zeros: usize,
    ) -> Option<String> {
        if count == 0 && zeros == 0 {
            return None;
        }
        let n = self.row_stars.len();
        let mut hostless: Vec<bool> = (0..n)
            .map(|r| is_own_star(self.row_stars.get(r), self.candidates.get(r)))
            .collect();
        let (mut written, mut count) = (written.to_vec(), count);
        // Rows whose star is `0` (or `TIC 0`) and whose own star id still
        // reads so: where the table has no `1` (`TIC 1`) beside it, the
        // zero is a placeholder too.
        let mut renamed: hashbrown::HashMap<usize, String> = hashbrown::HashMap::new();
        if zeros > 0 {
            let zero_rows: Vec<(usize, String)> = (0..n)
                .filter_map(|r| zero_id(self.row_stars.get(r)).map(|one| (r, one)))
                .collect();
            let mut present: hashbrown::HashMap<&str, bool> = zero_rows
                .iter()
                .map(|(_, one)| (one.as_str(), false))
                .collect();
            for r in 0..n {
                if let Some(p) = present.get_mut(self.row_stars.get(r)) {
                    *p = true;
                }
            }
            for (r, one) in &zero_rows {
                if !present[one.as_str()] {
                    hostless[*r] = true;
                    count += 1;
                    let w = self.row_stars.get(*r).trim();
                    if written.len() < 3 && !written.iter().any(|x| x == w) {
                        written.push(w.to_string());
                    }
                    renamed.insert(*r, own_star(self.candidates.get(*r)));
                }
            }
        }
        if count == 0 {
            return None;
        }
        // The families of the rows with no star: few, however large the
        // table.
        let wanted: hashbrown::HashSet<Vec<u8>> = (0..n)
            .filter(|&r| hostless[r])
            .filter_map(|r| {
                let mut key = Vec::new();
                family_key(self.candidates.get(r), &mut key).then_some(key)
            })
            .collect();
        let families = family_stars_among(
            (0..n)
                .filter(|&r| !hostless[r])
                .map(|r| (self.candidates.get(r), self.row_stars.get(r))),
            Some(&wanted),
        );
        let mut key = Vec::new();
        let mut joined: Vec<(usize, String)> = Vec::new();
        for r in (0..n).filter(|&r| hostless[r]) {
            if family_key(self.candidates.get(r), &mut key)
                && let Some(Some(star)) = families.get(key.as_slice())
            {
                joined.push((r, star.to_string()));
            }
        }
        drop(families);
        let examples: Vec<String> = joined
            .iter()
            .take(2)
            .map(|(r, star)| {
                format!(
                    "`{}` with star `{}`",
                    crate::sanitize::clean(self.candidates.get(*r)),
                    crate::sanitize::clean(star)
                )
            })
            .collect();
        let tokens: Vec<String> = written
            .iter()
            .map(|w| match w.as_str() {
                "" => "empty".to_string(),
                w => format!("`{}`", crate::sanitize::clean(w)),
            })
            .collect();
        let alone = count - joined.len();
        let mut note = format!(
            "{count} row{} gave no star id ({}): ",
            if count == 1 { "" } else { "s" },
            tokens.join(", ")
        );
        if !joined.is_empty() {
            note.push_str(&format!(
                "{} joined the star of {} candidate family by id ({}{}){}",
                joined.len(),
                if joined.len() == 1 { "its" } else { "their" },
                examples.join(", "),
                if joined.len() > 2 { ", …" } else { "" },
                if alone > 0 { "; " } else { "" }
            ));
        }
        if alone > 0 {
            note.push_str(&format!(
                "{alone} {} read as a star of {} own, `host of <candidate>`, never counted with another",
                if alone == 1 { "is" } else { "are" },
                if alone == 1 { "its" } else { "their" },
            ));
        }
        note.push_str(" (docs/science.md §3.4)");
        // The family's star where there is one, else a star of its own.
        renamed.extend(joined);
        if !renamed.is_empty() {
            let mut pool = StrPool::with_capacity(n, self.row_stars.byte_len());
            for r in 0..n {
                match renamed.get(&r) {
                    Some(star) => {
                        self.star_hash[r] = self.hasher.hash_one(star.as_bytes());
                        pool.push(star);
                    }
                    None => {
                        pool.push(self.row_stars.get(r));
                    }
                }
            }
            self.row_stars = pool;
        }
        Some(note)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn placeholders_name_no_star() {
        for id in [
            "",
            " ",
            "-1",
            "-999",
            "-9999.0",
            "NaN",
            "null",
            "N/A",
            "-",
            "?",
            "unknown",
            "None",
            "TIC nan",
            "TIC_-1",
            "Gaia DR3 NaN",
        ] {
            assert!(names_no_star(id), "{id:?}");
        }
        for id in [
            "1",
            "0",
            "TIC 0",
            "TIC 100",
            "005706966",
            "NGC 188",
            "Nova",
            "u1",
            "-TIC",
            "TIC ",
            "2MASS J0000-0000",
        ] {
            assert!(!names_no_star(id), "{id:?}");
        }
        assert_eq!(zero_id("0").as_deref(), Some("1"));
        assert_eq!(zero_id("0.0").as_deref(), Some("1"));
        assert_eq!(zero_id("TIC 0").as_deref(), Some("TIC 1"));
        assert_eq!(zero_id("star_0").as_deref(), Some("star_1"));
        for id in ["10", "TIC 100", "S0", ".", "0x", "TIC"] {
            assert_eq!(zero_id(id), None, "{id:?}");
        }
    }

    #[test]
    fn candidate_families() {
        let key = |c: &str| {
            let mut k = Vec::new();
            family_key(c, &mut k).then_some(k)
        };
        assert_eq!(candidate_family("TOI-902.03"), Some("TOI-902"));
        assert_eq!(candidate_family("1234.1"), Some("1234"));
        assert_eq!(key("TOI-901.01"), Some(b"toi901".to_vec()));
        assert_eq!(key("TOI 901.02"), key("TOI-901.01"));
        assert_eq!(key("K00123.01"), Some(b"k123".to_vec()));
        assert_eq!(key("901.1"), Some(b"901".to_vec()));
        for none in ["X17", "TOI-901", ".01", "A.1234", "A.b1", "A."] {
            assert_eq!(key(none), None, "{none}");
        }
        let stars = family_stars(
            [
                ("TOI-1.01", 7),
                ("TOI-1.02", 7),
                ("TOI-2.01", 8),
                ("TOI-2.02", 9),
            ]
            .into_iter(),
        );
        assert_eq!(stars[b"toi1".as_slice()], Some(7));
        assert_eq!(stars[b"toi2".as_slice()], None, "two stars: no family");
        // Only the families asked for are kept.
        let wanted: hashbrown::HashSet<Vec<u8>> = [b"toi2".to_vec()].into_iter().collect();
        let some = family_stars_among(
            [("TOI-1.01", 7), ("TOI-2.01", 8), ("TOI-2.02", 8)].into_iter(),
            Some(&wanted),
        );
        assert_eq!(some.len(), 1);
        assert_eq!(some[b"toi2".as_slice()], Some(8));
    }
}
