//! The terminal table renderer (comfy-table). Colour only when asked for; every text is
//! shown through [`terminal_text`], so no control character of a name reaches the terminal.
//! Given a width, tables and long lines are fitted to it (lists with a hanging indent);
//! without one every line is drawn whole.

use comfy_table::presets::UTF8_FULL_CONDENSED;
use comfy_table::{Cell as TableCell, Color, ColumnConstraint, ContentArrangement, Table, Width};

use super::escape::terminal_text;
use super::layout::{column_widths, longest_word, PADDING};
use super::model::StageReport;
use super::rows::{head_blocks, stage_blocks, tail_blocks, Block, Cell};
use super::stream::{Head, Renderer, Tail};
use super::wrap::{display_width, wrap};
use crate::check::Status;

/// Renders a report as text tables.
#[derive(Clone, Copy, Debug, Default)]
pub struct TableRenderer {
    /// Colour the status cells and verdicts.
    pub color: bool,
    /// Fit tables and lines to this many columns; `None` draws every line whole (for pipes
    /// and files).
    pub width: Option<usize>,
}

impl TableRenderer {
    /// A cell of text already made safe, coloured by its status when colour is on.
    fn paint(&self, text: &str, status: Option<Status>) -> TableCell {
        let cell = TableCell::new(text);
        match (self.color, status) {
            (true, Some(s)) => cell.fg(color_of(s)),
            _ => cell,
        }
    }

    fn verdict_line(&self, text: &str, status: Status) -> String {
        if !self.color {
            return text.to_string();
        }
        let code = match status {
            Status::Pass => 32,
            Status::Marginal => 33,
            Status::Fail => 31,
        };
        format!("\x1b[1;{code}m{text}\x1b[0m")
    }
}

/// A table drawn line by line in the layout of comfy-table's `UTF8_FULL_CONDENSED` preset with
/// one space of padding and nothing wrapped: the same text, without the layout engine, which
/// dominates the time of long reports (piped output: no width, no colour).
fn plain_table(headers: &[String], rows: &[Vec<Cell>]) -> String {
    let headers: Vec<std::borrow::Cow<'_, str>> =
        headers.iter().map(|h| terminal_text(h)).collect();
    let rows: Vec<Vec<std::borrow::Cow<'_, str>>> = rows
        .iter()
        .map(|r| r.iter().map(|c| terminal_text(&c.text)).collect())
        .collect();
    let columns = headers
        .len()
        .max(rows.iter().map(Vec::len).max().unwrap_or(0));
    let mut widths = vec![0usize; columns];
    for line in std::iter::once(&headers).chain(rows.iter()) {
        for (w, cell) in widths.iter_mut().zip(line) {
            *w = (*w).max(display_width(cell));
        }
    }
    let rule = |left: char, fill: char, joint: char, right: char, out: &mut String| {
        out.push(left);
        for (i, w) in widths.iter().enumerate() {
            if i > 0 {
                out.push(joint);
            }
            out.extend(std::iter::repeat_n(fill, w + 2));
        }
        out.push(right);
        out.push('\n');
    };
    let line = |cells: &[std::borrow::Cow<'_, str>], out: &mut String| {
        out.push('│');
        for (i, w) in widths.iter().enumerate() {
            if i > 0 {
                out.push('┆');
            }
            let text = cells.get(i).map(|c| c.as_ref()).unwrap_or("");
            out.push(' ');
            out.push_str(text);
            out.extend(std::iter::repeat_n(' ', w - display_width(text) + 1));
        }
        out.push('│');
        out.push('\n');
    };
    let mut out = String::with_capacity(256 * (rows.len() + 4));
    rule('┌', '─', '┬', '┐', &mut out);
    line(&headers, &mut out);
    rule('╞', '═', '╪', '╡', &mut out);
    for r in &rows {
        line(r, &mut out);
    }
    rule('└', '─', '┴', '┘', &mut out);
    // comfy-table ends its text without the last newline.
    out.pop();
    out
}

fn color_of(s: Status) -> Color {
    match s {
        Status::Pass => Color::Green,
        Status::Marginal => Color::Yellow,
        Status::Fail => Color::Red,
    }
}

impl TableRenderer {
    /// `text` shown safely and, with a width, wrapped: the first line starts with `first`,
    /// the others with `rest`.
    fn lines(&self, text: &str, first: &str, rest: &str) -> Vec<String> {
        let text = terminal_text(text);
        match self.width {
            Some(width) => wrap(&text, width, first, rest),
            None => vec![format!("{first}{text}")],
        }
    }

    fn push_lines(&self, out: &mut String, text: &str, first: &str, rest: &str) {
        for line in self.lines(text, first, rest) {
            out.push_str(&line);
            out.push('\n');
        }
    }

    fn table(&self, headers: &[String], rows: &[Vec<Cell>]) -> String {
        if !self.color && self.width.is_none() {
            return plain_table(headers, rows);
        }
        let mut t = Table::new();
        t.load_preset(UTF8_FULL_CONDENSED);
        // Never ask the real terminal: colour is what the caller chose.
        t.force_no_tty();
        if self.color {
            t.enforce_styling();
        }
        let headers: Vec<_> = headers.iter().map(|h| terminal_text(h)).collect();
        let rows: Vec<Vec<_>> = rows
            .iter()
            .map(|row| {
                row.iter()
                    .map(|Cell { text, status }| (terminal_text(text), *status))
                    .collect()
            })
            .collect();
        t.set_header(headers.iter().map(TableCell::new).collect::<Vec<_>>());
        for row in &rows {
            t.add_row(
                row.iter()
                    .map(|(text, status)| self.paint(text, *status))
                    .collect::<Vec<_>>(),
            );
        }
        let Some(width) = self.width else {
            t.set_content_arrangement(ContentArrangement::Disabled);
            return t.to_string();
        };
        let mut natural: Vec<usize> = headers.iter().map(|h| display_width(h)).collect();
        let mut longest: Vec<usize> = headers.iter().map(|h| longest_word(h)).collect();
        for row in &rows {
            for ((n, l), (text, _)) in natural.iter_mut().zip(longest.iter_mut()).zip(row) {
                *n = (*n).max(display_width(text));
                *l = (*l).max(longest_word(text));
            }
        }
        t.set_content_arrangement(ContentArrangement::Dynamic);
        t.set_width(u16::try_from(width).unwrap_or(u16::MAX));
        // After the rows: constraints apply to the columns the table has.
        let fixed = column_widths(&natural, &longest, width)
            .into_iter()
            .map(|w| {
                ColumnConstraint::Absolute(Width::Fixed(
                    u16::try_from(w + PADDING).unwrap_or(u16::MAX),
                ))
            });
        t.set_constraints(fixed);
        t.to_string()
    }

    pub(super) fn draw(&self, blocks: Vec<Block>, mut out: String) -> String {
        for block in blocks {
            match block {
                Block::Heading(level, text) => {
                    out.push('\n');
                    let lines = self.lines(&text, "", "");
                    let widest = lines.iter().map(|l| display_width(l)).max().unwrap_or(0);
                    for line in lines {
                        out.push_str(&line);
                        out.push('\n');
                    }
                    let rule = if level == 1 { '=' } else { '-' };
                    out.extend(std::iter::repeat_n(rule, widest));
                    out.push('\n');
                }
                Block::Table { headers, rows } => {
                    out.push_str(&self.table(&headers, &rows));
                    out.push('\n');
                }
                Block::List(title, items) => {
                    out.push('\n');
                    self.push_lines(&mut out, &format!("{title}:"), "", "");
                    for item in items {
                        self.push_lines(&mut out, &item, "  - ", "    ");
                    }
                }
                Block::Line(text) => self.push_lines(&mut out, &text, "", ""),
                Block::Image(alt, path) => {
                    self.push_lines(&mut out, &format!("{alt}: {path}"), "", "  ");
                }
                Block::Verdict(text, status) => {
                    out.push('\n');
                    for line in self.lines(&text, "", "") {
                        out.push_str(&self.verdict_line(&line, status));
                        out.push('\n');
                    }
                }
            }
        }
        out
    }
}

impl Renderer for TableRenderer {
    fn head(&mut self, head: &Head) -> String {
        let mut text = self.draw(head_blocks(head), String::new());
        // Drop the leading blank lines in place (the summary of a big board is large).
        let lead = text.len() - text.trim_start_matches('\n').len();
        text.drain(..lead);
        text
    }
    fn stage(&mut self, stage: &StageReport) -> String {
        self.draw(stage_blocks(stage), String::new())
    }
    fn tail(&mut self, tail: &Tail) -> String {
        self.draw(tail_blocks(tail), String::new())
    }
    fn wants_summary(&self) -> bool {
        true
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// comfy-table's own drawing of a table, nothing wrapped, no colour.
    fn comfy(headers: &[String], rows: &[Vec<Cell>]) -> String {
        let mut t = Table::new();
        t.load_preset(UTF8_FULL_CONDENSED);
        t.force_no_tty();
        t.set_content_arrangement(ContentArrangement::Disabled);
        t.set_header(headers.to_vec());
        for r in rows {
            t.add_row(r.iter().map(|c| c.text.clone()).collect::<Vec<_>>());
        }
        t.to_string()
    }

    #[test]
    fn the_plain_path_draws_what_comfy_table_draws() {
        let cases: Vec<(Vec<String>, Vec<Vec<Cell>>)> = vec![
            (
                vec!["Check".into(), "Status".into(), "Figure".into()],
                vec![
                    vec![
                        Cell::from("pinned-low"),
                        Cell::from("PASS"),
                        Cell::from("2.93"),
                    ],
                    vec![
                        Cell::from("junction-temp"),
                        Cell::from(""),
                        Cell::from("62.2 °C"),
                    ],
                ],
            ),
            (
                vec!["Ω µ ±".into(), "温度".into()],
                vec![vec![Cell::from("4.7 kΩ"), Cell::from("x")]],
            ),
            (vec!["only".into()], Vec::new()),
        ];
        for (headers, rows) in cases {
            assert_eq!(plain_table(&headers, &rows), comfy(&headers, &rows));
        }
    }
}
