//! A numeric column in four bytes a value where the catalogue wrote it
//! with few digits, as catalogues do (`9.375664`, `298.1`, `-48.82098`),
//! and in eight where it did not: the same `f64`s, bit for bit, in about
//! half the memory.
//!
//! A value is kept as a decimal m / 10^e (m < 2^26, e ≤ 15) when that
//! quotient, computed in one IEEE division, is the value itself. Both m and
//! 10^e are exact in an `f64`, so the division is correctly rounded
//! (Clinger 1990, "How to read floating point numbers accurately", PLDI:
//! the fast path), and it is the very operation that read the value from
//! its text (`load::number::number_at`): the reader hands over its digits
//! as the code (`Column::code_of`), and any other value is encoded only
//! after the code is checked to give it back bit for bit. Anything else (a
//! converted unit, a BJD with six decimals, a NaN other than the loader's)
//! is kept whole, in eight bytes beside the codes. A column of mostly such
//! values is kept as plain `f64`s.
//!
//! Once complete, a column is kept in two bytes a value where its values
//! allow ([`Column::narrow`]), in one of two forms: the digits of every
//! value at the column's largest exponent s, below 65,534 (a
//! signal-to-noise ratio written `59.7`, an impact `0.043`, a temperature
//! `5038`), m / 10^e being m·10^(s−e) / 10^s, one rational number, both
//! divisions correctly rounded, so the same `f64`; or each value's own
//! code with a mantissa below 4,096 (errors written `1.40e-4`, `3.1e-3`).
//! At most one value in sixteen that neither holds (a negative value, a
//! deep eclipse among shallow transits) is kept whole beside them.

/// A coded value as a decimal: ±`digits` / 10^`scale`, `digits` < 2^26
/// (at most eight significant digits). Its value is the `f64` nearest this
/// decimal, and no other decimal of eight digits or fewer is that near:
/// two such decimals differ by at least 10^-9 of their size, an `f64`'s
/// rounding interval spans 2^-52 of it. So the decimal, its zeros at the
/// end left out, is the shortest text that reads back as the value, the
/// digits a shortest round-trip formatter finds (Steele & White 1990;
/// Adams 2018, Ryu), and it can be written without searching for them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Decimal {
    pub negative: bool,
    pub digits: u32,
    pub scale: u32,
}

impl Decimal {
    /// The same decimal without its zeros at the end after the point
    /// (`3.70` as `3.7`, `0.000` as `0`; `3000` keeps its zeros: they are
    /// written to the unit).
    pub fn trimmed(self) -> Decimal {
        let (mut digits, mut scale) = (self.digits, self.scale);
        while scale > 0 && digits % 10 == 0 {
            digits /= 10;
            scale -= 1;
        }
        Decimal {
            digits,
            scale,
            ..self
        }
    }
}

/// Powers of ten exact in an `f64`, for the codes' exponents.
const POW10: [f64; 16] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
];
/// A code's top bit: the value is `wide[code & INDEX]`.
const WIDE: u32 = 1 << 31;
const INDEX: u32 = WIDE - 1;
/// Otherwise: the sign, then four bits of exponent, then the mantissa.
const SIGN: u32 = 1 << 30;
const EXP_SHIFT: u32 = 26;
const MANTISSA: u32 = (1 << EXP_SHIFT) - 1;
/// A missing value in a narrow column (the loader's NaN; no value is
/// given it, nor [`NARROW_RARE`]).
const NARROW_NAN: u16 = u16::MAX;
/// A narrow column's value kept whole, in `rare`.
const NARROW_RARE: u16 = u16::MAX - 1;
/// The `scale` of a narrow column whose values carry their own exponent:
/// e in the top four bits, the mantissa in the low [`FLOAT_BITS`].
const FLOATING: u8 = u8::MAX;
const FLOAT_BITS: u32 = 12;
const FLOAT_MANTISSA: u16 = (1 << FLOAT_BITS) - 1;
/// 10^k as integers, for a narrow column's digits.
const POW10_INT: [u32; 5] = [1, 10, 100, 1000, 10_000];
/// The loader's NaN (a missing value): minus zero at the largest exponent,
/// a code no value is given (`code_at` and `code_of` refuse it; minus zero
/// is coded at exponent 0).
const NAN: u32 = SIGN | (15 << EXP_SHIFT);

/// A narrow column's values kept whole: (row, value), in row order.
type Rare = Vec<(u32, f64)>;

/// A column of `f64`s; see the module's text.
#[derive(Debug, Clone, Default)]
pub struct Column {
    /// One per value; empty when `plain`.
    codes: Vec<u32>,
    /// The values no code holds; every value when `plain`.
    wide: Vec<f64>,
    /// Most values were wide: kept as plain `f64`s.
    plain: bool,
    /// Two bytes a value ([`Column::narrow`]): each value's digits at the
    /// column's exponent `scale`, or its code when `scale` is
    /// [`FLOATING`], or [`NARROW_NAN`], or [`NARROW_RARE`]; `codes` and
    /// `wide` are empty.
    narrow: Vec<u16>,
    narrowed: bool,
    scale: u8,
    /// The values of a narrow column kept whole.
    rare: Rare,
    /// The exponent that encoded the last value, tried first for the next
    /// (a column's values mostly carry the same number of decimals).
    hint: u8,
}

impl Column {
    /// No code: the value is encoded from itself ([`Column::push_code`]).
    pub const NO_CODE: u32 = u32::MAX;
    /// The code of a missing value (the loader's NaN).
    pub const MISSING: u32 = NAN;

    /// The code of the decimal ±m·10^exp as read from its text, if it has
    /// one: its value is the reader's (`m / 10^-exp`, the same division),
    /// so no check is needed. [`Column::NO_CODE`] otherwise.
    #[inline]
    pub fn code_of(neg: bool, m: u64, exp: i32) -> u32 {
        if (-15..=0).contains(&exp) && m <= MANTISSA as u64 {
            let code = (u32::from(neg) << 30) | (((-exp) as u32) << EXP_SHIFT) | m as u32;
            if code != NAN {
                return code;
            }
        }
        Column::NO_CODE
    }

    pub fn with_capacity(n: usize) -> Column {
        Column {
            codes: Vec::with_capacity(n),
            ..Column::default()
        }
    }

    pub fn from_values(values: &[f64]) -> Column {
        let mut c = Column::with_capacity(values.len());
        c.extend(values);
        c
    }

    pub fn len(&self) -> usize {
        if self.plain {
            self.wide.len()
        } else if self.narrowed {
            self.narrow.len()
        } else {
            self.codes.len()
        }
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The i-th value.
    #[inline(always)]
    pub fn get(&self, i: usize) -> f64 {
        if self.plain {
            return self.wide[i];
        }
        if self.narrowed {
            let n = self.narrow[i];
            if n >= NARROW_RARE {
                return if n == NARROW_NAN {
                    f64::NAN
                } else {
                    self.rare_at(i)
                };
            }
            return if self.scale == FLOATING {
                f64::from(n & FLOAT_MANTISSA) / POW10[(n >> FLOAT_BITS) as usize]
            } else {
                f64::from(n) / POW10[self.scale as usize]
            };
        }
        let code = self.codes[i];
        if code & WIDE == 0 {
            decode(code)
        } else {
            self.wide[(code & INDEX) as usize]
        }
    }

    /// The i-th value as the decimal its code holds, when it has one (not
    /// kept whole, not missing): the value is the `f64` nearest that
    /// decimal, so the decimal, its zeros at the end left out, is the
    /// shortest text that reads back as the value (see [`Decimal`]).
    #[inline]
    pub fn decimal(&self, i: usize) -> Option<Decimal> {
        if self.plain {
            return None;
        }
        if self.narrowed {
            let n = self.narrow[i];
            let (digits, scale) = if self.scale == FLOATING {
                (n & FLOAT_MANTISSA, n >> FLOAT_BITS)
            } else {
                (n, u16::from(self.scale))
            };
            return (n < NARROW_RARE).then_some(Decimal {
                negative: false,
                digits: u32::from(digits),
                scale: u32::from(scale),
            });
        }
        let code = self.codes[i];
        (code & WIDE == 0 && code != NAN).then_some(Decimal {
            negative: code & SIGN != 0,
            digits: code & MANTISSA,
            scale: (code >> EXP_SHIFT) & 15,
        })
    }

    pub fn iter(&self) -> impl ExactSizeIterator<Item = f64> + '_ {
        (0..self.len()).map(|i| self.get(i))
    }

    /// The values of `rows` into the start of `out`; returns how many.
    pub fn read_into(&self, rows: std::ops::Range<usize>, out: &mut [f64]) -> usize {
        let n = rows.len().min(out.len());
        for (o, i) in out.iter_mut().zip(rows.take(n)) {
            *o = self.get(i);
        }
        n
    }

    /// Every value, as plain `f64`s.
    pub fn to_vec(&self) -> Vec<f64> {
        self.iter().collect()
    }

    /// Asks the memory for the i-th value ahead of reading it.
    #[inline]
    pub fn prefetch(&self, i: usize) {
        if self.plain {
            crate::prefetch::value(&self.wide, i);
        } else if self.narrowed {
            crate::prefetch::value(&self.narrow, i);
        } else {
            crate::prefetch::value(&self.codes, i);
        }
    }

    pub fn push(&mut self, v: f64) {
        self.widen();
        if !self.plain && self.wide.len() as u64 >= INDEX as u64 {
            // More wide values than a code can index: plain from here on.
            self.go_plain();
        }
        if self.plain {
            self.wide.push(v);
            return;
        }
        let code = match self.encode(v) {
            Some(code) => code,
            None => self.wide_code(v),
        };
        self.codes.push(code);
    }

    /// Appends `v`, whose code (from [`Column::code_of`]) is `code`, or
    /// [`Column::NO_CODE`] to encode it here.
    #[inline]
    pub fn push_code(&mut self, code: u32, v: f64) {
        if code == Column::NO_CODE || self.plain || self.narrowed {
            return self.push(v);
        }
        debug_assert_eq!(decode(code).to_bits(), v.to_bits(), "code {code:#x}");
        self.codes.push(code);
    }

    /// Empties the column, keeping its memory.
    pub fn clear(&mut self) {
        self.codes.clear();
        self.wide.clear();
        self.narrow = Vec::new();
        self.rare = Vec::new();
        self.narrowed = false;
        self.plain = false;
    }

    pub fn extend(&mut self, values: &[f64]) {
        self.codes.reserve(values.len());
        for &v in values {
            self.push(v);
        }
    }

    /// Appends another column's values.
    pub fn append(&mut self, other: &Column) {
        self.widen();
        if !self.plain && (self.wide.len() + other.wide.len()) as u64 >= INDEX as u64 {
            // More wide values than a code can index: plain from here on.
            self.go_plain();
        }
        if self.plain || other.plain || other.narrowed {
            for v in other.iter() {
                self.push(v);
            }
            return;
        }
        let base = self.wide.len() as u32;
        if other.wide.is_empty() {
            self.codes.extend_from_slice(&other.codes);
        } else {
            self.codes
                .extend((other.codes.iter()).map(|&c| if c & WIDE != 0 { c + base } else { c }));
            self.wide.extend_from_slice(&other.wide);
        }
        self.hint = other.hint;
    }

    /// Sets every value v to `f(v)` (a unit's conversion, a placeholder
    /// read as missing); returns how many changed.
    pub fn update(&mut self, mut f: impl FnMut(f64) -> f64) -> usize {
        self.widen();
        let mut changed = 0;
        if self.plain {
            for v in &mut self.wide {
                let w = f(*v);
                changed += usize::from(w.to_bits() != v.to_bits());
                *v = w;
            }
            return changed;
        }
        for i in 0..self.codes.len() {
            let v = self.get(i);
            let w = f(v);
            if w.to_bits() != v.to_bits() {
                changed += 1;
                // A wide value's old slot is left unused: updates are
                // whole-column conversions, done once.
                self.codes[i] = match self.encode(w) {
                    Some(code) => code,
                    None => self.wide_code(w),
                };
            }
        }
        changed
    }

    /// Sets every value of zero or below to missing (NaN), reading the
    /// codes' own sign and mantissa rather than decoding each; returns how
    /// many. The same as `update(|v| if v <= 0.0 { NaN } else { v })`.
    pub fn not_positive_to_missing(&mut self) -> usize {
        if self.plain {
            return self.update(|v| if v <= 0.0 { f64::NAN } else { v });
        }
        let mut changed = 0;
        if self.narrowed {
            // Of the two-byte values, zero is the only one not positive
            // (none is negative); of those kept whole, any may be.
            for &(row, v) in &self.rare {
                if v <= 0.0 {
                    self.narrow[row as usize] = NARROW_NAN;
                    changed += 1;
                }
            }
            let zero = |n: u16| {
                n < NARROW_RARE && n & FLOAT_MANTISSA == 0 && (self.scale == FLOATING || n == 0)
            };
            for n in self.narrow.iter_mut().filter(|n| zero(**n)) {
                *n = NARROW_NAN;
                changed += 1;
            }
            return changed;
        }
        for code in &mut self.codes {
            let not_positive = if *code & WIDE != 0 {
                self.wide[(*code & INDEX) as usize] <= 0.0
            } else {
                *code != NAN && (*code & SIGN != 0 || *code & MANTISSA == 0)
            };
            if not_positive {
                *code = NAN;
                changed += 1;
            }
        }
        changed
    }

    /// The values whose `keep` is true, in order (an empty column, one
    /// not kept, stays empty).
    pub fn filter(&self, keep: &[bool]) -> Column {
        let mut out = Column::with_capacity(self.len());
        for (i, _) in keep
            .iter()
            .take(self.len())
            .enumerate()
            .filter(|(_, k)| **k)
        {
            out.push(self.get(i));
        }
        out.settle();
        out
    }

    /// Done growing: plain `f64`s when most values were wide (a code and a
    /// wide value cost more than the value alone), two bytes a value where
    /// the values allow ([`Column::narrow`]), spare capacity freed.
    pub fn settle(&mut self) {
        if !self.plain && !self.narrowed && self.wide.len() > self.codes.len() / 2 {
            self.go_plain();
        }
        self.narrow();
        for_spare(&mut self.codes);
        for_spare(&mut self.wide);
    }

    /// Two bytes a value where the values allow (see the module's text):
    /// the digits at the largest exponent, else each value's own code,
    /// whichever keeps at most one value in sixteen whole (a wide value, a
    /// negative one, or one whose digits do not fit); anything else stays
    /// as it is. The same `f64`s, bit for bit. A later push or update
    /// widens the column back to codes.
    pub fn narrow(&mut self) {
        if self.plain || self.narrowed || self.codes.is_empty() {
            return;
        }
        let limit = self.codes.len() / 16;
        let largest = (self.codes.iter())
            .filter(|&&c| c & (WIDE | SIGN) == 0)
            .map(|&c| c >> EXP_SHIFT)
            .max()
            .unwrap_or(0);
        for scale in [largest as u8, FLOATING] {
            if let Some((narrow, rare)) = self.narrowed_at(scale, limit) {
                self.codes = Vec::new();
                self.wide = Vec::new();
                self.narrow = narrow;
                self.rare = rare;
                self.scale = scale;
                self.narrowed = true;
                return;
            }
        }
    }

    /// The two-byte values at `scale` (or [`FLOATING`]) and those kept
    /// whole, when these are at most `limit`.
    fn narrowed_at(&self, scale: u8, limit: usize) -> Option<(Vec<u16>, Rare)> {
        let mut out = Vec::with_capacity(self.codes.len());
        let mut rare = Vec::new();
        for (i, &c) in self.codes.iter().enumerate() {
            let n = match c {
                NAN => Some(NARROW_NAN),
                c if c & (WIDE | SIGN) != 0 => None,
                c => narrow_code(c, scale),
            };
            out.push(n.unwrap_or_else(|| {
                rare.push((i as u32, self.get(i)));
                NARROW_RARE
            }));
            if rare.len() > limit {
                return None;
            }
        }
        Some((out, rare))
    }

    /// A value kept whole in a narrow column.
    #[cold]
    fn rare_at(&self, i: usize) -> f64 {
        let at = self.rare.partition_point(|r| (r.0 as usize) < i);
        self.rare.get(at).map_or(f64::NAN, |r| r.1)
    }

    /// Back to four-byte codes from two bytes a value, for a push or an
    /// update.
    fn widen(&mut self) {
        if !self.narrowed {
            return;
        }
        let values = self.to_vec();
        self.narrow = Vec::new();
        self.rare = Vec::new();
        self.narrowed = false;
        self.codes = Vec::with_capacity(values.len());
        self.wide = Vec::new();
        for v in values {
            self.push(v);
        }
    }

    fn wide_code(&mut self, v: f64) -> u32 {
        let at = self.wide.len() as u32;
        self.wide.push(v);
        WIDE | at
    }

    fn go_plain(&mut self) {
        let values = self.to_vec();
        self.codes = Vec::new();
        self.narrow = Vec::new();
        self.rare = Vec::new();
        self.narrowed = false;
        self.wide = values;
        self.plain = true;
    }

    /// The code of `v`, trying the last exponent first; `None` when no code
    /// gives back `v` exactly.
    #[inline]
    fn encode(&mut self, v: f64) -> Option<u32> {
        if let Some(code) = code_at(v, self.hint) {
            return Some(code);
        }
        if v.to_bits() == f64::NAN.to_bits() {
            return Some(NAN);
        }
        for e in 0..16u8 {
            match code_at(v, e) {
                Some(code) => {
                    self.hint = e;
                    return Some(code);
                }
                // A larger exponent only makes m larger.
                None if v.abs() * POW10[e as usize] >= MANTISSA as f64 => return None,
                None => {}
            }
        }
        None
    }
}

fn for_spare<T>(v: &mut Vec<T>) {
    if v.capacity() > v.len() + v.len() / 8 {
        v.shrink_to_fit();
    }
}

/// The two bytes of `code` (a decimal, not negative) in a narrow column of
/// `scale` ([`Column::narrow`]), if they hold it.
fn narrow_code(code: u32, scale: u8) -> Option<u16> {
    let (m, e) = (code & MANTISSA, code >> EXP_SHIFT);
    if e == u32::from(scale) {
        // The column's own exponent, the most common.
        return (m < u32::from(NARROW_RARE)).then_some(m as u16);
    }
    let n = if scale == FLOATING {
        // Its zeros at the end left out (`1.40e-4` as 14e-5).
        let d = Decimal {
            negative: false,
            digits: m,
            scale: e,
        }
        .trimmed();
        (d.digits <= u32::from(FLOAT_MANTISSA)).then_some((d.scale << FLOAT_BITS) | d.digits)?
    } else if m == 0 {
        0
    } else {
        let up = u32::from(scale).checked_sub(e)?;
        m.checked_mul(*POW10_INT.get(up as usize)?)?
    };
    (n < u32::from(NARROW_RARE)).then_some(n as u16)
}

/// The code m / 10^e of `v` at exponent `e`, if it gives back `v` bit for bit.
#[inline]
fn code_at(v: f64, e: u8) -> Option<u32> {
    let a = v.abs();
    let t = a * POW10[(e & 15) as usize];
    // Also refuses NaN and infinity.
    if t.is_nan() || t >= MANTISSA as f64 {
        return None;
    }
    // Rounded to the nearest (a truncation of t + ½, cheaper than a call
    // to `round`); a wrong m fails the check below.
    let m = (t + 0.5) as u32;
    let code = (u32::from(v.is_sign_negative()) << 30) | ((e as u32) << EXP_SHIFT) | m;
    (code != NAN && decode(code).to_bits() == v.to_bits()).then_some(code)
}

/// The value of a code that is not wide.
#[inline(always)]
fn decode(code: u32) -> f64 {
    if code == NAN {
        return f64::NAN;
    }
    let v = (code & MANTISSA) as f64 / POW10[((code >> EXP_SHIFT) & 15) as usize];
    // The code's sign bit to the value's (bit 30 to bit 63).
    f64::from_bits(v.to_bits() | (u64::from(code & SIGN) << 33))
}

#[cfg(test)]
mod tests;
