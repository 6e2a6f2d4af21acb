//! The candidate catalogue: columnar storage with interned ids, indexed by
//! host star. Loading lives in `load`, the header mapping in `columns`.

mod column;
mod columns;
pub mod formats;
mod load;
mod pool;
pub mod units;

use std::hash::BuildHasher;
use std::sync::Arc;

pub use column::{Column, Decimal};
pub use columns::{
    ColumnMap, ColumnUse, DepthUnit, FIELDS, FPP_PERCENT, Field, Mapping, NUMERIC, REQUIRED,
    percent_by_range,
};
pub use load::{
    LoadOptions, Source, bounded_number, candidate_family, family_key, family_stars, is_missing,
    names_no_star, parse_number, rounded_number, star_key,
};
pub use pool::StrPool;
use serde::Serialize;

/// Why a catalogue could not be loaded at all. Bad rows are not errors: they
/// are skipped and listed in [`Catalogue::skipped`].
#[derive(Debug, thiserror::Error)]
pub enum LoadError {
    #[error("{path}: cannot read: {source}")]
    Io {
        path: String,
        #[source]
        source: std::io::Error,
    },
    #[error("{path}: line {line}: cannot read: {message}")]
    Read {
        path: String,
        line: u64,
        message: String,
    },
    #[error("{path}: the file is empty (no header row)")]
    Empty { path: String },
    #[error("{path}: no candidate rows after the header")]
    NoRows { path: String },
    #[error(
        "{path}: line 1: no column for required field `{field}` \
         (looked for: {synonyms}); header is: {header}. \
         Name the column with --columns FILE (field = \"header\")"
    )]
    MissingColumn {
        path: String,
        field: Field,
        synonyms: String,
        header: String,
    },
    #[error(
        "{path}: line 1: the column map names `{header}` for `{field}`, \
         but the header has no such column; header is: {available}"
    )]
    MappedColumnMissing {
        path: String,
        field: Field,
        header: String,
        available: String,
    },
    #[error("{path}:{line}: column map: {message}")]
    ColumnMap {
        path: String,
        line: usize,
        message: String,
    },
    #[error(
        "{path}: column `{header}`: cannot tell the depth unit (median value {median}); \
         values below 50 could be fractions or percent. Say which with \
         --depth-unit ppm|fraction|percent, or name the column depth_ppm, \
         depth_frac or depth_pct"
    )]
    DepthUnitUnknown {
        path: String,
        header: String,
        median: f64,
    },
    #[error("{path}: {message}")]
    Format { path: String, message: String },
    #[error("{path}: line {line}: the header has {count} columns; at most 65535 are supported")]
    TooManyColumns {
        path: String,
        line: u64,
        count: usize,
    },
}

/// One row that was not loaded, and why.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Skip {
    /// 1-based line in the file where the row starts.
    pub line: u64,
    /// The file's own header for the offending column, if one is to blame.
    pub column: Option<String>,
    pub reason: String,
    /// What the row said of its star, where it said anything a verdict
    /// needs (docs/science.md §3.5): a skipped row may be the one that
    /// calls a candidate of a loaded star a false positive.
    #[serde(skip)]
    pub row: Option<Box<SkippedRow>>,
}

/// What a skipped row said of its star, as the file gave it: the star id
/// (empty, or a placeholder, when the row had none), the candidate's id,
/// and the non-empty cells of the columns that carry earlier verdicts (a
/// disposition, a false-positive flag, `fpp`; [`names_earlier_verdicts`]),
/// by header.
#[derive(Clone, Debug, PartialEq)]
pub struct SkippedRow {
    pub star: String,
    pub candidate: String,
    pub cells: Vec<(String, String)>,
}

/// Index of a candidate (a row that loaded), in file order.
pub type CandidateId = u32;
/// Index of a star, in order of first appearance.
pub type StarId = u32;

/// Which star each candidate orbits and which candidates each star has.
#[derive(Debug)]
pub struct StarIndex {
    /// Star of each candidate.
    pub star_of: Vec<StarId>,
    /// Compressed rows: the members of star s are
    /// `members[member_start[s]..member_start[s + 1]]`, in file order.
    pub member_start: Vec<u32>,
    pub members: Vec<CandidateId>,
}

impl StarIndex {
    pub fn members(&self, s: StarId) -> &[CandidateId] {
        let (a, b) = (
            self.member_start[s as usize] as usize,
            self.member_start[s as usize + 1] as usize,
        );
        &self.members[a..b]
    }

    pub fn star_count(&self) -> usize {
        self.member_start.len() - 1
    }
}

/// A loaded catalogue. Numeric fields are stored as columns of `f64` with
/// `NaN` for a missing value; depths are always ppm.
#[derive(Debug)]
pub struct Catalogue {
    /// Where it came from, as given (a path, or `built-in demo`).
    pub source: String,
    // The ids are shared (`Arc`) with a second read of the same rows
    // (`LoadOptions::ids_from`).
    candidates: Arc<StrPool>,
    stars: Arc<StrPool>,
    index: Arc<StarIndex>,
    num: Vec<Option<Column>>,
    /// By numeric slot: what each value written in the table was
    /// multiplied by to be stored in the field's unit (a unit's
    /// conversion: 10⁴ for a depth in percent, 24 for a duration in
    /// days); 1 when stored as written, NaN when the conversion is no
    /// factor (magnitudes). Empty: every column as written.
    written_scales: Vec<f64>,
    lightcurve: Option<StrPool>,
    extras: Vec<(String, StrPool)>,
    candidate_lookup: Arc<load::IdIndex>,
    star_lookup: Arc<load::IdIndex>,
    hasher: hashbrown::DefaultHashBuilder,
    /// Which header fed which field, in which unit.
    pub columns: Vec<ColumnUse>,
    /// Rows that were not loaded, in file order.
    pub skipped: Vec<Skip>,
    /// What the loader read otherwise than as written (candidate ids
    /// numbered per star), for every output's warnings.
    pub notes: Vec<String>,
    /// Data rows seen (loaded plus skipped).
    pub rows_seen: u64,
    /// Each star by the hash of its id's key (`load::star_key`; the keys
    /// themselves are not kept), built on the first id
    /// [`Catalogue::find_star`] does not find as written.
    star_keys: std::sync::OnceLock<load::IdIndex>,
    /// Each candidate family's one star (`load::family_stars`), built on
    /// the first call of [`Catalogue::star_of_family`].
    families: std::sync::OnceLock<hashbrown::HashMap<Vec<u8>, Option<StarId>>>,
    /// The table format read ("CSV/TSV", "IPAC table", "VOTable"...).
    pub format: &'static str,
    /// Its rows are threshold-crossing events, a pipeline's detections
    /// before vetting, not candidates (`load::events_note`): an event counts
    /// in its star's system only once a vetter keeps it (docs/science.md
    /// §1.1).
    pub events: bool,
}

impl Catalogue {
    pub fn len(&self) -> usize {
        self.index.star_of.len()
    }

    pub fn is_empty(&self) -> bool {
        self.index.star_of.is_empty()
    }

    pub fn star_count(&self) -> usize {
        self.stars.len()
    }

    pub fn candidate_id(&self, c: CandidateId) -> &str {
        self.candidates.get(c as usize)
    }

    /// Every candidate id, end to end in one pool (for substring search).
    pub fn candidate_ids(&self) -> &pool::StrPool {
        &self.candidates
    }

    pub fn star_id(&self, s: StarId) -> &str {
        self.stars.get(s as usize)
    }

    /// Asks the memory for the id of candidate `c`'s star ahead of reading
    /// it, in two steps (see `StrPool::prefetch`).
    #[inline]
    pub fn prefetch_star_id(&self, c: CandidateId, bytes: bool) {
        if let Some(&s) = self.index.star_of.get(c as usize) {
            self.stars.prefetch(s as usize, bytes);
        }
    }

    pub fn star_of(&self, c: CandidateId) -> StarId {
        self.index.star_of[c as usize]
    }

    /// The candidates of one star, in file order.
    pub fn members(&self, s: StarId) -> &[CandidateId] {
        self.index.members(s)
    }

    /// True when `other` holds the same rows as this catalogue: the same
    /// candidates on the same stars in the same order, from as many rows
    /// seen and skipped. Two reads of one unchanged file always do (the
    /// browser's read of the ids, then of the values, `tui::values`).
    pub fn same_rows(&self, other: &Catalogue) -> bool {
        self.rows_seen == other.rows_seen
            && self.skipped.len() == other.skipped.len()
            && self.index.star_of == other.index.star_of
            && self.candidates == other.candidates
            && self.stars == other.stars
    }

    /// The star index, shared (cheaply cloned) with the live odds state.
    pub fn index(&self) -> Arc<StarIndex> {
        Arc::clone(&self.index)
    }

    /// The value of a numeric field, `None` where the column is absent or the
    /// cell was empty.
    #[inline(always)]
    pub fn value(&self, field: Field, c: CandidateId) -> Option<f64> {
        let v = self.column(field)?.get(c as usize);
        (!v.is_nan()).then_some(v)
    }

    /// A value as the decimal it was written as, when it is kept as one
    /// ([`Column::decimal`]): written out without a search for its digits.
    #[inline]
    pub fn decimal(&self, field: Field, c: CandidateId) -> Option<Decimal> {
        self.column(field)?.decimal(c as usize)
    }

    /// A whole numeric column (`NaN` = missing), `None` if the catalogue lacks it.
    #[inline]
    pub fn column(&self, field: Field) -> Option<&Column> {
        self.num[field.num_slot()?].as_ref()
    }

    /// What the table's values of `field` were multiplied by to be stored
    /// (see `written_scales`): the stored value over this is the value
    /// as the table wrote it, to its digits.
    pub fn written_scale(&self, field: Field) -> f64 {
        field
            .num_slot()
            .and_then(|s| self.written_scales.get(s).copied())
            .unwrap_or(1.0)
    }

    pub fn has(&self, field: Field) -> bool {
        match field {
            Field::Lightcurve => self.lightcurve.is_some(),
            Field::Disposition => !self.disposition_columns().is_empty(),
            Field::Star | Field::Candidate => true,
            f => self.column(f).is_some(),
        }
    }

    pub fn lightcurve(&self, c: CandidateId) -> Option<&str> {
        let v = self.lightcurve.as_ref()?.get(c as usize);
        (!v.is_empty()).then_some(v)
    }

    /// Headers of the extra (unmapped) columns, in file order.
    pub fn extra_headers(&self) -> impl Iterator<Item = &str> {
        self.extras.iter().map(|(h, _)| h.as_str())
    }

    pub fn extra(&self, i: usize, c: CandidateId) -> &str {
        self.extras[i].1.get(c as usize)
    }

    /// The extra columns whose header names a star id too (`hostname`
    /// beside `tic_id`: the loader reads the first as the star and keeps
    /// the others), as indices for [`Catalogue::extra`].
    pub fn other_star_id_columns(&self) -> Vec<usize> {
        self.extra_headers()
            .enumerate()
            .filter(|(_, h)| Field::from_header(&columns::header_unit(h).0) == Some(Field::Star))
            .map(|(i, _)| i)
            .collect()
    }

    /// The extra columns that give a disposition, as indices for
    /// [`Catalogue::extra`]: the one mapped to `disposition` and any other
    /// whose header names one (an archive table may carry two, its own and
    /// its pipeline's, and spell them its own way: `TFOPWG Disposition`,
    /// `koi_pdisposition`, `tfopwg_disp`).
    pub fn disposition_columns(&self) -> Vec<usize> {
        let mapped = self
            .columns
            .iter()
            .find(|u| u.field == Field::Disposition.name())
            .map(|u| u.header.as_str());
        self.extras
            .iter()
            .enumerate()
            .filter(|(_, (h, _))| Some(h.as_str()) == mapped || names_a_disposition(h))
            .map(|(i, _)| i)
            .collect()
    }

    /// What every output says of the load: how many rows did not load (the
    /// first with its line and reason), and the loader's notes.
    pub fn load_warnings(&self) -> Vec<String> {
        let skipped = self.skipped.first().map(|first| {
            let n = self.skipped.len();
            format!(
                "{n} row{} skipped; first: line {} ({}); `starsift summary` lists them all",
                if n == 1 { "" } else { "s" },
                first.line,
                first.reason
            )
        });
        skipped
            .into_iter()
            .chain(self.notes.iter().cloned())
            .collect()
    }

    /// An invented catalogue from its text, loaded with the default
    /// options: the unit tests' one way to make one.
    #[cfg(test)]
    pub(crate) fn from_text(name: &str, text: &str) -> Catalogue {
        Catalogue::load(
            Source::Bytes {
                name,
                data: text.as_bytes(),
            },
            &LoadOptions::default(),
        )
        .unwrap()
    }

    pub fn find_candidate(&self, id: &str) -> Option<CandidateId> {
        let h = self.hasher.hash_one(id.as_bytes());
        self.candidate_lookup
            .find(h, |c| self.candidates.get(c as usize) == id)
    }

    /// [`Catalogue::find_candidate`] of each of `ids`, in their order: for
    /// many ids at once (a ledger's), which one sweep of the index finds
    /// sooner than a search each (`IdIndex::find_each`).
    pub fn find_candidates<S: AsRef<str>>(&self, ids: &[S]) -> Vec<Option<CandidateId>> {
        let hashes: Vec<u64> = ids
            .iter()
            .map(|id| self.hasher.hash_one(id.as_ref().as_bytes()))
            .collect();
        let mut found = vec![None; ids.len()];
        for (c, q) in self.candidate_lookup.find_each(&hashes) {
            let q = q as usize;
            if found[q].is_none() && self.candidates.get(c as usize) == ids[q].as_ref() {
                found[q] = Some(c);
            }
        }
        found
    }

    /// The star whose id is `id` exactly as the catalogue spells it.
    fn star_as_written(&self, id: &str) -> Option<StarId> {
        let h = self.hasher.hash_one(id.as_bytes());
        self.star_lookup
            .find(h, |s| self.stars.get(s as usize) == id)
    }

    /// The one star of the loaded candidates of `candidate`'s family
    /// (`TOI-901.01` and `TOI-901.02` for `TOI-901.03`; `load::family_key`):
    /// where a row that names no star belongs. `None` without a family,
    /// or when the family's candidates sit on several stars.
    pub fn star_of_family(&self, candidate: &str) -> Option<StarId> {
        let families = self.families.get_or_init(|| {
            load::family_stars((0..self.len() as CandidateId).filter_map(|c| {
                let star = self.star_of(c);
                // A star of its own says nothing of a family.
                let own = load::is_own_star(self.star_id(star), self.candidate_id(c));
                (!own).then(|| (self.candidate_id(c), star))
            }))
        });
        let mut key = Vec::new();
        load::family_key(candidate, &mut key)
            .then(|| families.get(key.as_slice()).copied().flatten())
            .flatten()
    }

    /// Whether `id` is a star's id exactly as the catalogue spells it.
    pub fn has_star_id(&self, id: &str) -> bool {
        self.star_as_written(id).is_some()
    }

    pub fn find_star(&self, id: &str) -> Option<StarId> {
        self.star_as_written(id).or_else(|| {
            // Another spelling of a star's id (`TIC100` for `TIC 100`):
            // the ledger's or a skipped row's.
            let keys = self.star_keys.get_or_init(|| self.star_key_index());
            let mut key = Vec::new();
            load::star_key(id, &mut key);
            keys.find(self.hasher.hash_one(&key), |s| self.star_key_of(s) == key)
        })
    }

    /// Builds now what [`Catalogue::find_star`] builds on its first id not
    /// found as written (the browser does so in the background, so that
    /// its first search is no wait).
    pub fn prepare_spellings(&self) {
        self.star_keys.get_or_init(|| self.star_key_index());
    }

    /// The key of star s's id (`load::star_key`).
    fn star_key_of(&self, s: StarId) -> Vec<u8> {
        let mut key = Vec::new();
        load::star_key(self.stars.get(s as usize), &mut key);
        key
    }

    /// Every star by the hash of its id's key, in one sorted index: no key
    /// is kept (at 10⁷ stars a map of the keys held half a GB and took
    /// seconds to build, on the browser's first search).
    fn star_key_index(&self) -> load::IdIndex {
        let mut key = Vec::new();
        let hashes: Vec<u64> = (0..self.stars.len())
            .map(|s| {
                load::star_key(self.stars.get(s), &mut key);
                self.hasher.hash_one(&key)
            })
            .collect();
        load::IdIndex::build(&hashes, |a, b| self.star_key_of(a) == self.star_key_of(b)).0
    }

    /// Number of stars with exactly k candidates, indexed by k (index 0 is 0).
    pub fn histogram(&self) -> Vec<usize> {
        let mut h = Vec::new();
        for w in self.index.member_start.windows(2) {
            let k = (w[1] - w[0]) as usize;
            if h.len() <= k {
                h.resize(k + 1, 0);
            }
            h[k] += 1;
        }
        h
    }

    /// Candidates ordered by a numeric field; missing values always last.
    /// Returns an index vector, never copies of rows.
    pub fn sorted_by(&self, field: Field, descending: bool) -> Vec<CandidateId> {
        let Some(col) = self.column(field) else {
            return (0..self.len() as CandidateId).collect();
        };
        let mut keyed: Vec<(f64, CandidateId)> = col
            .iter()
            .enumerate()
            .map(|(i, v)| (v, i as CandidateId))
            .collect();
        keyed.sort_unstable_by(|a, b| match (a.0.is_nan(), b.0.is_nan()) {
            (true, true) => a.1.cmp(&b.1),
            (true, false) => std::cmp::Ordering::Greater,
            (false, true) => std::cmp::Ordering::Less,
            (false, false) => {
                let o = a.0.total_cmp(&b.0);
                if descending { o.reverse() } else { o }.then(a.1.cmp(&b.1))
            }
        });
        keyed.into_iter().map(|(_, i)| i).collect()
    }
}

/// Whether a column carries an earlier verdict on its rows: a disposition
/// (by its header, or mapped to `disposition` by the caller), a
/// false-positive flag, or the mapped `fpp` (docs/science.md §3.5).
pub fn names_earlier_verdicts(header: &str) -> bool {
    names_a_disposition(header) || names_an_fp_flag(header) || names_an_fp_probability(header)
}

/// Whether a column is a false-positive probability by its header: a word
/// `fpp` or `nfpp` (a nearby star's, from memory of the validation tools'
/// outputs), or `false positive prob…`, `fp prob…` (words parted by
/// anything but letters and digits: `FPP`, `fpp_vespa`, `FPP (%)`,
/// `false_positive_probability`). Its errors and limits (`fpp_err`,
/// `e_fpp`, `fpp_upper`) are not. The mapped `fpp` is one; read beside it,
/// the others name false positives too (docs/science.md §3.5).
pub fn names_an_fp_probability(header: &str) -> bool {
    let h = header.to_ascii_lowercase();
    let words: Vec<&str> = h
        .split(|c: char| !c.is_ascii_alphanumeric())
        .filter(|w| !w.is_empty())
        .collect();
    const NOT_THE_VALUE: [&str; 11] = [
        "err", "err1", "err2", "error", "unc", "sigma", "e", "lower", "upper", "lim", "limit",
    ];
    if words.iter().any(|w| NOT_THE_VALUE.contains(w)) {
        return false;
    }
    let prob = |w: &&str| w.starts_with("prob");
    words.iter().any(|w| *w == "fpp" || *w == "nfpp")
        || words
            .windows(3)
            .any(|w| w[0] == "false" && w[1] == "positive" && prob(&w[2]))
        || words.windows(2).any(|w| w[0] == "fp" && prob(&w[1]))
}

/// Whether an extra column is a false-positive flag: an archive table's
/// (`koi_fpflag_ss`, `koi_fpflag_co`... from memory of the archive's
/// column list; `fp_flag`), a header holding `fpflag` or `fp_flag`; or a
/// survey team's own yes/no column named by what it marks, a false
/// positive or an eclipsing binary ([`FLAGGED_AS`]: `is_eb`, `EB_flag`,
/// `false_positive`, `known_fp`, `isFP`), its words (lower case, parted by
/// anything but letters and digits) less [`FLAG_WORDS`] before and after
/// them (`is`, `known`, `flag`...) being exactly one of those names.
/// `binary` alone is not one: a binary host may have planets.
pub fn names_an_fp_flag(header: &str) -> bool {
    let h = header.trim().to_ascii_lowercase();
    if h.contains("fpflag") || h.contains("fp_flag") {
        return true;
    }
    let mut words: Vec<&str> = h
        .split(|c: char| !c.is_ascii_alphanumeric())
        .filter(|w| !w.is_empty())
        .collect();
    // `isfp`, `ebflag`, `knowneb`: a flag word run into the name.
    if let [one] = words.as_slice() {
        let mut w = *one;
        for prefix in FLAG_WORDS {
            w = w.strip_prefix(prefix).unwrap_or(w);
        }
        for suffix in FLAG_WORDS {
            w = w.strip_suffix(suffix).unwrap_or(w);
        }
        return FLAGGED_AS.contains(&w);
    }
    while words.first().is_some_and(|w| FLAG_WORDS.contains(w)) {
        words.remove(0);
    }
    while words.last().is_some_and(|w| FLAG_WORDS.contains(w)) {
        words.pop();
    }
    FLAGGED_AS.contains(&words.join(" ").as_str())
}

/// What a yes/no column may be named for to mark false positives (lower
/// case, words parted by a space): a false positive, or an eclipsing
/// binary, on the target (`eb`) or a nearby, background or hierarchical
/// one (`neb`, `beb`, `heb`: the follow-up groups' codes, from memory).
const FLAGGED_AS: [&str; 9] = [
    "fp",
    "false positive",
    "falsepositive",
    "eb",
    "eclipsing binary",
    "eclipsingbinary",
    "neb",
    "beb",
    "heb",
];

/// Words around a flag's name that say it is a flag (`is_eb`, `eb_flag`,
/// `known_fp`, `likely_eb`: a doubt is enough, as in a disposition).
const FLAG_WORDS: [&str; 8] = [
    "is",
    "known",
    "likely",
    "possible",
    "probable",
    "suspected",
    "flag",
    "flagged",
];

/// Whether a false-positive flag column is the "not transit-like" one
/// (`koi_fpflag_nt`, from memory of the archive's columns): it names no
/// false positive of the star, only a signal that is no transit.
pub fn names_a_not_transit_flag(header: &str) -> bool {
    names_an_fp_flag(header) && header.to_ascii_lowercase().contains("flag_nt")
}

/// Whether a header names a disposition column: one of the field's
/// synonyms, or, in lower case with spaces and `-` as `_`, a name holding
/// `disposition` or `classification`, ending in `_disp`, or with the word
/// `vetting` (`vetting_status`): a survey's own verdict column.
pub fn names_a_disposition(header: &str) -> bool {
    if Field::from_header(header) == Some(Field::Disposition) {
        return true;
    }
    let h: String = header
        .trim()
        .to_ascii_lowercase()
        .chars()
        .map(|c| if c == ' ' || c == '-' { '_' } else { c })
        .collect();
    h.contains("disposition")
        || h.ends_with("_disp")
        || h.contains("classification")
        || h.split('_').any(|w| w == "vetting")
}
