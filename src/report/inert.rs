//! Text from records and files, made inert for a terminal: the one function every
//! text output passes names, notes, codes, lots and messages through, so that no
//! stored or imported text can move the cursor, clear lines, set the window title
//! or reorder what is shown. Every character is still visible, as a stand-in.

use std::borrow::Cow;

/// Whether a character can drive a terminal or reorder text: C0 and C1 controls,
/// DEL, and the Unicode bidirectional controls.
fn drives_a_terminal(c: char) -> bool {
    c.is_control()
        || matches!(
            c,
            '\u{200e}' | '\u{200f}' | '\u{061c}' | '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}'
        )
}

/// `text` with every control character shown inert: C0 controls (line breaks and
/// tabs too) as their Unicode control pictures (␛ for ESC, ␊ for a line feed), DEL
/// as ␡, and C1 and bidirectional controls as `\u{…}`. Borrowed when there is none.
pub fn inert(text: &str) -> Cow<'_, str> {
    if !text.chars().any(drives_a_terminal) {
        return Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len() + 8);
    for c in text.chars() {
        match c {
            '\u{0}'..='\u{1f}' => out.push(char::from_u32(0x2400 + u32::from(c)).unwrap_or('?')),
            '\u{7f}' => out.push('\u{2421}'),
            c if drives_a_terminal(c) => out.push_str(&format!("\\u{{{:x}}}", u32::from(c))),
            c => out.push(c),
        }
    }
    Cow::Owned(out)
}

#[cfg(test)]
mod tests {
    use super::inert;

    #[test]
    fn controls_become_visible_stand_ins_and_plain_text_is_untouched() {
        assert!(matches!(
            inert("Harbour vanilla"),
            std::borrow::Cow::Borrowed(_)
        ));
        assert_eq!(inert("a\u{1b}[2Jb"), "a\u{241b}[2Jb");
        assert_eq!(inert("one\ntwo\tthree"), "one\u{240a}two\u{2409}three");
        assert_eq!(inert("bell\u{7}"), "bell\u{2407}");
        assert_eq!(inert("del\u{7f}"), "del\u{2421}");
        assert_eq!(inert("csi\u{9b}31m"), "csi\\u{9b}31m");
        assert_eq!(inert("\u{202e}evil"), "\\u{202e}evil");
        assert!(
            !inert("\u{1b}]0;title\u{7}\u{9b}\u{85}")
                .chars()
                .any(char::is_control)
        );
    }
}
