//! Makes text that came from input files safe to print: no control character,
//! escape sequence or bidirectional override ever reaches a terminal.

use std::borrow::Cow;
use std::fmt::Write as _;

/// Returns `s` with every character that could drive a terminal shown escaped.
///
/// Escaped: C0 controls (including tab, newline and ESC), DEL, C1 controls
/// (U+0080–U+009F, which include the single-character CSI), and the Unicode
/// bidirectional embedding, override and isolate marks, which can make a
/// line read differently from what it holds. Backslash is escaped too, so the
/// output reads back unambiguously. Clean text is borrowed, not copied.
pub fn clean(s: &str) -> Cow<'_, str> {
    // Printable ASCII but the backslash, as ids nearly always are: clean
    // without decoding a character (every character `needs_escape` names
    // is a control, a backslash or not ASCII).
    if s.bytes().all(|b| (0x20..0x7f).contains(&b) && b != b'\\') || !s.chars().any(needs_escape) {
        return Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        if !needs_escape(c) {
            out.push(c);
            continue;
        }
        match c {
            '\\' => out.push_str("\\\\"),
            '\t' => out.push_str("\\t"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            c if (c as u32) < 0x100 => {
                let _ = write!(out, "\\x{:02x}", c as u32);
            }
            c => {
                let _ = write!(out, "\\u{{{:04x}}}", c as u32);
            }
        }
    }
    Cow::Owned(out)
}

/// The last guard before a message reaches the terminal: every control
/// character, escape sequence and bidirectional mark escaped as [`clean`]
/// does, but line breaks kept and backslashes left alone, so text cleaned
/// already passes through unchanged. Every error message goes through it.
pub fn for_terminal(s: &str) -> Cow<'_, str> {
    let risky = |c: char| c != '\\' && c != '\n' && needs_escape(c);
    if !s.chars().any(risky) {
        return Cow::Borrowed(s);
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        if risky(c) {
            let mut buf = [0u8; 4];
            out.push_str(&clean(c.encode_utf8(&mut buf)));
        } else {
            out.push(c);
        }
    }
    Cow::Owned(out)
}

/// Lossy UTF-8 decoding followed by [`clean`], for raw bytes from a file.
pub fn clean_bytes(b: &[u8]) -> String {
    clean(&String::from_utf8_lossy(b)).into_owned()
}

fn needs_escape(c: char) -> bool {
    matches!(c,
        '\\'
        | '\u{0}'..='\u{1f}'
        | '\u{7f}'..='\u{9f}'
        | '\u{200e}' | '\u{200f}'
        | '\u{202a}'..='\u{202e}'
        | '\u{2066}'..='\u{2069}')
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_terminal_guard_escapes_controls_and_keeps_cleaned_text() {
        // OSC 52 (clipboard write) and OSC 0 (window title), as a hostile
        // header would carry them (ECMA-48 control functions).
        let hostile = "time\u{1b}]52;c;ZXZpbA==\u{7}\u{1b}]0;owned\u{7}";
        let safe = for_terminal(hostile);
        assert!(
            !safe.contains('\u{1b}') && !safe.contains('\u{7}'),
            "{safe}"
        );
        let cleaned = clean("A\\B-1\tx").into_owned();
        assert_eq!(for_terminal(&cleaned), cleaned);
        assert_eq!(for_terminal("two\nlines"), "two\nlines");
    }

    #[test]
    fn the_ascii_shortcut_escapes_what_the_characters_do() {
        // Every byte on its own, and around a plain id: the shortcut
        // borrows only what the character test would.
        for b in 0u8..=0x7f {
            let one = (b as char).to_string();
            let id = format!("ZZ{one}-1");
            for text in [one.as_str(), id.as_str()] {
                let escaped = text.chars().any(needs_escape);
                assert_eq!(matches!(clean(text), Cow::Owned(_)), escaped, "{b:#x}");
            }
        }
    }

    #[test]
    fn clean_text_is_borrowed() {
        assert!(matches!(clean("HWT10427-s1 ±0.3 Å"), Cow::Borrowed(_)));
    }

    #[test]
    fn escapes_terminal_controls() {
        // ESC [ 2 J clears the screen on ANSI terminals (ECMA-48 CSI ED).
        assert_eq!(clean("a\u{1b}[2Jb"), "a\\x1b[2Jb");
        // U+009B is the 8-bit CSI of ECMA-48.
        assert_eq!(clean("x\u{9b}31m"), "x\\x9b31m");
        assert_eq!(clean("bell\u{7}"), "bell\\x07");
        assert_eq!(clean("tab\there\nnext\r"), "tab\\there\\nnext\\r");
        assert_eq!(clean("back\\slash"), "back\\\\slash");
        // U+202E RIGHT-TO-LEFT OVERRIDE (Unicode bidi control).
        assert_eq!(clean("id\u{202e}cba"), "id\\u{202e}cba");
        assert_eq!(clean_bytes(b"bad\xffbyte"), "bad\u{fffd}byte");
    }
}
