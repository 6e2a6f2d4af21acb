//! One star written several ways: `TIC 100`, `TIC100`, `tic-100`, `100`,
//! `100.0` (tables merged from several archives, a number written by a
//! float column). Rows of one star under two spellings would be two
//! stars: neither system whole, and a false positive under one spelling
//! would not hold the candidates under the other. The loader reads every
//! spelling of one key as one star, under its first spelling, and says so.

use std::hash::BuildHasher;

use super::merge::Merger;
use crate::catalogue::pool::StrPool;

/// A star id in one spelling (docs/science.md §3.4): ASCII lower case;
/// spaces, `_` and `-` (but a leading sign) left out; a whole number
/// written as a float (`100.0`) as the number; and the leading zeros of
/// the number that ends the id left out (`KIC 005706966` → `kic5706966`);
/// the Kepler and K2 archives' file prefixes read as their catalogues'
/// (`kplr005706966` → `kic5706966`, `ktwo201234567` → `epic201234567`).
/// Ids that differ only
/// so are one star in every catalogue convention we know of (common
/// practice, no source).
pub fn star_key(id: &str, out: &mut Vec<u8>) {
    out.clear();
    let id = id.as_bytes().trim_ascii();
    // `100.0`, `100.00`: a whole number through a float column.
    let id = match id.iter().position(|&b| b == b'.') {
        Some(dot)
            if id.last() == Some(&b'0')
                && dot > 0
                && id[..dot].iter().all(u8::is_ascii_digit)
                && id[dot + 1..].iter().all(|&b| b == b'0') =>
        {
            &id[..dot]
        }
        _ => id,
    };
    // Only ASCII bytes are left out or changed: the key stays UTF-8. A
    // leading `-` is a sign (`-1`, a placeholder), kept.
    for &b in id {
        match b {
            b' ' | b'\t' | b'_' => {}
            b'-' if !out.is_empty() => {}
            _ => out.push(b.to_ascii_lowercase()),
        }
    }
    // The ending number without its leading zeros (one digit kept).
    let digits = out.iter().rev().take_while(|b| b.is_ascii_digit()).count();
    // The Kepler and K2 archives' file prefixes of their catalogues'
    // numbers (`kplr005706966` is KIC 5706966, `ktwo201234567` EPIC
    // 201234567), as ids taken from file names carry them.
    for (file, catalogue) in [(&b"kplr"[..], &b"kic"[..]), (b"ktwo", b"epic")] {
        if digits > 0 && out.len() == file.len() + digits && out.starts_with(file) {
            out.splice(..file.len(), catalogue.iter().copied());
            break;
        }
    }
    let start = out.len() - digits;
    let zeros = out[start..].iter().take_while(|&&b| b == b'0').count();
    let zeros = zeros.min(digits.saturating_sub(1));
    if zeros > 0 {
        out.drain(start..start + zeros);
    }
}

/// Whether an id is a whole number written as a rounded floating-point
/// number: digits, a fraction, an exponent, and fewer digits shown than
/// the number has (`1.23457e+08`: a 9-digit number of which 6 digits are
/// left, as `%g` writes it; `4.295806720123457e+18`: a 19-digit id through
/// a double, which keeps 16). Such an id has lost its last digits: several
/// stars may read as one (docs/science.md §3.4).
pub fn rounded_number(id: &str) -> bool {
    let b = id.trim().as_bytes();
    let Some(e) = b.iter().position(|&c| c == b'e' || c == b'E') else {
        return false;
    };
    let (mantissa, exponent) = (&b[..e], &b[e + 1..]);
    let exponent = exponent.strip_prefix(b"+").unwrap_or(exponent);
    if exponent.is_empty() || exponent.len() > 3 || !exponent.iter().all(u8::is_ascii_digit) {
        return false;
    }
    let exponent = exponent
        .iter()
        .fold(0usize, |n, d| n * 10 + usize::from(d - b'0'));
    let (int, frac) = match mantissa.iter().position(|&c| c == b'.') {
        Some(dot) => (&mantissa[..dot], &mantissa[dot + 1..]),
        None => (mantissa, &b""[..]),
    };
    let digits = |p: &[u8]| p.iter().all(u8::is_ascii_digit);
    !int.is_empty() && digits(int) && digits(frac) && exponent > frac.len()
}

/// What the catalogue is told of star ids written as rounded numbers
/// ([`rounded_number`]): how many stars, the first with its line. `None`
/// when there are none. `first_rows` is each star's first row; `lines`
/// each row's line.
pub(super) fn rounded_note(
    row_stars: &StrPool,
    first_rows: &[u32],
    lines: &[u32],
) -> Option<String> {
    let mut rounded = first_rows
        .iter()
        .filter(|&&r| rounded_number(row_stars.get(r as usize)));
    let first = *rounded.next()?;
    let n = 1 + rounded.count();
    Some(format!(
        "{n} star id{} {} whole numbers written as rounded floating-point numbers, such as \
         `{}` (line {}): only the digits shown are kept, so several stars may read as one and \
         their signals as one system; unless every row of such a star gives a position, its \
         candidates count towards no system (flag mixed-host). Write the ids as text \
         (docs/science.md §3.4)",
        if n == 1 { "" } else { "s" },
        if n == 1 { "is" } else { "are" },
        crate::sanitize::clean(row_stars.get(first as usize).trim()),
        lines.get(first as usize).copied().unwrap_or(0),
    ))
}

/// The letters before the number of a key that is letters then a number
/// (`tic100` → `tic`), `Some("")` for a bare number, `None` otherwise.
fn prefix(key: &[u8]) -> Option<&[u8]> {
    let digits = key.iter().rev().take_while(|b| b.is_ascii_digit()).count();
    if digits == 0 {
        return None;
    }
    let head = &key[..key.len() - digits];
    head.iter().all(u8::is_ascii_lowercase).then_some(head)
}

/// The fewest digits of a bare number read with the table's one prefix:
/// catalogue numbers of survey targets run to 6–10 digits; placeholders for
/// unknown hosts (`0`, `99`, `-1`) are short (common practice, no source).
const BARE_DIGITS: usize = 4;

/// Which stars (by first row, in star order) are another's spelling: for
/// each star, the star it joins (itself when none); `None` when no two
/// stars share a key (the common case, found from the keys' hashes alone).
/// A bare number of [`BARE_DIGITS`] or more joins the prefixed ids when
/// every prefixed id of the table has the same letters (`9100` with `TIC
/// 9100`, in a table of TIC ids); with two catalogues' prefixes it stays
/// apart.
pub(super) fn joins(
    row_stars: &StrPool,
    first_rows: &[u32],
    hasher: &hashbrown::DefaultHashBuilder,
) -> Option<Vec<u32>> {
    let spelt = |s: usize| row_stars.get(first_rows[s] as usize);
    // The keys' hashes, and which keys are bare numbers or letters and a
    // number, on two threads (each half of the stars).
    let half = first_rows.len() / 2;
    let keyed = |range: std::ops::Range<usize>| {
        let mut key = Vec::new();
        let mut hashes = Vec::with_capacity(range.len());
        let mut bare: Vec<u32> = Vec::new();
        let (mut letters, mut one_prefix): (Option<Vec<u8>>, bool) = (None, true);
        for s in range {
            star_key(spelt(s), &mut key);
            match prefix(&key) {
                // A bare number long enough to be a catalogue's (not a
                // placeholder's `0` or `99`).
                Some([]) if key.len() >= BARE_DIGITS => bare.push(s as u32),
                Some([]) => {}
                Some(p) => match &letters {
                    None => letters = Some(p.to_vec()),
                    Some(l) => one_prefix &= l == p,
                },
                None => {}
            }
            hashes.push(hasher.hash_one(&key));
        }
        (hashes, bare, letters, one_prefix)
    };
    let (low, high) = std::thread::scope(|t| {
        let high = t.spawn(|| keyed(half..first_rows.len()));
        let low = keyed(0..half);
        (
            low,
            high.join().unwrap_or_else(|e| std::panic::resume_unwind(e)),
        )
    });
    let (mut hashes, mut bare, letters, mut one_prefix) = low;
    hashes.extend(high.0);
    bare.extend(high.1);
    let letters = match (letters, high.2) {
        (Some(a), Some(b)) => {
            one_prefix &= a == b;
            Some(a)
        }
        (a, b) => a.or(b),
    };
    one_prefix &= high.3;
    let mut key = Vec::new();
    // A bare number read with the table's one prefix.
    let lead = letters.filter(|_| one_prefix && !bare.is_empty());
    let full_key = |s: usize, key: &mut Vec<u8>| {
        star_key(spelt(s), key);
        if let Some(l) = &lead
            && prefix(key) == Some(&[])
            && key.len() >= BARE_DIGITS
        {
            key.splice(0..0, l.iter().copied());
        }
    };
    if lead.is_some() {
        for &s in &bare {
            full_key(s as usize, &mut key);
            hashes[s as usize] = hasher.hash_one(&key);
        }
    }
    // Hashes two stars share, on two threads (each the hashes of one half
    // of the hash space, sorted: 8 bytes a star more, where maps of them
    // took 18, at a load's peak): almost always none.
    let repeated_in = |upper: bool| {
        let mut part: Vec<u64> = Vec::with_capacity(hashes.len() / 2 + hashes.len() / 64 + 16);
        part.extend(hashes.iter().filter(|&&h| (h >> 63 == 1) == upper));
        part.sort_unstable();
        let mut repeated: Vec<u64> = part
            .windows(2)
            .filter(|w| w[0] == w[1])
            .map(|w| w[0])
            .collect();
        repeated.dedup();
        repeated
    };
    let repeated: hashbrown::HashSet<u64> = std::thread::scope(|t| {
        let upper = t.spawn(|| repeated_in(true));
        let mut repeated = repeated_in(false);
        repeated.extend(
            upper
                .join()
                .unwrap_or_else(|e| std::panic::resume_unwind(e)),
        );
        repeated.into_iter().collect()
    });
    if repeated.is_empty() {
        return None;
    }
    // Each later star of a repeated hash, with the first star of it.
    let mut first: hashbrown::HashMap<u64, u32> = hashbrown::HashMap::new();
    let mut pairs: Vec<(u32, u32)> = Vec::new();
    for (s, &h) in hashes.iter().enumerate() {
        if repeated.contains(&h) {
            let f = *first.entry(h).or_insert(s as u32);
            if f != s as u32 {
                pairs.push((s as u32, f));
            }
        }
    }
    pairs.sort_unstable();
    let mut to: Option<Vec<u32>> = None;
    let mut other = Vec::new();
    for (s, f) in pairs {
        // One hash: the same key, unless two keys collide (checked).
        full_key(s as usize, &mut key);
        full_key(f as usize, &mut other);
        if key == other {
            let to = to.get_or_insert_with(|| (0..hashes.len() as u32).collect());
            to[s as usize] = f;
        }
    }
    to
}

impl Merger {
    /// Rewrites the rows of every star that is another's spelling to that
    /// star's first spelling ([`joins`]), and returns the note that says so,
    /// or `None` when every star has one spelling (nothing changes).
    pub(super) fn join_spellings(&mut self, first_rows: &[u32], star_of: &[u32]) -> Option<String> {
        let to = joins(&self.row_stars, first_rows, &self.hasher)?;
        let mut examples: Vec<String> = Vec::new();
        let mut count = 0;
        for (s, &t) in to.iter().enumerate() {
            if t as usize != s {
                count += 1;
                if examples.len() < 3 {
                    examples.push(format!(
                        "`{}` as `{}`",
                        crate::sanitize::clean(self.row_stars.get(first_rows[s] as usize)),
                        crate::sanitize::clean(self.row_stars.get(first_rows[t as usize] as usize))
                    ));
                }
            }
        }
        let n = self.row_stars.len();
        let mut pool = StrPool::with_capacity(n, self.row_stars.byte_len());
        for (r, &s) in star_of.iter().enumerate() {
            let s = s as usize;
            let spelt = to[s] as usize;
            let text = self.row_stars.get(first_rows[spelt] as usize);
            if spelt != s {
                self.star_hash[r] = self.hasher.hash_one(text.as_bytes());
            }
            pool.push(text);
        }
        self.row_stars = pool;
        Some(format!(
            "star ids written more than one way were read as one star ({count} spelling{} joined: {}{}); a spelling is the same star when the ids differ only in case, spaces, `-` or `_`, leading zeros, a float's `.0`, an archive's file prefix (`kplr` for KIC, `ktwo` for EPIC), or a missing catalogue prefix (before 4 digits or more)",
            if count == 1 { "" } else { "s" },
            examples.join(", "),
            if count > 3 { ", …" } else { "" }
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn key(id: &str) -> Vec<u8> {
        let mut k = Vec::new();
        star_key(id, &mut k);
        k
    }

    #[test]
    fn whole_numbers_written_as_rounded_floats_are_told() {
        // A double keeps 15–17 significant digits (IEEE 754 binary64), so a
        // 19-digit id through one prints 16; `%g` prints 6 (C standard,
        // from memory).
        for id in [
            "4.295806720123457e+18",
            "1.23457e+08",
            "1.23457E8",
            " 9e+05 ",
            "12e3",
        ] {
            assert!(rounded_number(id), "{id}");
        }
        // Every digit shown, or not a number in exponent form.
        for id in [
            "1.234e3",
            "123456789",
            "4295806720123456789",
            "1.5e0",
            "TIC 1e5",
            "-1.2e+05",
            "1.2e-05",
            "WASP-12E",
            "e5",
            "1.2e",
        ] {
            assert!(!rounded_number(id), "{id}");
        }
    }

    #[test]
    fn spellings_of_one_star_share_a_key() {
        for (a, b) in [
            ("TIC 100", "TIC100"),
            ("TIC 100", "tic-100"),
            ("TIC 100", " TIC_100 "),
            ("KIC 005706966", "KIC 5706966"),
            // The archives' file names (MAST's Kepler and K2 products,
            // `kplr<9 digits>`, `ktwo<9 digits>`: from memory).
            ("kplr005706966", "KIC 5706966"),
            ("KTWO201234567", "EPIC 201234567"),
            ("100", "100.0"),
            ("0", "000"),
            ("WASP-12", "wasp 12"),
        ] {
            assert_eq!(key(a), key(b), "{a} / {b}");
        }
        for (a, b) in [
            ("TIC 100", "KIC 100"),
            ("TIC 100", "TIC 1000"),
            ("-1", "1"),
            ("100", "100.5"),
            ("TIC 10 0", "TIC 1"),
            ("kplr", "kic"),
            ("kplr12x", "kic12x"),
            ("kplr005706966", "EPIC 5706966"),
        ] {
            assert_ne!(key(a), key(b), "{a} / {b}");
        }
    }

    #[test]
    fn a_bare_number_joins_the_one_catalogue_of_the_table() {
        let pool = |ids: &[&str]| {
            let mut p = StrPool::default();
            for i in ids {
                p.push(i);
            }
            p
        };
        let h = hashbrown::DefaultHashBuilder::default();
        let rows = pool(&["TIC 1000", "TIC 7", "1000", "TIC1000", "7"]);
        let to = joins(&rows, &[0, 1, 2, 3, 4], &h).unwrap();
        assert_eq!(to, vec![0, 1, 0, 0, 4]);
        // A short number (a placeholder's `0`) stays apart.
        let rows = pool(&["S0", "S1", "0"]);
        assert!(joins(&rows, &[0, 1, 2], &h).is_none());
        // Two catalogues' prefixes: a bare number is neither.
        let rows = pool(&["TIC 1000", "KIC 1000", "1000"]);
        assert!(joins(&rows, &[0, 1, 2], &h).is_none());
        let rows = pool(&["A", "B"]);
        assert!(joins(&rows, &[0, 1], &h).is_none());
    }
}
