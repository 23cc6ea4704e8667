//! Snapshots of every output format for each fixture board, and of every error class.

mod common;

use common::run;

#[test]
fn boards_in_every_format() {
    insta::glob!("fixtures/boards/*.json", |path| {
        let rel = path
            .strip_prefix(env!("CARGO_MANIFEST_DIR"))
            .expect("fixture inside the crate");
        let file = rel.to_string_lossy().into_owned();
        for format in ["table", "json", "markdown"] {
            let (code, out, err) = run(&[
                "audit",
                &file,
                "--parts",
                "tests/fixtures/parts-extra",
                "--format",
                format,
                "--color",
                "never",
            ]);
            assert!(
                code == 0 || code == 1,
                "{file} {format}: exit {code}: {err}"
            );
            assert!(err.is_empty(), "{file} {format}: stderr {err}");
            insta::assert_snapshot!(format!("audit-{format}"), out);
        }
    });
}

#[test]
fn yield_in_every_format() {
    for format in ["table", "json", "markdown"] {
        let (code, out, err) = run(&[
            "audit",
            "examples/greenhouse.json",
            "--yield",
            "10000",
            "--seed",
            "5",
            "--only-problems",
            "--format",
            format,
        ]);
        assert_eq!(code, 1, "{err}");
        insta::assert_snapshot!(format!("yield-{format}"), out);
    }
}

#[test]
fn board_errors() {
    insta::glob!("fixtures/errors/*.json", |path| {
        let rel = path
            .strip_prefix(env!("CARGO_MANIFEST_DIR"))
            .expect("fixture inside the crate");
        let file = rel.to_string_lossy().into_owned();
        let (code, out, err) = run(&["audit", &file]);
        assert_eq!(code, 2, "{file}: {err}");
        assert!(
            out.is_empty(),
            "nothing printed as if it were a result: {out}"
        );
        insta::assert_snapshot!(err);
    });
}

#[test]
fn part_file_errors() {
    insta::glob!("fixtures/parts-bad/*.json", |path| {
        let rel = path
            .strip_prefix(env!("CARGO_MANIFEST_DIR"))
            .expect("fixture inside the crate");
        let file = rel.to_string_lossy().into_owned();
        let (code, out, err) = run(&["parts", "check", &file]);
        assert_eq!(code, 2, "{file}: {err}");
        assert!(out.is_empty());
        assert!(err.contains(&file), "the message names the file: {err}");
        insta::assert_snapshot!(err);
    });
}

#[test]
fn part_check_reports_every_bad_file() {
    let (code, out, err) = run(&[
        "parts",
        "check",
        "tests/fixtures/parts-bad/negative-rating.json",
        "parts/2n3904.json",
        "tests/fixtures/parts-bad/unsorted.json",
    ]);
    assert_eq!(code, 2);
    assert!(out.is_empty());
    assert_eq!(err.lines().count(), 2, "{err}");
    insta::assert_snapshot!(err);
}

/// Flag errors: each is (name, arguments).
const FLAG_ERRORS: &[(&str, &[&str])] = &[
    (
        "bad-unit",
        &[
            "size",
            "--supply",
            "12mA",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "50mA",
        ],
    ),
    (
        "trailing-junk",
        &[
            "size",
            "--supply",
            "12Vx",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "50mA",
        ],
    ),
    (
        "nan",
        &[
            "size",
            "--supply",
            "NaN",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "50mA",
        ],
    ),
    (
        "missing-part",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--load",
            "current",
            "--current",
            "50mA",
        ],
    ),
    (
        "unknown-part",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "X9",
            "--load",
            "current",
            "--current",
            "50mA",
        ],
    ),
    (
        "flag-of-other-load",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "50mA",
            "--coil",
            "400",
        ],
    ),
    (
        "missing-load-value",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "relay",
        ],
    ),
    (
        "negative-current",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "-5mA",
        ],
    ),
    (
        "tolerance-one",
        &[
            "size",
            "--supply",
            "12V",
            "--supply-tolerance",
            "100%",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "5mA",
        ],
    ),
    (
        "ambient-reversed",
        &[
            "size",
            "--supply",
            "12V",
            "--ambient",
            "85..-40",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "5mA",
        ],
    ),
    (
        "audit-without-resistor",
        &[
            "audit",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "5mA",
        ],
    ),
    (
        "size-with-resistor",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "5mA",
            "--base-resistor",
            "1k",
        ],
    ),
    (
        "board-and-flags",
        &["audit", "examples/greenhouse.json", "--supply", "5V"],
    ),
    (
        "missing-board-file",
        &["audit", "tests/fixtures/no-such-board.json"],
    ),
    (
        "report-flag-on-parts",
        &["parts", "list", "--only-problems"],
    ),
    (
        "report-flag-on-plot",
        &[
            "plot",
            "examples/greenhouse.json",
            "--output",
            "x.svg",
            "--plots",
            "dir",
        ],
    ),
    (
        "zener-without-voltage",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "relay",
            "--coil",
            "400",
            "--clamp",
            "zener",
        ],
    ),
    (
        "duplicate-part-ids",
        &["parts", "list", "--parts", "tests/fixtures/parts-dup"],
    ),
    // A folder where a file is expected: the operating system's reason is passed on.
    ("unreadable-board", &["audit", "tests/fixtures"]),
    (
        "overdrive-below-one",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "current",
            "--current",
            "50mA",
            "--overdrive",
            "0.5",
        ],
    ),
    (
        "ambient-too-cold",
        &[
            "size",
            "--supply",
            "12V",
            "--ambient",
            "-250..25",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "relay",
            "--coil",
            "400",
        ],
    ),
    (
        "huge-coil",
        &[
            "size",
            "--supply",
            "12V",
            "--logic-high",
            "3V3",
            "--part",
            "demo-npn-40v",
            "--load",
            "relay",
            "--coil",
            "1e300",
        ],
    ),
];

#[test]
fn flag_errors() {
    for (name, args) in FLAG_ERRORS {
        let (code, out, err) = run(args);
        assert_eq!(code, 2, "{name}: {err}");
        assert!(out.is_empty(), "{name}: {out}");
        insta::assert_snapshot!(format!("flag-error-{name}"), err);
    }
}
