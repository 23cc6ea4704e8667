//! Text safety for every renderer: text from users (stage, board and part names, anything a
//! report repeats) is shown as literal text on a terminal, in Markdown, in SVG/XML and in JSON,
//! and can never move the cursor, set a window title, reorder the text around it, become a
//! link or HTML, or make a document ill-formed.
//!
//! Characters that must not pass raw are shown as a Rust-style escape, `\u{1b}` for ESC, so the
//! reader still sees that they were there. Backslashes themselves are left alone on the
//! terminal: a name that spells `\u{1b}` out looks the same as one that holds ESC, which is
//! harmless.

use std::borrow::Cow;
use std::fmt::Write as _;
use std::io;

/// True for a character that must not reach a terminal raw: the C0 controls (newline and tab
/// included; the renderers put those themselves), DEL, the C1 controls, and the Unicode bidi
/// embedding, override and isolate controls (U+202A..U+202E, U+2066..U+2069), which reorder the
/// text shown around them [std: Unicode Standard Annex 9, the bidirectional algorithm].
pub fn is_unsafe_char(c: char) -> bool {
    c.is_control() || matches!(c, '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}')
}

/// True for a character XML 1.0 does not allow in a document at all: C0 controls other than
/// tab, newline and carriage return, and U+FFFE, U+FFFF [std: XML 1.0 fifth edition, 2.2
/// Characters, production `Char`]. (A Rust `char` is never a surrogate.)
pub fn is_xml_forbidden(c: char) -> bool {
    matches!(c, '\u{0}'..='\u{8}' | '\u{b}' | '\u{c}' | '\u{e}'..='\u{1f}' | '\u{fffe}' | '\u{ffff}')
}

/// `\u{1b}` for ESC: the escape a character is shown as.
fn push_escaped(out: &mut String, c: char) {
    // Writing to a String cannot fail.
    let _ = write!(out, "\\u{{{:x}}}", u32::from(c));
}

/// Text for a terminal: every character [`is_unsafe_char`] refuses is shown escaped
/// (`\u{1b}`), everything else passes unchanged.
pub fn terminal_text(text: &str) -> Cow<'_, str> {
    // Every unsafe character starts with a byte below 0x20, DEL, or the lead byte of a C1 or
    // bidi control.
    let may_hold = text
        .bytes()
        .any(|b| b < 0x20 || matches!(b, 0x7f | 0xc2 | 0xe2));
    if !may_hold || !text.chars().any(is_unsafe_char) {
        return Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len() + 8);
    for c in text.chars() {
        if is_unsafe_char(c) {
            push_escaped(&mut out, c);
        } else {
            out.push(c);
        }
    }
    Cow::Owned(out)
}

/// Inline text for Markdown (CommonMark and GitHub's dialect), to be placed in a heading, a
/// table cell or between `**`: it renders as exactly `terminal_text(text)`, never as a link,
/// image, HTML, emphasis, code, strike-through or table column break.
///
/// - controls and bidi controls are shown escaped, as on the terminal;
/// - `<` and `&` become entities, so no raw HTML, autolink or entity passes through (`>` can
///   only close what `<` opened, and starts a block quote only at a line start, see
///   [`markdown_line`]);
/// - the ASCII punctuation that opens or closes emphasis, code, strike-through, an image or a
///   table cell (`\`, `` ` ``, `*`, `_`, `~`, `!`, `|`, `#`) is backslash-escaped [std:
///   CommonMark 0.31, 2.4 backslash escapes: any ASCII punctuation may be escaped];
/// - a link needs `](`, `][` or a reference definition, which starts a line with `[`: the
///   character after every `]` that would start a destination or a reference is escaped
///   (and a leading `[` in [`markdown_line`]), so `[x](javascript:...)` stays text while
///   plain brackets such as `Tj max [°C]` pass unchanged [std: CommonMark 0.31, 6.3 links,
///   4.7 link reference definitions];
/// - `://` and `www.` are broken up so that GitHub's extended autolinks do not fire [memory:
///   GitHub's autolink extension starts at a raw `:` after a scheme, or at `www.`].
///
/// Text that starts a line (a paragraph, a list item) takes [`markdown_line`].
pub fn markdown_text(text: &str) -> String {
    markdown_inline(text, false)
}

/// [`markdown_text`] for the text of a link or image (`![TEXT](...)`), where an unbalanced
/// bracket would end the text early: every `[` and `]` is escaped.
pub fn markdown_link_text(text: &str) -> String {
    markdown_inline(text, true)
}

fn markdown_inline(text: &str, all_brackets: bool) -> String {
    let mut out = String::with_capacity(text.len() + 8);
    markdown_inline_into(&mut out, text, all_brackets);
    out
}

/// [`markdown_text`] appended to `out` (the renderer's buffer), without a string of its own.
pub fn markdown_text_into(out: &mut String, text: &str) {
    markdown_inline_into(out, text, false);
}

fn markdown_inline_into(out: &mut String, text: &str, all_brackets: bool) {
    // Runs of characters that need nothing are copied whole: a byte that cannot start a
    // character needing an escape (an ASCII mark, a control, or the lead byte of a C1 or bidi
    // control; those are never UTF-8 continuation bytes) continues the run, and so does a mark
    // whose context asks for nothing (a `.` not after `www`, a `:` not before `//`). The run is
    // flushed only where an escape is written.
    let bytes = text.as_bytes();
    let mut copied = 0usize;
    let mut after_bracket = false;
    let mut here = 0usize;
    while let Some(&b) = bytes.get(here) {
        if !may_need_markdown_escape(b) {
            after_bracket = false;
            here += 1;
            continue;
        }
        let was_after_bracket = after_bracket;
        after_bracket = b == b']';
        let escape = if b.is_ascii() {
            match b {
                _ if is_unsafe_char(char::from(b)) => Some(Escape::Shown(char::from(b), 1)),
                b'<' => Some(Escape::Text("&lt;")),
                b'&' => Some(Escape::Text("&amp;")),
                b'\\' | b'`' | b'*' | b'_' | b'~' | b'!' | b'|' | b'#' => {
                    Some(Escape::Backslash(b))
                }
                b'[' | b']' if all_brackets => Some(Escape::Backslash(b)),
                b'(' | b'[' | b':' if was_after_bracket => Some(Escape::Backslash(b)),
                b':' if bytes.get(here + 1..here + 3) == Some(b"//".as_slice()) => {
                    Some(Escape::Text("\\:"))
                }
                b'.' if here >= 3
                    && bytes
                        .get(here - 3..here)
                        .is_some_and(|w| w.eq_ignore_ascii_case(b"www")) =>
                {
                    Some(Escape::Text("&#46;"))
                }
                _ => None,
            }
        } else {
            match text.get(here..).and_then(|rest| rest.chars().next()) {
                Some(c) if is_unsafe_char(c) => Some(Escape::Shown(c, c.len_utf8())),
                _ => None,
            }
        };
        let Some(escape) = escape else {
            // Nothing to write: the character continues the run.
            here += 1;
            continue;
        };
        out.push_str(text.get(copied..here).unwrap_or_default());
        here += match escape {
            Escape::Shown(c, width) => {
                push_escaped(out, c);
                width
            }
            Escape::Text(t) => {
                out.push_str(t);
                1
            }
            Escape::Backslash(b) => {
                out.push('\\');
                out.push(char::from(b));
                1
            }
        };
        copied = here;
    }
    out.push_str(text.get(copied..).unwrap_or_default());
}

/// What [`markdown_inline_into`] writes for one character that needs an escape.
enum Escape {
    /// The character shown escaped (`\u{1b}`), with its width in bytes.
    Shown(char, usize),
    /// A replacement (an entity, a broken-up autolink).
    Text(&'static str),
    /// The ASCII mark after a backslash.
    Backslash(u8),
}

/// True for a byte that can start a character [`markdown_inline`] may escape.
fn may_need_markdown_escape(b: u8) -> bool {
    b < 0x20
        || matches!(
            b,
            b'<' | b'&'
                | b'\\'
                | b'`'
                | b'*'
                | b'_'
                | b'~'
                | b'!'
                | b'|'
                | b'#'
                | b'['
                | b']'
                | b'('
                | b':'
                | b'.'
                | 0x7f
                | 0xc2
                | 0xe2
        )
}

/// [`markdown_text`] for text that starts a line (a paragraph or a list item): a leading
/// block marker is neutralised too, so the text never turns into a list, a task box, a
/// heading, a block quote, a thematic break, a setext underline, a link reference definition
/// or an indented code block [std: CommonMark 0.31, sections 4 and 5]. (`#`, `*`, `_` and `|`
/// are already escaped everywhere.)
pub fn markdown_line(text: &str) -> String {
    let mut out = String::with_capacity(text.len() + 8);
    markdown_line_into(&mut out, text);
    out
}

/// [`markdown_line`] appended to `out` (the renderer's buffer).
pub fn markdown_line_into(out: &mut String, text: &str) {
    let start = out.len();
    markdown_inline_into(out, text, false);
    let inline = out.get(start..).unwrap_or_default();
    let digits = inline.bytes().take_while(u8::is_ascii_digit).count();
    let after = inline.as_bytes().get(digits).copied();
    if digits > 0 && matches!(after, Some(b'.' | b')')) {
        // The digits are ASCII: `start + digits` is a character boundary.
        out.insert(start + digits, '\\');
    } else if inline.starts_with(['-', '+', '=', '[']) {
        out.insert(start, '\\');
    } else if inline.starts_with('>') {
        out.replace_range(start..start + 1, "&gt;");
    } else if inline.starts_with(' ') {
        out.replace_range(start..start + 1, "&#32;");
    }
}

/// Characters for an SVG writer that escapes `&`, `<`, `>` and quotes itself (plotters' SVG
/// backend does): every character [`is_unsafe_char`] or [`is_xml_forbidden`] refuses is shown
/// escaped (`\u{1b}`), so the document stays well-formed and the picture shows what was there.
pub fn xml_chars(text: &str) -> Cow<'_, str> {
    let bad = |c: char| is_unsafe_char(c) || is_xml_forbidden(c);
    if !text.chars().any(bad) {
        return Cow::Borrowed(text);
    }
    let mut out = String::with_capacity(text.len() + 8);
    for c in text.chars() {
        if bad(c) {
            push_escaped(&mut out, c);
        } else {
            out.push(c);
        }
    }
    Cow::Owned(out)
}

/// Text for XML or SVG character data and attribute values: [`xml_chars`], then `&`, `<`, `>`,
/// `"` and `'` as entities.
pub fn xml_text(text: &str) -> String {
    let mut out = String::with_capacity(text.len() + 8);
    for c in xml_chars(text).chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c => out.push(c),
        }
    }
    out
}

/// serde_json's pretty layout, with every character [`is_unsafe_char`] refuses written as a
/// `\uXXXX` escape. serde_json already escapes the C0 controls; this adds DEL, the C1 controls
/// and the bidi controls, which JSON allows raw [std: RFC 8259, 7 Strings] but which would
/// reach a terminal raw. The JSON still parses back to the very same strings.
pub fn json_pretty<T: serde::Serialize + ?Sized>(value: &T) -> serde_json::Result<String> {
    json_pretty_at(value, 0)
}

/// [`json_pretty`] for a value written inside a larger document: every line after the first
/// is indented by `base` spaces more.
pub fn json_pretty_at<T: serde::Serialize + ?Sized>(
    value: &T,
    base: usize,
) -> serde_json::Result<String> {
    let mut buf = Vec::with_capacity(4096);
    let mut ser = serde_json::Serializer::with_formatter(&mut buf, SafeFormatter::at(base));
    value.serialize(&mut ser)?;
    // serde_json writes UTF-8 only.
    Ok(String::from_utf8(buf)
        .unwrap_or_else(|e| String::from_utf8_lossy(e.as_bytes()).into_owned()))
}

/// A two-space pretty layout starting at a base indent, with the escapes of [`json_pretty`].
#[derive(Default)]
struct SafeFormatter {
    base: usize,
    level: usize,
    has_value: bool,
}

impl SafeFormatter {
    fn at(base: usize) -> SafeFormatter {
        SafeFormatter {
            base,
            level: 0,
            has_value: false,
        }
    }

    fn newline<W: ?Sized + io::Write>(&self, w: &mut W) -> io::Result<()> {
        const SPACES: &[u8; 64] = &[b' '; 64];
        w.write_all(b"\n")?;
        let mut n = self.base + 2 * self.level;
        while n > 0 {
            let k = n.min(SPACES.len());
            w.write_all(SPACES.get(..k).unwrap_or_default())?;
            n -= k;
        }
        Ok(())
    }
}

impl serde_json::ser::Formatter for SafeFormatter {
    fn write_string_fragment<W: ?Sized + io::Write>(
        &mut self,
        writer: &mut W,
        fragment: &str,
    ) -> io::Result<()> {
        // Only the bytes that can start an unsafe character are looked at (`°` and `±` start
        // with 0xC2 and `≥` with 0xE2 too, so the report's own text takes this path often).
        let bytes = fragment.as_bytes();
        let mut start = 0usize;
        for at in memchr::memchr3_iter(0x7f, 0xc2, 0xe2, bytes) {
            let Some(c) = fragment.get(at..).and_then(|rest| rest.chars().next()) else {
                continue;
            };
            if is_unsafe_char(c) {
                writer.write_all(bytes.get(start..at).unwrap_or_default())?;
                // Every unsafe character that serde_json leaves raw lies in the BMP.
                write!(writer, "\\u{:04x}", u32::from(c))?;
                start = at + c.len_utf8();
            }
        }
        writer.write_all(bytes.get(start..).unwrap_or_default())
    }

    fn begin_array<W: ?Sized + io::Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.level += 1;
        self.has_value = false;
        w.write_all(b"[")
    }
    fn end_array<W: ?Sized + io::Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.level -= 1;
        if self.has_value {
            self.newline(w)?;
        }
        w.write_all(b"]")
    }
    fn begin_array_value<W: ?Sized + io::Write>(
        &mut self,
        w: &mut W,
        first: bool,
    ) -> io::Result<()> {
        if !first {
            w.write_all(b",")?;
        }
        self.newline(w)
    }
    fn end_array_value<W: ?Sized + io::Write>(&mut self, _w: &mut W) -> io::Result<()> {
        self.has_value = true;
        Ok(())
    }
    fn begin_object<W: ?Sized + io::Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.level += 1;
        self.has_value = false;
        w.write_all(b"{")
    }
    fn end_object<W: ?Sized + io::Write>(&mut self, w: &mut W) -> io::Result<()> {
        self.level -= 1;
        if self.has_value {
            self.newline(w)?;
        }
        w.write_all(b"}")
    }
    fn begin_object_key<W: ?Sized + io::Write>(
        &mut self,
        w: &mut W,
        first: bool,
    ) -> io::Result<()> {
        if !first {
            w.write_all(b",")?;
        }
        self.newline(w)
    }
    fn end_object_key<W: ?Sized + io::Write>(&mut self, _w: &mut W) -> io::Result<()> {
        Ok(())
    }
    fn begin_object_value<W: ?Sized + io::Write>(&mut self, w: &mut W) -> io::Result<()> {
        w.write_all(b": ")
    }
    fn end_object_value<W: ?Sized + io::Write>(&mut self, _w: &mut W) -> io::Result<()> {
        self.has_value = true;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    /// The escape rules of [`markdown_inline`] written character by character, the plain way.
    fn inline_by_chars(text: &str, all_brackets: bool) -> String {
        let mut out = String::new();
        let mut after_bracket = false;
        let chars: Vec<(usize, char)> = text.char_indices().collect();
        for &(here, c) in &chars {
            let at = here + c.len_utf8();
            match c {
                c if is_unsafe_char(c) => push_escaped(&mut out, c),
                '<' => out.push_str("&lt;"),
                '&' => out.push_str("&amp;"),
                '\\' | '`' | '*' | '_' | '~' | '!' | '|' | '#' => {
                    out.push('\\');
                    out.push(c);
                }
                '[' | ']' if all_brackets => {
                    out.push('\\');
                    out.push(c);
                }
                '(' | '[' | ':' if after_bracket => {
                    out.push('\\');
                    out.push(c);
                }
                ':' if text[at..].starts_with("//") => out.push_str("\\:"),
                '.' if here >= 3
                    && text
                        .get(here - 3..here)
                        .is_some_and(|w| w.eq_ignore_ascii_case("www")) =>
                {
                    out.push_str("&#46;")
                }
                c => out.push(c),
            }
            after_bracket = c == ']';
        }
        out
    }

    proptest! {
        #![proptest_config(ProptestConfig {
            cases: 2000,
            failure_persistence: None,
            ..ProptestConfig::default()
        })]

        /// The run-copying escape gives what the character-by-character rules give, on text
        /// dense in the characters it escapes.
        #[test]
        fn markdown_runs_escape_as_the_rules_say(
            text in "([a-zA-Z0-9 ]|[<&\\\\`*_~!|#\\[\\]():./]|www|é|±|°|≥|\u{1b}|\u{85}|\u{202e}|\u{2067}|\u{7f})*",
            all in any::<bool>(),
        ) {
            prop_assert_eq!(markdown_inline(&text, all), inline_by_chars(&text, all));
        }

        /// The in-place line start gives what the block-marker rules give on a fresh string.
        #[test]
        fn markdown_lines_neutralise_as_the_rules_say(
            text in "([0-9]|[-+=\\[> .)a#]|www)*",
        ) {
            prop_assert_eq!(markdown_line(&text), line_by_rules(&text));
        }
    }

    /// The block-marker rules of [`markdown_line`] on the escaped text, the plain way.
    fn line_by_rules(text: &str) -> String {
        let inline = inline_by_chars(text, false);
        let digits = inline.bytes().take_while(u8::is_ascii_digit).count();
        let (number, rest) = inline.split_at(digits);
        if digits > 0 && (rest.starts_with('.') || rest.starts_with(')')) {
            format!("{number}\\{rest}")
        } else if inline.starts_with(['-', '+', '=', '[']) {
            format!("\\{inline}")
        } else if let Some(rest) = inline.strip_prefix('>') {
            format!("&gt;{rest}")
        } else if let Some(rest) = inline.strip_prefix(' ') {
            format!("&#32;{rest}")
        } else {
            inline
        }
    }

    use super::*;

    #[test]
    fn terminal_text_escapes_controls_and_bidi_only() {
        assert_eq!(terminal_text("K1 relay"), "K1 relay");
        assert!(matches!(terminal_text("plain"), Cow::Borrowed(_)));
        // ESC ] 0 ; title BEL sets an xterm window title; ESC [ 2 J clears the screen.
        assert_eq!(
            terminal_text("a\u{1b}]0;t\u{7}b\u{1b}[2J"),
            "a\\u{1b}]0;t\\u{7}b\\u{1b}[2J"
        );
        assert_eq!(
            terminal_text("\n\t\r\u{7f}\u{85}\u{9b}"),
            "\\u{a}\\u{9}\\u{d}\\u{7f}\\u{85}\\u{9b}"
        );
        assert_eq!(
            terminal_text("x\u{202e}y\u{2066}z\u{2069}"),
            "x\\u{202e}y\\u{2066}z\\u{2069}"
        );
        // Ordinary non-ASCII text is left alone.
        assert_eq!(terminal_text("Ω µ ±5 % 温度"), "Ω µ ±5 % 温度");
    }

    #[test]
    fn markdown_text_neutralises_html_links_and_emphasis() {
        assert_eq!(
            markdown_text("<script>alert(1)</script>"),
            "&lt;script>alert(1)&lt;/script>"
        );
        assert_eq!(
            markdown_text("<img src=x onerror=alert(1)>"),
            "&lt;img src=x onerror=alert(1)>"
        );
        assert_eq!(
            markdown_text("[x](javascript:alert(1))"),
            "[x]\\(javascript:alert(1))"
        );
        assert_eq!(markdown_text("[x][r] [y]: z"), "[x]\\[r] [y]\\: z");
        assert_eq!(markdown_text("![i](y.png)"), "\\![i]\\(y.png)");
        assert_eq!(markdown_text("Tj max [°C]"), "Tj max [°C]");
        assert_eq!(markdown_link_text("a [x][r] b]"), "a \\[x\\]\\[r\\] b\\]");
        assert_eq!(
            markdown_text("*a* _b_ `c` ~d~"),
            "\\*a\\* \\_b\\_ \\`c\\` \\~d\\~"
        );
        assert_eq!(markdown_text("a|b \\ #1"), "a\\|b \\\\ \\#1");
        assert_eq!(markdown_text("&lt; R&D"), "&amp;lt; R&amp;D");
        assert_eq!(
            markdown_text("reverse rating >= 18 V"),
            "reverse rating >= 18 V"
        );
        assert_eq!(markdown_text("x\u{1b}[31m"), "x\\u{1b}[31m");
    }

    #[test]
    fn markdown_line_neutralises_block_markers() {
        assert_eq!(markdown_line("- item"), "\\- item");
        assert_eq!(markdown_line("+ item"), "\\+ item");
        assert_eq!(markdown_line("==="), "\\===");
        assert_eq!(markdown_line("---"), "\\---");
        assert_eq!(markdown_line("12. twelve. x"), "12\\. twelve. x");
        assert_eq!(markdown_line("3) three)"), "3\\) three)");
        assert_eq!(markdown_line("    code"), "&#32;   code");
        assert_eq!(markdown_line("# h"), "\\# h");
        assert_eq!(markdown_line("[ ] task"), "\\[ ] task");
        assert_eq!(markdown_line("[r]: http://x"), "\\[r]\\: http\\://x");
        assert_eq!(markdown_line("> q"), "&gt; q");
        assert_eq!(markdown_line("40 builds fell"), "40 builds fell");
        // In a table cell or a heading a leading dash or number is plain text.
        assert_eq!(markdown_text("-"), "-");
        assert_eq!(markdown_text("2.02"), "2.02");
    }

    #[test]
    fn markdown_text_breaks_up_autolinks() {
        assert_eq!(
            markdown_text("see https://x.example"),
            "see https\\://x.example"
        );
        assert_eq!(markdown_text("WWW.x.example"), "WWW&#46;x.example");
        // Ordinary report text passes unchanged.
        assert_eq!(
            markdown_text("Stage 1: K1 vent relay (demo-npn-40v, relay load): PASS"),
            "Stage 1: K1 vent relay (demo-npn-40v, relay load): PASS"
        );
    }

    #[test]
    fn xml_helpers_keep_documents_well_formed() {
        assert_eq!(xml_chars("a<b"), "a<b");
        assert_eq!(
            xml_chars("a\u{0}b\u{1b}\u{fffe}"),
            "a\\u{0}b\\u{1b}\\u{fffe}"
        );
        assert_eq!(
            xml_text("<a href=\"x\">'&'</a>\u{7}"),
            "&lt;a href=&quot;x&quot;&gt;&apos;&amp;&apos;&lt;/a&gt;\\u{7}"
        );
        assert!(is_xml_forbidden('\u{1}'));
        assert!(!is_xml_forbidden('\t') && !is_xml_forbidden('\n') && !is_xml_forbidden('\r'));
        assert!(!is_xml_forbidden('\u{85}'));
    }

    #[test]
    fn json_pretty_escapes_what_json_allows_raw_and_parses_back() {
        let name = "a\u{7f}b\u{9b}c\u{202e}d\u{1b}e\"\n";
        let text =
            json_pretty(&serde_json::json!({ "name": name, "n": [1, 2] })).expect("serialises");
        assert!(
            !text.chars().any(|c| is_unsafe_char(c) && c != '\n'),
            "{text:?}"
        );
        assert!(text.contains("\\u007f") && text.contains("\\u009b") && text.contains("\\u202e"));
        assert!(text.contains("\\u001b"));
        let back: serde_json::Value = serde_json::from_str(&text).expect("parses");
        assert_eq!(back["name"].as_str(), Some(name));
        // Same layout as serde_json's own pretty printer for ordinary text.
        let plain = serde_json::json!({ "a": [1, { "b": "c" }], "d": {} });
        assert_eq!(
            json_pretty(&plain).expect("serialises"),
            serde_json::to_string_pretty(&plain).expect("serialises")
        );
    }
}
