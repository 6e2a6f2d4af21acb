//! What a vetter decides about a candidate, and why.

use std::fmt;

/// Why a candidate was rejected (DESIGN.md vocabulary).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum Reason {
    EclipsingBinary,
    Blend,
    Artefact,
    Duplicate,
    Alias,
    TooLarge,
    Unstable,
    Other,
}

pub const ALL_REASONS: [Reason; 8] = [
    Reason::EclipsingBinary,
    Reason::Blend,
    Reason::Artefact,
    Reason::Duplicate,
    Reason::Alias,
    Reason::TooLarge,
    Reason::Unstable,
    Reason::Other,
];

impl Reason {
    pub fn name(self) -> &'static str {
        match self {
            Reason::EclipsingBinary => "eclipsing-binary",
            Reason::Blend => "blend",
            Reason::Artefact => "artefact",
            Reason::Duplicate => "duplicate",
            Reason::Alias => "alias",
            Reason::TooLarge => "too-large",
            Reason::Unstable => "unstable",
            Reason::Other => "other",
        }
    }

    pub fn parse(s: &str) -> Option<Reason> {
        ALL_REASONS.iter().copied().find(|r| r.name() == s)
    }
}

/// A vetter's decision on one candidate. Only `Rejected` takes a candidate
/// out of its system.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub enum Decision {
    #[default]
    Open,
    Kept,
    Rejected(Reason),
    Parked,
}

impl Decision {
    pub fn name(self) -> &'static str {
        match self {
            Decision::Open => "open",
            Decision::Kept => "kept",
            Decision::Rejected(_) => "rejected",
            Decision::Parked => "parked",
        }
    }

    pub fn is_rejected(self) -> bool {
        matches!(self, Decision::Rejected(_))
    }

    pub fn reason(self) -> Option<Reason> {
        match self {
            Decision::Rejected(r) => Some(r),
            _ => None,
        }
    }
}

impl fmt::Display for Decision {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Decision::Rejected(r) => write!(f, "rejected ({})", r.name()),
            d => f.write_str(d.name()),
        }
    }
}
