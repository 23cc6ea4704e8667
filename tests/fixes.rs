//! A stage's composed remedy, applied by hand to the board file (the `apply` object of its JSON
//! report), gives on the next audit the verdict the remedy's re-check promised, each fix's check
//! the status it promised, and no check worse than before; for each kind of fix a board file can
//! take.

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

/// Set `path` (dotted: `load.resistor_ohms`) in a stage object; an object the stage takes from
/// the defaults is copied into the stage first.
fn patch(stage: &mut Value, defaults: &Value, path: &str, value: &Value) {
    match path.split_once('.') {
        Some((object, key)) => {
            if stage.get(object).is_none() {
                stage[object] = defaults[object].clone();
            }
            stage[object][key] = value.clone();
        }
        None => stage[path] = value.clone(),
    }
}

fn rank(status: &Value) -> u8 {
    match status.as_str() {
        Some("pass") => 0,
        Some("marginal") => 1,
        _ => 2,
    }
}

#[test]
fn applied_remedies_give_what_they_promised() {
    let dir = std::env::temp_dir().join(format!("pinlow-fixes-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let mut covered = BTreeSet::new();
    let mut applied = 0;
    for board in [
        "examples/greenhouse.json",
        "tests/fixtures/boards/every-load.json",
        "tests/fixtures/boards/hand-worked.json",
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
            let remedy = &stage["remedy"];
            let Some(apply) = remedy["apply"].as_object().filter(|a| !a.is_empty()) else {
                continue;
            };
            let mut patched = original.clone();
            for (path, value) in apply {
                let defaults = original["defaults"].clone();
                patch(&mut patched["stages"][i], &defaults, path, value);
            }
            let file = dir.join(format!("fixed-{applied}.json"));
            std::fs::write(&file, patched.to_string()).expect("write");
            let again = &audit_json(&file.to_string_lossy())["stages"][i];
            applied += 1;
            assert_eq!(
                again["verdict"], remedy["verdict_after"],
                "{board} stage {i}: the re-check promised {}, the audit gives {}",
                remedy["verdict_after"], again["verdict"]
            );
            assert!(
                rank(&again["verdict"]) <= rank(&stage["verdict"]),
                "{board} stage {i} got worse"
            );
            let status_of = |report: &Value, id: &str| {
                report["checks"]
                    .as_array()
                    .expect("checks")
                    .iter()
                    .find(|c| c["id"] == id)
                    .map(|c| c["status"].clone())
            };
            for fix in stage["fixes"].as_array().expect("fixes") {
                let check = fix["check"].as_str().expect("check id");
                if fix["apply"].as_object().is_some_and(|a| !a.is_empty()) {
                    assert_eq!(
                        status_of(again, check),
                        Some(fix["recheck"].clone()),
                        "{board} stage {i}: {fix}"
                    );
                    if fix["recheck"] == "pass" {
                        covered.insert(check.to_string());
                    }
                }
            }
            for w in remedy["worsened"].as_array().expect("worsened") {
                assert_eq!(
                    status_of(again, w["check"].as_str().expect("id")),
                    Some(w["to"].clone())
                );
            }
        }
    }
    std::fs::remove_dir_all(&dir).ok();
    assert!(applied >= 4, "only {applied} remedies applied");
    for kind in ["pinned-low", "stays-off", "resistor-power"] {
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
