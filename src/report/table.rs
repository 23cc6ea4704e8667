//! The terminal table renderer (comfy-table). Colour only when asked for.

use comfy_table::presets::UTF8_FULL_CONDENSED;
use comfy_table::{Cell as TableCell, Color, ContentArrangement, Table};

use super::model::StageReport;
use super::rows::{head_blocks, stage_blocks, tail_blocks, Block, Cell};
use super::stream::{Head, Renderer, Tail};
use crate::analysis::Status;

/// Renders a report as text tables.
#[derive(Clone, Copy, Debug, Default)]
pub struct TableRenderer {
    /// Colour the status cells and verdicts.
    pub color: bool,
}

impl TableRenderer {
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

fn color_of(s: Status) -> Color {
    match s {
        Status::Pass => Color::Green,
        Status::Marginal => Color::Yellow,
        Status::Fail => Color::Red,
    }
}

impl TableRenderer {
    fn draw(&self, blocks: Vec<Block>, mut out: String) -> String {
        for block in blocks {
            match block {
                Block::Heading(level, text) => {
                    out.push('\n');
                    out.push_str(&text);
                    out.push('\n');
                    let rule = if level == 1 { '=' } else { '-' };
                    out.push_str(&rule.to_string().repeat(text.chars().count()));
                    out.push('\n');
                }
                Block::Table { headers, rows } => {
                    let mut t = Table::new();
                    t.load_preset(UTF8_FULL_CONDENSED);
                    t.set_content_arrangement(ContentArrangement::Dynamic);
                    t.set_width(120);
                    if !self.color {
                        t.force_no_tty();
                    }
                    t.set_header(headers);
                    for row in rows {
                        t.add_row(
                            row.iter()
                                .map(|Cell { text, status }| self.paint(text, *status))
                                .collect::<Vec<_>>(),
                        );
                    }
                    out.push_str(&t.to_string());
                    out.push('\n');
                }
                Block::List(title, items) => {
                    out.push('\n');
                    out.push_str(&title);
                    out.push_str(":\n");
                    for item in items {
                        out.push_str("  - ");
                        out.push_str(&item);
                        out.push('\n');
                    }
                }
                Block::Line(text) => {
                    out.push_str(&text);
                    out.push('\n');
                }
                Block::Image(alt, path) => {
                    out.push_str(&format!("{alt}: {path}\n"));
                }
                Block::Verdict(text, status) => {
                    out.push('\n');
                    out.push_str(&self.verdict_line(&text, status));
                    out.push('\n');
                }
            }
        }
        out
    }
}

impl Renderer for TableRenderer {
    fn head(&mut self, head: &Head) -> String {
        let text = self.draw(head_blocks(head), String::new());
        text.trim_start_matches('\n').to_string()
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
