//! The user documentation (README.md and docs/*.md) against the code: every key the board and
//! part readers accept is documented where a user looks for it (and no documented key is one the
//! readers refuse), every link resolves to a file of the repository, the README opens with the
//! job and the two set-up commands, and `pinlow --help` names the documents.

use std::collections::BTreeSet;
use std::path::{Component, Path, PathBuf};

use clap::CommandFactory;
use pinlow::cli::Cli;
use pinlow::schema::FileKind;
use pulldown_cmark::{Event, Options, Parser, Tag, TagEnd};
use serde_json::Value;

/// Hosts of open standards a document may link to; nothing else on the web.
const OPEN_STANDARDS: &[&str] = &["json-schema.org"];

/// The documents written in this repository: each must exist.
const DOCS: &[&str] = &[
    "docs/board-file.md",
    "docs/part-file.md",
    "docs/report.md",
    "docs/model.md",
    "docs/contributing.md",
];

/// The user documents `pinlow --help` names (docs/contributing.md is for contributors).
const HELP_DOCS: &[&str] = &[
    "docs/board-file.md",
    "docs/part-file.md",
    "docs/report.md",
    "docs/model.md",
];

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn read(rel: &str) -> String {
    std::fs::read_to_string(root().join(rel)).unwrap_or_else(|e| panic!("{rel}: {e}"))
}

/// README.md and every docs/*.md, as paths relative to the repository.
fn user_docs() -> Vec<String> {
    let mut docs: Vec<String> = std::fs::read_dir(root().join("docs"))
        .expect("docs/")
        .map(|e| e.expect("entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "md"))
        .map(|p| format!("docs/{}", p.file_name().expect("name").to_string_lossy()))
        .collect();
    docs.sort();
    docs.insert(0, "README.md".into());
    docs
}

/// What a document says, in order: its headings and its inline code spans (a code span in the
/// first cell of a table body row is the key that row documents).
#[derive(Debug)]
enum Item {
    Heading { title: String, codes: Vec<String> },
    Code { text: String, row_key: bool },
}

fn items(md: &str) -> Vec<Item> {
    let mut out = Vec::new();
    let mut heading: Option<(String, Vec<String>)> = None;
    let (mut in_head, mut in_row, mut cell) = (false, false, 0usize);
    for event in Parser::new_ext(md, Options::ENABLE_TABLES) {
        match event {
            Event::Start(Tag::Heading { .. }) => heading = Some((String::new(), Vec::new())),
            Event::End(TagEnd::Heading(_)) => {
                if let Some((title, codes)) = heading.take() {
                    out.push(Item::Heading { title, codes });
                }
            }
            Event::Start(Tag::TableHead) => (in_head, cell) = (true, 0),
            Event::End(TagEnd::TableHead) => in_head = false,
            Event::Start(Tag::TableRow) => (in_row, cell) = (true, 0),
            Event::End(TagEnd::TableRow) => in_row = false,
            Event::Start(Tag::TableCell) => cell += 1,
            Event::Text(t) => {
                if let Some((title, _)) = heading.as_mut() {
                    title.push_str(&t);
                }
            }
            Event::Code(c) => match heading.as_mut() {
                Some((title, codes)) => {
                    title.push_str(&c);
                    codes.push(c.to_string());
                }
                None => out.push(Item::Code {
                    text: c.to_string(),
                    row_key: in_row && !in_head && cell == 1,
                }),
            },
            _ => {}
        }
    }
    out
}

/// The body of one section (up to the next heading of any level): its code spans and the keys
/// its table rows document.
#[derive(Debug, Default)]
struct Section {
    codes: BTreeSet<String>,
    row_keys: BTreeSet<String>,
}

/// The section whose heading is `title` exactly, or whose heading starts with `` `title` ``.
fn section(doc: &str, items: &[Item], title: &str) -> Section {
    let start = items
        .iter()
        .position(|i| match i {
            Item::Heading { title: t, .. } => {
                t == title
                    || t.starts_with(&format!("{title}:"))
                    || t.starts_with(&format!("{title} "))
            }
            Item::Code { .. } => false,
        })
        .unwrap_or_else(|| panic!("{doc}: no section headed `{title}`"));
    let mut s = Section::default();
    for item in items.iter().skip(start + 1) {
        match item {
            Item::Heading { .. } => break,
            Item::Code { text, row_key } => {
                if *row_key {
                    s.row_keys.insert(text.clone());
                }
                s.codes.insert(text.clone());
            }
        }
    }
    s
}

/// Every key of every `properties` object in a JSON Schema.
fn schema_keys(v: &Value, out: &mut BTreeSet<String>) {
    match v {
        Value::Object(m) => {
            if let Some(Value::Object(props)) = m.get("properties") {
                out.extend(props.keys().cloned());
            }
            m.values().for_each(|x| schema_keys(x, out));
        }
        Value::Array(a) => a.iter().for_each(|x| schema_keys(x, out)),
        _ => {}
    }
}

fn all_codes(items: &[Item]) -> BTreeSet<String> {
    items
        .iter()
        .flat_map(|i| match i {
            Item::Code { text, .. } => vec![text.clone()],
            Item::Heading { codes, .. } => codes.clone(),
        })
        .collect()
}

/// Each of `keys` documented by a row of `s`, and each row of `s` one of `keys`.
fn rows_match(doc: &str, what: &str, s: &Section, keys: &[&str]) {
    for k in keys {
        assert!(
            s.row_keys.contains(*k),
            "{doc}: {what}: no table row documents `{k}`"
        );
    }
    for k in &s.row_keys {
        assert!(
            keys.contains(&k.as_str()),
            "{doc}: {what}: the row `{k}` is a key the reader does not take ({keys:?})"
        );
    }
}

#[test]
fn board_file_documents_every_key_the_reader_takes() {
    let doc = "docs/board-file.md";
    let items = items(&read(doc));
    rows_match(
        doc,
        "top level",
        &section(doc, &items, "Top level"),
        pinlow::board::BOARD_KEYS,
    );
    rows_match(
        doc,
        "stage keys",
        &section(doc, &items, "Stage keys"),
        pinlow::board::STAGE_KEYS,
    );
    for kind in pinlow::load::KINDS {
        let keys: Vec<&str> = kind.fields.iter().map(|f| f.key).collect();
        let s = section(doc, &items, kind.name);
        rows_match(doc, &format!("load kind {}", kind.name), &s, &keys);
    }
    for kind in pinlow::load::CLAMP_KINDS {
        let keys: Vec<&str> = kind.keys.iter().map(|k| k.spec.key).collect();
        let s = section(doc, &items, kind.name);
        rows_match(doc, &format!("clamp kind {}", kind.name), &s, &keys);
    }
    // Every key the board schema (made from the readers' types) names, nested ones included.
    let mut keys = BTreeSet::new();
    schema_keys(&FileKind::Board.schema(), &mut keys);
    let codes = all_codes(&items);
    for k in &keys {
        assert!(
            codes.contains(k),
            "{doc}: the schema key `{k}` is not documented"
        );
    }
}

#[test]
fn part_file_documents_every_key_the_readers_take() {
    let doc = "docs/part-file.md";
    let items = items(&read(doc));
    let kinds: [(&str, &[&str]); 2] = [
        ("npn", pinlow::drive::npn::part::KEYS),
        ("nmos", pinlow::drive::nmos::part::KEYS),
    ];
    // A new drive kind must be documented here too.
    let names: Vec<&str> = pinlow::drive::KINDS.iter().map(|k| k.name).collect();
    assert_eq!(names, kinds.iter().map(|k| k.0).collect::<Vec<_>>());
    let common = section(doc, &items, "Keys of every part");
    for (name, keys) in kinds {
        let own = section(doc, &items, &format!("{name} parts"));
        for k in keys {
            assert!(
                common.row_keys.contains(*k) || own.row_keys.contains(*k),
                "{doc}: no table row documents the {name} key `{k}`"
            );
        }
        for k in common.row_keys.iter().chain(&own.row_keys) {
            assert!(
                keys.contains(&k.as_str()),
                "{doc}: `{k}` is documented for {name} parts, which do not take it"
            );
        }
    }
    let mut keys = BTreeSet::new();
    schema_keys(&FileKind::Part.schema(), &mut keys);
    let codes = all_codes(&items);
    for k in &keys {
        assert!(
            codes.contains(k),
            "{doc}: the schema key `{k}` (a point key?) is not documented"
        );
    }
}

/// A heading's anchor as GitHub makes it: lower case, punctuation dropped, spaces as hyphens.
fn slug(title: &str) -> String {
    title
        .to_lowercase()
        .chars()
        .filter(|c| c.is_alphanumeric() || *c == ' ' || *c == '-' || *c == '_')
        .map(|c| if c == ' ' { '-' } else { c })
        .collect()
}

fn anchors(md: &str) -> BTreeSet<String> {
    let mut seen = BTreeSet::new();
    for item in items(md) {
        if let Item::Heading { title, .. } = item {
            let base = slug(&title);
            let mut anchor = base.clone();
            let mut n = 0;
            while seen.contains(&anchor) {
                n += 1;
                anchor = format!("{base}-{n}");
            }
            seen.insert(anchor);
        }
    }
    seen
}

fn links(md: &str) -> Vec<String> {
    Parser::new_ext(md, Options::ENABLE_TABLES)
        .filter_map(|e| match e {
            Event::Start(Tag::Link { dest_url, .. })
            | Event::Start(Tag::Image { dest_url, .. }) => Some(dest_url.to_string()),
            _ => None,
        })
        .collect()
}

/// Why `link` in `doc` is not allowed, or `None`.
fn bad_link(doc: &str, link: &str) -> Option<String> {
    if let Some((scheme, rest)) = link.split_once(':') {
        if scheme.chars().all(|c| c.is_ascii_alphabetic()) && !scheme.is_empty() {
            let host = rest.trim_start_matches('/').split('/').next().unwrap_or("");
            return (!(matches!(scheme, "http" | "https") && OPEN_STANDARDS.contains(&host)))
                .then(|| "a link outside the repository".to_string());
        }
    }
    let (path, anchor) = match link.split_once('#') {
        Some((p, a)) => (p, Some(a)),
        None => (link, None),
    };
    let here = root().join(doc);
    let dir = here.parent().expect("a folder");
    let target = if path.is_empty() {
        here.clone()
    } else {
        dir.join(path)
    };
    let p = Path::new(path);
    if p.is_absolute() || p.components().any(|c| matches!(c, Component::ParentDir)) {
        return Some("leaves its folder (`..` or an absolute path)".into());
    }
    let Ok(canonical) = target.canonicalize() else {
        return Some(format!("{} does not exist", target.display()));
    };
    if !canonical.starts_with(root().canonicalize().expect("root")) {
        return Some("points outside the repository".into());
    }
    if let Some(anchor) = anchor {
        if canonical.extension().is_some_and(|x| x == "md") {
            let text = std::fs::read_to_string(&canonical).expect("read");
            if !anchors(&text).contains(anchor) {
                return Some(format!("no heading makes the anchor #{anchor}"));
            }
        }
    }
    None
}

#[test]
fn links_resolve_inside_the_repository() {
    let mut count = 0;
    for doc in user_docs() {
        let text = read(&doc);
        for link in links(&text) {
            count += 1;
            if let Some(why) = bad_link(&doc, &link) {
                panic!("{doc}: link ({link}): {why}");
            }
        }
        // Nothing a user needs may live outside the repository, nor on another site.
        for needle in ["../shared", "shared/spec"] {
            assert!(!text.contains(needle), "{doc} refers to {needle}");
        }
        for (at, _) in text.match_indices("://") {
            let host = text[at + 3..]
                .split(|c: char| c == '/' || c.is_whitespace())
                .next()
                .unwrap_or("");
            assert!(
                OPEN_STANDARDS.contains(&host),
                "{doc}: a web address ({host}) outside the open standards"
            );
        }
    }
    assert!(
        count > 10,
        "the documents link to each other ({count} links)"
    );
    // The checker itself refuses what it must.
    for bad in [
        "../shared/spec/files.md",
        "https://example.org/x",
        "docs/nowhere.md",
        "docs/report.md#no-such-heading",
        "/etc/passwd",
    ] {
        assert!(bad_link("README.md", bad).is_some(), "{bad} passed");
    }
    assert!(bad_link("README.md", "docs/report.md#exit-codes").is_none());
}

#[test]
fn readme_opens_with_the_job_and_the_two_setup_commands() {
    let text = read("README.md");
    let mut lines = text
        .lines()
        .skip_while(|l| l.starts_with('#') || l.trim().is_empty());
    let paragraph: Vec<&str> = lines
        .by_ref()
        .take_while(|l| !l.trim().is_empty())
        .collect();
    let paragraph = paragraph.join(" ");
    for word in [
        "NPN",
        "N-channel MOSFET",
        "relay",
        "solenoid",
        "motor",
        "LEDs",
        "strip",
        "other load",
    ] {
        assert!(
            paragraph.contains(word),
            "the first paragraph does not name {word}: {paragraph}"
        );
    }
    let mut rest = lines.skip_while(|l| l.trim().is_empty());
    assert_eq!(
        rest.next(),
        Some("```sh"),
        "a shell block follows the first paragraph"
    );
    let commands: Vec<&str> = rest.take_while(|l| *l != "```").collect();
    assert_eq!(
        commands,
        [
            "cargo run --release -- audit examples/greenhouse.json",
            "cargo test --locked"
        ],
        "exactly the two set-up commands"
    );
    // CI must run the README's test command itself, not a variant of it.
    let ci = std::fs::read_to_string(".ci/run").expect(".ci/run");
    assert!(
        ci.lines().any(|l| l.trim() == commands[1]),
        ".ci/run does not call the README's test command `{}`",
        commands[1]
    );
    for phrase in [
        "**Caution.**",
        "driver stage",
        "licensed practice under local codes",
        "datasheet",
    ] {
        assert!(
            text.contains(phrase),
            "the caution paragraph lost `{phrase}`"
        );
    }
}

#[test]
fn help_names_the_documents() {
    let help = Cli::command().render_long_help().to_string();
    for doc in HELP_DOCS {
        assert!(help.contains(doc), "`pinlow --help` does not name {doc}");
    }
    for doc in DOCS {
        assert!(root().join(doc).is_file(), "{doc} is missing");
    }
}
