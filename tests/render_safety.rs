//! Names with arbitrary characters (controls, bidi controls, HTML, Markdown link and emphasis
//! syntax, characters XML forbids) go through every renderer: the table with and without
//! colour and width, Markdown, JSON and the SVG plot. Nothing comes out raw that could drive a
//! terminal, become HTML or a link, or make a document ill-formed, and the name is still there
//! for the reader to see.

use std::path::Path;
use std::sync::OnceLock;

use pinlow::analysis::analyse;
use pinlow::board::read_board;
use pinlow::parts::Library;
use pinlow::pipeline::{audit, picture};
use pinlow::plot::picture_svg;
use pinlow::report::{render, render_with_width, Format};
use pinlow::stage::Stage;
use proptest::prelude::*;
use pulldown_cmark::{Event, Options, Parser, Tag, TagEnd};
use unicode_width::UnicodeWidthStr;

fn demo_stages() -> &'static [Stage] {
    static STAGES: OnceLock<Vec<Stage>> = OnceLock::new();
    STAGES.get_or_init(|| {
        let lib = Library::builtin().expect("the shipped parts load");
        read_board(Path::new("examples/greenhouse.json"), &lib)
            .expect("the demo board reads")
            .stages
    })
}

/// Pieces that try to break out: terminal escapes, HTML, Markdown syntax, XML-forbidden and
/// bidi characters.
const HOSTILE: &[&str] = &[
    "\u{1b}[2J",
    "\u{1b}]0;owned\u{7}",
    "\u{1b}[31m",
    "\u{9b}31m",
    "\u{7f}",
    "\u{0}",
    "\r\n",
    "\t",
    "\u{202e}",
    "\u{2066}",
    "\u{fffe}",
    "\u{ffff}",
    "<script>alert(1)</script>",
    "<img src=x onerror=alert(1)>",
    "<IMG SRC=x>",
    "[x](javascript:alert(1))",
    "![i](javascript:alert(1))",
    "[r]: javascript:alert(1)",
    "[x][r]",
    "<https://example.invalid>",
    "https://example.invalid/",
    "www.example.invalid",
    "&lt;script&gt;",
    "&#60;",
    "**b**",
    "_i_",
    "`c`",
    "~~s~~",
    "| x |",
    "# h",
    "- l",
    "1. o",
    "> q",
    "    code",
    "\\",
    "]]>",
    "<!--",
    "\"'",
    "温度",
    " ",
];

fn piece() -> impl Strategy<Value = String> {
    prop_oneof![
        3 => prop::sample::select(HOSTILE).prop_map(str::to_string),
        2 => any::<char>().prop_map(String::from),
        1 => (0u32..0x20).prop_filter_map("a C0 control", char::from_u32).prop_map(String::from),
        1 => (0x7fu32..0xa0).prop_filter_map("DEL or C1", char::from_u32).prop_map(String::from),
        2 => "[a-z0-9 ]{1,6}",
    ]
}

fn hostile_text() -> impl Strategy<Value = String> {
    prop::collection::vec(piece(), 1..8).prop_map(|p| p.concat())
}

/// The characters no renderer may write raw (newline excepted: the formats put it themselves):
/// C0, DEL, C1, and the bidi embedding, override and isolate controls [std: Unicode Standard
/// Annex 9].
fn forbidden(c: char) -> bool {
    c != '\n' && (c.is_control() || matches!(c, '\u{202a}'..='\u{202e}' | '\u{2066}'..='\u{2069}'))
}

/// How a reader sees text: each forbidden character (newline included) as `\u{..}`. Written
/// here again rather than taken from the library, so the test checks the library.
fn shown(text: &str) -> String {
    text.chars()
        .map(|c| {
            if c == '\n' || forbidden(c) {
                format!("\\u{{{:x}}}", u32::from(c))
            } else {
                c.to_string()
            }
        })
        .collect()
}

/// Drop the SGR colour sequences (`ESC [ digits ; ... m`) the table writes itself.
fn strip_sgr(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut chars = text.chars().peekable();
    while let Some(c) = chars.next() {
        if c == '\u{1b}' && chars.peek() == Some(&'[') {
            let mut seq = String::new();
            chars.next();
            while let Some(&d) = chars.peek() {
                chars.next();
                if d == 'm' {
                    break;
                }
                seq.push(d);
            }
            if seq.chars().all(|d| d.is_ascii_digit() || d == ';') {
                continue;
            }
            // Not a colour sequence: keep it, so the check below sees the ESC.
            out.push('\u{1b}');
            out.push('[');
            out.push_str(&seq);
            continue;
        }
        out.push(c);
    }
    out
}

fn first_forbidden(text: &str) -> Option<(usize, char)> {
    text.char_indices().find(|&(_, c)| forbidden(c))
}

/// The Markdown as a CommonMark/GFM parser reads it: every heading's text, the image
/// destinations, and any HTML, link, code, emphasis or other construct no name may create.
struct MarkdownSeen {
    headings: Vec<String>,
    images: Vec<String>,
    intruders: Vec<String>,
}

fn read_markdown(text: &str) -> MarkdownSeen {
    let options = Options::ENABLE_TABLES
        | Options::ENABLE_STRIKETHROUGH
        | Options::ENABLE_TASKLISTS
        | Options::ENABLE_FOOTNOTES;
    let mut seen = MarkdownSeen {
        headings: Vec::new(),
        images: Vec::new(),
        intruders: Vec::new(),
    };
    let mut heading: Option<String> = None;
    for event in Parser::new_ext(text, options) {
        match event {
            Event::Start(Tag::Heading { .. }) => heading = Some(String::new()),
            Event::End(TagEnd::Heading(_)) => seen.headings.extend(heading.take()),
            Event::Text(t) => {
                if let Some(h) = heading.as_mut() {
                    h.push_str(&t);
                }
            }
            Event::Start(Tag::Image { dest_url, .. }) => seen.images.push(dest_url.to_string()),
            Event::Start(
                tag @ (Tag::Link { .. }
                | Tag::Emphasis
                | Tag::Strikethrough
                | Tag::CodeBlock(_)
                | Tag::BlockQuote(_)
                | Tag::HtmlBlock
                | Tag::FootnoteDefinition(_)
                | Tag::List(Some(_))),
            ) => seen.intruders.push(format!("{tag:?}")),
            Event::Html(h) | Event::InlineHtml(h) => seen.intruders.push(format!("html {h:?}")),
            Event::Code(c) => seen.intruders.push(format!("code {c:?}")),
            Event::TaskListMarker(_) => seen.intruders.push("task marker".into()),
            Event::FootnoteReference(f) => seen.intruders.push(format!("footnote {f:?}")),
            Event::Rule => seen.intruders.push("rule".into()),
            _ => {}
        }
    }
    seen
}

/// Every text node of an SVG document, after entity decoding.
fn svg_texts(svg: &str) -> Result<Vec<String>, String> {
    let doc = roxmltree::Document::parse(svg).map_err(|e| format!("SVG is not XML: {e}"))?;
    Ok(doc
        .descendants()
        .filter_map(|n| n.text())
        .map(str::to_string)
        .collect())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]

    #[test]
    fn hostile_names_come_out_escaped_in_every_format(
        board in hostile_text(),
        name in hostile_text(),
        part_id in hostile_text(),
        plot in hostile_text(),
        which in 0usize..7,
        width in 20usize..140,
    ) {
        let mut stages = demo_stages().to_vec();
        let which = which % stages.len();
        let stage = stages.get_mut(which).expect("index in range");
        stage.name = name.clone();
        let stage = stage.clone();
        let mut report = audit(Some(board.clone()), &stages);
        // The part id is refused at input when it holds a control character; the report layer
        // must still show any id it is given safely.
        let shown_stage = report.stages.get_mut(which).expect("index in range");
        shown_stage.plot_svg = Some(plot.clone());
        shown_stage.part = part_id.clone();

        // Tables: no raw control or bidi character, with and without colour and width; the
        // colour sequences the table writes itself are the only ESC.
        for (color, width) in [(false, None), (false, Some(width)), (true, None), (true, Some(width))] {
            let text = render_with_width(&report, Format::Table, color, width);
            let checked = if color { strip_sgr(&text) } else { text.clone() };
            prop_assert!(
                first_forbidden(&checked).is_none(),
                "table (colour {color}, width {width:?}): raw {:?} in {checked:?}",
                first_forbidden(&checked)
            );
            if let Some(w) = width.filter(|&w| w >= 60) {
                // Wide enough for the widest table at one character a column: every line fits,
                // whatever the names hold.
                let over = checked.lines().find(|l| UnicodeWidthStr::width(*l) > w);
                prop_assert!(over.is_none(), "line wider than {w}: {over:?}");
            }
            if width.is_none() {
                prop_assert!(text.contains(&shown(&name)), "table lacks the name {:?}", shown(&name));
                prop_assert!(text.contains(&shown(&board)), "table lacks the board {:?}", shown(&board));
            }
        }

        // Markdown: no raw control, no HTML or link, and the names read as literal text.
        let md = render(&report, Format::Markdown, false);
        prop_assert!(first_forbidden(&md).is_none(), "Markdown: raw {:?}", first_forbidden(&md));
        let lower = md.to_lowercase();
        for needle in ["<script", "<img", "](javascript:"] {
            prop_assert!(!lower.contains(needle), "Markdown holds {needle}: {md}");
        }
        let seen = read_markdown(&md);
        prop_assert!(seen.intruders.is_empty(), "Markdown grew {:?}", seen.intruders);
        prop_assert_eq!(seen.images.len(), 1, "one picture, the plot: {:?}", seen.images);
        for dest in &seen.images {
            prop_assert!(
                !dest.contains(':') && !dest.chars().any(|c| c.is_whitespace() || forbidden(c)),
                "picture destination {dest:?}"
            );
        }
        let stage_heading = seen.headings.iter().any(|h| h.contains(&shown(&name)));
        prop_assert!(stage_heading, "no heading shows {:?}: {:?}", shown(&name), seen.headings);
        let board_heading = seen.headings.iter().any(|h| h.contains(shown(&board).trim()));
        prop_assert!(board_heading, "no heading shows {:?}: {:?}", shown(&board), seen.headings);

        // JSON: parses back to the very same strings, with nothing raw on the way.
        let json = render(&report, Format::Json, false);
        prop_assert!(first_forbidden(&json).is_none(), "JSON: raw {:?}", first_forbidden(&json));
        let back: serde_json::Value = serde_json::from_str(&json)
            .map_err(|e| TestCaseError::fail(format!("JSON does not parse: {e}")))?;
        prop_assert_eq!(back["board"].as_str(), Some(board.as_str()));
        let s = &back["stages"][which];
        prop_assert_eq!(s["name"].as_str(), Some(name.as_str()));
        prop_assert_eq!(s["part"].as_str(), Some(part_id.as_str()));

        // SVG: well-formed XML with the names shown escaped.
        let drawn = picture(&stage, &analyse(&stage)).map_err(TestCaseError::fail)?;
        let svg = picture_svg(&drawn).map_err(TestCaseError::fail)?;
        prop_assert!(first_forbidden(&svg).is_none(), "SVG: raw {:?}", first_forbidden(&svg));
        let texts = svg_texts(&svg).map_err(TestCaseError::fail)?;
        let svg_name: String = shown(&name)
            .chars()
            .map(|c| match c {
                '\u{fffe}' | '\u{ffff}' => format!("\\u{{{:x}}}", u32::from(c)),
                c => c.to_string(),
            })
            .collect();
        prop_assert!(
            texts.iter().any(|t| t.contains(&svg_name)),
            "no SVG text shows {svg_name:?}"
        );
    }
}
