//! Cells as numbers: missing-value tokens, the fast decimal parser the
//! loader (and the light-curve reader) use, and text-cell bounds.

use super::*;

/// What one cell held.
pub(super) enum Cell {
    Missing,
    Value(f64),
    Bad,
}

/// Cells that mean "no value" in common catalogue exports.
pub(super) const MISSING_TOKENS: [&[u8]; 9] = [
    b"", b"nan", b"NaN", b"NAN", b"null", b"NULL", b"NA", b"N/A", b"--",
];

/// Whether a cell means "no value" (one of [`MISSING_TOKENS`], spaces
/// aside): for text fields read elsewhere, the same tokens as for numbers.
pub fn is_missing(raw: &[u8]) -> bool {
    MISSING_TOKENS.contains(&raw.trim_ascii())
}

pub(super) fn parse_cell(raw: &[u8]) -> Cell {
    let b = raw.trim_ascii();
    if let Some(v) = fast_f64(b) {
        return Cell::Value(v);
    }
    if MISSING_TOKENS.contains(&b) {
        return Cell::Missing;
    }
    match std::str::from_utf8(b)
        .ok()
        .and_then(|s| s.parse::<f64>().ok())
    {
        Some(v) if v.is_finite() => Cell::Value(v),
        Some(_) => Cell::Missing, // inf: treated like NaN; required fields say so
        None => Cell::Bad,
    }
}

/// A probability written as a limit or with its error, as validation
/// tables give them: `<0.001`, `>0.99`, `≤ 1e-3`, `~0.2`, `0.97±0.01`,
/// `0.97 +/- 0.01`, `>= 99 %`: the number itself (a limit is read as its
/// bound, which for an upper limit on a false-positive probability is the
/// cautious side; a `%` divides by 100). `None` when what is left is not a
/// number.
pub fn bounded_number(raw: &[u8]) -> Option<f64> {
    let s = std::str::from_utf8(raw.trim_ascii()).ok()?;
    let s = ["<=", ">=", "<", ">", "≤", "≥", "~", "≈"]
        .iter()
        .find_map(|m| s.strip_prefix(m))
        .unwrap_or(s)
        .trim_start();
    let s = ["±", "+/-", "+-"]
        .iter()
        .find_map(|m| s.split_once(m).map(|(v, _)| v))
        .unwrap_or(s)
        .trim_end();
    match s.strip_suffix('%') {
        Some(pct) => parse_number(pct.trim_end().as_bytes()).map(|v| v / 100.0),
        None => parse_number(s.as_bytes()),
    }
}

/// An angle written in sexagesimal, as archive tables often give positions:
/// `07:29:25.85`, `-05 06 07.1`, `07h29m25.85s`, `-05d06m07.1s`; in hours
/// of right ascension (× 15 to degrees) when `hours`, else in degrees. The
/// sign of the whole angle is the text's, so `-00:30:00` is −0.5°. `None`
/// for anything else (minutes of 60 or more, seconds above 60).
pub(super) fn sexagesimal(raw: &[u8], hours: bool) -> Option<f64> {
    let s = std::str::from_utf8(raw.trim_ascii()).ok()?;
    let (sign, rest) = match s.as_bytes().first()? {
        b'-' => (-1.0, &s[1..]),
        b'+' => (1.0, &s[1..]),
        _ => (1.0, s),
    };
    let parts: Vec<&str> = rest
        .split([':', ' ', 'h', 'm', 's', 'd', '°', '\'', '"'])
        .filter(|p| !p.is_empty())
        .collect();
    if parts.len() != 3 || !rest.contains(|c: char| !(c.is_ascii_digit() || c == '.')) {
        return None;
    }
    let num = |p: &str| {
        (p.bytes().all(|b| b.is_ascii_digit() || b == b'.'))
            .then(|| p.parse::<f64>().ok())
            .flatten()
    };
    let (d, m, sec) = (num(parts[0])?, num(parts[1])?, num(parts[2])?);
    // 60.00 seconds is a rounding of 59.995 and up, which some tables write.
    if m >= 60.0 || sec > 60.0 || d.fract() != 0.0 || m.fract() != 0.0 {
        return None;
    }
    let v = sign * (d + m / 60.0 + sec / 3600.0);
    Some(if hours { v * 15.0 } else { v })
}

/// True when `parse_cell` would read a value (finite or not) from the
/// cell: `[+-]digits[.digits][e[+-]digits]`, spaces around, at most five
/// exponent digits. A cheap test for cells whose value is not kept; `false`
/// decides nothing (the cell then goes to `parse_cell`).
pub(super) fn is_number(raw: &[u8]) -> bool {
    let b = raw.trim_ascii();
    let b = match b {
        [b'-' | b'+', rest @ ..] => rest,
        _ => b,
    };
    let digits = |from: usize| from + b[from..].iter().take_while(|c| c.is_ascii_digit()).count();
    let mut i = digits(0);
    if i == 0 {
        return false;
    }
    if b.get(i) == Some(&b'.') {
        let j = digits(i + 1);
        if j == i + 1 {
            return false;
        }
        i = j;
    }
    if matches!(b.get(i), Some(b'e' | b'E')) {
        i += 1;
        if matches!(b.get(i), Some(b'-' | b'+')) {
            i += 1;
        }
        let j = digits(i);
        if j == i || j - i > 5 {
            return false;
        }
        i = j;
    }
    i == b.len()
}

/// A number from a text cell: `Some` for a finite value, `None` for missing
/// tokens, non-finite values or text that is not a number.
pub fn parse_number(raw: &[u8]) -> Option<f64> {
    match parse_cell(raw) {
        Cell::Value(v) => Some(v),
        _ => None,
    }
}

/// Powers of ten exactly representable in f64.
pub(super) const POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// Clinger's fast path (Clinger 1990, "How to read floating point numbers
/// accurately", PLDI): a decimal `[+-]digits[.digits][e[+-]digits]` whose
/// digits fit in a 53-bit integer m and whose power of ten |e| ≤ 22 is exactly
/// m·10^e or m/10^−e, correctly rounded by one IEEE operation. Anything else
/// returns `None` and goes to the standard library's parser.
#[inline]
pub(super) fn fast_f64(b: &[u8]) -> Option<f64> {
    match number_at(b, 0) {
        Some((v, end)) if end == b.len() => Some(v),
        _ => None,
    }
}

/// A decimal `[+-]digits[.digits][e[+-]digits]` as read by [`number_scan`].
pub(super) struct Decimal {
    pub(super) neg: bool,
    /// The digits as an integer (wrapped when there are more than 19).
    pub(super) m: u64,
    pub(super) digits: usize,
    /// The power of ten: the exponent less the fraction's digits.
    pub(super) exp: i32,
}

/// Reads the decimal that starts at `b[p]` up to the first byte that
/// cannot continue it: (the decimal, that byte's position). `None` when no
/// digit starts it, an exponent has no digit or more than six.
#[inline(always)]
pub(super) fn number_scan(b: &[u8], p: usize) -> Option<(Decimal, usize)> {
    let (neg, mut i) = match b.get(p) {
        Some(b'-') => (true, p + 1),
        Some(b'+') => (false, p + 1),
        _ => (false, p),
    };
    let n = b.len();
    let int_start = i;
    let mut m;
    (i, m) = decimal_digits(b, i, 0);
    let mut digits = i - int_start;
    let mut exp: i32 = 0;
    if i < n && b[i] == b'.' {
        let start = i + 1;
        (i, m) = decimal_digits(b, start, m);
        digits += i - start;
        exp = -((i - start) as i32);
    }
    if digits == 0 {
        return None;
    }
    if i < n && (b[i] == b'e' || b[i] == b'E') {
        i += 1;
        let eneg = match b.get(i) {
            Some(b'-') => {
                i += 1;
                true
            }
            Some(b'+') => {
                i += 1;
                false
            }
            _ => false,
        };
        let start = i;
        let mut e: i32 = 0;
        while i < n && i - start < 6 {
            let d = b[i].wrapping_sub(b'0');
            if d > 9 {
                break;
            }
            e = e * 10 + d as i32;
            i += 1;
        }
        if i == start || b.get(i).is_some_and(u8::is_ascii_digit) {
            return None;
        }
        exp += if eneg { -e } else { e };
    }
    Some((
        Decimal {
            neg,
            m,
            digits,
            exp,
        },
        i,
    ))
}

/// The number of [`fast_f64`]'s form that starts at `b[p]`, read up to the
/// first byte that cannot continue it: (its value, that byte's position).
/// `None` when no number starts there or it is outside the fast path (more
/// than 19 digits, m > 2^53, |e| > 22, more than six exponent digits).
#[inline(always)]
pub(super) fn number_at(b: &[u8], p: usize) -> Option<(f64, usize)> {
    let (d, end) = number_scan(b, p)?;
    Some((fast_value(&d)?, end))
}

/// [`number_at`], with the number's code in a [`Column`] (`Column::code_of`:
/// the same digits, so the same value), or [`Column::NO_CODE`].
#[inline(always)]
pub(super) fn number_and_code_at(b: &[u8], p: usize) -> Option<(f64, u32, usize)> {
    let (d, end) = number_scan(b, p)?;
    let v = fast_value(&d)?;
    Some((v, Column::code_of(d.neg, d.m, d.exp), end))
}

/// The value of a decimal on Clinger's fast path, `None` off it.
#[inline(always)]
fn fast_value(d: &Decimal) -> Option<f64> {
    if d.digits > 19 || d.m > (1u64 << 53) || !(-22..=22).contains(&d.exp) {
        return None;
    }
    let v = if d.exp < 0 {
        d.m as f64 / POW10[(-d.exp) as usize]
    } else {
        d.m as f64 * POW10[d.exp as usize]
    };
    Some(if d.neg { -v } else { v })
}

/// `end`, or one byte less when `b[start..end]` ends in a CR (of a CRLF).
pub(super) fn before_cr(b: &[u8], start: usize, end: usize) -> usize {
    if end > start && b[end - 1] == b'\r' {
        end - 1
    } else {
        end
    }
}

/// Where the text cell that starts at `b[p]` ends: the next delimiter or
/// line end, or the end of `b`. Eight bytes at a time (SWAR: a word's
/// matching bytes become a bit mask), as cells are short.
#[inline]
pub(super) fn text_end(b: &[u8], mut p: usize, delimiter: u8) -> usize {
    const ONES: u64 = 0x0101_0101_0101_0101;
    while let Some(word) = b.get(p..p + 8) {
        let w = u64::from_le_bytes(word.try_into().unwrap_or([0; 8]));
        let hits =
            zero_bytes(w ^ (ONES * delimiter as u64)) | zero_bytes(w ^ (ONES * b'\n' as u64));
        if hits != 0 {
            return p + (hits.trailing_zeros() / 8) as usize;
        }
        p += 8;
    }
    while p < b.len() && b[p] != delimiter && b[p] != b'\n' {
        p += 1;
    }
    p
}

/// Appends the decimal digits of `b` from `i` to the mantissa `m`
/// (wrapping: callers bound the digit count); returns where they stop.
/// (Eight digits at a time by SWAR multiplications was tried: slower, as
/// most runs here are a few digits long.)
#[inline]
pub(super) fn decimal_digits(b: &[u8], mut i: usize, mut m: u64) -> (usize, u64) {
    while let Some(d) = b.get(i).map(|c| c.wrapping_sub(b'0')).filter(|d| *d <= 9) {
        m = m.wrapping_mul(10).wrapping_add(d as u64);
        i += 1;
    }
    (i, m)
}
