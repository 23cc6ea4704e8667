//! A proposed fix, applied to the board file, makes its check pass on the next audit, for each
//! kind of fix that a board file can take.

mod common;

use std::collections::BTreeSet;

use common::run;
use serde_json::Value;

fn audit_json(file: &str) -> Value {
    let (code, out, err) = run(&[
        "audit",
        file,
        "--format",
        "json",
        "--parts",
        "tests/fixtures/parts-extra",
    ]);
    assert!(code == 0 || code == 1, "{file}: {err}");
    serde_json::from_str(&out).expect("JSON report")
}

/// Set `path` (dotted: `load.resistor_ohms`) in a stage object.
fn patch(stage: &mut Value, path: &str, value: &Value) {
    let mut target = stage;
    let parts: Vec<&str> = path.split('.').collect();
    for key in &parts[..parts.len() - 1] {
        target = target
            .get_mut(*key)
            .expect("the object the fix names exists in the stage");
    }
    target[parts[parts.len() - 1]] = value.clone();
}

#[test]
fn applied_fixes_pass_on_the_next_audit() {
    let dir = std::env::temp_dir().join(format!("pinlow-fixes-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let mut covered = BTreeSet::new();
    for board in [
        "examples/greenhouse.json",
        "tests/fixtures/boards/every-load.json",
    ] {
        let report = audit_json(board);
        let text = std::fs::read_to_string(board).expect("board");
        let original: Value = serde_json::from_str(&text).expect("board JSON");
        for (i, stage) in report["stages"]
            .as_array()
            .expect("stages")
            .iter()
            .enumerate()
        {
            for fix in stage["fixes"].as_array().expect("fixes array") {
                let apply = fix["apply"].as_object().expect("apply object");
                if apply.is_empty() || fix["recheck"] != "pass" {
                    continue;
                }
                let mut patched = original.clone();
                for (path, value) in apply {
                    patch(&mut patched["stages"][i], path, value);
                }
                let file = dir.join(format!("fixed-{}-{i}.json", covered.len()));
                std::fs::write(&file, patched.to_string()).expect("write");
                let again = audit_json(&file.to_string_lossy());
                let check = fix["check"].as_str().expect("check id");
                let status = again["stages"][i]["checks"]
                    .as_array()
                    .expect("checks")
                    .iter()
                    .find(|c| c["id"] == check)
                    .map(|c| c["status"].clone());
                assert_eq!(
                    status,
                    Some(Value::from("pass")),
                    "{board} stage {i}: fix {fix} did not make {check} pass"
                );
                covered.insert(check.to_string());
            }
        }
    }
    std::fs::remove_dir_all(&dir).ok();
    for kind in ["pinned-low", "stays-off", "led-current", "resistor-power"] {
        assert!(
            covered.contains(kind),
            "no applied fix for {kind}: covered {covered:?}"
        );
    }
    assert!(
        covered.contains("collector-voltage") || covered.contains("clamp-rating"),
        "no applied clamp fix: covered {covered:?}"
    );
}
