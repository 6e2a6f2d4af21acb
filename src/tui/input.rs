//! Terminal events to browser inputs: keys through the key map (or as text
//! in a prompt), Ctrl-C as a way out that cannot be lost, a paste as one
//! piece of text (never as keys: pasted text must not decide candidates),
//! the mouse when asked for.

use ratatui::crossterm::event::{
    Event, KeyCode, KeyEvent, KeyEventKind, KeyModifiers, MouseButton, MouseEventKind,
};

use super::app::{Action, App, Edit, Hits, Input, Mode};
use super::keymap::{ALWAYS_QUITS, Key, KeyName};

/// What one terminal event asks of the browser.
pub enum Translated {
    Input(Input),
    Quit,
    Nothing,
}

/// `hits`: where the last frame drew the lists, to find the row a click or
/// the wheel is over.
pub fn translate(app: &App, hits: &Hits, event: Event) -> Translated {
    let input = match event {
        Event::Key(k) if k.kind == KeyEventKind::Press => {
            let Some(key) = Key::from_event(&k) else {
                return Translated::Nothing;
            };
            // Ctrl-C leaves from anywhere, whatever the key map says.
            if key == ALWAYS_QUITS {
                return Translated::Quit;
            }
            if app.takes_text() {
                if let Some(input) = line_key(&k, matches!(app.mode, Mode::Prompt { .. })) {
                    return Translated::Input(input);
                }
                match key.code {
                    KeyName::Char(c) if !key.ctrl => Some(Input::Char(c)),
                    KeyName::Space => Some(Input::Char(' ')),
                    KeyName::Backspace => Some(Input::Backspace),
                    KeyName::Enter => Some(Input::Action(Action::Select)),
                    KeyName::Esc => Some(Input::Action(Action::Close)),
                    _ => app.keymap.action(key).map(Input::Action),
                }
            } else {
                app.keymap.action(key).map(Input::Action)
            }
        }
        Event::Paste(text) => Some(Input::Paste(text)),
        Event::Resize(w, h) => Some(Input::Resize(w, h)),
        Event::Mouse(m) => match m.kind {
            MouseEventKind::Down(MouseButton::Left) => hits
                .at(m.column, m.row)
                .map(|(pane, row)| Input::Pick(pane, row)),
            MouseEventKind::ScrollDown => hits
                .at(m.column, m.row)
                .map(|(pane, _)| Input::Wheel(pane, true)),
            MouseEventKind::ScrollUp => hits
                .at(m.column, m.row)
                .map(|(pane, _)| Input::Wheel(pane, false)),
            _ => None,
        },
        _ => None,
    };
    input.map_or(Translated::Nothing, Translated::Input)
}

/// The line-editing keys of a shell (GNU readline's emacs bindings) while
/// text is typed; Up/Down recall earlier entries in a prompt.
fn line_key(k: &KeyEvent, prompt: bool) -> Option<Input> {
    let ctrl = k.modifiers.contains(KeyModifiers::CONTROL);
    let alt = k.modifiers.contains(KeyModifiers::ALT);
    let edit = match (k.code, ctrl, alt) {
        (KeyCode::Home, ..) | (KeyCode::Char('a'), true, false) => Edit::Home,
        (KeyCode::End, ..) | (KeyCode::Char('e'), true, false) => Edit::End,
        (KeyCode::Left, false, false) | (KeyCode::Char('b'), true, false) => Edit::Left,
        (KeyCode::Right, false, false) | (KeyCode::Char('f'), true, false) => Edit::Right,
        (KeyCode::Left, ..) | (KeyCode::Char('b'), false, true) => Edit::WordLeft,
        (KeyCode::Right, ..) | (KeyCode::Char('f'), false, true) => Edit::WordRight,
        (KeyCode::Char('u'), true, false) => Edit::KillToStart,
        (KeyCode::Char('w'), true, false) | (KeyCode::Backspace, _, true) => Edit::KillWord,
        (KeyCode::Char('k'), true, false) => Edit::KillToEnd,
        (KeyCode::Char('h'), true, false) | (KeyCode::Backspace, false, false) => Edit::Backspace,
        (KeyCode::Delete, ..) | (KeyCode::Char('d'), true, false) => Edit::Delete,
        (KeyCode::Up, ..) | (KeyCode::Char('p'), true, false) if prompt => {
            return Some(Input::Recall(true));
        }
        (KeyCode::Down, ..) | (KeyCode::Char('n'), true, false) if prompt => {
            return Some(Input::Recall(false));
        }
        _ => return None,
    };
    Some(Input::Edit(edit))
}
