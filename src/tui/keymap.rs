//! Key maps: action name → keys, from TOML files. The defaults ship in
//! `keymaps/` and are embedded; a user file overrides the actions it names.
//! The help overlay is generated from the map in effect.

use std::collections::BTreeMap;

use ratatui::crossterm::event::{KeyCode, KeyEvent, KeyModifiers};

use super::app::action::Action;

pub const DEFAULT: &str = include_str!("../../keymaps/default.toml");
pub const HOME_ROW: &str = include_str!("../../keymaps/home-row.toml");

/// A key as written in a key map.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Key {
    pub code: KeyName,
    pub ctrl: bool,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum KeyName {
    Char(char),
    Enter,
    Esc,
    Tab,
    BackTab,
    Space,
    Backspace,
    Up,
    Down,
    Left,
    Right,
    PageUp,
    PageDown,
    Home,
    End,
    F(u8),
}

impl Key {
    pub fn parse(s: &str) -> Option<Key> {
        let (ctrl, name) = match s.strip_prefix("ctrl-") {
            Some(rest) => (true, rest),
            None => (false, s),
        };
        let code = match name {
            "enter" => KeyName::Enter,
            "esc" => KeyName::Esc,
            "tab" => KeyName::Tab,
            "backtab" => KeyName::BackTab,
            "space" => KeyName::Space,
            "backspace" => KeyName::Backspace,
            "up" => KeyName::Up,
            "down" => KeyName::Down,
            "left" => KeyName::Left,
            "right" => KeyName::Right,
            "pageup" => KeyName::PageUp,
            "pagedown" => KeyName::PageDown,
            "home" => KeyName::Home,
            "end" => KeyName::End,
            f if f.len() >= 2
                && f.starts_with('f')
                && f[1..].parse::<u8>().is_ok_and(|n| (1..=12).contains(&n)) =>
            {
                KeyName::F(f[1..].parse().ok()?)
            }
            c if c.chars().count() == 1 => KeyName::Char(c.chars().next()?),
            _ => return None,
        };
        Some(Key { code, ctrl })
    }

    /// The key of a terminal event (shift folded into the character).
    pub fn from_event(e: &KeyEvent) -> Option<Key> {
        let ctrl = e.modifiers.contains(KeyModifiers::CONTROL);
        let code = match e.code {
            KeyCode::Char(' ') => KeyName::Space,
            KeyCode::Char(c) => KeyName::Char(c),
            KeyCode::Enter => KeyName::Enter,
            KeyCode::Esc => KeyName::Esc,
            KeyCode::Tab => KeyName::Tab,
            KeyCode::BackTab => KeyName::BackTab,
            KeyCode::Backspace => KeyName::Backspace,
            KeyCode::Up => KeyName::Up,
            KeyCode::Down => KeyName::Down,
            KeyCode::Left => KeyName::Left,
            KeyCode::Right => KeyName::Right,
            KeyCode::PageUp => KeyName::PageUp,
            KeyCode::PageDown => KeyName::PageDown,
            KeyCode::Home => KeyName::Home,
            KeyCode::End => KeyName::End,
            KeyCode::F(n) => KeyName::F(n),
            _ => return None,
        };
        Some(Key { code, ctrl })
    }

    pub fn label(&self) -> String {
        let name = match self.code {
            KeyName::Char(c) => c.to_string(),
            KeyName::Enter => "Enter".into(),
            KeyName::Esc => "Esc".into(),
            KeyName::Tab => "Tab".into(),
            KeyName::BackTab => "Shift-Tab".into(),
            KeyName::Space => "Space".into(),
            KeyName::Backspace => "Backspace".into(),
            KeyName::Up => "Up".into(),
            KeyName::Down => "Down".into(),
            KeyName::Left => "Left".into(),
            KeyName::Right => "Right".into(),
            KeyName::PageUp => "PgUp".into(),
            KeyName::PageDown => "PgDn".into(),
            KeyName::Home => "Home".into(),
            KeyName::End => "End".into(),
            KeyName::F(n) => format!("F{n}"),
        };
        if self.ctrl {
            format!("Ctrl-{name}")
        } else {
            name
        }
    }
}

/// A key map: keys per action, and the action of each key.
#[derive(Clone, Debug, Default)]
pub struct Keymap {
    pub keys: BTreeMap<Action, Vec<Key>>,
    /// Where each action's keys were set: (file, line).
    origin: BTreeMap<Action, (String, usize)>,
}

#[derive(Debug, thiserror::Error)]
#[error("{file}:{line}: {message}")]
pub struct KeymapError {
    pub file: String,
    pub line: usize,
    pub message: String,
}

/// Ctrl-C quits whatever the key map says (a way out that cannot be lost).
pub const ALWAYS_QUITS: Key = Key {
    code: KeyName::Char('c'),
    ctrl: true,
};

impl Keymap {
    /// The defaults, then each (name, text) layer on top, in order. The
    /// result must keep a key for `quit` and give no key two actions.
    pub fn load(layers: &[(&str, &str)]) -> Result<Keymap, KeymapError> {
        let mut map = Keymap::default();
        map.apply("keymaps/default.toml", DEFAULT)?;
        for (name, text) in layers {
            map.apply(name, text)?;
        }
        map.check()?;
        Ok(map)
    }

    fn apply(&mut self, file: &str, text: &str) -> Result<(), KeymapError> {
        let line_of = |byte: usize| text[..byte.min(text.len())].matches('\n').count() + 1;
        let err = |line, message: String| KeymapError {
            file: file.to_string(),
            line,
            message,
        };
        type Spanned<T> = toml::Spanned<T>;
        let table: BTreeMap<Spanned<String>, Spanned<toml::Value>> =
            toml::from_str(text).map_err(|e: toml::de::Error| {
                err(
                    e.span().map_or(1, |s| line_of(s.start)),
                    e.message().to_string(),
                )
            })?;
        for (name, value) in &table {
            let line = line_of(name.span().start);
            let name = name.get_ref();
            let action = Action::from_name(name).ok_or_else(|| {
                err(
                    line,
                    format!(
                        "`{name}` is not an action; actions: {}",
                        Action::ALL.map(|a| a.name()).join(", ")
                    ),
                )
            })?;
            let list = value.get_ref().as_array().ok_or_else(|| {
                err(
                    line_of(value.span().start),
                    format!("`{name}` must be a list of keys, e.g. [\"x\"]"),
                )
            })?;
            let mut keys = Vec::new();
            for v in list {
                let s = v
                    .as_str()
                    .ok_or_else(|| err(line, format!("`{name}`: keys are strings")))?;
                keys.push(Key::parse(s).ok_or_else(|| err(line, format!("`{s}` is not a key")))?);
            }
            if action == Action::Quit && keys.is_empty() {
                return Err(err(
                    line,
                    "`quit` needs at least one key (Ctrl-C quits too, always)".into(),
                ));
            }
            if action != Action::Quit && keys.contains(&ALWAYS_QUITS) {
                return Err(err(
                    line,
                    format!("`{name}`: ctrl-c always quits and cannot be bound to another action"),
                ));
            }
            self.keys.insert(action, keys);
            self.origin.insert(action, (file.to_string(), line));
        }
        Ok(())
    }

    /// No key bound to two actions: the error names both actions and where
    /// each was set.
    fn check(&self) -> Result<(), KeymapError> {
        let mut owner: std::collections::HashMap<Key, Action> = Default::default();
        for (&action, keys) in &self.keys {
            for &k in keys {
                if let Some(&other) = owner.get(&k) {
                    let at = |a: Action| {
                        self.origin
                            .get(&a)
                            .cloned()
                            .unwrap_or_else(|| ("keymaps/default.toml".into(), 0))
                    };
                    let (mine, theirs) = (at(action), at(other));
                    // Report at the later layer's line (usually the user's file).
                    let (file, line) = if mine.0 != "keymaps/default.toml" {
                        mine.clone()
                    } else {
                        theirs.clone()
                    };
                    return Err(KeymapError {
                        file,
                        line,
                        message: format!(
                            "`{}` is bound to both `{}` ({}:{}) and `{}` ({}:{}); give one of them another key",
                            k.label(),
                            other.name(),
                            theirs.0,
                            theirs.1,
                            action.name(),
                            mine.0,
                            mine.1
                        ),
                    });
                }
                owner.insert(k, action);
            }
        }
        Ok(())
    }

    /// The action bound to a key, if any.
    pub fn action(&self, key: Key) -> Option<Action> {
        self.keys
            .iter()
            .find(|(_, ks)| ks.contains(&key))
            .map(|(a, _)| *a)
    }

    /// "a, x" for the help overlay and hints.
    pub fn keys_of(&self, a: Action) -> String {
        self.keys
            .get(&a)
            .map(|ks| ks.iter().map(Key::label).collect::<Vec<_>>().join(", "))
            .unwrap_or_else(|| "-".into())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_shipped_keymap_binds_every_action() {
        for layers in [vec![], vec![("keymaps/home-row.toml", HOME_ROW)]] {
            let map = Keymap::load(&layers).unwrap();
            for a in Action::ALL {
                assert!(
                    map.keys.get(&a).is_some_and(|k| !k.is_empty()),
                    "{} has no key",
                    a.name()
                );
            }
        }
        let home = Keymap::load(&[("home-row.toml", HOME_ROW)]).unwrap();
        assert_eq!(home.action(Key::parse("j").unwrap()), Some(Action::Down));
        assert_eq!(home.action(Key::parse("x").unwrap()), Some(Action::Reject));
    }

    #[test]
    fn foot_guns_are_refused_with_both_lines() {
        let e = Keymap::load(&[("mine.toml", "# mine\nquit = []\n")]).unwrap_err();
        assert_eq!((e.file.as_str(), e.line), ("mine.toml", 2), "{e}");
        let e = Keymap::load(&[("mine.toml", "\n\nquit = [\"a\"]\n")]).unwrap_err();
        assert_eq!((e.file.as_str(), e.line), ("mine.toml", 3), "{e}");
        let m = e.to_string();
        assert!(
            m.contains("`keep`") && m.contains("`quit`") && m.contains("keymaps/default.toml:"),
            "{m}"
        );
        let e = Keymap::load(&[("mine.toml", "keep = [\"ctrl-c\"]\n")]).unwrap_err();
        assert!(e.to_string().contains("always quits"), "{e}");
        // Moving a key is fine when its old action gets another.
        let m = Keymap::load(&[("mine.toml", "quit = [\"a\"]\nkeep = [\"k\"]\n")]).unwrap();
        assert_eq!(m.action(Key::parse("a").unwrap()), Some(Action::Quit));
    }

    #[test]
    fn bad_files_name_the_line() {
        let e = Keymap::load(&[("mine.toml", "quit = [\"q\"]\nwobble = [\"w\"]\n")]).unwrap_err();
        assert_eq!((e.file.as_str(), e.line), ("mine.toml", 2));
        let e = Keymap::load(&[("mine.toml", "quit = [\"ctrl-\"]\n")]).unwrap_err();
        assert!(e.to_string().starts_with("mine.toml:1:"), "{e}");
        let e = Keymap::load(&[("mine.toml", "quit = \n")]).unwrap_err();
        assert!(e.to_string().starts_with("mine.toml:1:"), "{e}");
        // A user file overrides only what it names.
        let m = Keymap::load(&[("mine.toml", "reject = [\"r\"]\n")]).unwrap();
        assert_eq!(m.action(Key::parse("r").unwrap()), Some(Action::Reject));
        assert_eq!(m.action(Key::parse("x").unwrap()), None);
        assert_eq!(m.action(Key::parse("a").unwrap()), Some(Action::Keep));
    }
}
