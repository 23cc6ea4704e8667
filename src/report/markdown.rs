//! The Markdown renderer: the same content as the table, for pasting into a design review.

use super::model::Report;
use super::rows::{document, Block};
use super::Renderer;

/// Renders a report as GitHub-flavoured Markdown.
#[derive(Clone, Copy, Debug, Default)]
pub struct MarkdownRenderer;

fn escape(text: &str) -> String {
    text.replace('|', "\\|").replace('\n', " ")
}

impl Renderer for MarkdownRenderer {
    fn render(&self, report: &Report) -> String {
        let mut out = String::new();
        if report.board.is_none() {
            out.push_str("# Driver stage review\n\n");
        }
        for block in document(report) {
            match block {
                Block::Heading(level, text) => {
                    out.push_str(&"#".repeat(usize::from(level)));
                    out.push(' ');
                    out.push_str(&escape(&text));
                    out.push_str("\n\n");
                }
                Block::Table { headers, rows } => {
                    out.push_str(&format!(
                        "| {} |\n",
                        headers
                            .iter()
                            .map(|h| escape(h))
                            .collect::<Vec<_>>()
                            .join(" | ")
                    ));
                    out.push_str(&format!("|{}\n", " --- |".repeat(headers.len())));
                    for row in rows {
                        let cells: Vec<String> = row
                            .iter()
                            .map(|c| match c.status {
                                Some(_) => format!("**{}**", escape(&c.text)),
                                None => escape(&c.text),
                            })
                            .collect();
                        out.push_str(&format!("| {} |\n", cells.join(" | ")));
                    }
                    out.push('\n');
                }
                Block::List(title, items) => {
                    out.push_str(&format!("**{}**\n\n", escape(&title)));
                    for item in items {
                        out.push_str(&format!("- {}\n", escape(&item)));
                    }
                    out.push('\n');
                }
                Block::Line(text) => {
                    out.push_str(&escape(&text));
                    out.push_str("\n\n");
                }
                Block::Image(alt, path) => {
                    out.push_str(&format!(
                        "![{}]({})\n\n",
                        escape(&alt),
                        path.replace(' ', "%20")
                    ));
                }
                Block::Verdict(text, _) => {
                    out.push_str(&format!("**{}**\n\n", escape(&text)));
                }
            }
        }
        out
    }
}
