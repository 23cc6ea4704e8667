//! Boards written to stage-model.md version 2 and files.md version 2 by a reviewer who did not read
//! the engine, each audited by the `pinlow` binary and compared with the figures of an independent
//! oracle (tests/spec_v2/oracle.py, Python, standard library only, written from the two spec files
//! alone; five of its stages are worked by hand in tests/spec_v2/README.md).
//!
//! Outside source of every expected value: stage-model.md v2 / files.md v2 as computed by that
//! oracle; the expected files are committed, so this test needs no Python. Regenerate them with
//! `python3 tests/spec_v2/oracle.py`.
//!
//! Compared per board: the exit code (files.md "Exit codes"), `model_version` 2, the board verdict;
//! per stage: name, drive, verdict, the set of check ids and each check's status, the resistor
//! values and `*_sized` flags (exactly: E-series values, compared to 1e-9 relative only so that a
//! float written as 4700 or 4700.0 still matches), and every worst-case figure of files.md within
//! 1.5 % relative (`null` must match `null`). Every mismatch is listed with board, stage, field,
//! expected and got; the test fails when there is any.

mod common;

use serde_json::Value;
use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

/// Worst-case figures must agree within this relative tolerance (issues 11 and 12, "Checked by").
const FIGURE_TOLERANCE: f64 = 0.015;
/// Resistor values are preferred numbers; this only absorbs the float spelling of one value.
const RESISTOR_TOLERANCE: f64 = 1e-9;
/// Fewer boards than this means the folder was not found or was emptied: a test on no boards
/// would pass without checking anything.
const MIN_BOARDS: usize = 30;

const NPN_FIGURES: [&str; 9] = [
    "collector_current_max_a",
    "base_current_min_a",
    "gain_min",
    "overdrive_min",
    "forced_beta_max",
    "pin_current_max_a",
    "power_max_w",
    "junction_max_c",
    "collector_peak_v",
];
const NMOS_FIGURES: [&str; 8] = [
    "drain_current_max_a",
    "gate_voltage_min_v",
    "rds_on_max_ohms",
    "on_voltage_max_v",
    "pin_current_max_a",
    "power_max_w",
    "junction_max_c",
    "drain_peak_v",
];

/// One difference between the oracle and pinlow.
struct Mismatch {
    kind: &'static str,
    text: String,
}

struct Diff<'a> {
    board: &'a str,
    out: Vec<Mismatch>,
}

impl Diff<'_> {
    fn push(
        &mut self,
        kind: &'static str,
        stage: &str,
        field: &str,
        expected: &Value,
        got: &Value,
    ) {
        let place = if stage.is_empty() {
            "board".to_string()
        } else {
            format!("stage '{stage}'")
        };
        let text = format!(
            "{}: {place}, {field}: expected {}, got {}",
            self.board,
            show(expected),
            show(got)
        );
        self.out.push(Mismatch { kind, text });
    }
}

fn show(v: &Value) -> String {
    match v {
        Value::Null => "null".to_string(),
        Value::String(s) => format!("\"{s}\""),
        other => other.to_string(),
    }
}

fn spec_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/spec_v2")
}

fn json_files(dir: &Path) -> Vec<String> {
    let mut names: Vec<String> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", dir.display()))
        .filter_map(|entry| entry.ok())
        .map(|entry| entry.file_name().to_string_lossy().into_owned())
        .filter(|name| name.ends_with(".json"))
        .collect();
    names.sort();
    names
}

fn read_json(path: &Path) -> Value {
    let text =
        fs::read_to_string(path).unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
    serde_json::from_str(&text).unwrap_or_else(|e| panic!("{} is not JSON: {e}", path.display()))
}

fn figure_matches(expected: &Value, got: &Value, tolerance: f64) -> bool {
    match (expected.as_f64(), got.as_f64()) {
        (Some(e), Some(g)) => {
            if e == 0.0 {
                g.abs() <= 1e-12
            } else {
                ((g - e) / e).abs() <= tolerance
            }
        }
        _ => expected.is_null() && got.is_null(),
    }
}

fn relative_note(expected: &Value, got: &Value) -> String {
    match (expected.as_f64(), got.as_f64()) {
        (Some(e), Some(g)) if e != 0.0 => format!(" ({:+.2} %)", (g - e) / e * 100.0),
        _ => String::new(),
    }
}

fn checks_by_id(stage: &Value) -> BTreeMap<String, Value> {
    let mut map = BTreeMap::new();
    if let Some(checks) = stage.get("checks").and_then(Value::as_array) {
        for check in checks {
            let id = check
                .get("id")
                .and_then(Value::as_str)
                .unwrap_or("<no id>")
                .to_string();
            map.insert(id, check.get("status").cloned().unwrap_or(Value::Null));
        }
    }
    map
}

fn compare_stage(diff: &mut Diff<'_>, expected: &Value, got: &Value) {
    let name = expected["name"].as_str().unwrap_or("?").to_string();
    let missing = Value::String("<missing>".to_string());
    let field = |v: &Value, key: &str| v.get(key).cloned().unwrap_or_else(|| missing.clone());

    for key in ["name", "drive", "verdict"] {
        let (e, g) = (field(expected, key), field(got, key));
        if e != g {
            diff.push(
                if key == "verdict" {
                    "stage verdict"
                } else {
                    "stage identity"
                },
                &name,
                key,
                &e,
                &g,
            );
        }
    }

    // Checks: the same set of ids, each with the oracle's status.
    let (want, have) = (checks_by_id(expected), checks_by_id(got));
    let want_ids: BTreeSet<&String> = want.keys().collect();
    let have_ids: BTreeSet<&String> = have.keys().collect();
    for id in want_ids.difference(&have_ids) {
        diff.push(
            "check missing",
            &name,
            &format!("check {id}"),
            &want[*id],
            &Value::String("<absent>".into()),
        );
    }
    for id in have_ids.difference(&want_ids) {
        diff.push(
            "check not expected",
            &name,
            &format!("check {id}"),
            &Value::String("<absent>".into()),
            &have[*id],
        );
    }
    for id in want_ids.intersection(&have_ids) {
        if want[*id] != have[*id] {
            diff.push(
                "check status",
                &name,
                &format!("check {id} status"),
                &want[*id],
                &have[*id],
            );
        }
    }

    // Resistor values and the sized flags (files.md: the stage's resistor keys).
    let npn = expected["drive"] == "npn";
    let (input, sized) = if npn {
        ("base_resistor_ohms", "base_resistor_sized")
    } else {
        ("gate_resistor_ohms", "gate_resistor_sized")
    };
    for key in [input, "pull_down_ohms", "led_resistor_ohms"] {
        let (e, g) = (field(expected, key), field(got, key));
        if !figure_matches(&e, &g, RESISTOR_TOLERANCE) {
            diff.push("resistor value", &name, key, &e, &g);
        }
    }
    let (e, g) = (field(expected, sized), field(got, sized));
    if e != g {
        diff.push("resistor value", &name, sized, &e, &g);
    }

    // Worst-case figures of files.md.
    let figures: &[&str] = if npn { &NPN_FIGURES } else { &NMOS_FIGURES };
    let (ew, gw) = (
        &expected["worst_case"],
        got.get("worst_case").unwrap_or(&Value::Null),
    );
    for key in figures {
        let e = ew.get(*key).cloned().unwrap_or(Value::Null);
        let g = gw.get(*key).cloned().unwrap_or_else(|| missing.clone());
        if !figure_matches(&e, &g, FIGURE_TOLERANCE) {
            let label = format!("worst_case.{key}{}", relative_note(&e, &g));
            diff.push("worst-case figure", &name, &label, &e, &g);
        }
    }
}

fn compare_board(board_file: &str, expected: &Value) -> Vec<Mismatch> {
    let board = board_file.trim_end_matches(".json");
    let mut diff = Diff {
        board,
        out: Vec::new(),
    };
    let rel = format!("tests/spec_v2/boards/{board_file}");
    let (code, stdout, stderr) = common::run(&[
        "audit",
        &rel,
        "--parts",
        "tests/spec_v2/parts",
        "--format",
        "json",
    ]);

    // files.md "Exit codes": 1 when some stage fails, else 0.
    let want_code = expected["exit_code"].as_i64().unwrap_or(-1);
    if i64::from(code) != want_code {
        diff.push(
            "exit code",
            "",
            "exit code",
            &Value::from(want_code),
            &Value::from(code),
        );
    }
    let report: Value = match serde_json::from_str(&stdout) {
        Ok(v) => v,
        Err(_) => {
            let first = stderr.lines().next().unwrap_or("").to_string();
            diff.out.push(Mismatch {
                kind: "no JSON report",
                text: format!("{board}: no JSON report (exit {code}); stderr: {first}"),
            });
            return diff.out;
        }
    };
    for key in ["model_version", "verdict"] {
        let e = expected[key].clone();
        let g = report.get(key).cloned().unwrap_or(Value::Null);
        if e != g {
            diff.push("board field", "", key, &e, &g);
        }
    }
    let want = expected["stages"].as_array().cloned().unwrap_or_default();
    let have = report
        .get("stages")
        .and_then(Value::as_array)
        .cloned()
        .unwrap_or_default();
    if want.len() != have.len() {
        diff.push(
            "board field",
            "",
            "number of stages",
            &Value::from(want.len()),
            &Value::from(have.len()),
        );
    }
    for (e, g) in want.iter().zip(have.iter()) {
        compare_stage(&mut diff, e, g);
    }
    diff.out
}

#[test]
fn spec_v2_boards_match_the_independent_oracle() {
    let dir = spec_dir();
    let boards = json_files(&dir.join("boards"));
    let expected_files = json_files(&dir.join("expected"));
    assert!(
        boards.len() >= MIN_BOARDS,
        "only {} boards in tests/spec_v2/boards (at least {MIN_BOARDS} expected)",
        boards.len()
    );
    assert_eq!(
        boards, expected_files,
        "every board needs its expected file and every expected file its board; run `python3 tests/spec_v2/oracle.py`"
    );

    let mut all = Vec::new();
    let mut stages = 0;
    for board in &boards {
        let expected = read_json(&dir.join("expected").join(board));
        stages += expected["stages"].as_array().map_or(0, Vec::len);
        all.extend(compare_board(board, &expected));
    }

    if !all.is_empty() {
        let mut kinds: BTreeMap<&str, usize> = BTreeMap::new();
        let mut boards_hit = BTreeSet::new();
        for m in &all {
            *kinds.entry(m.kind).or_default() += 1;
            boards_hit.insert(m.text.split(':').next().unwrap_or("").to_string());
        }
        let summary: Vec<String> = kinds.iter().map(|(k, n)| format!("  {n:5}  {k}")).collect();
        let lines: Vec<&str> = all.iter().map(|m| m.text.as_str()).collect();
        panic!(
            "{} mismatches against stage-model v2 on {} of {} boards ({} stages); by kind:\n{}\n\n{}\n",
            all.len(),
            boards_hit.len(),
            boards.len(),
            stages,
            summary.join("\n"),
            lines.join("\n")
        );
    }
}
