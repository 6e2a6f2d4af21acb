//! What a filter selects: each candidate as the filter sees it, read from
//! the catalogue, the live odds, the checks and the vetters' disagreements.
//! One candidate at a time (`Selection::selects`) or, for a catalogue
//! column, 64 at a time (`Selection::clause_bits`). The browser's view and
//! the headless commands' `--where` both read it.

use std::collections::HashSet;

use crate::catalogue::{CandidateId, Catalogue, Field, StarId};
use crate::checks::Checks;
use crate::decision::Reason;
use crate::flags::Flag;
use crate::odds::{Live, Verdict};
use crate::query::{Clause, Filter, NumField, Subject, compare_bits};

/// What the filter reads, borrowed; `Sync`, so a filter can run on several
/// threads.
pub struct Selection<'a> {
    pub cat: &'a Catalogue,
    pub live: &'a Live,
    pub checks: &'a Checks,
    /// Planet radii by candidate (`planet_radii`), or empty when no clause
    /// reads them (`needs_radii`).
    pub radii: &'a [f64],
    /// Candidates whose vetters' latest decisions differ.
    pub disagree: &'a HashSet<CandidateId>,
    /// True while the checks have not given their evidence (the browser
    /// before they arrive, or after they failed): no candidate's verdict
    /// is validated then, and a filter on it finds none.
    pub withheld: bool,
}

impl Selection<'_> {
    /// Whether the filter holds for candidate `c`.
    pub fn selects(&self, filter: &Filter, c: CandidateId) -> bool {
        filter.matches(&self.row(c, self.cat.star_of(c)))
    }

    /// Candidate `c` of star `star` as the filter sees it.
    pub fn row(&self, c: CandidateId, star: StarId) -> Row<'_> {
        Row { app: self, c, star }
    }

    /// Which of the candidates `cands` (at most 64; bit i for the i-th) the
    /// clause holds for, among those set in `live`. Catalogue columns are
    /// compared 64 values at a time; other clauses read one candidate
    /// after another.
    pub fn clause_bits(&self, clause: &Clause, cands: std::ops::Range<usize>, live: u64) -> u64 {
        if let Clause::Compare(f, op, v) = *clause {
            if f == NumField::Radius {
                return (self.radii.get(cands)).map_or(0, |r| compare_bits(r, op, v, true));
            }
            if let Some(field) = column_field(f) {
                return self.cat.column(field).map_or(0, |col| {
                    let mut values = [0.0; 64];
                    let n = col.read_into(cands, &mut values);
                    compare_bits(&values[..n], op, v, false)
                });
            }
        }
        let mut out = 0;
        let mut rest = live;
        while rest != 0 {
            let i = rest.trailing_zeros();
            let c = (cands.start + i as usize) as CandidateId;
            out |= (clause.holds(&self.row(c, self.cat.star_of(c))) as u64) << i;
            rest &= rest - 1;
        }
        out
    }
}

/// The candidates of the catalogue among the ledger's disagreements (by
/// candidate id; ids the catalogue lacks are left out).
pub fn disagreeing<V>(
    cat: &Catalogue,
    disagreements: &std::collections::BTreeMap<String, V>,
) -> HashSet<CandidateId> {
    disagreements
        .keys()
        .filter_map(|id| cat.find_candidate(id))
        .collect()
}

/// The candidates `filter` selects, in file order (all without a filter).
pub fn selected(
    cat: &Catalogue,
    live: &Live,
    checks: &Checks,
    disagree: &HashSet<CandidateId>,
    filter: Option<&Filter>,
) -> Vec<CandidateId> {
    let all = 0..cat.len() as CandidateId;
    let Some(filter) = filter else {
        return all.collect();
    };
    let radii = if needs_radii(filter) {
        crate::checks::planet_radii(cat)
    } else {
        Vec::new()
    };
    let selection = Selection {
        cat,
        live,
        checks,
        radii: &radii,
        disagree,
        withheld: false,
    };
    all.filter(|&c| selection.selects(filter, c)).collect()
}

/// Whether a filter compares planet radii (which `planet_radii` computes).
pub fn needs_radii(filter: &Filter) -> bool {
    filter
        .clauses
        .iter()
        .any(|c| matches!(c, Clause::Compare(NumField::Radius, ..)))
}

/// Whether a filter reads the catalogue's values (a column, or the planet
/// radius made from them), which the browser reads after the ids.
pub fn reads_values(filter: &Filter) -> bool {
    filter.clauses.iter().any(|c| {
        matches!(c, Clause::Compare(f, ..) if *f == NumField::Radius || column_field(*f).is_some())
    })
}

/// Whether a filter reads what the checks give (a flag, a verdict), which
/// the browser has only once they have run.
pub fn reads_checks(filter: &Filter) -> bool {
    (filter.clauses.iter()).any(|c| matches!(c, Clause::Flag(..) | Clause::Verdict(..)))
}

/// The catalogue column a numeric filter field reads, if it is one.
pub fn column_field(f: NumField) -> Option<Field> {
    Some(match f {
        NumField::Period => Field::PeriodD,
        NumField::Depth => Field::DepthPpm,
        NumField::Duration => Field::DurationH,
        NumField::Snr => Field::Snr,
        NumField::Mag => Field::Mag,
        NumField::Teff => Field::StarTeffK,
        NumField::Impact => Field::Impact,
        _ => return None,
    })
}

/// One candidate as the filter sees it, with its star (known to the caller:
/// one random read fewer per candidate).
pub struct Row<'a> {
    app: &'a Selection<'a>,
    c: CandidateId,
    star: StarId,
}

impl Subject for Row<'_> {
    fn number(&self, f: NumField) -> Option<f64> {
        let (a, c) = (self.app, self.c);
        if let Some(field) = column_field(f) {
            return a.cat.value(field, c);
        }
        match f {
            NumField::Odds => a.live.odds(c),
            NumField::Probability => a.live.probability(c),
            NumField::Radius => a.radii.get(c as usize).copied().filter(|r| r.is_finite()),
            NumField::K => Some(a.live.k(c) as f64),
            NumField::Boost => a.live.boost(c),
            NumField::Prior => Some(a.live.prior(c)),
            // The catalogue columns, read above.
            _ => None,
        }
    }
    fn has_flag(&self, f: Flag) -> bool {
        self.app.checks.flags(self.c).contains(f) || self.app.checks.warnings(self.c).contains(f)
    }
    fn decision(&self) -> &'static str {
        self.app.live.decision(self.c).name()
    }
    fn reason(&self) -> Option<Reason> {
        self.app.live.decision(self.c).reason()
    }
    fn verdict(&self) -> Option<Verdict> {
        let v = self.app.live.verdict(self.c);
        (!(self.app.withheld && v == Verdict::Validated)).then_some(v)
    }
    fn star(&self) -> &str {
        self.app.cat.star_id(self.star)
    }
    fn id(&self) -> &str {
        self.app.cat.candidate_id(self.c)
    }
    fn disagreed(&self) -> bool {
        self.app.disagree.contains(&self.c)
    }
}
