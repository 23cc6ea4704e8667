//! Hostile input through the binary: endless, binary and deeply nested files fail cleanly with
//! exit 2 (files.md: unusable input) and print nothing as if it were a result; large boards are
//! read as a stream and work.

mod common;

use std::path::PathBuf;
use std::time::Duration;

use common::run;

/// A file under cargo's scratch folder for integration tests.
fn scratch(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join(name)
}

/// One stage of a generated board.
fn stage(i: usize) -> String {
    format!(
        r#"{{"name": "S{i}", "part": "demo-npn-40v", "load": {{"kind": "current", "current_a": 0.05}}, "base_resistor_ohms": 1000}}"#
    )
}

fn board(stages: usize) -> String {
    let list: Vec<String> = (0..stages).map(stage).collect();
    format!(
        r#"{{"defaults": {{"supply_v": 12, "logic_high_v": 3.3}}, "stages": [{}]}}"#,
        list.join(",")
    )
}

#[test]
fn a_board_larger_than_the_old_cap_is_read_as_a_stream() {
    // 17 MiB, over the 16 MiB cap boards once had, mostly white space between three stages
    // (cheap to audit in a debug build): board files have no size cap; every stage is read.
    let padding = " ".repeat(17 * 1024 * 1024 / 2);
    let text = format!(
        r#"{{"defaults": {{"supply_v": 12, "logic_high_v": 3.3}}, "stages": [{}{padding},{padding}{},{}]}}"#,
        stage(0),
        stage(1),
        stage(2)
    );
    assert!(text.len() > 17 * 1024 * 1024);
    let path = scratch("seventeen-mebibytes.json");
    std::fs::write(&path, &text).expect("write the board");
    let (code, out, err) = run(&["audit", &path.to_string_lossy(), "--format", "json"]);
    let _ = std::fs::remove_file(&path);
    assert!(code == 0 || code == 1, "exit {code}: {err}");
    let report: serde_json::Value = serde_json::from_str(&out).expect("JSON report");
    assert_eq!(report["stages"].as_array().map(Vec::len), Some(3));
}

/// Run with standard input from `stdin`; killed if it is still running after two minutes (a
/// guard against a hang, not a speed check: it must end by itself long before).
fn run_with_stdin(args: &[&str], stdin: std::process::Stdio) -> (i32, String, String) {
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_pinlow"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .env_remove("PINLOW_PARTS")
        .stdin(stdin)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .expect("runs");
    let mut waited = Duration::ZERO;
    while child.try_wait().expect("wait").is_none() && waited < Duration::from_secs(120) {
        std::thread::sleep(Duration::from_millis(20));
        waited += Duration::from_millis(20);
    }
    let _ = child.kill();
    let out = child.wait_with_output().expect("output");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn endless_and_binary_input_stops_at_once() {
    // /dev/zero has no size and never ends (POSIX): its first byte, NUL, is refused where a
    // board object must start, as a file and as standard input.
    if std::path::Path::new("/dev/zero").exists() {
        let (code, out, err) = run(&["audit", "/dev/zero"]);
        assert_eq!(code, 2, "{err}");
        assert!(out.is_empty());
        assert!(
            err.contains("/dev/zero: line 1, column 1") && err.contains("byte 0x00"),
            "{err}"
        );
        let zero = std::fs::File::open("/dev/zero").expect("open /dev/zero");
        let (code, out, err) = run_with_stdin(&["audit", "-"], zero.into());
        assert_eq!(code, 2, "{err}");
        assert!(out.is_empty());
        assert!(err.contains("<stdin>: line 1, column 1"), "{err}");
        let (code, _, err) = run(&["parts", "check", "/dev/zero"]);
        assert_eq!(code, 2, "{err}");
        assert!(err.contains("larger than 1 MiB"), "{err}");
    }
    // Random bytes (a fixed linear congruential sequence, so the test repeats) and NUL bytes
    // after a valid start: refused with a line and column.
    let mut x: u32 = 12345;
    let random: Vec<u8> = (0..100_000)
        .map(|_| {
            x = x.wrapping_mul(1_103_515_245).wrapping_add(12345);
            (x >> 16) as u8
        })
        .collect();
    let mut nul = br#"{"stages": [{"name": "a"#.to_vec();
    nul.extend(std::iter::repeat_n(0u8, 100_000));
    for (name, bytes) in [("random.json", random), ("nul.json", nul)] {
        let path = scratch(name);
        std::fs::write(&path, &bytes).expect("write");
        let (code, out, err) = run(&["audit", &path.to_string_lossy()]);
        assert_eq!(code, 2, "{name}: {err}");
        assert!(out.is_empty(), "{name}");
        assert!(
            err.contains(name) && err.contains("line 1, column"),
            "{name}: {err}"
        );
        let file = std::fs::File::open(&path).expect("open");
        let (code, _, err) = run_with_stdin(&["audit", "-"], file.into());
        assert_eq!(code, 2, "{name} on stdin: {err}");
        assert!(err.contains("<stdin>: line 1, column"), "{name}: {err}");
        let _ = std::fs::remove_file(&path);
    }
}

#[test]
fn deeply_nested_files_fail_cleanly() {
    let nest = format!("{}{}", "[".repeat(200_000), "]".repeat(200_000));
    let board = scratch("deep-board.json");
    std::fs::write(
        &board,
        format!(
            r#"{{"stages": [{{"name": "S", "load": {{"kind": "current", "current_a": {nest}}}}}]}}"#
        ),
    )
    .expect("write");
    let (code, out, err) = run(&["audit", &board.to_string_lossy()]);
    assert_eq!(code, 2, "{err}");
    assert!(out.is_empty());
    assert!(err.contains("recursion limit exceeded"), "{err}");
    let part = scratch("deep-part.json");
    std::fs::write(&part, format!(r#"{{"id": "x", "gain_min": {nest}}}"#)).expect("write");
    let (code, out, err) = run(&["parts", "check", &part.to_string_lossy()]);
    assert_eq!(code, 2, "{err}");
    assert!(out.is_empty());
    assert!(
        err.contains("deep-part.json") && err.contains("recursion limit exceeded"),
        "{err}"
    );
}

#[test]
fn a_generated_board_audits_in_every_format() {
    // 2,000 stages keep a debug build quick; the 100,000-stage board is measured by
    // `cargo bench --bench board_stream` (time and peak memory in every format).
    let n = 2000;
    let path = scratch("two-thousand.json");
    std::fs::write(&path, board(n)).expect("write");
    let file = path.to_string_lossy().into_owned();
    let (code, out, err) = run(&["audit", &file, "--format", "json"]);
    assert!(code == 0 || code == 1, "exit {code}: {err}");
    let report: serde_json::Value = serde_json::from_str(&out).expect("JSON report");
    assert_eq!(report["stages"].as_array().map(Vec::len), Some(n));
    let last = format!("S{}", n - 1);
    for format in ["table", "markdown"] {
        let (code, out, err) = run(&["audit", &file, "--format", format]);
        assert!(code == 0 || code == 1, "{format}: exit {code}: {err}");
        // Every stage has its own section after the summary.
        assert!(out.contains(&format!("Stage {n}: {last}")), "{format}");
        assert!(out.contains("Board verdict"), "{format}");
    }
    let _ = std::fs::remove_file(&path);
}
