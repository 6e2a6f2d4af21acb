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

/// Every action once: its name in key maps and the line the help shows, in
/// the enum's order (a test holds the two together). Default keys live in
/// `keymaps/default.toml`; every hint on screen asks the key map in effect.
const TABLE: [(Action, &str, &str); 31] = [
    (Action::Quit, "quit", "leave the browser"),
    (Action::Help, "help", "show these keys"),
    (Action::Find, "find", "fuzzy-find a star or candidate by id"),
    (
        Action::Filter,
        "filter",
        "filter the systems (e.g. odds>=100 flag:echo decision:open)",
    ),
    (
        Action::SortNext,
        "sort-next",
        "sort by the next column (systems, or the candidates of a system)",
    ),
    (
        Action::SortReverse,
        "sort-reverse",
        "reverse the sort of the pane",
    ),
    (Action::Keep, "keep", "keep the candidate"),
    (
        Action::Reject,
        "reject",
        "reject the candidate (pick a reason)",
    ),
    (Action::Park, "park", "park the candidate (needs more data)"),
    (Action::Reopen, "reopen", "reopen the candidate"),
    (Action::Undo, "undo", "undo the last decision"),
    (Action::Redo, "redo", "redo an undone decision"),
    (Action::Up, "up", "move up"),
    (Action::Down, "down", "move down"),
    (Action::PageUp, "page-up", "move a page up"),
    (Action::PageDown, "page-down", "move a page down"),
    (Action::Top, "top", "go to the first row"),
    (Action::Bottom, "bottom", "go to the last row"),
    (Action::NextPane, "next-pane", "next pane"),
    (Action::PrevPane, "prev-pane", "previous pane"),
    (
        Action::Select,
        "select",
        "open the selected system / accept the prompt",
    ),
    (Action::NextOpen, "next-open", "next open candidate"),
    (Action::PrevOpen, "prev-open", "previous open candidate"),
    (Action::NextFlagged, "next-flagged", "next star with a flag"),
    (
        Action::ToggleAdvance,
        "toggle-advance",
        "advance to the next open candidate after a decision (on/off)",
    ),
    (
        Action::CopyId,
        "copy-id",
        "copy the selected id to the clipboard (OSC 52)",
    ),
    (
        Action::WriteFigure,
        "write-figure",
        "write the selected candidate's one-page figure (SVG) into starsift-figures/",
    ),
    (
        Action::ShowLedger,
        "show-ledger",
        "show the ledger history of the selected system instead of its facts (and back)",
    ),
    (
        Action::SignalView,
        "signal-view",
        "signal pane: all transits, odd beside even, or the secondary window (cycles)",
    ),
    (
        Action::ApplyToFilter,
        "apply-to-filter",
        "apply one decision to every candidate matching the filter (asks first)",
    ),
    (Action::Close, "close", "close a prompt or overlay"),
];

impl Action {
    pub const ALL: [Action; 31] = {
        let mut all = [Action::Quit; 31];
        let mut i = 0;
        while i < TABLE.len() {
            all[i] = TABLE[i].0;
            i += 1;
        }
        all
    };

    pub fn name(self) -> &'static str {
        TABLE[self as usize].1
    }

    pub fn describe(self) -> &'static str {
        TABLE[self as usize].2
    }

    pub fn from_name(s: &str) -> Option<Action> {
        Action::ALL.into_iter().find(|a| a.name() == s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_table_follows_the_enum() {
        for (i, (a, name, _)) in TABLE.iter().enumerate() {
            assert_eq!(*a as usize, i, "{name}");
            assert_eq!(Action::from_name(name), Some(*a));
        }
    }
}
