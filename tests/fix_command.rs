//! `pinlow fix`: for every fixture board and the demo, fixing and then auditing the result
//! makes no stage worse, passes every stage the fix changed, leaves the others byte for byte as
//! they were (as JSON values, keys in order), keeps names and order, and never writes over its
//! input.

mod common;

use common::run;
use serde_json::Value;

const PARTS: &str = "tests/fixtures/parts-extra";

fn audit(file: &str) -> Value {
    let (code, out, err) = run(&["audit", file, "--format", "json", "--parts", PARTS]);
    assert!(code == 0 || code == 1, "{file}: {err}");
    serde_json::from_str(&out).expect("JSON report")
}

fn rank(v: &Value) -> u8 {
    match v.as_str() {
        Some("pass") => 0,
        Some("marginal") => 1,
        _ => 2,
    }
}

#[test]
fn fixing_never_makes_a_stage_worse_and_passes_what_it_changed() {
    let dir = std::env::temp_dir().join(format!("pinlow-fix-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let mut boards: Vec<String> = std::fs::read_dir("tests/fixtures/boards")
        .expect("fixtures")
        .filter_map(|e| e.ok())
        .map(|e| e.path().display().to_string())
        .collect();
    boards.push("examples/greenhouse.json".into());
    let mut changed_total = 0;
    for (n, board) in boards.iter().enumerate() {
        let fixed = dir.join(format!("fixed-{n}.json"));
        let fixed_name = fixed.display().to_string();
        let before_bytes = std::fs::read(board).expect("board");
        let (code, out, err) = run(&["fix", board, "-o", &fixed_name, "--parts", PARTS]);
        assert!(code == 0 || code == 1, "{board}: {err}");
        assert_eq!(
            std::fs::read(board).expect("board"),
            before_bytes,
            "{board} changed"
        );
        let before = audit(board);
        let after = audit(&fixed_name);
        let original: Value = serde_json::from_slice(&before_bytes).expect("board JSON");
        let rewritten: Value =
            serde_json::from_str(&std::fs::read_to_string(&fixed).expect("fixed")).expect("JSON");
        let stages_before = before["stages"].as_array().expect("stages");
        let stages_after = after["stages"].as_array().expect("stages");
        assert_eq!(stages_before.len(), stages_after.len());
        for (i, (b, a)) in stages_before.iter().zip(stages_after).enumerate() {
            assert_eq!(b["name"], a["name"], "{board}: names and order kept");
            assert!(
                rank(&a["verdict"]) <= rank(&b["verdict"]),
                "{board} stage {i} got worse"
            );
            let changed = original["stages"][i] != rewritten["stages"][i];
            let line = out
                .lines()
                .find(|l| l.starts_with(&format!("Stage {} ", i + 1)))
                .unwrap_or_default();
            if changed {
                changed_total += 1;
                assert_eq!(
                    a["verdict"], "pass",
                    "{board} stage {i}: a changed stage passes"
                );
                assert!(line.contains(" -> PASS: "), "{board}: {line}");
                // Only the fields the remedy names differ.
                let fields: Vec<String> = b["remedy"]["apply"]
                    .as_object()
                    .expect("apply")
                    .keys()
                    .map(|k| k.split('.').next().unwrap_or(k).to_string())
                    .collect();
                for (key, value) in rewritten["stages"][i].as_object().expect("stage") {
                    if !fields.contains(key) {
                        assert_eq!(
                            &original["stages"][i][key], value,
                            "{board} stage {i}: {key}"
                        );
                    }
                }
            } else {
                assert_eq!(
                    a["verdict"], b["verdict"],
                    "{board} stage {i} left as it was"
                );
                if b["verdict"] != "pass" {
                    assert!(line.contains("left as it was"), "{board}: {line}");
                }
            }
        }
    }
    assert!(changed_total >= 3, "only {changed_total} stages changed");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn fix_refuses_its_input_and_a_file_it_did_not_write() {
    let dir = std::env::temp_dir().join(format!("pinlow-fix-in-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let board = dir.join("b.json");
    std::fs::copy("examples/greenhouse.json", &board).expect("copy");
    let bytes = std::fs::read(&board).expect("read");
    let name = board.display().to_string();
    let (code, _, err) = run(&["fix", &name, "-o", &name]);
    assert_eq!(code, 2);
    assert!(err.contains("it is the input"), "{err}");
    let notes = dir.join("notes.json");
    std::fs::write(&notes, "{}").expect("write");
    let (code, _, err) = run(&["fix", &name, "-o", &notes.display().to_string()]);
    assert_eq!(code, 2);
    assert!(err.contains("--force"), "{err}");
    let (code, _, err) = run(&["fix", &name, "-o", &notes.display().to_string(), "--force"]);
    assert_eq!(code, 1, "{err}");
    assert_eq!(std::fs::read(&board).expect("read"), bytes);
    std::fs::remove_dir_all(&dir).ok();
}
