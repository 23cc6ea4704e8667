//! The Markdown renderer: the same content as the table, for pasting into a design review.
//! Every text passes through [`escape`], [`markdown_line`] or [`markdown_link_text`], so names
//! render as literal text, never as HTML, links or formatting.

use super::escape::{markdown_line, markdown_link_text, markdown_text as escape};
use super::model::StageReport;
use super::rows::{head_blocks, stage_blocks, tail_blocks, Block};
use super::stream::{Head, Renderer, Tail};

/// Renders a report as GitHub-flavoured Markdown.
#[derive(Clone, Copy, Debug, Default)]
pub struct MarkdownRenderer;

/// A picture path as a link destination: every ASCII character but letters, digits and
/// `-._~/` percent-encoded, and every space, control or bidi character too, so the path can neither
/// end the destination early, nor carry a control character, nor name a scheme such as
/// `javascript:` (`:` is encoded) [std: CommonMark 0.31, 6.3 link destination; RFC 3986, 2.1
/// percent-encoding].
fn destination(path: &str) -> String {
    let mut out = String::with_capacity(path.len());
    for c in path.chars() {
        if c.is_ascii_alphanumeric() || "-._~/".contains(c) {
            out.push(c);
        } else if c.is_ascii() || c.is_whitespace() || super::escape::is_unsafe_char(c) {
            let mut buf = [0u8; 4];
            for b in c.encode_utf8(&mut buf).bytes() {
                out.push_str(&format!("%{b:02X}"));
            }
        } else {
            out.push(c);
        }
    }
    out
}

impl Renderer for MarkdownRenderer {
    fn head(&mut self, head: &Head) -> String {
        let mut out = String::new();
        if head.board.is_none() {
            out.push_str("# Driver stage review\n\n");
        }
        draw(head_blocks(head), out)
    }
    fn stage(&mut self, stage: &StageReport) -> String {
        draw(stage_blocks(stage), String::new())
    }
    fn tail(&mut self, tail: &Tail) -> String {
        draw(tail_blocks(tail), String::new())
    }
    fn wants_summary(&self) -> bool {
        true
    }
}

pub(super) fn draw(blocks: Vec<Block>, mut out: String) -> String {
    {
        for block in blocks {
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
                                // Bold draws the eye to what is not a pass only.
                                Some(st) if st != crate::check::Status::Pass => {
                                    format!("**{}**", escape(&c.text))
                                }
                                _ => escape(&c.text),
                            })
                            .collect();
                        out.push_str(&format!("| {} |\n", cells.join(" | ")));
                    }
                    out.push('\n');
                }
                Block::List(title, items) => {
                    out.push_str(&format!("**{}**\n\n", escape(&title)));
                    for item in items {
                        out.push_str(&format!("- {}\n", markdown_line(&item)));
                    }
                    out.push('\n');
                }
                Block::Line(text) => {
                    out.push_str(&markdown_line(&text));
                    out.push_str("\n\n");
                }
                Block::Image(alt, path) => {
                    let (alt, dest) = (markdown_link_text(&alt), destination(&path));
                    out.push_str(&format!("![{alt}]({dest})\n\n"));
                }
                Block::Verdict(text, _) => {
                    out.push_str(&format!("**{}**\n\n", escape(&text)));
                }
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn destinations_are_percent_encoded_and_name_no_scheme() {
        assert_eq!(destination("plots/stage-1.svg"), "plots/stage-1.svg");
        assert_eq!(
            destination("my plots/a (1).svg"),
            "my%20plots/a%20%281%29.svg"
        );
        assert_eq!(
            destination("javascript:alert(1)"),
            "javascript%3Aalert%281%29"
        );
        assert_eq!(destination("a\u{1b}b\u{202e}>"), "a%1Bb%E2%80%AE%3E");
        assert_eq!(destination("温度.svg"), "温度.svg");
        assert_eq!(destination("a\u{a0}b"), "a%C2%A0b");
    }
}
