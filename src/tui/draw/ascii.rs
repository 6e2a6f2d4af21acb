//! ASCII means ASCII: with `--ascii` (or a locale that is not UTF-8) the
//! finished frame is rewritten so that no byte above 127 reaches the
//! terminal. Text first gets readable spellings (`R_earth`, `rho*`, `+/-`,
//! `->`); whatever is left (borders, plot dots, ids in other scripts) is
//! replaced cell by cell.

use std::borrow::Cow;

use ratatui::buffer::Buffer;
use unicode_width::UnicodeWidthStr;

/// Readable ASCII spellings of the symbols the browser's text uses.
const SPELLINGS: [(&str, &str); 18] = [
    ("R⊕", "R_earth"),
    ("S⊕", "S_earth"),
    ("M⊕", "M_earth"),
    ("ρ★", "rho*"),
    ("R★", "R*"),
    ("★", "*"),
    ("⊕", "_earth"),
    ("☉", "_sun"),
    ("±", "+/-"),
    ("→", "->"),
    ("←", "<-"),
    ("≥", ">="),
    ("≤", "<="),
    ("×", "x"),
    ("−", "-"),
    ("³", "^3"),
    ("…", "..."),
    ("·", "-"),
];

/// `text` with the browser's symbols spelled in ASCII (unchanged when it
/// has none).
pub fn spell(text: &str) -> Cow<'_, str> {
    if text.is_ascii() {
        return Cow::Borrowed(text);
    }
    let mut s = text.to_string();
    for (from, to) in SPELLINGS {
        if s.contains(from) {
            s = s.replace(from, to);
        }
    }
    Cow::Owned(s)
}

/// One cell's ASCII stand-in: box drawing as `-`, `|`, `+`; braille plot
/// dots by how many dots they hold; anything else `?`.
fn stand_in(symbol: &str) -> &'static str {
    let Some(c) = symbol.chars().next() else {
        return " ";
    };
    match c {
        '─' | '━' | '═' | '╌' | '┄' | '▔' | '▁' | '▂' | '▄' => "-",
        '│' | '┃' | '║' | '╎' | '┆' | '▏' | '▕' => "|",
        '┌' | '┐' | '└' | '┘' | '├' | '┤' | '┬' | '┴' | '┼' | '╭' | '╮' | '╯' | '╰' | '┏' | '┓'
        | '┗' | '┛' | '╔' | '╗' | '╚' | '╝' => "+",
        '•' | '●' | '█' | '▀' | '▌' | '▐' | '★' => "*",
        '·' => ".",
        '…' => "~",
        '\u{2800}'..='\u{28ff}' => match (c as u32 - 0x2800).count_ones() {
            0 => " ",
            1 | 2 => ".",
            3 | 4 => ":",
            _ => "#",
        },
        _ => "?",
    }
}

/// Rewrites every cell that is not ASCII; a wide character's second cell
/// becomes a space, so the row keeps its width.
pub fn asciify(buf: &mut Buffer) {
    let width = buf.area.width as usize;
    let n = buf.content.len();
    let mut i = 0;
    while i < n {
        let sym = buf.content[i].symbol();
        if sym.is_ascii() {
            i += 1;
            continue;
        }
        let wide = sym.width() > 1;
        let sub = stand_in(sym);
        buf.content[i].set_symbol(sub);
        if wide && (i + 1) % width != 0 && i + 1 < n {
            buf.content[i + 1].set_symbol(" ");
            i += 1;
        }
        i += 1;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spellings_and_stand_ins_are_ascii() {
        assert_eq!(
            spell("R 2.9 R⊕ · ρ★ 1.4 ± 0.1 → x"),
            "R 2.9 R_earth - rho* 1.4 +/- 0.1 -> x"
        );
        for (_, to) in SPELLINGS {
            assert!(to.is_ascii());
        }
        for c in ['─', '┌', '\u{28ff}', '界', '⊕'] {
            assert!(stand_in(&c.to_string()).is_ascii());
        }
    }
}
