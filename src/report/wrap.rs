//! Fitting text to a width: the display width of text, word wrapping with a hanging indent, and
//! the width the report is drawn to (the terminal's, or none when the output is piped).

use std::ffi::OsStr;
use std::io::IsTerminal;

use unicode_width::{UnicodeWidthChar, UnicodeWidthStr};

/// Columns a text takes on a terminal (East Asian wide characters take two, combining marks
/// none), not its length in bytes or characters.
pub fn display_width(text: &str) -> usize {
    // Printable ASCII takes one column a byte.
    if text.bytes().all(|b| (0x20..0x7f).contains(&b)) {
        return text.len();
    }
    UnicodeWidthStr::width(text)
}

/// The width to draw a report to: on a terminal, `COLUMNS` when it holds a positive number,
/// else the terminal's own width; `None` (draw whole lines) when standard output is not a
/// terminal or no width can be found.
pub fn output_width() -> Option<usize> {
    let terminal =
        || terminal_size::terminal_size().map(|(terminal_size::Width(w), _)| usize::from(w));
    width_from(
        std::io::stdout().is_terminal(),
        std::env::var_os("COLUMNS").as_deref(),
        terminal,
    )
}

/// [`output_width`] from its facts: whether standard output is a terminal, the value of
/// `COLUMNS`, and the terminal's own width (asked only when needed).
pub fn width_from(
    stdout_is_tty: bool,
    columns: Option<&OsStr>,
    terminal: impl FnOnce() -> Option<usize>,
) -> Option<usize> {
    if !stdout_is_tty {
        return None;
    }
    let from_env = columns
        .and_then(OsStr::to_str)
        .and_then(|v| v.trim().parse::<usize>().ok())
        .filter(|&w| w > 0);
    from_env.or_else(terminal).filter(|&w| w > 0)
}

/// Wrap `text` at spaces into lines of at most `width` columns, the first line starting with
/// `first` and the others with `rest` (a hanging indent). Runs of spaces inside a line are
/// kept; spaces at a break (and at the very end) are dropped. A word wider than the room left
/// on an empty line is split between characters. A line exceeds `width` only when the indent
/// alone leaves no room for the next character.
pub fn wrap(text: &str, width: usize, first: &str, rest: &str) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = first.to_string();
    let mut used = display_width(first);
    // No character of the text on the current line yet.
    let mut fresh = true;
    let mut spaces = 0usize;
    let next_line = |line: &mut String, used: &mut usize, lines: &mut Vec<String>| {
        lines.push(std::mem::replace(line, rest.to_string()));
        *used = display_width(rest);
    };
    for (i, word) in text.split(' ').enumerate() {
        if i > 0 {
            spaces += 1;
        }
        if word.is_empty() {
            continue;
        }
        let w = display_width(word);
        if !fresh && used + spaces + w > width {
            next_line(&mut line, &mut used, &mut lines);
            fresh = true;
            spaces = 0;
        }
        line.extend(std::iter::repeat_n(' ', spaces));
        used += spaces;
        spaces = 0;
        if used + w <= width {
            line.push_str(word);
            used += w;
            fresh = false;
            continue;
        }
        // Wider than the room left on an empty line: split between characters.
        for c in word.chars() {
            let cw = c.width().unwrap_or(0);
            if !fresh && used + cw > width {
                next_line(&mut line, &mut used, &mut lines);
            }
            line.push(c);
            used += cw;
            fresh = false;
        }
    }
    lines.push(line);
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    fn widest(lines: &[String]) -> usize {
        lines.iter().map(|l| display_width(l)).max().unwrap_or(0)
    }

    #[test]
    fn wraps_at_spaces_with_a_hanging_indent() {
        let text =
            "pinned-low: lower RB to 820R so that the worst-case overdrive reaches the target";
        let lines = wrap(text, 30, "  - ", "    ");
        assert_eq!(
            lines,
            vec![
                "  - pinned-low: lower RB to",
                "    820R so that the",
                "    worst-case overdrive",
                "    reaches the target",
            ]
        );
        assert!(widest(&lines) <= 30);
    }

    #[test]
    fn short_text_is_one_line_and_inner_spaces_stay() {
        assert_eq!(wrap("a  b", 80, "", ""), vec!["a  b"]);
        assert_eq!(wrap("", 80, "  - ", "    "), vec!["  - "]);
        assert_eq!(wrap("exactly ten", 11, "", ""), vec!["exactly ten"]);
        assert_eq!(wrap("exactly ten", 10, "", ""), vec!["exactly", "ten"]);
    }

    #[test]
    fn long_words_are_split_and_nothing_is_lost() {
        let word = "x".repeat(25);
        let lines = wrap(&format!("a {word} b"), 10, "", "  ");
        assert!(widest(&lines) <= 10, "{lines:?}");
        let joined: String = lines.concat().split_whitespace().collect();
        assert_eq!(joined, format!("a{word}b"));
    }

    #[test]
    fn width_counts_columns_not_bytes() {
        // Each of these characters takes two columns [std: UAX 11, East Asian Width W].
        assert_eq!(display_width("温度"), 4);
        assert_eq!(display_width("Ω µ °C"), 6);
        let lines = wrap("温度 温度 温度", 9, "", "");
        assert_eq!(lines, vec!["温度 温度", "温度"]);
        // A wide character with one column of room still goes somewhere.
        let lines = wrap("温度", 1, "", "");
        assert_eq!(lines.concat(), "温度");
    }

    #[test]
    fn the_width_comes_from_columns_then_the_terminal_and_never_when_piped() {
        let env = |v: &str| Some(OsStr::new(v).to_owned());
        assert_eq!(
            width_from(true, env("80").as_deref(), || Some(132)),
            Some(80)
        );
        assert_eq!(width_from(true, None, || Some(132)), Some(132));
        assert_eq!(
            width_from(true, env("0").as_deref(), || Some(132)),
            Some(132)
        );
        assert_eq!(
            width_from(true, env("wide").as_deref(), || Some(100)),
            Some(100)
        );
        assert_eq!(width_from(true, env("-5").as_deref(), || None), None);
        assert_eq!(width_from(true, None, || Some(0)), None);
        assert_eq!(width_from(false, env("80").as_deref(), || Some(132)), None);
    }
}
