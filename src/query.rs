//! Filters: our own small syntax, typed at the browser's prompt or given with
//! `--where`. Clauses are separated by spaces and all must hold:
//!
//! ```text
//! odds>=100 period<20 depth>300 k>=2 flag:odd-even decision:open verdict:likely disagree
//! ```
//!
//! Numeric clauses compare a field (`odds`, `probability`, `period`, `depth`,
//! `duration`, `snr`, `radius`, `k`, `boost`, `prior`, `mag`, `teff`, `impact`)
//! with `<`, `<=`, `>`, `>=`, `=` or `!=`; a candidate lacking the value fails
//! the clause. Word clauses: `flag:NAME` (fired firmly or as a warning),
//! `decision:open|kept|rejected|parked`, `verdict:validated|likely|unlikely|rejected`,
//! `reason:NAME`, `star:TEXT` and `id:TEXT` (substring of the id), and
//! `disagree` (vetters' latest decisions differ). A leading `!` negates a
//! word clause.

use std::fmt;

use crate::decision::Reason;
use crate::flags::Flag;
use crate::odds::{ALL_VERDICTS, Verdict};

/// A numeric field a filter can compare.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NumField {
    Odds,
    Probability,
    Period,
    Depth,
    Duration,
    Snr,
    Radius,
    K,
    Boost,
    Prior,
    Mag,
    Teff,
    Impact,
}

const NUM_FIELDS: [(&str, NumField); 14] = [
    ("odds", NumField::Odds),
    ("probability", NumField::Probability),
    ("prob", NumField::Probability),
    ("period", NumField::Period),
    ("depth", NumField::Depth),
    ("duration", NumField::Duration),
    ("snr", NumField::Snr),
    ("radius", NumField::Radius),
    ("k", NumField::K),
    ("boost", NumField::Boost),
    ("prior", NumField::Prior),
    ("mag", NumField::Mag),
    ("teff", NumField::Teff),
    ("impact", NumField::Impact),
];

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Op {
    Lt,
    Le,
    Gt,
    Ge,
    Eq,
    Ne,
}

impl Op {
    fn holds(self, a: f64, b: f64) -> bool {
        match self {
            Op::Lt => a < b,
            Op::Le => a <= b,
            Op::Gt => a > b,
            Op::Ge => a >= b,
            Op::Eq => a == b,
            Op::Ne => a != b,
        }
    }
}

/// One clause of a filter.
#[derive(Clone, Debug, PartialEq)]
pub enum Clause {
    Compare(NumField, Op, f64),
    Flag(Flag, bool),
    Decision(&'static str, bool),
    Verdict(Verdict, bool),
    Reason(Reason, bool),
    Star(String, bool),
    Id(String, bool),
    Disagree(bool),
}

impl Clause {
    pub fn holds<S: Subject + ?Sized>(&self, s: &S) -> bool {
        match self {
            Clause::Compare(f, op, v) => s.number(*f).is_some_and(|x| op.holds(x, *v)),
            Clause::Flag(f, want) => s.has_flag(*f) == *want,
            Clause::Decision(d, want) => (s.decision() == *d) == *want,
            Clause::Verdict(v, want) => (s.verdict() == Some(*v)) == *want,
            Clause::Reason(r, want) => (s.reason() == Some(*r)) == *want,
            Clause::Star(t, want) => contains_folded(s.star(), t) == *want,
            Clause::Id(t, want) => contains_folded(s.id(), t) == *want,
            Clause::Disagree(want) => s.disagreed() == *want,
        }
    }
}

/// Where `Compare(_, op, v)` holds over up to 64 values of a column, one
/// bit each (bit i for `values[i]`). `NaN` is a missing value and fails,
/// as does any value when `finite` and the value is infinite. One loop per
/// operator, so that each compiles to straight compares.
pub fn compare_bits(values: &[f64], op: Op, v: f64, finite: bool) -> u64 {
    // Branch-free bodies (`&`, not `&&`), so that the loops vectorise.
    fn bits(values: &[f64], keep: impl Fn(f64) -> bool) -> u64 {
        values
            .iter()
            .enumerate()
            .fold(0, |b, (i, &x)| b | (keep(x) as u64) << i)
    }
    fn by_op(values: &[f64], op: Op, v: f64, ok: impl Fn(f64) -> bool) -> u64 {
        match op {
            Op::Lt => bits(values, |x| (x < v) & ok(x)),
            Op::Le => bits(values, |x| (x <= v) & ok(x)),
            Op::Gt => bits(values, |x| (x > v) & ok(x)),
            Op::Ge => bits(values, |x| (x >= v) & ok(x)),
            Op::Eq => bits(values, |x| (x == v) & ok(x)),
            Op::Ne => bits(values, |x| (x != v) & ok(x)),
        }
    }
    debug_assert!(values.len() <= 64);
    match (finite, op) {
        (true, _) => by_op(values, op, v, f64::is_finite),
        // Every comparison but `!=` already fails on NaN.
        (false, Op::Ne) => by_op(values, op, v, |x| !x.is_nan()),
        (false, _) => by_op(values, op, v, |_| true),
    }
}

/// A parsed filter: all clauses must hold. Empty holds for everything.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Filter {
    pub clauses: Vec<Clause>,
    pub text: String,
}

/// A filter that does not parse: where (byte offset) and why.
#[derive(Clone, Debug, PartialEq)]
pub struct ParseError {
    pub pos: usize,
    pub message: String,
}

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "at column {}: {}", self.pos + 1, self.message)
    }
}

impl std::error::Error for ParseError {}

/// What a filter reads about one candidate.
pub trait Subject {
    fn number(&self, f: NumField) -> Option<f64>;
    fn has_flag(&self, f: Flag) -> bool;
    fn decision(&self) -> &'static str;
    fn reason(&self) -> Option<Reason>;
    /// `None` while the verdict waits for its evidence (the checks).
    fn verdict(&self) -> Option<Verdict>;
    fn star(&self) -> &str;
    fn id(&self) -> &str;
    fn disagreed(&self) -> bool;
}

impl Filter {
    pub fn parse(text: &str) -> Result<Filter, ParseError> {
        let mut clauses = Vec::new();
        let mut pos = 0;
        for word in text.split(' ') {
            let start = pos;
            pos += word.len() + 1;
            if word.is_empty() {
                continue;
            }
            clauses.push(parse_clause(word, start)?);
        }
        Ok(Filter {
            clauses,
            text: text.trim().to_string(),
        })
    }

    pub fn is_empty(&self) -> bool {
        self.clauses.is_empty()
    }

    pub fn matches<S: Subject + ?Sized>(&self, s: &S) -> bool {
        self.clauses.iter().all(|c| c.holds(s))
    }

    /// The part of the filter that reads only the star, to judge a whole
    /// star before reading its members.
    pub fn star_test(&self) -> StarTest<'_> {
        let k_holds = |k: f64| {
            self.clauses.iter().all(|c| match c {
                Clause::Compare(NumField::K, op, v) => op.holds(k, *v),
                _ => true,
            })
        };
        StarTest {
            table: (0..StarTest::TABLE).map(|k| k_holds(k as f64)).collect(),
            k_holds: Box::new(move |k| k_holds(k as f64)),
            star: self
                .clauses
                .iter()
                .filter_map(|c| match c {
                    Clause::Star(t, want) => Some((t.as_str(), *want)),
                    _ => None,
                })
                .collect(),
            exact: self
                .clauses
                .iter()
                .all(|c| matches!(c, Clause::Compare(NumField::K, ..) | Clause::Star(..))),
        }
    }
}

/// The star-level clauses of a filter (`k` and `star:`), compiled to judge
/// a whole star from its id, its `k` (open and kept candidates) and its
/// number of candidates. A member's `k` is the star's, or 0 when the member
/// itself is rejected.
pub struct StarTest<'f> {
    /// Whether the `k` clauses hold, for small `k`.
    table: Vec<bool>,
    k_holds: Box<dyn Fn(usize) -> bool + Sync + 'f>,
    star: Vec<(&'f str, bool)>,
    /// The filter has no other clauses: the star's answer is its members'.
    exact: bool,
}

impl StarTest<'_> {
    const TABLE: usize = 256;

    /// Whether the filter has star-level clauses at all (else every star
    /// is undecided).
    pub fn reads_star(&self) -> bool {
        !self.star.is_empty() || self.table.iter().any(|&ok| !ok)
    }

    #[inline]
    fn k_holds(&self, k: usize) -> bool {
        match self.table.get(k) {
            Some(&ok) => ok,
            None => (self.k_holds)(k),
        }
    }

    /// Whether some candidate of a star with `k` open and kept candidates
    /// out of `n`, and this id, matches the filter: `Some(false)` none does,
    /// `Some(true)` one does, `None` the members must be read to know.
    #[inline]
    pub fn judge<'s>(&self, k: usize, n: usize, star: impl FnOnce() -> &'s str) -> Option<bool> {
        // Some member has k = the star's when k > 0, and k = 0 when k < n.
        let at_k = k > 0 && self.k_holds(k);
        let at_0 = k < n && self.k_holds(0);
        if !at_k && !at_0 {
            return Some(false);
        }
        if !self.star.is_empty() {
            let id = star();
            if !self
                .star
                .iter()
                .all(|&(t, want)| contains_folded(id, t) == want)
            {
                return Some(false);
            }
        }
        self.exact.then_some(true)
    }
}

/// Whether `hay` contains `needle` (already lower case), ignoring ASCII
/// case, without allocating.
fn contains_folded(hay: &str, needle: &str) -> bool {
    let (h, n) = (hay.as_bytes(), needle.as_bytes());
    n.is_empty() || h.windows(n.len()).any(|w| w.eq_ignore_ascii_case(n))
}

fn parse_clause(word: &str, at: usize) -> Result<Clause, ParseError> {
    let err = |off: usize, message: String| ParseError {
        pos: at + off,
        message,
    };
    let (negate, body, skip) = match word.strip_prefix('!') {
        Some(rest) => (true, rest, 1),
        None => (false, word, 0),
    };
    let want = !negate;
    if body == "disagree" {
        return Ok(Clause::Disagree(want));
    }
    if let Some((key, value)) = body.split_once(':') {
        let voff = skip + key.len() + 1;
        let v = value.to_ascii_lowercase();
        return match key.to_ascii_lowercase().as_str() {
            "flag" => Flag::parse(&v).map(|f| Clause::Flag(f, want)).ok_or_else(|| {
                err(voff, format!("`{value}` is not a flag; flags: {}", crate::flags::ALL_FLAGS.map(Flag::name).join(", ")))
            }),
            "decision" => ["open", "kept", "rejected", "parked"]
                .into_iter()
                .find(|d| *d == v)
                .map(|d| Clause::Decision(d, want))
                .ok_or_else(|| err(voff, format!("`{value}` is not a decision; use open, kept, rejected or parked"))),
            "verdict" => ALL_VERDICTS
                .into_iter()
                .find(|x| x.name() == v)
                .map(|x| Clause::Verdict(x, want))
                .ok_or_else(|| err(voff, format!("`{value}` is not a verdict; use validated, likely, unlikely or rejected"))),
            "reason" => Reason::parse(&v)
                .map(|r| Clause::Reason(r, want))
                .ok_or_else(|| err(voff, format!("`{value}` is not a reason"))),
            "star" => Ok(Clause::Star(v, want)),
            "id" => Ok(Clause::Id(v, want)),
            other => Err(err(skip, format!("`{other}:` is not a clause; use flag:, decision:, verdict:, reason:, star: or id:"))),
        };
    }
    if negate {
        return Err(err(
            0,
            "`!` negates word clauses only (flag:, decision:, ... or disagree)".into(),
        ));
    }
    let op_at = body.find(['<', '>', '=', '!']).ok_or_else(|| {
        err(
            0,
            format!("`{body}` is not a clause; e.g. odds>=100, flag:echo, decision:open"),
        )
    })?;
    let (name, rest) = body.split_at(op_at);
    let field = NUM_FIELDS
        .iter()
        .find(|(n, _)| n.eq_ignore_ascii_case(name))
        .map(|(_, f)| *f)
        .ok_or_else(|| {
            err(
                0,
                format!(
                    "`{name}` is not a field; fields: {}",
                    NUM_FIELDS.map(|f| f.0).join(", ")
                ),
            )
        })?;
    let (op, len) = [
        ("<=", Op::Le),
        (">=", Op::Ge),
        ("!=", Op::Ne),
        ("<", Op::Lt),
        (">", Op::Gt),
        ("=", Op::Eq),
    ]
    .into_iter()
    .find(|(s, _)| rest.starts_with(s))
    .map(|(s, o)| (o, s.len()))
    .ok_or_else(|| err(op_at, "expected <, <=, >, >=, = or !=".into()))?;
    let num = &rest[len..];
    let value: f64 = num
        .parse()
        .ok()
        .filter(|v: &f64| v.is_finite())
        .ok_or_else(|| err(op_at + len, format!("`{num}` is not a number")))?;
    Ok(Clause::Compare(field, op, value))
}

#[cfg(test)]
mod tests {
    use super::*;

    struct S;
    impl Subject for S {
        fn number(&self, f: NumField) -> Option<f64> {
            match f {
                NumField::Odds => Some(340.0),
                NumField::Period => Some(12.5),
                NumField::K => Some(3.0),
                _ => None,
            }
        }
        fn has_flag(&self, f: Flag) -> bool {
            f == Flag::OddEven
        }
        fn decision(&self) -> &'static str {
            "open"
        }
        fn reason(&self) -> Option<Reason> {
            None
        }
        fn verdict(&self) -> Option<Verdict> {
            Some(Verdict::Validated)
        }
        fn star(&self) -> &str {
            "HWT12345"
        }
        fn id(&self) -> &str {
            "HWT12345-s2"
        }
        fn disagreed(&self) -> bool {
            false
        }
    }

    #[test]
    fn parses_and_matches_the_design_example() {
        let f = Filter::parse("odds>=100 period<20 k>=2 flag:odd-even decision:open").unwrap();
        assert_eq!(f.clauses.len(), 5);
        assert!(f.matches(&S));
        assert!(!Filter::parse("odds>=1000").unwrap().matches(&S));
        assert!(
            !Filter::parse("depth>300").unwrap().matches(&S),
            "a missing value fails"
        );
        assert!(
            Filter::parse("!flag:echo verdict:validated star:hwt12 !disagree")
                .unwrap()
                .matches(&S)
        );
        assert!(Filter::parse("").unwrap().matches(&S));
        assert!(Filter::parse("  k=3  ").unwrap().matches(&S));
    }

    #[test]
    fn a_star_is_judged_as_its_members_are() {
        // Stars of n candidates, k of them open or kept (the rest rejected,
        // with k 0), judged whole and member by member.
        struct M {
            k: usize,
            rejected: bool,
            id: &'static str,
        }
        impl Subject for M {
            fn number(&self, f: NumField) -> Option<f64> {
                match f {
                    NumField::K => Some(if self.rejected { 0.0 } else { self.k as f64 }),
                    NumField::Odds => Some(340.0),
                    _ => None,
                }
            }
            fn has_flag(&self, _: Flag) -> bool {
                false
            }
            fn decision(&self) -> &'static str {
                if self.rejected { "rejected" } else { "open" }
            }
            fn reason(&self) -> Option<Reason> {
                None
            }
            fn verdict(&self) -> Option<Verdict> {
                Some(Verdict::Likely)
            }
            fn star(&self) -> &str {
                self.id
            }
            fn id(&self) -> &str {
                self.id
            }
            fn disagreed(&self) -> bool {
                false
            }
        }
        let texts = [
            "k>1",
            "k<1",
            "k=0",
            "k>=1 k<1",
            "k!=2",
            "k>=2 star:wt1",
            "star:wt2",
            "!star:wt",
            "k>1 odds>5",
            "k>300",
            "k<=300 k>=299",
            "odds>1000",
            "",
        ];
        for text in texts {
            let f = Filter::parse(text).unwrap();
            let test = f.star_test();
            for (n, id) in [
                (1, "HWT1"),
                (2, "HWT1"),
                (3, "HWT1"),
                (300, "HWT1"),
                (4, "hwt2"),
            ] {
                for k in 0..=n {
                    let members: Vec<M> = (0..n)
                        .map(|i| M {
                            k,
                            rejected: i >= k,
                            id,
                        })
                        .collect();
                    let truth = members.iter().any(|m| f.matches(m));
                    match test.judge(k, n, || id) {
                        Some(v) => assert_eq!(v, truth, "{text}: k {k} of {n}, {id}"),
                        None => assert!(!f.star_test().exact, "{text}"),
                    }
                }
            }
        }
        assert_eq!(
            Filter::parse("k>1")
                .unwrap()
                .star_test()
                .judge(1, 3, || "x"),
            Some(false)
        );
        assert_eq!(
            Filter::parse("k>1 odds>5")
                .unwrap()
                .star_test()
                .judge(2, 2, || "x"),
            None
        );
    }

    #[test]
    fn column_bits_agree_with_one_value_at_a_time() {
        let values = [
            1.0,
            f64::NAN,
            20.0,
            f64::INFINITY,
            -3.0,
            20.0,
            f64::NEG_INFINITY,
        ];
        for op in [Op::Lt, Op::Le, Op::Gt, Op::Ge, Op::Eq, Op::Ne] {
            for finite in [false, true] {
                let bits = compare_bits(&values, op, 20.0, finite);
                for (i, &x) in values.iter().enumerate() {
                    let one = !x.is_nan() && (!finite || x.is_finite()) && op.holds(x, 20.0);
                    assert_eq!(bits >> i & 1 == 1, one, "{op:?} {x} finite {finite}");
                }
            }
        }
        assert_eq!(compare_bits(&[2.0; 64], Op::Gt, 1.0, false), u64::MAX);
    }

    #[test]
    fn id_clauses_ignore_case() {
        assert!(contains_folded("HWT12345-s2", "t12345-s"));
        assert!(contains_folded("abc", ""));
        assert!(!contains_folded("ab", "abc"));
    }

    #[test]
    fn errors_say_where() {
        let e = Filter::parse("odds>=100 peroid<20").unwrap_err();
        assert_eq!(e.pos, 10);
        assert!(e.message.contains("`peroid` is not a field"), "{e}");
        let e = Filter::parse("k>=two").unwrap_err();
        assert_eq!(e.pos, 3);
        let e = Filter::parse("flag:wobble").unwrap_err();
        assert_eq!(e.pos, 5);
        assert!(Filter::parse("k~2").is_err());
        assert!(Filter::parse("!k>2").is_err());
        assert_eq!(
            e.to_string(),
            "at column 6: `wobble` is not a flag; flags: big-radius, odd-even, secondary, v-shape, density-mismatch, near-twin, harmonic, crowded, echo, low-snr, half-phase, not-recovered, mixed-host, known-fp, ellipsoidal, known-artefact"
        );
    }
}
