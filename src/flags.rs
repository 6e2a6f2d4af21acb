//! Diagnostic flags: the warning signs a check can raise on a candidate, and
//! a small set type for them.

use std::fmt;

/// A diagnostic that fired (DESIGN.md vocabulary).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Flag {
    BigRadius,
    OddEven,
    Secondary,
    VShape,
    DensityMismatch,
    NearTwin,
    Harmonic,
    Crowded,
    Echo,
    LowSnr,
    HalfPhase,
    NotRecovered,
    MixedHost,
    KnownFp,
    Ellipsoidal,
    KnownArtefact,
}

pub const ALL_FLAGS: [Flag; 16] = [
    Flag::BigRadius,
    Flag::OddEven,
    Flag::Secondary,
    Flag::VShape,
    Flag::DensityMismatch,
    Flag::NearTwin,
    Flag::Harmonic,
    Flag::Crowded,
    Flag::Echo,
    Flag::LowSnr,
    Flag::HalfPhase,
    Flag::NotRecovered,
    Flag::MixedHost,
    Flag::KnownFp,
    Flag::Ellipsoidal,
    Flag::KnownArtefact,
];

impl Flag {
    pub fn name(self) -> &'static str {
        match self {
            Flag::BigRadius => "big-radius",
            Flag::OddEven => "odd-even",
            Flag::Secondary => "secondary",
            Flag::VShape => "v-shape",
            Flag::DensityMismatch => "density-mismatch",
            Flag::NearTwin => "near-twin",
            Flag::Harmonic => "harmonic",
            Flag::Crowded => "crowded",
            Flag::Echo => "echo",
            Flag::LowSnr => "low-snr",
            Flag::HalfPhase => "half-phase",
            Flag::NotRecovered => "not-recovered",
            Flag::MixedHost => "mixed-host",
            Flag::KnownFp => "known-fp",
            Flag::Ellipsoidal => "ellipsoidal",
            Flag::KnownArtefact => "known-artefact",
        }
    }

    pub fn parse(s: &str) -> Option<Flag> {
        ALL_FLAGS.iter().copied().find(|f| f.name() == s)
    }

    fn bit(self) -> u16 {
        1 << (self as u16)
    }
}

impl fmt::Display for Flag {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// A set of flags, as bits.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash)]
pub struct FlagSet(u16);

impl FlagSet {
    pub const EMPTY: FlagSet = FlagSet(0);

    /// The flags that keep a candidate out of the count and from
    /// `validated` by default (docs/science.md §4): every firm sign that the
    /// signal is not an independent planet of this star. Only `v-shape`
    /// (grazing planets are V-shaped too) stays out by default.
    pub fn default_blocking() -> FlagSet {
        [
            Flag::BigRadius,
            Flag::Secondary,
            Flag::OddEven,
            Flag::Echo,
            Flag::Crowded,
            Flag::LowSnr,
            Flag::NearTwin,
            Flag::Harmonic,
            Flag::HalfPhase,
            Flag::DensityMismatch,
            Flag::NotRecovered,
            Flag::MixedHost,
            Flag::KnownFp,
            Flag::Ellipsoidal,
            Flag::KnownArtefact,
        ]
        .into_iter()
        .collect()
    }

    /// The flags that name a candidate a false positive of its own star
    /// beyond doubt, not a copy, not noise and not a test's chance
    /// excursion (docs/science.md §1.1): known from the catalogue, an
    /// eclipse deeper than any planet's occultation, a body larger than any
    /// planet, light varying with the orbit more than any planet can make
    /// it. A star with one is a star known to host a false positive,
    /// and its other candidates are held back. `odd-even` (a depth
    /// difference at 3σ, which real planets reach by chance; at 5σ with
    /// both eclipses present the diagnostics add `secondary`) and `echo`
    /// (another star's light) hold back only the candidate itself.
    pub fn false_positive_signs() -> FlagSet {
        [
            Flag::KnownFp,
            Flag::Secondary,
            Flag::BigRadius,
            Flag::Ellipsoidal,
        ]
        .into_iter()
        .collect()
    }

    /// The flags that say a candidate is itself no planet of its star: the
    /// [`false_positive_signs`](Self::false_positive_signs), `known-artefact`
    /// (the catalogue's own "not transit-like") and `echo` as a blocking
    /// flag (the shallower copy of a neighbour's eclipse, within the echo
    /// radius: light from another star, which says nothing of this star's
    /// other candidates). A held candidate with one of them among the
    /// blocking flags is `unlikely`, its odds at most 1:1 (docs/science.md
    /// §1.1).
    pub fn not_a_planet() -> FlagSet {
        let mut set = FlagSet::false_positive_signs();
        set.insert(Flag::KnownArtefact);
        set.insert(Flag::Echo);
        set
    }

    /// The flags that mark a candidate as a copy of another signal of its
    /// star (one member of a signal group that is not its representative).
    pub fn group_flags() -> FlagSet {
        [Flag::NearTwin, Flag::Harmonic, Flag::HalfPhase]
            .into_iter()
            .collect()
    }

    pub fn insert(&mut self, f: Flag) {
        self.0 |= f.bit();
    }

    pub fn contains(self, f: Flag) -> bool {
        self.0 & f.bit() != 0
    }

    pub fn intersects(self, other: FlagSet) -> bool {
        self.0 & other.0 != 0
    }

    /// The flags in both sets.
    pub fn intersection(self, other: FlagSet) -> FlagSet {
        FlagSet(self.0 & other.0)
    }

    /// The flags of `self` not in `other`.
    pub fn difference(self, other: FlagSet) -> FlagSet {
        FlagSet(self.0 & !other.0)
    }

    /// Every flag in either set.
    pub fn union(self, other: FlagSet) -> FlagSet {
        FlagSet(self.0 | other.0)
    }

    /// How many flags are set.
    pub fn len(self) -> usize {
        self.0.count_ones() as usize
    }

    pub fn is_empty(self) -> bool {
        self.0 == 0
    }

    pub fn iter(self) -> impl Iterator<Item = Flag> {
        ALL_FLAGS.into_iter().filter(move |f| self.contains(*f))
    }

    /// [`FlagSet::joined`] appended to a string.
    pub fn push_joined(self, sep: &str, out: &mut String) {
        for (i, f) in self.iter().enumerate() {
            if i > 0 {
                out.push_str(sep);
            }
            out.push_str(f.name());
        }
    }

    /// `a;b;c`, as in CSV exports.
    pub fn joined(self, sep: &str) -> String {
        let mut s = String::new();
        self.push_joined(sep, &mut s);
        s
    }

    /// Parses a comma-separated list of flag names.
    pub fn parse_list(s: &str) -> Result<FlagSet, String> {
        let mut set = FlagSet::EMPTY;
        for name in s.split(',').map(str::trim).filter(|n| !n.is_empty()) {
            let f = Flag::parse(name).ok_or_else(|| {
                format!(
                    "unknown flag `{name}`; known: {}",
                    ALL_FLAGS.map(Flag::name).join(", ")
                )
            })?;
            set.insert(f);
        }
        Ok(set)
    }
}

impl FromIterator<Flag> for FlagSet {
    fn from_iter<I: IntoIterator<Item = Flag>>(iter: I) -> FlagSet {
        let mut s = FlagSet::EMPTY;
        for f in iter {
            s.insert(f);
        }
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip_and_sets() {
        for f in ALL_FLAGS {
            assert_eq!(Flag::parse(f.name()), Some(f));
        }
        let b = FlagSet::default_blocking();
        assert!(b.contains(Flag::Echo) && b.contains(Flag::LowSnr));
        assert!(!b.contains(Flag::VShape));
        assert_eq!(
            b.joined(";"),
            "big-radius;odd-even;secondary;density-mismatch;near-twin;harmonic;crowded;echo;low-snr;half-phase;not-recovered;mixed-host;known-fp;ellipsoidal;known-artefact"
        );
        assert_eq!(
            FlagSet::parse_list("echo, low-snr").unwrap().joined(","),
            "echo,low-snr"
        );
        assert!(
            FlagSet::parse_list("wobbly")
                .unwrap_err()
                .contains("unknown flag `wobbly`")
        );
    }
}
