//! One line of typed text with a cursor, edited as a shell's line editor
//! edits it (the readline/emacs keys: Ctrl-A/E, Ctrl-U/W/K, Alt-B/F), and
//! an optional selection of the whole text so that typing replaces it.

/// An edit of the line.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Edit {
    /// To the start (Home, Ctrl-A).
    Home,
    /// To the end (End, Ctrl-E).
    End,
    Left,
    Right,
    /// A word left (Alt-B).
    WordLeft,
    /// A word right (Alt-F).
    WordRight,
    /// Delete from the start to the cursor (Ctrl-U).
    KillToStart,
    /// Delete the word before the cursor (Ctrl-W).
    KillWord,
    /// Delete from the cursor to the end (Ctrl-K).
    KillToEnd,
    /// Delete the character before the cursor.
    Backspace,
    /// Delete the character under the cursor.
    Delete,
}

/// The text, the cursor (a character index, 0..=len) and whether the whole
/// text is selected.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct LineEdit {
    pub text: String,
    pub cursor: usize,
    pub selected: bool,
}

impl LineEdit {
    /// The text with the cursor at its end.
    pub fn new(text: &str) -> LineEdit {
        LineEdit {
            text: text.to_string(),
            cursor: text.chars().count(),
            selected: false,
        }
    }

    /// The text, selected: typing replaces it, a movement keeps it.
    pub fn selected(text: &str) -> LineEdit {
        LineEdit {
            selected: !text.is_empty(),
            ..LineEdit::new(text)
        }
    }

    fn len(&self) -> usize {
        self.text.chars().count()
    }

    fn byte(&self, char_index: usize) -> usize {
        self.text
            .char_indices()
            .nth(char_index)
            .map_or(self.text.len(), |(b, _)| b)
    }

    /// Inserts text at the cursor (replacing a selection), keeping the
    /// line at most `max` characters.
    pub fn insert(&mut self, s: &str, max: usize) {
        if self.selected {
            self.text.clear();
            self.cursor = 0;
            self.selected = false;
        }
        let room = max.saturating_sub(self.len());
        let add: String = s.chars().take(room).collect();
        let at = self.byte(self.cursor);
        self.text.insert_str(at, &add);
        self.cursor += add.chars().count();
    }

    /// The start of the word before `from` (words are runs of
    /// non-whitespace, as readline's unix-word-rubout takes them).
    fn word_start(&self, from: usize) -> usize {
        let chars: Vec<char> = self.text.chars().collect();
        let mut i = from;
        while i > 0 && chars[i - 1].is_whitespace() {
            i -= 1;
        }
        while i > 0 && !chars[i - 1].is_whitespace() {
            i -= 1;
        }
        i
    }

    fn word_end(&self, from: usize) -> usize {
        let chars: Vec<char> = self.text.chars().collect();
        let mut i = from;
        while i < chars.len() && chars[i].is_whitespace() {
            i += 1;
        }
        while i < chars.len() && !chars[i].is_whitespace() {
            i += 1;
        }
        i
    }

    fn remove(&mut self, from: usize, to: usize) {
        let (a, b) = (self.byte(from), self.byte(to));
        self.text.replace_range(a..b, "");
        self.cursor = from;
    }

    pub fn apply(&mut self, e: Edit) {
        if self.selected {
            self.selected = false;
            match e {
                // Deleting a selection deletes it all.
                Edit::Backspace | Edit::Delete | Edit::KillToStart | Edit::KillWord => {
                    self.text.clear();
                    self.cursor = 0;
                    return;
                }
                // Moving keeps the text for editing.
                Edit::Home | Edit::Left | Edit::WordLeft => self.cursor = 0,
                _ => self.cursor = self.len(),
            }
            if !matches!(e, Edit::KillToEnd) {
                return;
            }
        }
        let len = self.len();
        match e {
            Edit::Home => self.cursor = 0,
            Edit::End => self.cursor = len,
            Edit::Left => self.cursor = self.cursor.saturating_sub(1),
            Edit::Right => self.cursor = (self.cursor + 1).min(len),
            Edit::WordLeft => self.cursor = self.word_start(self.cursor),
            Edit::WordRight => self.cursor = self.word_end(self.cursor),
            Edit::KillToStart => self.remove(0, self.cursor),
            Edit::KillWord => self.remove(self.word_start(self.cursor), self.cursor),
            Edit::KillToEnd => self.remove(self.cursor, len),
            Edit::Backspace if self.cursor > 0 => self.remove(self.cursor - 1, self.cursor),
            Edit::Delete if self.cursor < len => self.remove(self.cursor, self.cursor + 1),
            Edit::Backspace | Edit::Delete => {}
        }
    }

    /// The text before and after the cursor, for drawing.
    pub fn split(&self) -> (&str, &str) {
        self.text.split_at(self.byte(self.cursor))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The expected results follow GNU readline's emacs bindings (readline
    // manual, "Commands for Moving" and "Killing and Yanking"), from memory,
    // with words separated by whitespace as unix-word-rubout (Ctrl-W) takes
    // them (readline's Alt-B/F stop at punctuation too; a filter clause is
    // one word here).

    #[test]
    fn moves_and_kills_as_readline_does() {
        let mut l = LineEdit::new("k>=2 flag:odd-even");
        l.apply(Edit::KillWord);
        assert_eq!((l.text.as_str(), l.cursor), ("k>=2 ", 5));
        l.apply(Edit::Home);
        l.insert("!", 100);
        assert_eq!(l.text, "!k>=2 ");
        l.apply(Edit::End);
        l.apply(Edit::WordLeft);
        assert_eq!(l.cursor, 0, "words are whitespace-separated");
        l.apply(Edit::Right);
        l.apply(Edit::KillToEnd);
        assert_eq!(l.text, "!");
        l.insert("period<3 depth>100", 100);
        l.apply(Edit::WordLeft);
        l.apply(Edit::KillToStart);
        assert_eq!((l.text.as_str(), l.cursor), ("depth>100", 0));
        l.apply(Edit::WordRight);
        assert_eq!(l.cursor, 9);
        l.apply(Edit::Left);
        l.apply(Edit::Backspace);
        l.apply(Edit::Delete);
        assert_eq!(l.text, "depth>1");
        assert_eq!(l.split(), ("depth>1", ""));
    }

    #[test]
    fn a_selection_is_replaced_by_typing_and_kept_by_moving() {
        let mut l = LineEdit::selected("k>=2");
        l.insert("flag:echo", 100);
        assert_eq!(l.text, "flag:echo");
        let mut l = LineEdit::selected("k>=2");
        l.apply(Edit::End);
        l.insert(" odds>9", 100);
        assert_eq!(l.text, "k>=2 odds>9");
        let mut l = LineEdit::selected("k>=2");
        l.apply(Edit::Backspace);
        assert_eq!(l.text, "");
        let mut l = LineEdit::new("ab");
        l.insert("cdef", 4);
        assert_eq!(l.text, "abcd", "capped");
    }
}
