//! Hostile input through the binary: huge, endless and deeply nested files fail cleanly with
//! exit 2 (files.md: unusable input) and print nothing as if it were a result; a large but
//! reasonable board works.

mod common;

use std::path::PathBuf;
use std::time::{Duration, Instant};

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
fn a_fifty_megabyte_board_fails_cleanly_and_quickly() {
    // About 420 000 stages: generated here, never committed.
    let mut text = board(0);
    text.truncate(text.len() - 2);
    let mut i = 0;
    while text.len() < 50_000_000 {
        if i > 0 {
            text.push(',');
        }
        text.push_str(&stage(i));
        i += 1;
    }
    text.push_str("]}");
    let path = scratch("fifty-megabytes.json");
    std::fs::write(&path, &text).expect("write the board");
    let started = Instant::now();
    let (code, out, err) = run(&["audit", &path.to_string_lossy(), "--format", "json"]);
    let took = started.elapsed();
    let _ = std::fs::remove_file(&path);
    assert_eq!(code, 2, "{err}");
    assert!(out.is_empty(), "nothing printed as a result");
    assert!(err.contains("larger than 16 MiB"), "{err}");
    // Refused from its size alone, before reading: far under a second even in a debug build.
    assert!(took < Duration::from_secs(10), "took {took:?}");
}

#[test]
fn an_endless_file_fails_cleanly() {
    // /dev/zero has no size and never ends (POSIX); reading must stop at the cap.
    if !std::path::Path::new("/dev/zero").exists() {
        return;
    }
    let (code, out, err) = run(&["audit", "/dev/zero"]);
    assert_eq!(code, 2, "{err}");
    assert!(out.is_empty());
    assert!(
        err.contains("/dev/zero") && err.contains("larger than"),
        "{err}"
    );
    let (code, _, err) = run(&["parts", "check", "/dev/zero"]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("larger than 1 MiB"), "{err}");
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
    assert!(err.contains("gain_min"), "{err}");
}

#[test]
fn a_board_of_two_thousand_stages_works() {
    let path = scratch("two-thousand.json");
    std::fs::write(&path, board(2000)).expect("write");
    let (code, out, err) = run(&["audit", &path.to_string_lossy(), "--format", "json"]);
    assert!(code == 0 || code == 1, "exit {code}: {err}");
    let report: serde_json::Value = serde_json::from_str(&out).expect("JSON report");
    let stages = report["stages"].as_array().map(Vec::len);
    assert_eq!(stages, Some(2000));
}
