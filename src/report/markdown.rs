//! The Markdown renderer: the same content as the table, for pasting into a design review.
//! Every text passes through [`escape`], [`markdown_line`] or [`markdown_link_text`], so names
//! render as literal text, never as HTML, links or formatting.

use super::escape::{markdown_line_into, markdown_link_text, markdown_text_into as escape_into};
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

/// Draws blocks into `out`, every text escaped straight into it (no string of its own per cell).
pub(super) fn draw(blocks: Vec<Block>, mut out: String) -> String {
    for block in blocks {
        match block {
            Block::Heading(level, text) => {
                for _ in 0..level {
                    out.push('#');
                }
                out.push(' ');
                escape_into(&mut out, &text);
                out.push_str("\n\n");
            }
            Block::Table { headers, rows } => {
                out.push('|');
                for h in &headers {
                    out.push(' ');
                    escape_into(&mut out, h);
                    out.push_str(" |");
                }
                out.push_str("\n|");
                for _ in &headers {
                    out.push_str(" --- |");
                }
                out.push('\n');
                for row in rows {
                    out.push('|');
                    for c in &row {
                        out.push(' ');
                        // Bold draws the eye to what is not a pass only.
                        let bold = c.status.is_some_and(|st| st != crate::check::Status::Pass);
                        if bold {
                            out.push_str("**");
                        }
                        escape_into(&mut out, &c.text);
                        if bold {
                            out.push_str("**");
                        }
                        out.push_str(" |");
                    }
                    out.push('\n');
                }
                out.push('\n');
            }
            Block::List(title, items) => {
                out.push_str("**");
                escape_into(&mut out, &title);
                out.push_str("**\n\n");
                for item in items {
                    out.push_str("- ");
                    markdown_line_into(&mut out, &item);
                    out.push('\n');
                }
                out.push('\n');
            }
            Block::Line(text) => {
                markdown_line_into(&mut out, &text);
                out.push_str("\n\n");
            }
            Block::Image(alt, path) => {
                out.push_str("![");
                out.push_str(&markdown_link_text(&alt));
                out.push_str("](");
                out.push_str(&destination(&path));
                out.push_str(")\n\n");
            }
            Block::Verdict(text, _) => {
                out.push_str("**");
                escape_into(&mut out, &text);
                out.push_str("**\n\n");
            }
        }
    }
    out
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
