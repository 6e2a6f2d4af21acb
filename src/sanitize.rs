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
    if !s.chars().any(needs_escape) {
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
