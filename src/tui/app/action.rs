//! Everything a person can do in the browser: the one verb list that keys
//! map to, with the names key maps use and the words the help shows.

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
    WriteFigure,
    ShowLedger,
    SignalView,
    ApplyToFilter,
    Close,
}

impl Action {
    pub const ALL: [Action; 31] = [
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
        Action::WriteFigure,
        Action::ShowLedger,
        Action::SignalView,
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
            Action::WriteFigure => "write-figure",
            Action::ShowLedger => "show-ledger",
            Action::SignalView => "signal-view",
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
            Action::SortNext => "sort by the next column (systems, or the candidates of a system)",
            Action::SortReverse => "reverse the sort of the pane",
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
            Action::WriteFigure => {
                "write the selected candidate's one-page figure (SVG) into starsift-figures/"
            }
            Action::ShowLedger => {
                "show the ledger history of the selected system instead of its facts (and back)"
            }
            Action::SignalView => {
                "signal pane: all transits, odd beside even, or the secondary window (cycles)"
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
