//! Numbers for people, written into a reused `String`: the text of the
//! standard formatter (`format!("{v:.3}")`), made with integer arithmetic
//! wherever the rounding is certain, which is nearly always. A table of a
//! million rows formats a few million numbers.

use std::fmt::Write;

/// Powers of ten, exact in an f64 and in a u64.
const POW10: [f64; 10] = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9];
const IPOW10: [u64; 10] = [
    1,
    10,
    100,
    1_000,
    10_000,
    100_000,
    1_000_000,
    10_000_000,
    100_000_000,
    1_000_000_000,
];

/// Appends `v` with `d` decimals, exactly as `format!("{v:.d$}")` does:
/// the binary value rounded in decimal, halves to even, the sign of a
/// negative value kept even when it rounds to zero.
///
/// `x = |v|·10^d` is one multiplication by an exact power, so it is within
/// `x·2^-53` of the true product; when its fraction is further than that
/// from one half, rounding `x` rounds the true product the same way, and
/// the digits come from the integer. Otherwise (a half, or too close to
/// tell) the standard formatter decides.
pub fn push_fixed(s: &mut String, v: f64, d: usize) {
    if d < POW10.len() && v.is_finite() {
        let x = v.abs() * POW10[d];
        if x < 1e15 {
            let whole = x.floor();
            let frac = x - whole; // exact: below 2^52 the floor is exact
            if (frac - 0.5).abs() > x * 2.5e-16 {
                let m = whole as u64 + u64::from(frac > 0.5);
                if v.is_sign_negative() {
                    s.push('-');
                }
                let mut b = itoa::Buffer::new();
                s.push_str(b.format(m / IPOW10[d]));
                if d > 0 {
                    s.push('.');
                    let f = b.format(m % IPOW10[d]);
                    s.extend(std::iter::repeat_n('0', d - f.len()));
                    s.push_str(f);
                }
                return;
            }
        }
    }
    let _ = write!(s, "{v:.d$}");
}

/// Appends a number for people: up to `sig` significant digits, no
/// exponent for everyday magnitudes (1e-4 to 1e10), trailing zeros
/// dropped, `-` for missing or not finite.
pub fn push_num(s: &mut String, v: Option<f64>, sig: usize) {
    match v {
        None => s.push('-'),
        Some(v) if !v.is_finite() => s.push('-'),
        Some(0.0) => s.push('0'),
        Some(v) => {
            let mag = v.abs().log10().floor() as i32;
            if !(-4..=9).contains(&mag) {
                let _ = write!(s, "{:.*e}", sig.saturating_sub(1), v);
                return;
            }
            let decimals = (sig as i32 - 1 - mag).max(0) as usize;
            let start = s.len();
            push_fixed(s, v, decimals);
            if s[start..].contains('.') {
                let kept = s[start..].trim_end_matches('0').trim_end_matches('.').len();
                s.truncate(start + kept);
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// SplitMix64 (Steele, Lea, Flood 2014): reproducible test values.
    fn splitmix(state: &mut u64) -> u64 {
        *state = state.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = *state;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }

    #[test]
    fn fixed_is_the_standard_formatter() {
        // The standard library's formatter is the reference: halves (exact
        // binary ones go to even), values a hair off a half, values that
        // round up across a power of ten, negatives rounding to zero, huge,
        // tiny and non-finite values, then a million random ones over every
        // decade and decimal count.
        let mut xs = vec![
            0.0,
            -0.0,
            0.5,
            1.5,
            2.5,
            0.125,
            0.375,
            -0.125,
            0.0015,
            1.0005,
            9.9995,
            0.99999,
            999.9996,
            -0.0004,
            -1e-300,
            1e-300,
            123456789.987654,
            4.5e14,
            9.9e14,
            1.2e15,
            1e300,
            f64::MAX,
            f64::MIN_POSITIVE,
            f64::NAN,
            f64::INFINITY,
            f64::NEG_INFINITY,
        ];
        let mut state = 7;
        for _ in 0..1_000_000 {
            let r = splitmix(&mut state);
            let mantissa = (r >> 11) as f64 / (1u64 << 53) as f64;
            let decade = ((r & 0xff) % 24) as i32 - 10;
            let sign = if r & 0x100 == 0 { 1.0 } else { -1.0 };
            xs.push(sign * mantissa * 10f64.powi(decade));
        }
        // Near-halves at every decimal count: k + 0.5 one ulp either side.
        for p in &POW10[..6] {
            for k in 0..200 {
                let h = (k as f64 + 0.5) / p;
                let (up, down) = (
                    f64::from_bits(h.to_bits() + 1),
                    f64::from_bits(h.to_bits() - 1),
                );
                xs.extend([h, up, down, -h]);
            }
        }
        let mut s = String::new();
        for &x in &xs {
            for d in 0..12 {
                s.clear();
                push_fixed(&mut s, x, d);
                assert_eq!(s, format!("{x:.d$}"), "{x:e} with {d} decimals");
            }
        }
    }

    #[test]
    fn numbers_for_people() {
        let f = |v: Option<f64>, sig: usize| {
            let mut s = String::new();
            push_num(&mut s, v, sig);
            s
        };
        assert_eq!(f(Some(52.7143), 3), "52.7");
        assert_eq!(f(Some(0.001899), 4), "0.001899");
        assert_eq!(f(Some(156453.0), 3), "156453");
        assert_eq!(f(Some(1.0e-6), 3), "1.00e-6");
        assert_eq!(f(Some(99.96), 3), "100");
        assert_eq!(f(Some(-0.5), 2), "-0.5");
        assert_eq!(f(Some(-0.0), 2), "0");
        assert_eq!(f(None, 3), "-");
        assert_eq!(f(Some(f64::NAN), 3), "-");
    }
}
