//! Typed text: the prompts (filter and find, with the line editor and
//! their history) and the reject note; find's jump to an id.

use super::*;

impl App {
    /// True while a prompt or the reason picker's note takes typed text.
    pub fn takes_text(&self) -> bool {
        matches!(self.mode, Mode::Prompt { .. } | Mode::Reasons { .. })
    }

    /// Pasted text: into a prompt or a note up to its length cap, control
    /// characters (a pasted line break) as spaces; outside them it is
    /// ignored, never read as keys.
    pub(super) fn paste(&mut self, pasted: &str) {
        let clean = |c: char| if c.is_control() { ' ' } else { c };
        match &mut self.mode {
            Mode::Prompt { line, .. } => {
                let text: String = pasted.chars().map(clean).collect();
                line.insert(&text, PROMPT_MAX);
                self.prompt_changed();
            }
            Mode::Reasons { note, .. } => {
                let room = NOTE_MAX.saturating_sub(note.chars().count());
                note.extend(pasted.chars().map(clean).take(room));
            }
            _ => {
                self.message = Some("paste ignored: text goes only into a prompt or a note".into());
            }
        }
    }

    pub(super) fn type_char(&mut self, ch: char) {
        match &mut self.mode {
            Mode::Prompt { line, .. } => {
                line.insert(ch.encode_utf8(&mut [0; 4]), PROMPT_MAX);
                self.prompt_changed();
            }
            // A note is one line of plain text.
            Mode::Reasons { note, .. } if !ch.is_control() && note.chars().count() < NOTE_MAX => {
                note.push(ch)
            }
            _ => {}
        }
    }

    /// A line-editing key: in a prompt anywhere in the line; in a note at
    /// its end (the note has no cursor).
    pub(super) fn edit(&mut self, e: Edit) {
        match &mut self.mode {
            Mode::Prompt { line, .. } => {
                line.apply(e);
                self.prompt_changed();
            }
            Mode::Reasons { note, .. } => {
                let mut l = LineEdit::new(note);
                l.apply(e);
                if l.cursor == l.text.chars().count() {
                    *note = l.text;
                }
            }
            _ => {}
        }
    }

    /// Up/Down in a prompt: the previous (or next) filter or find entered,
    /// selected so typing replaces it; past the newest, an empty line.
    pub(super) fn recall(&mut self, up: bool) {
        let Mode::Prompt {
            kind, line, recall, ..
        } = &mut self.mode
        else {
            return;
        };
        let list = match kind {
            PromptKind::Filter => &self.filter_history,
            PromptKind::Find => &self.find_history,
        };
        if list.is_empty() {
            return;
        }
        let next = match (*recall, up) {
            (None, true) => Some(0),
            (None, false) => None,
            (Some(i), true) => Some((i + 1).min(list.len() - 1)),
            (Some(0), false) => None,
            (Some(i), false) => Some(i - 1),
        };
        *recall = next;
        *line = match next {
            Some(i) => LineEdit::selected(&list[list.len() - 1 - i]),
            None => LineEdit::default(),
        };
        self.prompt_changed();
    }

    /// Live feedback while typing: filter errors at their position, fuzzy
    /// jumps as the text grows.
    pub(super) fn prompt_changed(&mut self) {
        if let Mode::Prompt {
            kind, line, error, ..
        } = &mut self.mode
        {
            let text = &line.text;
            match kind {
                PromptKind::Filter => *error = Filter::parse(text).err(),
                PromptKind::Find => {
                    let t = text.clone();
                    self.jump_fuzzy(&t, false);
                }
            }
        }
    }

    /// Jumps to the candidate an id (or part of one) names: an exact
    /// candidate or star id first, then the best id containing the text
    /// (those starting with it first, then the shortest; lower-case text
    /// matches either case), and only then the best fuzzy match (the
    /// skim algorithm of fuzzy-matcher). The fuzzy pass reads every id,
    /// ~0.3 s on a million: while typing it runs on catalogues up to
    /// 100,000 candidates, and on Enter always.
    pub(super) fn jump_fuzzy(&mut self, text: &str, enter: bool) {
        if text.is_empty() {
            return;
        }
        if let Some(c) = self.cat.find_candidate(text) {
            return self.go_to(c);
        }
        if let Some(&c) = self
            .cat
            .find_star(text)
            .and_then(|s| self.cat.members(s).first())
        {
            return self.go_to(c);
        }
        if let Some(c) = self.best_containing(text) {
            return self.go_to(c);
        }
        if !enter && self.cat.len() > 100_000 {
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

    /// The candidate whose id contains `text` best: a prefix before a
    /// match inside, then the shortest id, then file order. Smart case:
    /// text without capitals ignores ASCII case.
    pub(super) fn best_containing(&self, text: &str) -> Option<CandidateId> {
        let ids = self.cat.candidate_ids();
        let fold = !text.bytes().any(|b| b.is_ascii_uppercase());
        let hay = if fold && text.bytes().any(|b| b.is_ascii_alphabetic()) {
            // Built on the first search that needs it: the ids in lower case.
            self.ids_folded
                .get_or_init(|| ids.bytes().to_ascii_lowercase())
                .as_slice()
        } else {
            ids.bytes()
        };
        let mut best: Option<((bool, usize), CandidateId)> = None;
        ids.containing(hay, text.as_bytes(), |c, at| {
            let rank = (at != 0, ids.get(c).len());
            // Ties go to file order: the first found.
            if best.is_none_or(|(b, _)| rank < b) {
                best = Some((rank, c as CandidateId));
            }
        });
        best.map(|(_, c)| c)
    }
}
