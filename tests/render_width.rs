//! The table report fits the terminal: at a width every line fits and no word is lost; without
//! one (piped output) every line is whole. Checked on the demo board at 80 and 120 columns,
//! through the library and through the binary on a pseudo-terminal.

use std::path::Path;
use std::process::{Command, Stdio};

use pinlow::board::read_board;
use pinlow::parts::Library;
use pinlow::pipeline::audit;
use pinlow::report::{render, render_with_width, Format, Report};
use unicode_width::UnicodeWidthStr;

fn demo() -> Report {
    let lib = Library::builtin().expect("the shipped parts load");
    let board = read_board(Path::new("examples/greenhouse.json"), &lib).expect("demo reads");
    audit(board.name, &board.stages)
}

/// Characters of the table preset's borders.
const BORDERS: &[char] = &[
    '┌', '┐', '└', '┘', '─', '┬', '┴', '│', '┆', '╞', '╡', '╪', '═',
];

/// What a report says, apart from its layout: the text outside tables as one string of words
/// (heading rules dropped), and each table as the text of each column top to bottom with all
/// whitespace removed (a cell wrapped over several lines reads the same, and comfy-table may
/// split a word too long for its column).
#[derive(Debug, PartialEq)]
enum Part {
    Text(String),
    Table(Vec<String>),
}

fn content(text: &str) -> Vec<Part> {
    let mut parts = Vec::new();
    let mut words: Vec<String> = Vec::new();
    let mut table: Option<Vec<String>> = None;
    for line in text.lines() {
        if line.starts_with('┌') {
            assert!(table.is_none(), "a table opens inside another: {line:?}");
            parts.push(Part::Text(words.join(" ")));
            words.clear();
            table = Some(Vec::new());
            continue;
        }
        if let Some(columns) = table.as_mut() {
            if line.starts_with('└') {
                parts.extend(table.take().map(Part::Table));
            } else if !line.starts_with('╞') {
                let cells: Vec<&str> = line.split(['│', '┆']).collect();
                let inner = cells.get(1..cells.len().saturating_sub(1)).unwrap_or(&[]);
                assert!(!inner.is_empty(), "table line without cells: {line:?}");
                if columns.is_empty() {
                    columns.resize(inner.len(), String::new());
                }
                assert_eq!(columns.len(), inner.len(), "ragged table line: {line:?}");
                for (column, cell) in columns.iter_mut().zip(inner) {
                    column.extend(cell.chars().filter(|c| !c.is_whitespace()));
                }
            }
            continue;
        }
        assert!(
            !line.contains(BORDERS),
            "a table line outside a table: {line:?}"
        );
        if !line.is_empty() && line.chars().all(|c| c == '=' || c == '-') {
            continue;
        }
        words.extend(line.split_whitespace().map(str::to_string));
    }
    assert!(table.is_none(), "a table was left open");
    parts.push(Part::Text(words.join(" ")));
    parts
}

/// Drop SGR colour sequences (`ESC [ digits ; ... m`).
fn strip_sgr(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut rest = text;
    while let Some(at) = rest.find("\u{1b}[") {
        let (before, after) = rest.split_at(at);
        out.push_str(before);
        let seq = &after[2..];
        let end = seq
            .find(|c: char| !(c.is_ascii_digit() || c == ';'))
            .filter(|&e| seq[e..].starts_with('m'));
        match end {
            Some(e) => rest = &seq[e + 1..],
            None => {
                out.push_str("\u{1b}[");
                rest = seq;
            }
        }
    }
    out.push_str(rest);
    out
}

fn widest(text: &str) -> usize {
    text.lines().map(UnicodeWidthStr::width).max().unwrap_or(0)
}

fn wider_than(text: &str, width: usize) -> usize {
    text.lines()
        .filter(|l| UnicodeWidthStr::width(*l) > width)
        .count()
}

#[test]
fn at_80_and_120_columns_every_line_fits_and_no_word_is_lost() {
    let report = demo();
    let whole = render(&report, Format::Table, false);
    let whole_content = content(&whole);
    let tables = whole_content
        .iter()
        .filter(|p| matches!(p, Part::Table(_)))
        .count();
    // The demo has a summary and four tables per stage, and long lines: the check means
    // something only if there is much to wrap.
    assert!(tables >= 20, "only {tables} tables in the demo");
    let chars: usize = whole_content
        .iter()
        .map(|p| match p {
            Part::Text(t) => t.len(),
            Part::Table(cols) => cols.iter().map(String::len).sum(),
        })
        .sum();
    assert!(chars > 10_000, "only {chars} characters of content");
    for width in [80, 120] {
        let fitted = render_with_width(&report, Format::Table, false, Some(width));
        assert!(
            wider_than(&whole, width) > 10,
            "whole lines should run past {width} columns"
        );
        let over: Vec<&str> = fitted
            .lines()
            .filter(|l| UnicodeWidthStr::width(*l) > width)
            .collect();
        assert!(
            over.is_empty(),
            "{} lines wider than {width}: {over:#?}",
            over.len()
        );
        assert!(fitted.lines().count() > whole.lines().count());
        assert_eq!(
            content(&fitted),
            whole_content,
            "the {width}-column report says something else than the whole one"
        );
    }
}

#[test]
fn the_content_check_sees_a_lost_word_and_a_lost_cell() {
    // The comparison above must fail when a word or a cell goes missing.
    let whole = render(&demo(), Format::Table, false);
    let fitted = render_with_width(&demo(), Format::Table, false, Some(80));
    let lost_word = fitted.replacen("coldest", "", 1);
    assert_ne!(content(&lost_word), content(&whole));
    let lost_cell = fitted.replacen("62.89", "     ", 1);
    assert_ne!(content(&lost_cell), content(&whole));
    let broken_border = fitted.replacen('└', "x", 1);
    assert!(std::panic::catch_unwind(|| content(&broken_border)).is_err());
}

#[test]
fn piped_output_keeps_each_fix_on_one_line() {
    let report = demo();
    let whole = render(&report, Format::Table, false);
    let items: Vec<&str> = whole.lines().filter(|l| l.starts_with("  - ")).collect();
    let mut fixes = 0;
    for stage in &report.stages {
        for fix in &stage.fixes {
            fixes += 1;
            assert!(
                items
                    .iter()
                    .any(|l| l.contains(&format!("{}: {}", fix.check, fix.action))),
                "fix not on one line: {}",
                fix.action
            );
        }
    }
    assert!(fixes >= 5, "the demo proposes {fixes} fixes");
    // Some fix lines are far wider than any terminal: they were not wrapped.
    assert!(widest(&whole) > 250, "widest line {}", widest(&whole));
    // No line is the indented continuation of a wrapped one.
    assert!(!whole.lines().any(|l| l.starts_with("    ")));
}

#[test]
fn wrapped_fixes_hang_under_their_bullet() {
    let fitted = render_with_width(&demo(), Format::Table, false, Some(80));
    let lines: Vec<&str> = fitted.lines().collect();
    let mut continued = 0;
    for pair in lines.windows(2) {
        if let [first, next] = pair {
            if first.starts_with("  - ") && next.starts_with("    ") {
                continued += 1;
                assert!(
                    !next.starts_with("     "),
                    "continuation indented by four: {next:?}"
                );
            }
        }
    }
    assert!(
        continued >= 5,
        "only {continued} list items wrapped at 80 columns"
    );
}

/// Run the binary on a pseudo-terminal with `script` (util-linux), `setup` shell commands
/// first; returns its output with the terminal's CR LF turned into LF, or `None` when `script`
/// is not installed.
fn on_terminal(setup: &str, args: &str, columns: Option<&str>) -> Option<String> {
    let present = Command::new("script")
        .arg("--version")
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    if !present {
        eprintln!("skipped: util-linux `script` is not installed, so no pseudo-terminal test");
        return None;
    }
    let bin = env!("CARGO_BIN_EXE_pinlow");
    // Set COLUMNS in the command itself: the shell `script` starts may reset it to the
    // terminal's width after `stty`.
    let env = match columns {
        Some(c) => format!("env COLUMNS={c}"),
        None => "env -u COLUMNS".to_string(),
    };
    let command = format!("{setup} exec {env} '{bin}' {args}");
    let out = Command::new("script")
        .args(["-qec", &command, "/dev/null"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .env_remove("PINLOW_PARTS")
        .env("NO_COLOR", "1")
        .stdin(Stdio::null())
        .output()
        .expect("script runs");
    let text = String::from_utf8_lossy(&out.stdout).replace("\r\n", "\n");
    assert!(
        text.contains("Board verdict"),
        "no report on the terminal (exit {:?}): {text}\n{}",
        out.status.code(),
        String::from_utf8_lossy(&out.stderr)
    );
    Some(text)
}

#[test]
fn on_a_terminal_the_report_fits_columns_or_the_terminal_width() {
    let args = "audit examples/greenhouse.json --color never";
    let Some(at_80) = on_terminal("", args, Some("80")) else {
        return;
    };
    assert_eq!(wider_than(&at_80, 80), 0, "at COLUMNS=80: {at_80}");
    let whole = render(&demo(), Format::Table, false);
    assert!(at_80.lines().count() > whole.lines().count());
    assert_eq!(content(&at_80), content(&whole));

    // Colour codes take no columns: with them stripped the lines fit too.
    let Some(colored) = on_terminal(
        "",
        "audit examples/greenhouse.json --color always",
        Some("80"),
    ) else {
        return;
    };
    assert!(colored.contains("\u{1b}["), "no colour on the terminal");
    let plain = strip_sgr(&colored);
    assert_eq!(wider_than(&plain, 80), 0, "coloured at COLUMNS=80: {plain}");
    assert_eq!(content(&plain), content(&whole));

    // No COLUMNS: the terminal's own width.
    let Some(at_100) = on_terminal("stty rows 40 cols 100;", args, None) else {
        return;
    };
    assert_eq!(
        wider_than(&at_100, 100),
        0,
        "at a 100-column terminal: {at_100}"
    );
    assert!(widest(&at_100) > 80, "the 100 columns were not used");

    // COLUMNS wins over the terminal.
    let Some(both) = on_terminal("stty rows 40 cols 100;", args, Some("120")) else {
        return;
    };
    assert_eq!(wider_than(&both, 120), 0);
    assert!(widest(&both) > 100, "COLUMNS=120 was not used");
}

#[test]
fn piped_the_binary_ignores_columns() {
    let out = Command::new(env!("CARGO_BIN_EXE_pinlow"))
        .args(["audit", "examples/greenhouse.json", "--color", "never"])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .env_remove("PINLOW_PARTS")
        .env("COLUMNS", "80")
        .output()
        .expect("runs");
    let text = String::from_utf8_lossy(&out.stdout);
    assert_eq!(text, render(&demo(), Format::Table, false));
}
