//! The browser's state and its one verb list: every key becomes an
//! [`Action`], and only [`App::update`] changes state. Nothing here touches
//! the terminal, so every action is testable without one.

use std::collections::{HashMap, HashSet};

use fuzzy_matcher::FuzzyMatcher;
use fuzzy_matcher::skim::SkimMatcherV2;

use crate::catalogue::{CandidateId, Catalogue, Field, StarId};
use crate::checks::Checks;
use crate::decision::{ALL_REASONS, Decision};
use crate::flags::FlagSet;
use crate::ledger::{Ledger, NewDecision};
use crate::lightcurve::analysis::Diagnostics;
use crate::odds::Live;
use crate::query::{Clause, Filter, NumField, ParseError};
use crate::selection::{Selection, column_field};
pub use crate::tui::lineedit::{Edit, LineEdit};

mod act;
pub(crate) mod action;
mod decide;
mod order;
mod prompt;
mod team;
mod values;
mod view;
pub use action::Action;
use decide::Step;
pub use order::{CandidateSort, SortKey, static_order};
use order::{
    ORDERS_KEPT, Scratch, id_common_of, id_tie, low_bits_of, sort_keyed, sortable_bits, static_key,
};
pub use values::{OddsAhead, OddsFrom, Values, ValuesIn};

/// The longest filter or find text, characters (a filter is a line, not a
/// file; the cap keeps every keystroke's work bounded).
pub const PROMPT_MAX: usize = 500;
/// The longest note typed in the browser, characters.
pub const NOTE_MAX: usize = 200;

/// Typed input the keymap does not own (prompt text), and results of
/// background work.
#[derive(Clone, Debug)]
pub enum Input {
    Action(Action),
    Char(char),
    /// Text pasted into the terminal (bracketed paste): typed into a prompt
    /// or a note, ignored elsewhere.
    Paste(String),
    Backspace,
    /// A line-editing key in a prompt (or the end of a note).
    Edit(Edit),
    /// Up (true) or Down in a prompt: an earlier filter or find.
    Recall(bool),
    /// A light-curve result from the background worker.
    Signal(CandidateId, Box<SignalResult>),
    /// The checks, run on a background thread at start-up.
    Checks(Box<Checks>),
    /// The checks and the odds built with them on the background thread,
    /// from the decisions of when the checks started (`App::apply_built`).
    ChecksBuilt(Box<(Checks, Result<Live, crate::odds::ModelError>)>),
    /// Orders of the sorts no decision moves (`static_order`), computed on
    /// a background thread at start-up: (sort, descending) and the stars.
    Orders(Vec<((SortKey, bool), Vec<StarId>)>),
    /// The terminal's size (columns, rows): a page is a third of the rows.
    Resize(u16, u16),
    /// The checks started on a background thread.
    ChecksStarted,
    /// The catalogue's fingerprint and stamp, hashed in the background for
    /// a catalogue new to the ledger, to record its sighting (or why the
    /// file could not be read); and its fingerprint as earlier versions
    /// took it, where the ledger's last sighting of it is theirs
    /// (`Ledger::note_catalogue`).
    Seen(Result<(String, String, Option<String>), String>),
    /// A line for the message bar, from a background thread.
    Notice(String),
    /// The ledger read again after another vetter recorded decisions
    /// (`App::take_team`).
    Team(Box<crate::ledger::Decided>),
    /// The background checks stopped without a result: why.
    ChecksFailed(String),
    /// The whole catalogue, read after the table (`App::take_values`), with
    /// the odds its thread built from it, or why it could not be read.
    Values(Result<ValuesIn, String>),
    /// Whole percent of the catalogue's second read done so far.
    ValuesRead(u8),
    /// Light curves checked so far, of how many.
    Progress(usize, usize),
    /// Whole percent of the catalogue checks done so far.
    ChecksDone(u8),
    /// The flags the background checks found so far (a stage finished),
    /// shown until the checks themselves arrive.
    FlagsSoFar(Vec<FlagSet>),
    /// A left click on a list row (with `--mouse`): the pane and the row,
    /// found by the event loop from where the last frame drew the lists.
    Pick(Pane, usize),
    /// The wheel turned over a list: down when true.
    Wheel(Pane, bool),
}

/// Where a frame drew the two lists: the rows' area (below the header) and
/// the index of the first row shown. `draw` returns it; the event loop keeps
/// the last one to turn a click or the wheel into a row.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Hits {
    pub systems: (ratatui::layout::Rect, usize),
    pub candidates: (ratatui::layout::Rect, usize),
}

impl Hits {
    /// The pane and list row under a cell, if it is a row of a list.
    pub fn at(&self, x: u16, y: u16) -> Option<(Pane, usize)> {
        let inside = |(r, first): (ratatui::layout::Rect, usize)| {
            (x >= r.x && x < r.x + r.width && y >= r.y && y < r.y + r.height)
                .then(|| first + (y - r.y) as usize)
        };
        inside(self.systems)
            .map(|i| (Pane::Systems, i))
            .or_else(|| inside(self.candidates).map(|i| (Pane::Candidates, i)))
    }
}

/// What the background worker found for a candidate.
#[derive(Clone, Debug, PartialEq)]
pub enum SignalResult {
    Data {
        views: Box<crate::lightcurve::analysis::Views>,
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
    /// Write this candidate's figure and say where.
    WriteFigure(CandidateId),
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
        line: LineEdit,
        error: Option<ParseError>,
        /// Which earlier entry Up/Down has recalled (0 = the latest).
        recall: Option<usize>,
    },
    /// Choosing a rejection reason (index into ALL_REASONS) and typing an
    /// optional note; for every candidate matching the filter when `bulk`.
    Reasons {
        selected: usize,
        bulk: bool,
        note: String,
    },
    /// Choosing the decision for every candidate matching the filter.
    Bulk,
    /// Asking before a decision is applied to `count` candidates.
    Confirm {
        decision: Decision,
        count: usize,
        note: String,
    },
    Help,
}

/// What the signal pane shows. A tall pane shows the transit fold with the
/// three others in a row beneath it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SignalView {
    /// Every transit folded, the model over it.
    Transit,
    /// Odd and even transits side by side on one scale.
    OddEven,
    /// Half an orbit after the transit, where a secondary eclipse would be.
    Secondary,
}

impl SignalView {
    fn next(self) -> SignalView {
        match self {
            SignalView::Transit => SignalView::OddEven,
            SignalView::OddEven => SignalView::Secondary,
            SignalView::Secondary => SignalView::Transit,
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
    #[serde(default)]
    pub candidate_sort: String,
    #[serde(default)]
    pub candidate_descending: bool,
    /// Filters and finds entered, newest last.
    #[serde(default)]
    pub filters: Vec<String>,
    #[serde(default)]
    pub finds: Vec<String>,
}

/// The whole browser state.
pub struct App {
    pub cat: std::sync::Arc<Catalogue>,
    pub live: Live,
    pub checks: Checks,
    /// Planet radii, computed on first use (only a `radius` filter needs them all).
    radius: std::cell::OnceCell<Vec<f64>>,
    id_common: std::cell::OnceCell<usize>,
    /// The candidate ids in ASCII lower case, for find (built on first use).
    ids_folded: std::cell::OnceCell<Vec<u8>>,
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
    /// The order of the candidates pane.
    pub cand_sort: CandidateSort,
    pub cand_descending: bool,
    pub mode: Mode,
    /// Undo and redo stacks of groups: a bulk decision is one group.
    undo: Vec<Vec<Step>>,
    redo: Vec<Vec<Step>>,
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
    /// What the signal pane shows.
    pub signal_view: SignalView,
    /// The first line of the help overlay shown (it scrolls when taller
    /// than the terminal).
    pub help_scroll: usize,
    /// True until the background checks have arrived.
    pub checks_pending: bool,
    /// True once the checks have failed: no verdict is called validated.
    pub checks_failed: bool,
    /// Whether the catalogue's values are in (`App::take_values`).
    pub values: Values,
    /// The flags the background checks found so far, while they run, and
    /// how many candidates they flag.
    pub flags_so_far: Option<Vec<FlagSet>>,
    pub flagged_so_far: usize,
    /// Light curves checked so far, of how many, while the checks run.
    pub lc_progress: Option<(usize, usize)>,
    /// Whole percent of the catalogue checks done, while they run.
    pub checks_percent: u8,
    /// The ledger history of the selected star (all vetters), oldest first.
    pub history: Vec<crate::ledger::Entry>,
    history_of: Option<StarId>,
    /// Every star in the order of a (sort, descending) pair, kept until a
    /// decision or the checks change the keys: a sort change or a new
    /// filter then costs one pass over the stars, not a sort.
    orders: Vec<((SortKey, bool), Vec<StarId>)>,
    buffers: SortBuffers,
    /// From this many stars on, the filter runs on two threads.
    pub(crate) parallel_from: usize,
    /// Filters and finds entered, newest last (kept per catalogue).
    pub filter_history: Vec<String>,
    pub find_history: Vec<String>,
    /// The newest ledger row the odds hold (`Decided::newest`): the team's
    /// later decisions are read after it (`App::take_team`).
    pub ledger_seen: i64,
    /// The ledger row of each decision made here since the last read of
    /// the team's (`App::take_team` keeps the newer of the two).
    own_writes: HashMap<CandidateId, i64>,
}

/// Memory the sorts of the view reuse.
#[derive(Default)]
struct SortBuffers {
    keys: Vec<u64>,
    scratch: Scratch,
    /// One bit per star: shown by the filter; not decided by the star
    /// alone; shown, from the second thread.
    shown: Vec<u64>,
    undecided: Vec<u64>,
    second: Vec<u64>,
    /// Orders dropped from the cache, to be refilled.
    spare: Vec<Vec<StarId>>,
}

impl App {
    /// The browser over `cat`, with where vetters disagree read from the
    /// ledger.
    pub fn new(
        cat: std::sync::Arc<Catalogue>,
        live: Live,
        checks: Checks,
        ledger: Option<Ledger>,
        vetter: String,
        keymap: super::keymap::Keymap,
    ) -> App {
        let disagree = ledger
            .as_ref()
            .and_then(|l| l.disagreements().ok())
            .map(|d| crate::selection::disagreeing(&cat, &d))
            .unwrap_or_default();
        App::with_disagreements(cat, live, checks, ledger, vetter, keymap, disagree)
    }

    /// [`App::new`] given where vetters disagree (the browser has it from
    /// its one read of the decisions, `Ledger::decided`).
    pub fn with_disagreements(
        cat: std::sync::Arc<Catalogue>,
        live: Live,
        checks: Checks,
        ledger: Option<Ledger>,
        vetter: String,
        keymap: super::keymap::Keymap,
        disagree: HashSet<CandidateId>,
    ) -> App {
        let ledger_path = ledger
            .as_ref()
            .map_or("none (decisions in memory)".into(), |l| {
                l.path().display().to_string()
            });
        let mut app = App {
            cat,
            live,
            checks,
            radius: std::cell::OnceCell::new(),
            id_common: std::cell::OnceCell::new(),
            ids_folded: std::cell::OnceCell::new(),
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
            cand_sort: CandidateSort::File,
            cand_descending: false,
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
            signal_view: SignalView::Transit,
            help_scroll: 0,
            checks_pending: false,
            ledger_seen: 0,
            own_writes: HashMap::new(),
            checks_failed: false,
            values: Values::In,
            flags_so_far: None,
            flagged_so_far: 0,
            lc_progress: None,
            checks_percent: 0,
            history: Vec::new(),
            history_of: None,
            orders: Vec::new(),
            buffers: SortBuffers::default(),
            parallel_from: 100_000,
            filter_history: Vec::new(),
            find_history: Vec::new(),
        };
        app.refresh_view();
        app
    }

    fn radii(&self) -> &[f64] {
        self.radius
            .get_or_init(|| crate::checks::planet_radii(&self.cat))
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
            candidate_sort: self.cand_sort.name().to_string(),
            candidate_descending: self.cand_descending,
            filters: self.filter_history.clone(),
            finds: self.find_history.clone(),
        }
    }

    /// Returns to a remembered position; what no longer applies (a filter
    /// that does not parse, a candidate that is gone) is passed over.
    pub fn restore(&mut self, p: &Position) {
        if let Some(k) = SortKey::ALL.into_iter().find(|k| k.name() == p.sort) {
            self.sort = k;
        }
        self.descending = p.descending;
        if let Some(k) = CandidateSort::ALL
            .into_iter()
            .find(|k| k.name() == p.candidate_sort)
        {
            self.cand_sort = k;
        }
        self.cand_descending = p.candidate_descending;
        self.filter_history = p.filters.clone();
        self.find_history = p.finds.clone();
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

    /// The members of the selected star, in the candidates pane's order.
    pub fn members(&self) -> Vec<CandidateId> {
        self.star().map_or_else(Vec::new, |s| self.members_of(s))
    }

    /// The selected candidate.
    pub fn candidate(&self) -> Option<CandidateId> {
        self.members().get(self.cand_row).copied()
    }

    /// A click selects the row under it (only in the normal mode: an open
    /// overlay or prompt is left alone).
    fn click(&mut self, pane: Pane, row: usize) {
        if self.mode != Mode::Normal {
            return;
        }
        match (pane, row) {
            (Pane::Systems, i) if i < self.stars.len() => {
                self.focus = Pane::Systems;
                if self.star_row != i {
                    self.star_row = i;
                    self.cand_row = 0;
                }
            }
            (Pane::Candidates, i) if i < self.members().len() => {
                self.focus = Pane::Candidates;
                self.cand_row = i;
            }
            _ => {}
        }
    }

    /// The wheel moves the selection of the list under the pointer by three rows.
    fn scroll(&mut self, pane: Pane, down: bool) {
        if self.mode != Mode::Normal {
            return;
        }
        let step = |row: usize, len: usize| {
            if down {
                (row + 3).min(len.saturating_sub(1))
            } else {
                row.saturating_sub(3)
            }
        };
        match pane {
            Pane::Systems => {
                let to = step(self.star_row, self.stars.len());
                if to != self.star_row {
                    self.star_row = to;
                    self.cand_row = 0;
                }
            }
            Pane::Candidates => self.cand_row = step(self.cand_row, self.members().len()),
        }
    }

    /// Keeps the selection on candidate `c` after the members are reordered.
    fn keep_candidate(&mut self, c: Option<CandidateId>) {
        if let Some(c) = c {
            self.cand_row = self.members().iter().position(|&m| m == c).unwrap_or(0);
        }
    }

    /// The filter's view of the App; planet radii are computed first
    /// when the filter asks for them.
    fn shared(&self) -> Selection<'_> {
        Selection {
            cat: &self.cat,
            live: &self.live,
            checks: &self.checks,
            radii: if crate::selection::needs_radii(&self.filter) {
                self.radii()
            } else {
                &[]
            },
            disagree: &self.disagree,
            withheld: self.verdicts_withheld(),
        }
    }

    /// The best (largest) odds among a star's non-rejected candidates.
    pub fn best_odds(&self, s: StarId) -> Option<f64> {
        self.live.best_odds(s)
    }

    pub fn star_flags(&self, s: StarId) -> FlagSet {
        self.cat
            .members(s)
            .iter()
            .fold(FlagSet::EMPTY, |a, &c| a.union(self.flags(c)))
    }

    /// A candidate's flags: those the background checks found so far while
    /// they run, then the checks' own.
    pub fn flags(&self, c: CandidateId) -> FlagSet {
        match &self.flags_so_far {
            Some(f) => f[c as usize],
            None => self.checks.flags(c),
        }
    }

    /// Applies one input; returns what the shell must do. The effects
    /// must reach the shell: a request for the selected candidate's light
    /// curve is made once, and one dropped leaves it "reading" for good.
    #[must_use = "the effects (a light-curve request) must reach the shell"]
    pub fn update(&mut self, input: Input) -> Vec<Effect> {
        let before = self.candidate();
        let mut effects = match input {
            Input::Signal(c, result) => {
                // The worker answers only the latest request: the others
                // are dropped, and asked again if the vetter comes back.
                self.pending.clear();
                self.signals.insert(c, *result);
                Vec::new()
            }
            Input::Resize(_, rows) => {
                self.page = (rows as usize / 3).max(1);
                Vec::new()
            }
            Input::ChecksStarted => {
                self.checks_pending = true;
                Vec::new()
            }
            Input::Seen(seen) => {
                self.record_sighting(seen);
                Vec::new()
            }
            Input::Team(decided) => {
                self.take_team(*decided);
                Vec::new()
            }
            Input::Orders(orders) => {
                for (at, order) in orders {
                    // Cached as the least recently used, while there is room.
                    let known = self.orders.iter().any(|(k, _)| *k == at);
                    if !known
                        && self.orders.len() < ORDERS_KEPT
                        && order.len() == self.cat.star_count()
                    {
                        self.orders.insert(0, (at, order));
                    }
                }
                Vec::new()
            }
            Input::Checks(checks) => {
                self.apply_checks(*checks);
                Vec::new()
            }
            Input::ChecksBuilt(built) => {
                let (checks, live) = *built;
                self.apply_built(checks, live);
                Vec::new()
            }
            Input::Notice(text) => {
                self.message = Some(text);
                Vec::new()
            }
            Input::ChecksDone(percent) => {
                self.checks_percent = percent;
                Vec::new()
            }
            Input::FlagsSoFar(flags) => {
                if self.checks_pending && flags.len() == self.cat.len() {
                    self.flagged_so_far = flags.iter().filter(|f| !f.is_empty()).count();
                    self.flags_so_far = Some(flags);
                    // A sort by flags follows them; no other order moves.
                    self.forget_flag_orders();
                    if self.sort == SortKey::Flags {
                        self.refresh_view();
                    }
                }
                Vec::new()
            }
            Input::Progress(done, total) => {
                self.lc_progress = Some((done, total));
                Vec::new()
            }
            Input::Values(read) => {
                self.take_values(read);
                Vec::new()
            }
            Input::ValuesRead(percent) => {
                if let Values::Reading(p) = &mut self.values {
                    *p = percent;
                }
                Vec::new()
            }
            Input::ChecksFailed(text) => {
                self.checks_fail(text);
                Vec::new()
            }
            Input::Char(ch) => {
                self.type_char(ch);
                Vec::new()
            }
            Input::Paste(text) => {
                self.paste(&text);
                Vec::new()
            }
            Input::Backspace => {
                self.edit(Edit::Backspace);
                Vec::new()
            }
            Input::Edit(e) => {
                self.edit(e);
                Vec::new()
            }
            Input::Recall(up) => {
                self.recall(up);
                Vec::new()
            }
            Input::Action(a) => self.act(a),
            Input::Pick(pane, row) => {
                self.click(pane, row);
                Vec::new()
            }
            Input::Wheel(pane, down) => {
                self.scroll(pane, down);
                Vec::new()
            }
        };
        self.refresh_history(false);
        // A fold needs the catalogue's values: asked for once they are in.
        if let Some(c) = self.candidate().filter(|_| self.values == Values::In)
            && (before != Some(c) || !self.signals.contains_key(&c))
            && !self.pending.contains(&c)
            && !self.signals.contains_key(&c)
        {
            self.pending.insert(c);
            effects.push(Effect::LoadSignal(c));
        }
        effects
    }

    /// True while any light-curve result is being computed.
    pub fn waiting(&self) -> bool {
        !self.pending.is_empty()
    }

    /// True while the light-curve result of `c` is being computed.
    pub fn loading(&self, c: CandidateId) -> bool {
        self.pending.contains(&c)
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
            self.cand_row = self.members_of(s).iter().position(|&m| m == c).unwrap_or(0);
        }
    }

    /// Takes the checks' results: flags feed the verdicts from now on.
    pub fn apply_checks(&mut self, checks: Checks) {
        let decisions = decisions_of(&self.cat, &self.live);
        let live = crate::session::odds_with(
            &self.cat,
            self.live.model().clone(),
            &checks,
            decisions,
            self.live.unseen_fps(),
            self.live.disputes().to_vec(),
        );
        self.apply_built(checks, live);
    }

    /// Takes the checks with the odds built with them
    /// (`crate::session::odds_with`, on
    /// another thread) from the decisions of some moment before: each
    /// decision recorded since is applied to them as the vetter's decisions
    /// always are, so the odds are those of the checks and every decision
    /// now (the incremental path equals the path from nothing: tested).
    pub fn apply_built(&mut self, checks: Checks, live: Result<Live, crate::odds::ModelError>) {
        match live {
            Ok(mut live) => {
                let (asked, links) = self.live.links();
                live.add_links(asked, links.to_vec());
                let since: Vec<_> = (0..self.cat.len() as CandidateId)
                    .map(|c| (c, self.live.decision(c)))
                    .filter(|&(c, now)| live.decision(c) != now)
                    .collect();
                decide::set_decisions(&mut live, &self.cat, &since);
                live.set_disputes(self.live.disputes().to_vec());
                self.live = live;
            }
            Err(e) => self.message = Some(format!("checks not applied: {e}")),
        }
        self.checks = checks;
        self.checks_pending = false;
        self.flags_so_far = None;
        self.forget_orders(true);
        self.refresh_view();
    }

    /// The siblings' odds if the selected candidate were rejected for what
    /// is not a false positive of its star (`duplicate`, `alias`,
    /// `artefact`...). Rejected as one (`eclipsing-binary`, `blend`,
    /// `too-large`), it would hold them back instead, as the what-if line
    /// says.
    pub fn what_if(&self) -> Vec<(CandidateId, usize, f64)> {
        self.candidate().map_or_else(Vec::new, |c| {
            self.live
                .what_if_rejected(c, crate::decision::Reason::Duplicate)
        })
    }
}

/// Every candidate's decision in `live`.
pub fn decisions_of(cat: &Catalogue, live: &Live) -> Vec<Decision> {
    (0..cat.len() as CandidateId)
        .map(|c| live.decision(c))
        .collect()
}
