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
    ("p", NumField::Probability),
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
    fn verdict(&self) -> Verdict;
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
        self.clauses.iter().all(|c| match c {
            Clause::Compare(f, op, v) => s.number(*f).is_some_and(|x| op.holds(x, *v)),
            Clause::Flag(f, want) => s.has_flag(*f) == *want,
            Clause::Decision(d, want) => (s.decision() == *d) == *want,
            Clause::Verdict(v, want) => (s.verdict() == *v) == *want,
            Clause::Reason(r, want) => (s.reason() == Some(*r)) == *want,
            Clause::Star(t, want) => s.star().to_ascii_lowercase().contains(t.as_str()) == *want,
            Clause::Id(t, want) => s.id().to_ascii_lowercase().contains(t.as_str()) == *want,
            Clause::Disagree(want) => s.disagreed() == *want,
        })
    }
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
        fn verdict(&self) -> Verdict {
            Verdict::Validated
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
            "at column 6: `wobble` is not a flag; flags: big-radius, odd-even, secondary, v-shape, density-mismatch, near-twin, harmonic, crowded, echo, low-snr"
        );
    }
}
