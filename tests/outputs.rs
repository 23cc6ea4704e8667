//! The input and output contract through the binary: outputs never destroy inputs (by any
//! alias), files are written whole, foreign files are not replaced without --force, standard
//! input, byte-order marks, flags a command does not take, a closed standard output, and errors
//! that name PINLOW_PARTS entries and bad part folders. Each refusal exits 2 (files.md) and
//! leaves every input byte-identical.

mod common;

use std::io::{BufRead, Read, Write};
use std::path::{Path, PathBuf};
use std::process::Stdio;

use common::pinlow;
use proptest::prelude::*;

const STAGE: &str = r#"{"name": "S1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
    "load": {"kind": "current", "current_a": 0.05}, "base_resistor_ohms": 1000}"#;

/// A fresh folder under cargo's scratch space for integration tests.
fn scratch(name: &str) -> PathBuf {
    let dir = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join(format!("outputs-{name}"));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("scratch dir");
    dir
}

fn one_stage_board() -> String {
    format!("{{\"board\": \"one\", \"stages\": [{STAGE}]}}\n")
}

fn two_stage_board() -> String {
    let second = STAGE.replace("S1", "S2");
    format!("{{\"board\": \"two\", \"stages\": [{STAGE}, {second}]}}\n")
}

/// Run in `dir`; (exit code, stdout, stderr).
fn run_in(dir: &Path, args: &[&str]) -> (i32, String, String) {
    let out = pinlow().current_dir(dir).args(args).output().expect("runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// The binary as a plain process (for standard streams of our choosing), run in `dir`.
fn process_in(dir: &Path) -> std::process::Command {
    let mut cmd = std::process::Command::new(env!("CARGO_BIN_EXE_pinlow"));
    cmd.current_dir(dir)
        .env_remove("PINLOW_PARTS")
        .env("NO_COLOR", "1");
    cmd
}

/// The names in `dir` that look like pinlow's temporary files.
fn temporaries(dir: &Path) -> Vec<String> {
    std::fs::read_dir(dir)
        .expect("list")
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with(".pinlow-"))
        .collect()
}

fn part_file() -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("parts/2n3904.json"))
        .expect("a shipped part")
        .replace("\"2N3904\"", "\"lab-2n3904\"")
}

#[test]
fn an_output_that_is_an_input_is_refused_before_anything_is_written() {
    let dir = scratch("clash");
    let board = one_stage_board();
    std::fs::write(dir.join("b.json"), &board).expect("board");
    std::fs::write(dir.join("p.json"), part_file()).expect("part");
    std::fs::create_dir_all(dir.join("parts")).expect("parts folder");
    std::fs::write(dir.join("parts/q.json"), part_file()).expect("part in folder");
    let cases: &[&[&str]] = &[
        &["audit", "b.json", "-o", "b.json"],
        &["audit", "b.json", "--format", "json", "-o", "./b.json"],
        &[
            "audit",
            "b.json",
            "--format",
            "markdown",
            "--output",
            "parts/../b.json",
        ],
        &["plot", "b.json", "-o", "b.json"],
        &["parts", "list", "--parts", "p.json", "-o", "p.json"],
        &[
            "parts",
            "show",
            "lab-2n3904",
            "--parts",
            "parts",
            "-o",
            "parts/q.json",
        ],
        &["parts", "check", "p.json", "-o", "p.json"],
        &[
            "audit", "b.json", "--parts", "p.json", "-o", "p.json", "--force",
        ],
    ];
    for args in cases {
        let (code, out, err) = run_in(&dir, args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(out.is_empty(), "{args:?}: {out}");
        assert!(
            err.contains("cannot write") && err.contains("it is the input"),
            "{args:?}: {err}"
        );
        // Both paths are named: the output as given and the input.
        let output = args
            .iter()
            .skip_while(|a| !matches!(**a, "-o" | "--output"))
            .nth(1);
        assert!(
            output.is_some_and(|o| err.contains(&format!("cannot write {o}:"))),
            "{args:?}: {err}"
        );
    }
    let (_, _, err) = run_in(&dir, &["audit", "b.json", "-o", "./b.json"]);
    assert!(
        err.contains("cannot write ./b.json: it is the input b.json (both are /"),
        "{err}"
    );
    assert_eq!(
        std::fs::read_to_string(dir.join("b.json")).expect("board"),
        board
    );
    assert_eq!(
        std::fs::read_to_string(dir.join("p.json")).expect("part"),
        part_file()
    );
    assert!(temporaries(&dir).is_empty());
    // A new file in a parts folder would be read as a part next time: refused too.
    let (code, _, err) = run_in(
        &dir,
        &[
            "parts",
            "list",
            "--format",
            "json",
            "--parts",
            "parts",
            "-o",
            "parts/list.json",
        ],
    );
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("parts folder parts"), "{err}");
    assert!(!dir.join("parts/list.json").exists());
    // The same through PINLOW_PARTS.
    let out = pinlow()
        .current_dir(&dir)
        .env("PINLOW_PARTS", "parts")
        .args(["parts", "list", "-o", "parts/q.json"])
        .output()
        .expect("runs");
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("it is the input"));
}

#[cfg(unix)]
#[test]
fn links_to_an_input_are_refused() {
    let dir = scratch("links");
    let board = one_stage_board();
    std::fs::write(dir.join("b.json"), &board).expect("board");
    std::os::unix::fs::symlink("b.json", dir.join("soft.json")).expect("symlink");
    std::fs::hard_link(dir.join("b.json"), dir.join("hard.json")).expect("hard link");
    std::os::unix::fs::symlink(".", dir.join("here")).expect("folder link");
    for alias in [
        "soft.json",
        "hard.json",
        "here/b.json",
        "here/here/soft.json",
    ] {
        for args in [
            vec!["audit", "b.json", "-o", alias],
            vec!["audit", alias, "-o", "b.json"],
            vec!["plot", "b.json", "-o", alias],
        ] {
            let (code, _, err) = run_in(&dir, &args);
            assert_eq!(code, 2, "{args:?}: {err}");
            assert!(err.contains("it is the input"), "{args:?}: {err}");
        }
    }
    assert_eq!(
        std::fs::read_to_string(dir.join("b.json")).expect("board"),
        board
    );
    // Standard input that is the file itself.
    let out = process_in(&dir)
        .args(["audit", "-", "-o", "hard.json"])
        .stdin(std::fs::File::open(dir.join("b.json")).expect("open"))
        .output()
        .expect("runs");
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("it is the input <stdin>"), "{err}");
    assert_eq!(
        std::fs::read_to_string(dir.join("b.json")).expect("board"),
        board
    );
}

/// Ways to write a path that leads to `name` in the test folder.
fn alias_of(name: &'static str) -> impl Strategy<Value = String> {
    let step = prop_oneof![
        Just("./".to_string()),
        Just("sub/../".to_string()),
        Just("sub/./../".to_string()),
        Just("here/".to_string()),
        Just("sub/up/".to_string()),
    ];
    let last = prop_oneof![
        Just(name.to_string()),
        Just(format!("soft-{name}")),
        Just(format!("hard-{name}")),
        Just(format!("chain-{name}")),
    ];
    (
        proptest::collection::vec(step, 0..4),
        last,
        proptest::bool::ANY,
    )
        .prop_map(|(steps, last, absolute)| {
            let rel = format!("{}{last}", steps.concat());
            if absolute {
                format!("{}/{rel}", alias_root().display())
            } else {
                rel
            }
        })
}

/// The folder the randomized test works in (made once).
fn alias_root() -> PathBuf {
    PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("outputs-aliases")
}

#[cfg(unix)]
fn make_alias_root() -> PathBuf {
    let dir = alias_root();
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(dir.join("sub")).expect("dirs");
    std::fs::write(dir.join("b.json"), one_stage_board()).expect("board");
    std::fs::write(dir.join("p.json"), part_file()).expect("part");
    for name in ["b.json", "p.json"] {
        std::os::unix::fs::symlink(name, dir.join(format!("soft-{name}"))).expect("soft");
        std::os::unix::fs::symlink(format!("soft-{name}"), dir.join(format!("chain-{name}")))
            .expect("chain");
        std::fs::hard_link(dir.join(name), dir.join(format!("hard-{name}"))).expect("hard");
    }
    std::os::unix::fs::symlink(".", dir.join("here")).expect("here");
    std::os::unix::fs::symlink("..", dir.join("sub/up")).expect("up");
    dir
}

#[cfg(unix)]
#[test]
fn randomized_aliases_of_an_input_are_refused() {
    let dir = make_alias_root();
    let board = std::fs::read(dir.join("b.json")).expect("board");
    let part = std::fs::read(dir.join("p.json")).expect("part");
    // Commands that read both files, with an output aliasing either; commands that read the
    // part file only, with an output aliasing it.
    let both = prop_oneof![
        Just(vec!["audit", "b.json", "--parts", "p.json"]),
        Just(vec![
            "audit", "b.json", "--format", "json", "--parts", "p.json"
        ]),
        Just(vec![
            "audit", "b.json", "--format", "markdown", "--parts", "p.json", "--force"
        ]),
        Just(vec!["plot", "b.json", "--parts", "p.json", "--force"]),
    ];
    let part_only = prop_oneof![
        Just(vec!["parts", "list", "--parts", "p.json"]),
        Just(vec![
            "parts",
            "show",
            "lab-2n3904",
            "--parts",
            "p.json",
            "--format",
            "json"
        ]),
        Just(vec!["parts", "check", "p.json", "--force"]),
    ];
    let cases = prop_oneof![
        (both, prop_oneof![alias_of("b.json"), alias_of("p.json")]),
        (part_only, alias_of("p.json")),
    ];
    let mut runner = proptest::test_runner::TestRunner::new(ProptestConfig {
        cases: 48,
        failure_persistence: None,
        ..ProptestConfig::default()
    });
    runner
        .run(&cases, |(command, target)| {
            let mut args = command.clone();
            args.push("-o");
            args.push(&target);
            let (code, out, err) = run_in(&dir, &args);
            prop_assert_eq!(code, 2, "{:?}: {}", args, err);
            prop_assert!(out.is_empty());
            prop_assert!(err.contains("it is the input"), "{:?}: {}", args, err);
            prop_assert!(err.contains(target.as_str()), "{:?}: {}", args, err);
            prop_assert_eq!(&std::fs::read(dir.join("b.json")).expect("board"), &board);
            prop_assert_eq!(&std::fs::read(dir.join("p.json")).expect("part"), &part);
            prop_assert!(temporaries(&dir).is_empty());
            Ok(())
        })
        .expect("every alias refused");
}

#[test]
fn foreign_files_are_kept_unless_forced_and_pinlow_replaces_its_own() {
    let dir = scratch("foreign");
    std::fs::write(dir.join("b.json"), two_stage_board()).expect("board");
    std::fs::write(dir.join("notes.md"), "my notes\n").expect("notes");
    let (code, _, err) = run_in(
        &dir,
        &["audit", "b.json", "--format", "markdown", "-o", "notes.md"],
    );
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("cannot write notes.md: the file exists and pinlow did not write it; give --force to replace it"),
        "{err}"
    );
    assert_eq!(
        std::fs::read_to_string(dir.join("notes.md")).expect("notes"),
        "my notes\n"
    );
    let (code, _, err) = run_in(
        &dir,
        &[
            "audit", "b.json", "--format", "markdown", "-o", "notes.md", "--force",
        ],
    );
    assert_eq!(code, 0, "{err}");
    assert!(std::fs::read_to_string(dir.join("notes.md"))
        .expect("report")
        .contains("# Board: two"));
    // Its own file, in another format: replaced without asking.
    let (code, _, err) = run_in(
        &dir,
        &["audit", "b.json", "--format", "json", "-o", "notes.md"],
    );
    assert_eq!(code, 0, "{err}");
    let json: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("notes.md")).expect("report"))
            .expect("JSON");
    assert_eq!(
        json["generator"],
        format!("pinlow {}", env!("CARGO_PKG_VERSION"))
    );
    // Text tables carry the marker as a first line.
    let (code, _, err) = run_in(&dir, &["parts", "list", "-o", "list.txt"]);
    assert_eq!(code, 0, "{err}");
    let text = std::fs::read_to_string(dir.join("list.txt")).expect("list");
    assert!(text.starts_with("# written by pinlow "), "{text}");
    // A many-stage plot never names a file after the board, whatever -o ends with.
    std::fs::write(dir.join("x-1.svg"), "<svg/>").expect("a foreign svg");
    let (code, _, err) = run_in(&dir, &["plot", "b.json", "-o", "x.json"]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("cannot write x-1.svg"), "{err}");
    assert!(
        !dir.join("x-2.svg").exists(),
        "nothing written before the check"
    );
    std::fs::remove_file(dir.join("x-1.svg")).expect("remove");
    let (code, out, err) = run_in(&dir, &["plot", "b.json", "-o", "b.json"]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(out, "S1: b-1.svg\nS2: b-2.svg\n");
    assert_eq!(
        std::fs::read_to_string(dir.join("b.json")).expect("board"),
        two_stage_board()
    );
    let svg = std::fs::read_to_string(dir.join("b-1.svg")).expect("svg");
    assert!(
        svg.starts_with("<!-- written by pinlow ") && svg.contains("<svg"),
        "{svg}"
    );
    assert!(temporaries(&dir).is_empty());
}

#[test]
fn plots_are_checked_first_and_linked_from_the_report_folder() {
    let dir = scratch("plots");
    std::fs::write(dir.join("b.json"), two_stage_board()).expect("board");
    std::fs::create_dir_all(dir.join("plots")).expect("plots");
    std::fs::create_dir_all(dir.join("reports")).expect("reports");
    std::fs::write(dir.join("plots/stage-2.svg"), "hand drawn").expect("foreign plot");
    let args = [
        "audit",
        "b.json",
        "--format",
        "markdown",
        "--plots",
        "plots",
        "-o",
        "reports/review.md",
    ];
    let (code, _, err) = run_in(&dir, &args);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("cannot write plots/stage-2.svg"), "{err}");
    assert!(
        !dir.join("plots/stage-1.svg").exists(),
        "nothing written before the check"
    );
    assert!(!dir.join("reports/review.md").exists());
    let mut forced = args.to_vec();
    forced.push("--force");
    let (code, _, err) = run_in(&dir, &forced);
    assert_eq!(code, 0, "{err}");
    let review = std::fs::read_to_string(dir.join("reports/review.md")).expect("review");
    // Links are relative to the report's folder, and lead to the files.
    assert!(review.contains("](../plots/stage-1.svg)"), "{review}");
    assert!(dir.join("reports").join("../plots/stage-2.svg").exists());
    assert!(std::fs::read_to_string(dir.join("plots/stage-2.svg"))
        .expect("plot")
        .contains("<svg"));
    // The plots are now pinlow's own: a second run needs no --force.
    let (code, _, err) = run_in(&dir, &args);
    assert_eq!(code, 0, "{err}");
    // Two outputs of one run that are one file.
    let (code, _, err) = run_in(
        &dir,
        &[
            "audit",
            "b.json",
            "--plots",
            "plots",
            "-o",
            "plots/./stage-1.svg",
        ],
    );
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("which this command writes too"), "{err}");
}

#[test]
fn devices_and_pipes_are_written_in_place() {
    // /dev/null and /dev/stdout (here a pipe) are not files to replace: written as they are,
    // without a marker.
    let (code, plain, _) = common::run(&["audit", "examples/greenhouse.json", "--format", "json"]);
    assert_eq!(code, 1);
    if Path::new("/dev/stdout").exists() {
        let (code, out, err) = common::run(&[
            "audit",
            "examples/greenhouse.json",
            "--format",
            "json",
            "-o",
            "/dev/stdout",
        ]);
        assert_eq!(code, 1, "{err}");
        assert_eq!(out, plain);
    }
    if Path::new("/dev/null").exists() {
        let (code, out, err) =
            common::run(&["audit", "examples/greenhouse.json", "-o", "/dev/null"]);
        assert_eq!((code, out.as_str(), err.as_str()), (1, "", ""));
    }
}

#[test]
fn write_failures_say_cannot_write() {
    let dir = scratch("write-failures");
    std::fs::write(dir.join("b.json"), one_stage_board()).expect("board");
    let (code, _, err) = run_in(&dir, &["audit", "b.json", "-o", "no-such-folder/r.txt"]);
    assert_eq!(code, 2);
    assert!(
        err.contains(
            "no-such-folder/r.txt: cannot write: its folder no-such-folder cannot be used"
        ),
        "{err}"
    );
    assert!(!err.contains("cannot read"), "{err}");
    if Path::new("/dev/full").exists() {
        // /dev/full refuses every write with ENOSPC (Linux).
        let (code, _, err) = run_in(&dir, &["audit", "b.json", "-o", "/dev/full"]);
        assert_eq!(code, 2);
        assert!(err.contains("/dev/full: cannot write:"), "{err}");
        let out = process_in(&dir)
            .args(["audit", "b.json"])
            .stdout(std::fs::File::create("/dev/full").expect("open /dev/full"))
            .output()
            .expect("runs");
        assert_eq!(out.status.code(), Some(2));
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains("<standard output>: cannot write:"), "{err}");
    }
    let (code, _, err) = run_in(&dir, &["audit", "missing.json"]);
    assert_eq!(code, 2);
    assert!(err.contains("missing.json: cannot read"), "{err}");
}

#[test]
fn standard_input_is_a_board_named_stdin() {
    let board =
        std::fs::read(Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/greenhouse.json"))
            .expect("demo board");
    let mut child = process_in(Path::new(env!("CARGO_MANIFEST_DIR")))
        .args(["audit", "-", "--format", "json"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .expect("runs");
    let mut stdin = child.stdin.take().expect("stdin");
    let writer = std::thread::spawn(move || stdin.write_all(&board));
    let out = child.wait_with_output().expect("output");
    writer.join().expect("writer").expect("written");
    let (_, from_file, _) = common::run(&["audit", "examples/greenhouse.json", "--format", "json"]);
    assert_eq!(out.status.code(), Some(1));
    assert_eq!(String::from_utf8_lossy(&out.stdout), from_file);
    let out = pinlow()
        .args(["audit", "-"])
        .write_stdin("{\"stages\": [\n  {\"name\": \"a\", \"supply_vv\": 1}]}")
        .output()
        .expect("runs");
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("<stdin>: line 2, column 30, at stages[0].supply_vv: unknown field"),
        "{err}"
    );
}

#[test]
fn byte_order_marks_are_accepted() {
    let dir = scratch("bom");
    std::fs::write(dir.join("b.json"), format!("\u{feff}{}", one_stage_board())).expect("board");
    std::fs::create_dir_all(dir.join("parts")).expect("parts");
    std::fs::write(dir.join("parts/p.json"), format!("\u{feff}{}", part_file())).expect("part");
    let (code, out, err) = run_in(&dir, &["audit", "b.json"]);
    assert!(code == 0 || code == 1, "{err}");
    assert!(out.contains("Board: one"), "{out}");
    let (code, out, err) = run_in(&dir, &["parts", "check", "parts/p.json"]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(out, "parts/p.json: ok (lab-2n3904, npn)\n");
    let (code, _, err) = run_in(&dir, &["parts", "show", "lab-2n3904", "--parts", "parts"]);
    assert_eq!(code, 0, "{err}");
}

#[test]
fn flags_a_command_does_not_take_are_refused() {
    let cases: &[&[&str]] = &[
        &[
            "plot",
            "examples/greenhouse.json",
            "-o",
            "x.svg",
            "--format",
            "json",
        ],
        &[
            "plot",
            "examples/greenhouse.json",
            "-o",
            "x.svg",
            "--strict",
        ],
        &[
            "plot",
            "examples/greenhouse.json",
            "-o",
            "x.svg",
            "--plots",
            "dir",
        ],
        &[
            "plot",
            "examples/greenhouse.json",
            "-o",
            "x.svg",
            "--color",
            "never",
        ],
        &["parts", "check", "parts/2n3904.json", "--format", "json"],
        &["parts", "check", "parts/2n3904.json", "--parts", "parts"],
        &["parts", "list", "--strict"],
        &["parts", "list", "--only-problems"],
        &["parts", "show", "2N3904", "--color", "always"],
        &["parts", "list", "--plots", "dir"],
    ];
    for args in cases {
        let (code, out, err) = common::run(args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(out.is_empty(), "{args:?}");
        assert!(err.contains("unexpected argument"), "{args:?}: {err}");
    }
    assert!(!Path::new(env!("CARGO_MANIFEST_DIR")).join("x.svg").exists());
    // parts list and show take --format.
    let (code, out, _) = common::run(&["parts", "list", "--format", "json"]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).expect("JSON");
    assert!(v["parts"].as_array().is_some_and(|a| a.len() >= 8), "{v}");
    let (code, out, _) = common::run(&["parts", "show", "2N3904", "--format", "json"]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).expect("JSON");
    assert_eq!(v["id"], "2N3904");
    assert!(v["fields"].as_array().is_some_and(|a| !a.is_empty()), "{v}");
}

#[test]
fn a_closed_standard_output_ends_quietly_with_141() {
    // A board whose JSON report is far larger than a pipe's buffer, so pinlow is still writing
    // when the reader leaves after the first line (as `| head -1` does).
    let dir = scratch("closed");
    let stages: Vec<String> = (0..300)
        .map(|i| STAGE.replace("S1", &format!("S{i}")))
        .collect();
    std::fs::write(
        dir.join("b.json"),
        format!("{{\"stages\": [{}]}}", stages.join(",")),
    )
    .expect("board");
    let mut child = process_in(&dir)
        .args(["audit", "b.json", "--format", "json"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("runs");
    let stdout = child.stdout.take().expect("stdout");
    let mut first = String::new();
    std::io::BufReader::new(stdout)
        .read_line(&mut first)
        .expect("first line");
    assert_eq!(first, "{\n");
    // The reader is dropped here: the pipe is closed.
    let mut stderr = String::new();
    child
        .stderr
        .take()
        .expect("stderr")
        .read_to_string(&mut stderr)
        .expect("stderr");
    let status = child.wait().expect("exit");
    assert_eq!(status.code(), Some(141), "{stderr}");
    assert!(stderr.is_empty(), "{stderr}");
}

#[test]
fn part_folder_and_variable_errors_name_their_source() {
    let dir = scratch("part-errors");
    std::fs::create_dir_all(dir.join("parts")).expect("parts");
    std::fs::write(dir.join("parts/a.json"), part_file()).expect("part");
    let out = pinlow()
        .current_dir(&dir)
        .env("PINLOW_PARTS", "parts:missing-folder")
        .args(["parts", "list"])
        .output()
        .expect("runs");
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains(
            "pinlow: error: PINLOW_PARTS entry 2 (missing-folder): missing-folder: cannot read"
        ),
        "{err}"
    );
    // Two files that define one id: named both, by parts check.
    std::fs::write(dir.join("parts/b.json"), part_file()).expect("part");
    let (code, _, err) = run_in(&dir, &["parts", "check", "parts/a.json", "parts/b.json"]);
    assert_eq!(code, 2, "{err}");
    assert!(
        err.contains("part `lab-2n3904` is defined twice: parts/a.json and parts/b.json"),
        "{err}"
    );
    let (code, _, err) = run_in(&dir, &["parts", "check", "parts"]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("parts/a.json and parts/b.json"), "{err}");
    std::fs::remove_file(dir.join("parts/b.json")).expect("remove");
    #[cfg(unix)]
    {
        std::os::unix::fs::symlink("gone.json", dir.join("parts/dangling.json")).expect("link");
        for args in [
            vec!["parts", "list", "--parts", "parts"],
            vec!["parts", "check", "parts"],
        ] {
            let (code, _, err) = run_in(&dir, &args);
            assert_eq!(code, 2, "{args:?}: {err}");
            assert!(
                err.contains("parts/dangling.json: a symbolic link that leads nowhere"),
                "{args:?}: {err}"
            );
        }
    }
}
