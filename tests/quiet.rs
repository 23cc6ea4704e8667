//! Small behaviours a careful user would expect: a stage with nothing to draw still gets its
//! report, a part id in another case is found, a value of another scale says what it was read
//! as, an unnamed stage is called after its load, implausible inputs get a caution, and `size`
//! of one stage prints no board verdict. (A closed standard output is in tests/outputs.rs.)

mod common;

use common::run;

/// Three 3 V LEDs from 5 V: they cannot light, so the load draws nothing to draw.
const DARK: &str = r#"{ "board": "dark", "stages": [ { "name": "dark string", "part": "demo-npn-40v",
    "supply_v": 5, "logic_high_v": 3.3, "load": { "kind": "led", "count": 3, "forward_v": 3.0,
    "current_a": 0.01, "resistor_ohms": 100 } } ] }"#;

fn scratch(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("pinlow-quiet-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).expect("temp dir");
    dir
}

#[test]
fn a_stage_without_a_picture_still_gets_its_report() {
    let dir = scratch("dark");
    let board = dir.join("dark.json");
    std::fs::write(&board, DARK).expect("board");
    let b = board.display().to_string();
    let plots = dir.join("plots").display().to_string();
    let (code, out, err) = run(&["audit", &b, "--plots", &plots]);
    assert_eq!(code, 1, "the stage fails, and its report is written: {err}");
    assert!(
        out.contains("No picture: stage `dark string`: the load draws no current"),
        "{out}"
    );
    assert!(
        !dir.join("plots/stage-1.svg").exists(),
        "no half-written picture"
    );
    let svg = dir.join("dark.svg").display().to_string();
    let (code, out, err) = run(&["plot", &b, "-o", &svg]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("dark string: no picture"), "{out}");
    assert!(!dir.join("dark.svg").exists());
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn part_ids_match_in_any_case_and_near_misses_get_suggestions() {
    let (code, out, _) = run(&["parts", "show", "tip120"]);
    assert_eq!(code, 0);
    assert!(out.contains("TIP120"));
    let (code, _, err) = run(&["parts", "show", "2N3094"]);
    assert_eq!(code, 2);
    assert!(err.contains("did you mean 2N3904"), "{err}");
}

#[test]
fn a_value_of_another_scale_says_what_it_was_read_as() {
    let (code, _, err) = run(&[
        "size",
        "--supply",
        "5V",
        "--logic-high",
        "3V3",
        "--part",
        "2N3904",
        "--load",
        "current",
        "--current",
        "50MA",
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("it reads as 50 MA = 50000000 A"), "{err}");
}

#[test]
fn one_stage_has_no_board_verdict_and_is_named_after_its_load() {
    let (code, out, err) = run(&[
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
        "diode",
    ]);
    assert!(code == 0 || code == 1, "{err}");
    assert!(!out.contains("Board verdict"), "{out}");
    assert!(out.contains("Stage 1: relay stage"), "{out}");
}

#[test]
fn implausible_inputs_are_accepted_with_a_caution() {
    let (code, out, err) = run(&[
        "size",
        "--supply",
        "12V",
        "--logic-high",
        "30V",
        "--pin-limit",
        "500mA",
        "--part",
        "demo-npn-1a",
        "--load",
        "current",
        "--current",
        "100mA",
    ]);
    assert!(code == 0 || code == 1, "{err}");
    assert!(
        out.contains("the pin limit 500 mA is above 100 mA, unusual"),
        "{out}"
    );
    assert!(
        out.contains("the logic high 30 V is above 24 V, unusual"),
        "{out}"
    );
}
