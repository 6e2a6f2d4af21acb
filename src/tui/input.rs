//! Terminal events to browser inputs: keys through the key map (or as text
//! in a prompt), Ctrl-C as a way out that cannot be lost, a paste as one
//! piece of text (never as keys: pasted text must not decide candidates),
//! the mouse when asked for.

use ratatui::crossterm::event::{Event, KeyEventKind, MouseButton, MouseEventKind};

use super::app::{Action, App, Input};
use super::keymap::{ALWAYS_QUITS, Key, KeyName};

/// What one terminal event asks of the browser.
pub enum Translated {
    Input(Input),
    Quit,
    Nothing,
}

pub fn translate(app: &App, event: Event) -> Translated {
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
            MouseEventKind::Down(MouseButton::Left) => Some(Input::Click(m.column, m.row)),
            MouseEventKind::ScrollDown => Some(Input::Scroll(m.column, m.row, true)),
            MouseEventKind::ScrollUp => Some(Input::Scroll(m.column, m.row, false)),
            _ => None,
        },
        _ => None,
    };
    input.map_or(Translated::Nothing, Translated::Input)
}
