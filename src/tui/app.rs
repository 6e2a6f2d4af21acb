//! The browser's state and its one verb list: every key becomes an
//! [`Action`], and only [`App::update`] changes state. Nothing here touches
//! the terminal, so every action is testable without one.

use std::collections::{HashMap, HashSet};

use fuzzy_matcher::FuzzyMatcher;
use fuzzy_matcher::skim::SkimMatcherV2;

use crate::catalogue::{CandidateId, Catalogue, Field, StarId};
use crate::checks::Checks;
use crate::decision::{ALL_REASONS, Decision, Reason};
use crate::flags::{Flag, FlagSet};
use crate::ledger::{Ledger, NewDecision};
use crate::lightcurve::analysis::{Binned, Diagnostics};
use crate::odds::{Live, Verdict};
use crate::query::{Filter, NumField, ParseError, Subject};

/// Everything a person can do.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Action {
    Quit,
    Help,
    Find,
    Filter,
    SortNext,
    SortReverse,
    Keep,
    Reject,
    Park,
    Reopen,
    Undo,
    Redo,
    Up,
    Down,
    PageUp,
    PageDown,
    Top,
    Bottom,
    NextPane,
    PrevPane,
    Select,
    NextOpen,
    PrevOpen,
    NextFlagged,
    ToggleAdvance,
    CopyId,
    ShowLedger,
    ApplyToFilter,
    Close,
}

impl Action {
    pub const ALL: [Action; 29] = [
        Action::Quit,
        Action::Help,
        Action::Find,
        Action::Filter,
        Action::SortNext,
        Action::SortReverse,
        Action::Keep,
        Action::Reject,
        Action::Park,
        Action::Reopen,
        Action::Undo,
        Action::Redo,
        Action::Up,
        Action::Down,
        Action::PageUp,
        Action::PageDown,
        Action::Top,
        Action::Bottom,
        Action::NextPane,
        Action::PrevPane,
        Action::Select,
        Action::NextOpen,
        Action::PrevOpen,
        Action::NextFlagged,
        Action::ToggleAdvance,
        Action::CopyId,
        Action::ShowLedger,
        Action::ApplyToFilter,
        Action::Close,
    ];

    pub fn name(self) -> &'static str {
        match self {
            Action::Quit => "quit",
            Action::Help => "help",
            Action::Find => "find",
            Action::Filter => "filter",
            Action::SortNext => "sort-next",
            Action::SortReverse => "sort-reverse",
            Action::Keep => "keep",
            Action::Reject => "reject",
            Action::Park => "park",
            Action::Reopen => "reopen",
            Action::Undo => "undo",
            Action::Redo => "redo",
            Action::Up => "up",
            Action::Down => "down",
            Action::PageUp => "page-up",
            Action::PageDown => "page-down",
            Action::Top => "top",
            Action::Bottom => "bottom",
            Action::NextPane => "next-pane",
            Action::PrevPane => "prev-pane",
            Action::Select => "select",
            Action::NextOpen => "next-open",
            Action::PrevOpen => "prev-open",
            Action::NextFlagged => "next-flagged",
            Action::ToggleAdvance => "toggle-advance",
            Action::CopyId => "copy-id",
            Action::ShowLedger => "show-ledger",
            Action::ApplyToFilter => "apply-to-filter",
            Action::Close => "close",
        }
    }

    pub fn describe(self) -> &'static str {
        match self {
            Action::Quit => "leave the browser",
            Action::Help => "show these keys",
            Action::Find => "fuzzy-find a star or candidate by id",
            Action::Filter => "filter the systems (e.g. odds>=100 flag:echo decision:open)",
            Action::SortNext => "sort systems by the next column",
            Action::SortReverse => "reverse the sort",
            Action::Keep => "keep the candidate",
            Action::Reject => "reject the candidate (pick a reason)",
            Action::Park => "park the candidate (needs more data)",
            Action::Reopen => "reopen the candidate",
            Action::Undo => "undo the last decision",
            Action::Redo => "redo an undone decision",
            Action::Up => "move up",
            Action::Down => "move down",
            Action::PageUp => "move a page up",
            Action::PageDown => "move a page down",
            Action::Top => "go to the first row",
            Action::Bottom => "go to the last row",
            Action::NextPane => "next pane",
            Action::PrevPane => "previous pane",
            Action::Select => "open the selected system / accept the prompt",
            Action::NextOpen => "next open candidate",
            Action::PrevOpen => "previous open candidate",
            Action::NextFlagged => "next star with a flag",
            Action::ToggleAdvance => "advance to the next open candidate after a decision (on/off)",
            Action::CopyId => "copy the selected id to the clipboard (OSC 52)",
            Action::ShowLedger => {
                "show the ledger history of the selected system instead of its facts (and back)"
            }
            Action::ApplyToFilter => {
                "apply one decision to every candidate matching the filter (asks first)"
            }
            Action::Close => "close a prompt or overlay",
        }
    }

    pub fn from_name(s: &str) -> Option<Action> {
        Action::ALL.into_iter().find(|a| a.name() == s)
    }
}

/// Typed input the keymap does not own (prompt text), and results of
/// background work.
#[derive(Clone, Debug)]
pub enum Input {
    Action(Action),
    Char(char),
    Backspace,
    /// A light-curve result from the background worker.
    Signal(CandidateId, Box<SignalResult>),
    /// The checks, run on a background thread at start-up.
    Checks(Box<Checks>),
    Resize,
}

/// What the background worker found for a candidate.
#[derive(Clone, Debug, PartialEq)]
pub enum SignalResult {
    Data {
        binned: Binned,
        diagnostics: Box<Diagnostics>,
        source: String,
    },
    /// No light curve: the model is drawn.
    Model(String),
}

/// What the shell must do after an update.
#[derive(Clone, Debug, PartialEq)]
pub enum Effect {
    Quit,
    /// Put this text on the clipboard (OSC 52).
    Copy(String),
    /// Compute the light-curve result of this candidate.
    LoadSignal(CandidateId),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Pane {
    Systems,
    Candidates,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum PromptKind {
    Filter,
    Find,
}

#[derive(Clone, Debug, PartialEq)]
pub enum Mode {
    Normal,
    Prompt {
        kind: PromptKind,
        text: String,
        error: Option<ParseError>,
    },
    /// Choosing a rejection reason (index into ALL_REASONS); for every
    /// candidate matching the filter when `bulk`.
    Reasons {
        selected: usize,
        bulk: bool,
    },
    /// Choosing the decision for every candidate matching the filter.
    Bulk,
    /// Asking before a decision is applied to `count` candidates.
    Confirm {
        decision: Decision,
        count: usize,
    },
    Help,
}

/// How the systems are ordered.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SortKey {
    BestOdds,
    Multiplicity,
    Flags,
    Star,
    Period,
}

impl SortKey {
    const ALL: [SortKey; 5] = [
        SortKey::BestOdds,
        SortKey::Multiplicity,
        SortKey::Flags,
        SortKey::Star,
        SortKey::Period,
    ];

    pub fn name(self) -> &'static str {
        match self {
            SortKey::BestOdds => "best odds",
            SortKey::Multiplicity => "k",
            SortKey::Flags => "flags",
            SortKey::Star => "star",
            SortKey::Period => "shortest period",
        }
    }
}

/// Where a vetter was in a catalogue, remembered between sessions.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Position {
    pub candidate: Option<String>,
    pub filter: String,
    pub sort: String,
    pub descending: bool,
    pub candidates_pane: bool,
}

/// An f64 as a u64 whose unsigned order is the float's total order.
fn sortable_bits(x: f64) -> u64 {
    let b = x.to_bits();
    if b >> 63 == 1 { !b } else { b | 1 << 63 }
}

/// Stable LSD radix sort of (key, star) pairs by key, 16 bits a pass.
fn radix_sort(v: &mut Vec<(u64, StarId)>) {
    if v.len() < 256 {
        v.sort_by_key(|e| e.0);
        return;
    }
    let mut tmp = vec![(0u64, 0 as StarId); v.len()];
    for pass in 0..4 {
        let shift = pass * 16;
        // Skip a pass where every key has the same 16 bits.
        let first = (v[0].0 >> shift) & 0xffff;
        if v.iter().all(|e| (e.0 >> shift) & 0xffff == first) {
            continue;
        }
        let mut count = vec![0usize; 1 << 16];
        for e in v.iter() {
            count[((e.0 >> shift) & 0xffff) as usize] += 1;
        }
        let mut at = 0;
        for c in count.iter_mut() {
            let n = *c;
            *c = at;
            at += n;
        }
        for &e in v.iter() {
            let b = ((e.0 >> shift) & 0xffff) as usize;
            tmp[count[b]] = e;
            count[b] += 1;
        }
        std::mem::swap(v, &mut tmp);
    }
}

/// A decision as made and as undone.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Step {
    candidate: CandidateId,
    before: Decision,
    after: Decision,
    ledger_id: Option<i64>,
}

/// The whole browser state.
pub struct App {
    pub cat: std::sync::Arc<Catalogue>,
    pub live: Live,
    pub checks: Checks,
    /// Planet radii, computed on first use (only a `radius` filter needs them all).
    radius: std::cell::OnceCell<Vec<f64>>,
    id_rank: std::cell::OnceCell<Vec<u32>>,
    pub ledger: Option<Ledger>,
    pub ledger_path: String,
    pub vetter: String,
    pub disagree: HashSet<CandidateId>,
    /// The stars shown, filtered and sorted: an index vector.
    pub stars: Vec<StarId>,
    pub star_row: usize,
    pub cand_row: usize,
    pub focus: Pane,
    pub filter: Filter,
    pub sort: SortKey,
    pub descending: bool,
    pub mode: Mode,
    undo: Vec<Step>,
    redo: Vec<Step>,
    pub message: Option<String>,
    pub advance: bool,
    pub signals: HashMap<CandidateId, SignalResult>,
    pending: HashSet<CandidateId>,
    pub page: usize,
    pub keymap: super::keymap::Keymap,
    /// The star a decision was just made on stays in view, whatever the
    /// filter now says, until the selection leaves it.
    pinned: Option<StarId>,
    /// The lower-left pane shows the ledger history instead of the facts.
    pub show_ledger: bool,
    /// True until the background checks have arrived.
    pub checks_pending: bool,
    /// The ledger history of the selected star (all vetters), oldest first.
    pub history: Vec<crate::ledger::Entry>,
    history_of: Option<StarId>,
}

/// One candidate as the filter sees it.
struct Row<'a> {
    app: &'a App,
    c: CandidateId,
}

impl Subject for Row<'_> {
    fn number(&self, f: NumField) -> Option<f64> {
        let (a, c) = (self.app, self.c);
        let v = |field| a.cat.value(field, c);
        match f {
            NumField::Odds => a.live.odds(c),
            NumField::Probability => a.live.probability(c),
            NumField::Period => v(Field::PeriodD),
            NumField::Depth => v(Field::DepthPpm),
            NumField::Duration => v(Field::DurationH),
            NumField::Snr => v(Field::Snr),
            NumField::Radius => Some(a.radii()[c as usize]).filter(|r| r.is_finite()),
            NumField::K => Some(a.live.k(c) as f64),
            NumField::Boost => a.live.boost(c),
            NumField::Prior => Some(a.live.prior(c)),
            NumField::Mag => v(Field::Mag),
            NumField::Teff => v(Field::StarTeffK),
            NumField::Impact => v(Field::Impact),
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
    fn verdict(&self) -> Verdict {
        self.app.live.verdict(self.c)
    }
    fn star(&self) -> &str {
        self.app.cat.star_id(self.app.cat.star_of(self.c))
    }
    fn id(&self) -> &str {
        self.app.cat.candidate_id(self.c)
    }
    fn disagreed(&self) -> bool {
        self.app.disagree.contains(&self.c)
    }
}

impl App {
    pub fn new(
        cat: std::sync::Arc<Catalogue>,
        live: Live,
        checks: Checks,
        ledger: Option<Ledger>,
        vetter: String,
        keymap: super::keymap::Keymap,
    ) -> App {
        let ledger_path = ledger
            .as_ref()
            .map_or("none (decisions in memory)".into(), |l| {
                l.path().display().to_string()
            });
        let disagree = ledger
            .as_ref()
            .and_then(|l| l.disagreements().ok())
            .map(|d| d.keys().filter_map(|id| cat.find_candidate(id)).collect())
            .unwrap_or_default();
        let mut app = App {
            cat,
            live,
            checks,
            radius: std::cell::OnceCell::new(),
            id_rank: std::cell::OnceCell::new(),
            ledger,
            ledger_path,
            vetter,
            disagree,
            stars: Vec::new(),
            star_row: 0,
            cand_row: 0,
            focus: Pane::Systems,
            filter: Filter::default(),
            sort: SortKey::BestOdds,
            descending: true,
            mode: Mode::Normal,
            undo: Vec::new(),
            redo: Vec::new(),
            message: None,
            advance: true,
            signals: HashMap::new(),
            pending: HashSet::new(),
            page: 10,
            keymap,
            pinned: None,
            show_ledger: false,
            checks_pending: false,
            history: Vec::new(),
            history_of: None,
        };
        app.refresh_view();
        app
    }

    fn radii(&self) -> &[f64] {
        self.radius.get_or_init(|| {
            let settings = crate::checks::CheckSettings::default();
            (0..self.cat.len() as CandidateId)
                .map(|c| {
                    crate::checks::derive(&self.cat, c, &settings)
                        .radius_rearth
                        .unwrap_or(f64::NAN)
                })
                .collect()
        })
    }

    /// The sort key of a star (larger first when descending).
    fn sort_key(&self, s: StarId) -> f64 {
        match self.sort {
            SortKey::BestOdds => self.best_odds(s).unwrap_or(-1.0),
            SortKey::Multiplicity => self
                .cat
                .members(s)
                .iter()
                .filter(|&&c| self.live.k(c) > 0)
                .count() as f64,
            SortKey::Flags => self.star_flags(s).iter().count() as f64,
            SortKey::Star => 0.0,
            SortKey::Period => self
                .cat
                .members(s)
                .iter()
                .filter_map(|&c| self.cat.value(Field::PeriodD, c))
                .fold(f64::INFINITY, f64::min),
        }
    }

    /// Each star's place in id order, computed once: sorting compares
    /// integers, not strings.
    fn id_rank(&self) -> &[u32] {
        self.id_rank.get_or_init(|| {
            let mut order: Vec<StarId> = (0..self.cat.star_count() as StarId).collect();
            order.sort_unstable_by(|&a, &b| self.cat.star_id(a).cmp(self.cat.star_id(b)));
            let mut rank = vec![0u32; order.len()];
            for (r, &s) in order.iter().enumerate() {
                rank[s as usize] = r as u32;
            }
            rank
        })
    }

    /// Orders (key, star) pairs: by key, then in catalogue order (by id for
    /// the id sort).
    fn order(&self, a: &(f64, StarId), b: &(f64, StarId)) -> std::cmp::Ordering {
        let by_key = a.0.total_cmp(&b.0);
        let by_key = if self.descending {
            by_key.reverse()
        } else {
            by_key
        };
        match self.sort {
            SortKey::Star => {
                let rank = self.id_rank();
                let by_id = rank[a.1 as usize].cmp(&rank[b.1 as usize]);
                if self.descending {
                    by_id.reverse()
                } else {
                    by_id
                }
            }
            // Ties keep catalogue order: cheap, and the same every time.
            _ => by_key.then(a.1.cmp(&b.1)),
        }
    }

    /// After a decision on star `s`: only its place in the view changes
    /// (every other star of the same size moves with the same factor, so the
    /// order among them holds); O(log n) to find, one memmove to move.
    fn reposition(&mut self, s: StarId) {
        if let Some(i) = self.stars.iter().position(|&x| x == s) {
            self.stars.remove(i);
        }
        let key = (self.sort_key(s), s);
        let at = self.stars.partition_point(|&x| {
            self.order(&(self.sort_key(x), x), &key) == std::cmp::Ordering::Less
        });
        self.stars.insert(at, s);
        self.star_row = at;
    }

    /// Where the vetter is now.
    pub fn position(&self) -> Position {
        Position {
            candidate: self
                .candidate()
                .map(|c| self.cat.candidate_id(c).to_string()),
            filter: self.filter.text.clone(),
            sort: self.sort.name().to_string(),
            descending: self.descending,
            candidates_pane: self.focus == Pane::Candidates,
        }
    }

    /// Returns to a remembered position; what no longer applies (a filter
    /// that does not parse, a candidate that is gone) is passed over.
    pub fn restore(&mut self, p: &Position) {
        if let Some(k) = SortKey::ALL.into_iter().find(|k| k.name() == p.sort) {
            self.sort = k;
        }
        self.descending = p.descending;
        if let Ok(f) = Filter::parse(&p.filter) {
            self.filter = f;
        }
        self.refresh_view();
        if let Some(c) = p
            .candidate
            .as_deref()
            .and_then(|id| self.cat.find_candidate(id))
        {
            self.go_to(c);
        }
        self.focus = if p.candidates_pane {
            Pane::Candidates
        } else {
            Pane::Systems
        };
    }

    /// The selected star, if any is shown.
    pub fn star(&self) -> Option<StarId> {
        self.stars.get(self.star_row).copied()
    }

    /// The members of the selected star.
    pub fn members(&self) -> &[CandidateId] {
        self.star().map_or(&[], |s| self.cat.members(s))
    }

    /// The selected candidate.
    pub fn candidate(&self) -> Option<CandidateId> {
        self.members().get(self.cand_row).copied()
    }

    fn matches(&self, c: CandidateId) -> bool {
        self.filter.matches(&Row { app: self, c })
    }

    /// The best (largest) odds among a star's non-rejected candidates.
    pub fn best_odds(&self, s: StarId) -> Option<f64> {
        self.cat
            .members(s)
            .iter()
            .filter_map(|&c| self.live.odds(c))
            .reduce(f64::max)
    }

    pub fn star_flags(&self, s: StarId) -> FlagSet {
        self.cat
            .members(s)
            .iter()
            .map(|&c| self.checks.flags(c))
            .fold(FlagSet::EMPTY, |a, b| {
                let mut out = a;
                b.iter().for_each(|f| out.insert(f));
                out
            })
    }

    /// Rebuilds the index vector of shown stars from the filter and sort,
    /// keeping the selection on the same star where it is still shown.
    pub fn refresh_view(&mut self) {
        let keep = self.star();
        if self.pinned != keep {
            self.pinned = None;
        }
        let stars: Vec<StarId> = (0..self.cat.star_count() as StarId)
            .filter(|&s| {
                self.filter.is_empty()
                    || Some(s) == self.pinned
                    || self.cat.members(s).iter().any(|&c| self.matches(c))
            })
            .collect();
        // Keys as order-preserving integers, then a stable radix sort: ties
        // keep catalogue order, exactly as `order` says.
        let mut keyed: Vec<(u64, StarId)> = stars
            .iter()
            .map(|&s| {
                let k = match self.sort {
                    SortKey::Star => self.id_rank()[s as usize] as u64,
                    _ => sortable_bits(self.sort_key(s)),
                };
                (if self.descending { !k } else { k }, s)
            })
            .collect();
        radix_sort(&mut keyed);
        self.stars = keyed.into_iter().map(|(_, s)| s).collect();
        self.star_row = keep
            .and_then(|k| self.stars.iter().position(|&s| s == k))
            .unwrap_or(0)
            .min(self.stars.len().saturating_sub(1));
        self.cand_row = self.cand_row.min(self.members().len().saturating_sub(1));
    }

    /// Applies one input; returns what the shell must do.
    pub fn update(&mut self, input: Input) -> Vec<Effect> {
        let before = self.candidate();
        let mut effects = match input {
            Input::Signal(c, result) => {
                self.pending.remove(&c);
                self.signals.insert(c, *result);
                Vec::new()
            }
            Input::Resize => Vec::new(),
            Input::Checks(checks) => {
                self.apply_checks(*checks);
                Vec::new()
            }
            Input::Char(ch) => {
                self.type_char(ch);
                Vec::new()
            }
            Input::Backspace => {
                if let Mode::Prompt { text, .. } = &mut self.mode {
                    text.pop();
                }
                self.prompt_changed();
                Vec::new()
            }
            Input::Action(a) => self.act(a),
        };
        self.refresh_history(false);
        if let Some(c) = self.candidate() {
            if (before != Some(c) || !self.signals.contains_key(&c))
                && !self.pending.contains(&c)
                && !self.signals.contains_key(&c)
            {
                self.pending.insert(c);
                effects.push(Effect::LoadSignal(c));
            }
        }
        effects
    }

    /// Reloads the selected star's ledger history when the star changed (or
    /// when forced, after a decision).
    fn refresh_history(&mut self, force: bool) {
        let star = self.star();
        if !force && star == self.history_of {
            return;
        }
        self.history_of = star;
        self.history = match (star, self.ledger.as_ref()) {
            (Some(s), Some(l)) => {
                let ids: Vec<&str> = self
                    .cat
                    .members(s)
                    .iter()
                    .map(|&c| self.cat.candidate_id(c))
                    .collect();
                let mut h: Vec<crate::ledger::Entry> = Vec::new();
                for id in ids {
                    h.extend(l.history(Some(id)).unwrap_or_default());
                }
                h.sort_by_key(|e| e.id);
                h
            }
            _ => Vec::new(),
        };
    }

    /// True while the light-curve result of `c` is being computed.
    pub fn loading(&self, c: CandidateId) -> bool {
        self.pending.contains(&c)
    }

    fn type_char(&mut self, ch: char) {
        if let Mode::Prompt { text, .. } = &mut self.mode {
            text.push(ch);
            self.prompt_changed();
        }
    }

    /// Live feedback while typing: filter errors at their position, fuzzy
    /// jumps as the text grows.
    fn prompt_changed(&mut self) {
        if let Mode::Prompt { kind, text, error } = &mut self.mode {
            match kind {
                PromptKind::Filter => *error = Filter::parse(text).err(),
                PromptKind::Find => {
                    let t = text.clone();
                    self.jump_fuzzy(&t);
                }
            }
        }
    }

    fn jump_fuzzy(&mut self, text: &str) {
        if text.is_empty() {
            return;
        }
        let matcher = SkimMatcherV2::default();
        let best = (0..self.cat.len() as CandidateId)
            .filter_map(|c| {
                matcher
                    .fuzzy_match(self.cat.candidate_id(c), text)
                    .map(|score| (score, c))
            })
            .max_by(|a, b| a.0.cmp(&b.0).then(b.1.cmp(&a.1)));
        if let Some((_, c)) = best {
            self.go_to(c);
        }
    }

    /// Selects a candidate, clearing a filter that hides it.
    pub fn go_to(&mut self, c: CandidateId) {
        let s = self.cat.star_of(c);
        if !self.stars.contains(&s) {
            self.filter = Filter::default();
            self.refresh_view();
        }
        if let Some(row) = self.stars.iter().position(|&x| x == s) {
            self.star_row = row;
            self.cand_row = self
                .cat
                .members(s)
                .iter()
                .position(|&m| m == c)
                .unwrap_or(0);
        }
    }

    fn act(&mut self, a: Action) -> Vec<Effect> {
        // Overlays and prompts take their keys first.
        match (&self.mode, a) {
            (Mode::Help, Action::Close | Action::Help | Action::Quit) => {
                self.mode = Mode::Normal;
                return Vec::new();
            }
            (Mode::Help, _) => return Vec::new(),
            (Mode::Prompt { .. }, Action::Close) => {
                self.mode = Mode::Normal;
                return Vec::new();
            }
            (Mode::Prompt { kind, text, .. }, Action::Select) => {
                let (kind, text) = (*kind, text.clone());
                match kind {
                    PromptKind::Filter => match Filter::parse(&text) {
                        Ok(f) => {
                            self.filter = f;
                            self.mode = Mode::Normal;
                            self.refresh_view();
                            self.message = Some(format!("{} systems match", self.stars.len()));
                        }
                        Err(e) => {
                            self.mode = Mode::Prompt {
                                kind,
                                text,
                                error: Some(e),
                            };
                        }
                    },
                    PromptKind::Find => {
                        self.jump_fuzzy(&text);
                        self.mode = Mode::Normal;
                        self.focus = Pane::Candidates;
                    }
                }
                return Vec::new();
            }
            (Mode::Prompt { .. }, _) => return Vec::new(),
            (Mode::Bulk, _) => {
                let d = match a {
                    Action::Keep => Some(Decision::Kept),
                    Action::Park => Some(Decision::Parked),
                    Action::Reopen => Some(Decision::Open),
                    Action::Reject => {
                        self.mode = Mode::Reasons {
                            selected: 0,
                            bulk: true,
                        };
                        None
                    }
                    Action::Close | Action::Quit => {
                        self.mode = Mode::Normal;
                        None
                    }
                    _ => None,
                };
                if let Some(d) = d {
                    self.mode = Mode::Confirm {
                        decision: d,
                        count: self.bulk_targets(d).len(),
                    };
                }
                return Vec::new();
            }
            (Mode::Confirm { decision, .. }, _) => {
                let d = *decision;
                match a {
                    Action::Select => {
                        self.mode = Mode::Normal;
                        self.apply_bulk(d);
                    }
                    Action::Close | Action::Quit => self.mode = Mode::Normal,
                    _ => {}
                }
                return Vec::new();
            }
            (Mode::Reasons { selected, bulk }, _) => {
                let (sel, bulk) = (*selected, *bulk);
                match a {
                    Action::Up => {
                        self.mode = Mode::Reasons {
                            selected: sel.saturating_sub(1),
                            bulk,
                        }
                    }
                    Action::Down => {
                        self.mode = Mode::Reasons {
                            selected: (sel + 1).min(ALL_REASONS.len() - 1),
                            bulk,
                        }
                    }
                    Action::Select | Action::Reject if bulk => {
                        let d = Decision::Rejected(ALL_REASONS[sel]);
                        self.mode = Mode::Confirm {
                            decision: d,
                            count: self.bulk_targets(d).len(),
                        };
                    }
                    Action::Select | Action::Reject => {
                        self.mode = Mode::Normal;
                        self.decide(Decision::Rejected(ALL_REASONS[sel]));
                    }
                    Action::Close | Action::Quit => self.mode = Mode::Normal,
                    _ => {}
                }
                return Vec::new();
            }
            (Mode::Normal, _) => {}
        }
        self.message = None;
        let rows = match self.focus {
            Pane::Systems => self.stars.len(),
            Pane::Candidates => self.members().len(),
        };
        let moved = |app: &mut App, to: usize| match app.focus {
            Pane::Systems => {
                app.star_row = to.min(rows.saturating_sub(1));
                app.cand_row = 0;
            }
            Pane::Candidates => app.cand_row = to.min(rows.saturating_sub(1)),
        };
        let cur = match self.focus {
            Pane::Systems => self.star_row,
            Pane::Candidates => self.cand_row,
        };
        match a {
            Action::Quit => return vec![Effect::Quit],
            Action::Help => self.mode = Mode::Help,
            Action::Close => {}
            Action::Find => {
                self.mode = Mode::Prompt {
                    kind: PromptKind::Find,
                    text: String::new(),
                    error: None,
                }
            }
            Action::Filter => {
                self.mode = Mode::Prompt {
                    kind: PromptKind::Filter,
                    text: self.filter.text.clone(),
                    error: None,
                }
            }
            Action::SortNext => {
                let i = SortKey::ALL
                    .iter()
                    .position(|k| *k == self.sort)
                    .unwrap_or(0);
                self.sort = SortKey::ALL[(i + 1) % SortKey::ALL.len()];
                self.refresh_view();
            }
            Action::SortReverse => {
                self.descending = !self.descending;
                self.refresh_view();
            }
            Action::Up => moved(self, cur.saturating_sub(1)),
            Action::Down => moved(self, cur + 1),
            Action::PageUp => moved(self, cur.saturating_sub(self.page)),
            Action::PageDown => moved(self, cur + self.page),
            Action::Top => moved(self, 0),
            Action::Bottom => moved(self, rows.saturating_sub(1)),
            Action::NextPane | Action::PrevPane => {
                self.focus = if self.focus == Pane::Systems {
                    Pane::Candidates
                } else {
                    Pane::Systems
                }
            }
            Action::Select => {
                if self.focus == Pane::Systems {
                    self.focus = Pane::Candidates;
                }
            }
            Action::Keep => self.decide(Decision::Kept),
            Action::Park => self.decide(Decision::Parked),
            Action::Reopen => self.decide(Decision::Open),
            Action::Reject => {
                if self.candidate().is_some() {
                    self.mode = Mode::Reasons {
                        selected: 0,
                        bulk: false,
                    };
                }
            }
            Action::Undo => self.undo(),
            Action::Redo => self.redo(),
            Action::NextOpen => self.next_open(true),
            Action::PrevOpen => self.next_open(false),
            Action::NextFlagged => self.next_flagged(),
            Action::ToggleAdvance => {
                self.advance = !self.advance;
                self.message = Some(format!(
                    "advance after a decision: {}",
                    if self.advance { "on" } else { "off" }
                ));
            }
            Action::ShowLedger => self.show_ledger = !self.show_ledger,
            Action::ApplyToFilter => {
                if self.filter.is_empty() {
                    self.message = Some(
                        "set a filter first: a decision applies to every candidate it matches"
                            .into(),
                    );
                } else {
                    self.mode = Mode::Bulk;
                }
            }
            Action::CopyId => {
                let id = match self.focus {
                    Pane::Systems => self.star().map(|s| self.cat.star_id(s).to_string()),
                    Pane::Candidates => self
                        .candidate()
                        .map(|c| self.cat.candidate_id(c).to_string()),
                };
                if let Some(id) = id {
                    self.message = Some(format!("copied {}", crate::sanitize::clean(&id)));
                    return vec![Effect::Copy(id)];
                }
            }
        }
        Vec::new()
    }

    /// Takes the checks' results: flags feed the verdicts from now on.
    pub fn apply_checks(&mut self, checks: Checks) {
        let decisions: Vec<Decision> = (0..self.cat.len() as CandidateId)
            .map(|c| self.live.decision(c))
            .collect();
        match Live::with_state(
            &self.cat,
            self.live.model().clone(),
            checks.all_flags().to_vec(),
            decisions,
        ) {
            Ok(live) => self.live = live,
            Err(e) => self.message = Some(format!("checks not applied: {e}")),
        }
        self.checks = checks;
        self.checks_pending = false;
        self.refresh_view();
    }

    /// The candidates a bulk decision would change: those matching the
    /// filter whose decision is not already `d`.
    pub fn bulk_targets(&self, d: Decision) -> Vec<CandidateId> {
        (0..self.cat.len() as CandidateId)
            .filter(|&c| self.live.decision(c) != d && self.matches(c))
            .collect()
    }

    /// Applies one decision to every candidate matching the filter, in one
    /// ledger transaction (all or nothing), then to the state.
    fn apply_bulk(&mut self, d: Decision) {
        let targets = self.bulk_targets(d);
        let mut ids: Vec<Option<i64>> = vec![None; targets.len()];
        if let Some(ledger) = self.ledger.as_mut() {
            let cat = &self.cat;
            let rows: Vec<NewDecision> = targets
                .iter()
                .map(|&c| NewDecision {
                    candidate: cat.candidate_id(c),
                    star: cat.star_id(cat.star_of(c)),
                    vetter: &self.vetter,
                    decision: d,
                    note: Some("applied to every candidate matching the filter"),
                    undoes: None,
                })
                .collect();
            match ledger.record_all(&rows) {
                Ok(written) => ids = written.into_iter().map(Some).collect(),
                Err(e) => {
                    self.message = Some(format!("NOT SAVED: {e}"));
                    return;
                }
            }
        }
        for (&c, id) in targets.iter().zip(ids) {
            let before = self.live.decision(c);
            self.live.set_decision(c, d);
            self.undo.push(Step {
                candidate: c,
                before,
                after: d,
                ledger_id: id,
            });
        }
        self.redo.clear();
        self.refresh_view();
        self.refresh_history(true);
        self.message = Some(format!(
            "{d} applied to {} candidates matching [{}]",
            targets.len(),
            self.filter.text
        ));
    }

    /// Records a decision: the ledger first, then the state, then the odds.
    fn decide(&mut self, d: Decision) {
        let Some(c) = self.candidate() else { return };
        let before = self.live.decision(c);
        match self.record(c, d, None) {
            Ok(id) => {
                self.undo.push(Step {
                    candidate: c,
                    before,
                    after: d,
                    ledger_id: id,
                });
                self.redo.clear();
                self.after_decision(c, d);
                if self.advance {
                    self.next_open(true);
                }
            }
            Err(e) => self.message = Some(format!("NOT SAVED: {e}")),
        }
    }

    fn record(
        &mut self,
        c: CandidateId,
        d: Decision,
        undoes: Option<i64>,
    ) -> Result<Option<i64>, String> {
        let Some(ledger) = self.ledger.as_mut() else {
            return Ok(None);
        };
        let cat = &self.cat;
        ledger
            .record(&NewDecision {
                candidate: cat.candidate_id(c),
                star: cat.star_id(cat.star_of(c)),
                vetter: &self.vetter,
                decision: d,
                note: None,
                undoes,
            })
            .map(Some)
            .map_err(|e| e.to_string())
    }

    fn after_decision(&mut self, c: CandidateId, d: Decision) {
        self.live.set_decision(c, d);
        let s = self.cat.star_of(c);
        self.pinned = Some(s);
        self.message = Some(format!(
            "{} {}",
            crate::sanitize::clean(self.cat.candidate_id(c)),
            d
        ));
        let row = self.cand_row;
        self.reposition(s);
        self.cand_row = row.min(self.members().len().saturating_sub(1));
        self.refresh_history(true);
    }

    fn undo(&mut self) {
        let Some(step) = self.undo.pop() else {
            self.message = Some("nothing to undo".into());
            return;
        };
        match self.record(step.candidate, step.before, step.ledger_id) {
            Ok(_) => {
                self.after_decision(step.candidate, step.before);
                self.message = Some(format!(
                    "undone: {}",
                    crate::sanitize::clean(self.cat.candidate_id(step.candidate))
                ));
                self.go_to(step.candidate);
                self.redo.push(step);
            }
            Err(e) => {
                self.undo.push(step);
                self.message = Some(format!("NOT SAVED: {e}"));
            }
        }
    }

    fn redo(&mut self) {
        let Some(step) = self.redo.pop() else {
            self.message = Some("nothing to redo".into());
            return;
        };
        match self.record(step.candidate, step.after, None) {
            Ok(id) => {
                self.after_decision(step.candidate, step.after);
                self.go_to(step.candidate);
                self.undo.push(Step {
                    ledger_id: id,
                    ..step
                });
            }
            Err(e) => {
                self.redo.push(step);
                self.message = Some(format!("NOT SAVED: {e}"));
            }
        }
    }

    /// Moves to the next (or previous) open candidate in view order,
    /// looking star by star from the selection (no pass over the whole view).
    fn next_open(&mut self, forward: bool) {
        let n = self.stars.len();
        if n == 0 {
            return;
        }
        for step in 0..=n {
            let row = if forward {
                (self.star_row + step) % n
            } else {
                (self.star_row + n - step % n) % n
            };
            let members = self.cat.members(self.stars[row]);
            let m = members.len();
            let picks: Vec<usize> = match (step, forward) {
                (0, true) => (self.cand_row + 1..m).collect(),
                (0, false) => (0..self.cand_row.min(m)).rev().collect(),
                (_, true) => (0..m).collect(),
                (_, false) => (0..m).rev().collect(),
            };
            if let Some(&i) = picks
                .iter()
                .find(|&&i| self.live.decision(members[i]) == Decision::Open)
            {
                self.star_row = row;
                self.cand_row = i;
                self.focus = Pane::Candidates;
                return;
            }
        }
        self.message = Some("no open candidate left in view".into());
    }

    fn next_flagged(&mut self) {
        let n = self.stars.len();
        for step in 1..=n {
            let row = (self.star_row + step) % n;
            if !self.star_flags(self.stars[row]).is_empty() {
                self.star_row = row;
                self.cand_row = 0;
                return;
            }
        }
        self.message = Some("no flagged star in view".into());
    }

    /// The siblings' odds if the selected candidate were rejected.
    pub fn what_if(&self) -> Vec<(CandidateId, usize, f64)> {
        self.candidate()
            .map_or_else(Vec::new, |c| self.live.what_if_rejected(c))
    }
}

#[cfg(test)]
mod sort_tests {
    use super::*;

    #[test]
    fn radix_sort_is_a_stable_sort_by_key() {
        let mut rng = crate::demo::Rng::new(8);
        let keys = [-3.5, -0.0, 0.0, 1.0, 1.0, 2.5, f64::MAX, -1e300, 7.25];
        let mut v: Vec<(u64, StarId)> = (0..5000u32)
            .map(|i| {
                (
                    sortable_bits(keys[rng.below(keys.len() as u64) as usize]),
                    i,
                )
            })
            .collect();
        let mut want = v.clone();
        want.sort_by_key(|e| e.0); // std's sort_by_key is stable
        radix_sort(&mut v);
        assert_eq!(v, want);
        // The bits keep the float order.
        let mut f = keys.to_vec();
        f.sort_by(f64::total_cmp);
        assert!(
            f.windows(2)
                .all(|w| sortable_bits(w[0]) <= sortable_bits(w[1]))
        );
    }
}
