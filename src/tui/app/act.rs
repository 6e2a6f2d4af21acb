//! What each action does in each mode: the one dispatcher `update` hands
//! an [`Action`] to.

use super::*;

impl App {
    pub(super) fn act(&mut self, a: Action) -> Vec<Effect> {
        // Overlays and prompts take their keys first.
        match (&self.mode, a) {
            (Mode::Help, Action::Close | Action::Help | Action::Quit) => {
                self.mode = Mode::Normal;
                return Vec::new();
            }
            (Mode::Help, _) => {
                // The overlay scrolls; the draw clamps the offset.
                let h = &mut self.help_scroll;
                match a {
                    Action::Down => *h += 1,
                    Action::PageDown => *h += self.page,
                    Action::Up => *h = h.saturating_sub(1),
                    Action::PageUp => *h = h.saturating_sub(self.page),
                    Action::Top => *h = 0,
                    _ => {}
                }
                return Vec::new();
            }
            (Mode::Prompt { .. }, Action::Close) => {
                self.mode = Mode::Normal;
                return Vec::new();
            }
            (Mode::Prompt { kind, line, .. }, Action::Select) => {
                let (kind, text) = (*kind, line.text.clone());
                match kind {
                    PromptKind::Filter => match Filter::parse(&text) {
                        Ok(f) => {
                            self.filter = f;
                            self.mode = Mode::Normal;
                            remember(&mut self.filter_history, &text);
                            self.refresh_view();
                            self.message = Some(if text.trim().is_empty() {
                                format!("no filter: all {} systems", self.stars.len())
                            } else {
                                format!(
                                    "filter {}: {} systems match",
                                    text.trim(),
                                    self.stars.len()
                                )
                            });
                        }
                        Err(e) => {
                            if let Mode::Prompt { error, .. } = &mut self.mode {
                                *error = Some(e);
                            }
                        }
                    },
                    // An empty find changes nothing (the filter stays).
                    PromptKind::Find => {
                        self.mode = Mode::Normal;
                        if !text.trim().is_empty() {
                            remember(&mut self.find_history, &text);
                            self.jump_fuzzy(&text, true);
                            self.focus = Pane::Candidates;
                        }
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
                            note: String::new(),
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
                        note: String::new(),
                    };
                }
                return Vec::new();
            }
            (Mode::Confirm { decision, note, .. }, _) => {
                let (d, note) = (*decision, note.clone());
                match a {
                    Action::Select => {
                        self.mode = Mode::Normal;
                        self.apply_bulk(d, &note);
                    }
                    Action::Close | Action::Quit => self.mode = Mode::Normal,
                    _ => {}
                }
                return Vec::new();
            }
            (
                Mode::Reasons {
                    selected,
                    bulk,
                    note,
                },
                _,
            ) => {
                let (sel, bulk, note) = (*selected, *bulk, note.clone());
                let reasons = |selected| Mode::Reasons {
                    selected,
                    bulk,
                    note: note.clone(),
                };
                match a {
                    Action::Up => self.mode = reasons(sel.saturating_sub(1)),
                    Action::Down => self.mode = reasons((sel + 1).min(ALL_REASONS.len() - 1)),
                    Action::Select if bulk => {
                        let d = Decision::Rejected(ALL_REASONS[sel]);
                        self.mode = Mode::Confirm {
                            decision: d,
                            count: self.bulk_targets(d).len(),
                            note,
                        };
                    }
                    Action::Select => {
                        self.mode = Mode::Normal;
                        let note = note.trim();
                        self.decide(
                            Decision::Rejected(ALL_REASONS[sel]),
                            (!note.is_empty()).then_some(note),
                        );
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
            Action::Help => {
                self.mode = Mode::Help;
                self.help_scroll = 0;
            }
            Action::Close => {}
            Action::Find => {
                self.mode = Mode::Prompt {
                    kind: PromptKind::Find,
                    line: LineEdit::default(),
                    error: None,
                    recall: None,
                }
            }
            Action::Filter => {
                // The filter in effect, selected: typing replaces it,
                // Right or End keeps it for editing.
                self.mode = Mode::Prompt {
                    kind: PromptKind::Filter,
                    line: LineEdit::selected(&self.filter.text),
                    error: None,
                    recall: None,
                }
            }
            // In the candidates pane the sort keys order the members.
            Action::SortNext if self.focus == Pane::Candidates => {
                let keep = self.candidate();
                let all = CandidateSort::ALL;
                let i = all.iter().position(|k| *k == self.cand_sort).unwrap_or(0);
                self.cand_sort = all[(i + 1) % all.len()];
                self.keep_candidate(keep);
            }
            Action::SortReverse if self.focus == Pane::Candidates => {
                let keep = self.candidate();
                self.cand_descending = !self.cand_descending;
                self.keep_candidate(keep);
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
            Action::Keep => self.decide(Decision::Kept, None),
            Action::Park => self.decide(Decision::Parked, None),
            Action::Reopen => self.decide(Decision::Open, None),
            Action::Reject => {
                if self.candidate().is_some() {
                    self.mode = Mode::Reasons {
                        selected: 0,
                        bulk: false,
                        note: String::new(),
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
            Action::SignalView => self.signal_view = self.signal_view.next(),
            Action::ApplyToFilter => {
                // What the filter matches must be what it will match: not
                // on values or checks yet to come.
                let waits = if self.values != Values::In
                    && crate::selection::reads_values(&self.filter)
                {
                    Some("catalogue values, which are not read yet")
                } else if self.verdicts_withheld() && crate::selection::reads_checks(&self.filter) {
                    Some("flags or verdicts, which the checks have not given yet")
                } else {
                    None
                };
                if self.filter.is_empty() {
                    self.message = Some(
                        "set a filter first: a decision applies to every candidate it matches"
                            .into(),
                    );
                } else if let Some(what) = waits {
                    self.message = Some(format!(
                        "the filter reads {what}: a decision for all it matches waits for them"
                    ));
                } else {
                    self.mode = Mode::Bulk;
                }
            }
            Action::WriteFigure => {
                if self.checks_failed {
                    // A figure states the verdict: never without its evidence.
                    self.message =
                        Some("no figure: the checks could not run, so there is no verdict".into());
                } else if self.checks_pending {
                    self.message = Some(
                        "the checks are still running: the figure waits for the verdict they give"
                            .into(),
                    );
                } else if let Some(c) = self.candidate() {
                    self.message = Some(format!(
                        "drawing the figure of {}…",
                        crate::sanitize::clean(self.cat.candidate_id(c))
                    ));
                    return vec![Effect::WriteFigure(c)];
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
}

/// How many filters and finds are remembered per catalogue.
const HISTORY_KEPT: usize = 50;

/// Adds an entry to a prompt's history (newest last, no repeats, bounded).
fn remember(history: &mut Vec<String>, text: &str) {
    let t = text.trim();
    if t.is_empty() {
        return;
    }
    history.retain(|h| h != t);
    history.push(t.to_string());
    if history.len() > HISTORY_KEPT {
        history.remove(0);
    }
}
