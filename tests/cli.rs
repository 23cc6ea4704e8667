//! CLI tests: exit codes (files.md), parts commands, colour, output files.

mod common;

use clap::CommandFactory;
use common::{pinlow, run};
use pinlow::cli::Cli;

#[test]
fn command_line_definition_is_consistent() {
    Cli::command().debug_assert();
}

#[test]
fn parts_list_prints_at_least_eight_parts() {
    let (code, out, _) = run(&["parts", "list"]);
    assert_eq!(code, 0);
    let rows = out.lines().filter(|l| l.contains(" npn ")).count();
    assert!(rows >= 8, "{out}");
    assert!(out.contains("demo-npn-40v") && out.contains("TIP120"));
}

#[test]
fn parts_show_prints_every_figure() {
    let (code, out, _) = run(&["parts", "show", "demo-npn-1a"]);
    assert_eq!(code, 0);
    for needle in [
        "VCEO",
        "60 V",
        "hFE min",
        "VCE(sat) max",
        "VBE(sat)",
        "invented",
    ] {
        assert!(out.contains(needle), "{needle} missing in {out}");
    }
}

#[test]
fn parts_check_accepts_shipped_files_and_names_bad_ones() {
    let (code, out, _) = run(&[
        "parts",
        "check",
        "parts/demo-npn-40v.json",
        "parts/tip120.json",
    ]);
    assert_eq!(code, 0);
    assert!(out.contains("parts/tip120.json: ok (TIP120, npn)"), "{out}");
    let (code, _, err) = run(&[
        "parts",
        "check",
        "tests/fixtures/parts-bad/unknown-key.json",
    ]);
    assert_eq!(code, 2);
    assert!(
        err.contains("tests/fixtures/parts-bad/unknown-key.json"),
        "{err}"
    );
    assert!(err.contains("gain_min[0].vce_v"), "{err}");
}

#[test]
fn user_parts_folder_and_variable_add_parts() {
    let (code, out, _) = run(&["parts", "list", "--parts", "tests/fixtures/parts-extra"]);
    assert_eq!(code, 0);
    assert!(out.contains("lab-npn"));
    let out = pinlow()
        .args(["parts", "show", "lab-npn"])
        .env("PINLOW_PARTS", "tests/fixtures/parts-extra")
        .output()
        .expect("runs");
    assert_eq!(out.status.code(), Some(0));
    let (code, _, err) = run(&["parts", "show", "lab-npn"]);
    assert_eq!(code, 2, "not known without the folder: {err}");
}

#[test]
fn exit_codes_follow_the_verdict() {
    // The demo board has failing stages: exit 1.
    let (code, out, _) = run(&["audit", "examples/greenhouse.json"]);
    assert_eq!(code, 1);
    assert!(out.contains("Board verdict: FAIL"));
    // A passing stage: exit 0, with and without --strict.
    let pass = [
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
        "--clamp-reverse",
        "100V",
        "--clamp-current",
        "1A",
    ];
    assert_eq!(run(&pass).0, 0);
    let mut strict = pass.to_vec();
    strict.push("--strict");
    assert_eq!(run(&strict).0, 0);
    // A marginal stage (no pull-down): 0, and 1 with --strict.
    let marginal = [
        "audit",
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
        "--base-resistor",
        "1k",
        "--no-pull-down",
    ];
    let (code, out, _) = run(&marginal);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("MARGINAL"));
    let mut strict = marginal.to_vec();
    strict.push("--strict");
    assert_eq!(run(&strict).0, 1);
    // Unusable input: 2.
    assert_eq!(
        run(&["audit", "tests/fixtures/errors/unknown-key.json"]).0,
        2
    );
    assert_eq!(run(&["size", "--supply", "twelve"]).0, 2);
}

#[test]
fn colour_only_when_asked() {
    let args = ["audit", "examples/greenhouse.json"];
    let (_, plain, _) = run(&args);
    assert!(!plain.contains('\u{1b}'), "no colour off a terminal");
    let (_, never, _) = run(&["audit", "examples/greenhouse.json", "--color", "never"]);
    assert!(!never.contains('\u{1b}'));
    let (_, always, _) = run(&["audit", "examples/greenhouse.json", "--color", "always"]);
    assert!(always.contains('\u{1b}'), "--color always colours");
}

#[test]
fn output_file_receives_the_report() {
    let dir = std::env::temp_dir().join(format!("pinlow-out-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let file = dir.join("review.md");
    let file_s = file.to_string_lossy().into_owned();
    let (code, out, _) = run(&[
        "audit",
        "examples/greenhouse.json",
        "--format",
        "markdown",
        "--output",
        &file_s,
    ]);
    assert_eq!(code, 1);
    assert!(out.is_empty());
    let text = std::fs::read_to_string(&file).expect("written");
    // The first line marks the file as pinlow's own (so a later run may replace it); the
    // report follows unchanged.
    let (marker, report) = text.split_once('\n').expect("two lines at least");
    assert_eq!(
        marker,
        format!("<!-- written by pinlow {} -->", env!("CARGO_PKG_VERSION"))
    );
    assert!(
        report.starts_with("# Board: greenhouse controller"),
        "{text}"
    );
    // Written again over its own output: fine, and the same bytes.
    let (code, _, err) = run(&[
        "audit",
        "examples/greenhouse.json",
        "--format",
        "markdown",
        "--output",
        &file_s,
    ]);
    assert_eq!(code, 1, "{err}");
    assert_eq!(std::fs::read_to_string(&file).expect("written"), text);
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn json_report_has_the_contract_fields() {
    let (_, out, _) = run(&["audit", "examples/greenhouse.json", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_str(&out).expect("valid JSON");
    assert_eq!(v["verdict"], "fail");
    let s = &v["stages"][0];
    for key in [
        "name",
        "verdict",
        "base_resistor_ohms",
        "base_resistor_sized",
        "pull_down_ohms",
        "led_resistor_ohms",
        "worst_case",
        "checks",
        "assumptions",
        "cautions",
    ] {
        assert!(s.get(key).is_some(), "{key} missing");
    }
    for key in [
        "collector_current_max_a",
        "base_current_min_a",
        "gain_min",
        "overdrive_min",
        "forced_beta_max",
        "pin_current_max_a",
        "power_max_w",
        "junction_max_c",
        "collector_peak_v",
    ] {
        assert!(
            s["worst_case"].get(key).is_some(),
            "worst_case.{key} missing"
        );
    }
    let c = &s["checks"][0];
    for key in ["id", "status", "value", "limit", "detail"] {
        assert!(c.get(key).is_some(), "checks[].{key} missing");
    }
}

#[test]
fn every_command_has_help_with_examples_and_a_version() {
    // Every command path of the clap definition, so a new command cannot be forgotten here.
    fn paths(cmd: &clap::Command, prefix: Vec<String>, out: &mut Vec<Vec<String>>) {
        out.push(prefix.clone());
        for sub in cmd.get_subcommands().filter(|s| s.get_name() != "help") {
            let mut p = prefix.clone();
            p.push(sub.get_name().to_string());
            paths(sub, p, out);
        }
    }
    let mut all = Vec::new();
    paths(&Cli::command(), Vec::new(), &mut all);
    assert!(all.len() >= 8, "{all:?}");
    for path in all {
        let mut args: Vec<&str> = path.iter().map(String::as_str).collect();
        args.push("--help");
        let (code, out, _) = run(&args);
        assert_eq!(code, 0, "{args:?}");
        assert!(out.contains("Example"), "{args:?} has no example: {out}");
    }
    let (code, out, _) = run(&["--version"]);
    assert_eq!(code, 0);
    // The model and the shipped parts follow (tests/ecosystem.rs checks them).
    assert!(
        out.starts_with(&format!(
            "pinlow {} (stage model ",
            env!("CARGO_PKG_VERSION")
        )),
        "{out}"
    );
}

#[test]
fn plot_writes_an_svg_per_stage() {
    let dir = std::env::temp_dir().join(format!("pinlow-plot-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let one = dir.join("relay.svg");
    let (code, out, err) = run(&[
        "plot",
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
        "--output",
        &one.to_string_lossy(),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("relay.svg"));
    let svg = std::fs::read_to_string(&one).expect("svg written");
    for class in [
        "pinlow-load-line",
        "pinlow-curve",
        "pinlow-point-nominal",
        "pinlow-point-worst",
    ] {
        assert!(svg.contains(class), "{class} missing");
    }
    let many = dir.join("board.svg");
    let (code, _, err) = run(&[
        "plot",
        "examples/greenhouse.json",
        "--output",
        &many.to_string_lossy(),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(dir.join("board-1.svg").exists() && dir.join("board-7.svg").exists());
    let (code, _, err) = run(&["plot", "examples/greenhouse.json"]);
    assert_eq!(code, 2, "no --output is a usage error: {err}");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn markdown_links_the_plots() {
    let dir = std::env::temp_dir().join(format!("pinlow-plots-{}", std::process::id()));
    let plots = dir.join("plots");
    let (code, out, _) = run(&[
        "audit",
        "examples/greenhouse.json",
        "--format",
        "markdown",
        "--plots",
        &plots.to_string_lossy(),
    ]);
    assert_eq!(code, 1);
    assert!(
        out.contains("![Operating point of K1 vent relay]("),
        "{out}"
    );
    assert!(plots.join("stage-1.svg").exists());
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn only_problems_hides_passing_stages_but_not_the_verdict() {
    let (code, out, _) = run(&["audit", "examples/greenhouse.json", "--only-problems"]);
    assert_eq!(code, 1);
    assert!(!out.contains("K1 vent relay"), "K1 passes and is hidden");
    assert!(out.contains("B1 frost alarm buzzer"));
    assert!(out.contains("Board verdict: FAIL"));
}

#[test]
fn yield_adds_a_seeded_monte_carlo_to_each_stage() {
    let args = [
        "audit",
        "examples/greenhouse.json",
        "--format",
        "json",
        "--yield",
        "20000",
        "--seed",
        "42",
    ];
    let (code, out, err) = run(&args);
    assert_eq!(code, 1, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).expect("JSON");
    let mut modelled = 0;
    for s in v["stages"].as_array().expect("stages") {
        let y = &s["yield"];
        if s["drive"] == "nmos" {
            // No yield model for MOSFET stages yet: the report says so instead of leaving it out.
            assert_eq!(y["modelled"], false, "{}", s["name"]);
            assert!(y["reason"].as_str().is_some_and(|r| r.contains("nmos")));
            continue;
        }
        modelled += 1;
        assert_eq!(y["builds"], 20000);
        assert_eq!(y["seed"], 42);
        for key in ["pinned_low_fraction", "overdrive_met_fraction"] {
            let f = y[key].as_f64().expect("fraction");
            assert!((0.0..=1.0).contains(&f), "{key} = {f}");
        }
        for key in ["pinned_low_interval", "overdrive_met_interval"] {
            let lo = y[key][0].as_f64().expect("low");
            let hi = y[key][1].as_f64().expect("high");
            assert!(lo <= hi, "{key}");
        }
        assert!(y["overdrive_percentiles"]["p50"].is_number());
        // A stage whose worst case pins the load low pins it low in every build.
        if s["worst_case"]["overdrive_min"].as_f64().unwrap_or(0.0) >= 1.0 {
            assert_eq!(y["pinned_low_fraction"], 1.0, "{}", s["name"]);
        }
    }
    assert!(modelled >= 6, "the NPN stages have a yield: {modelled}");
    // The same seed gives the same figures.
    let (_, again, _) = run(&args);
    assert_eq!(out, again);
    // Without --yield there is no yield object.
    let (_, plain, _) = run(&["audit", "examples/greenhouse.json", "--format", "json"]);
    assert!(!plain.contains("\"yield\""));
    // --seed needs --yield; a fractional or zero count is refused.
    assert_eq!(
        run(&["audit", "examples/greenhouse.json", "--seed", "3"]).0,
        2
    );
    assert_eq!(
        run(&["audit", "examples/greenhouse.json", "--yield", "0"]).0,
        2
    );
    assert_eq!(
        run(&["audit", "examples/greenhouse.json", "--yield", "2.5"]).0,
        2
    );
}

#[test]
fn listed_parts_read_back_as_part_files() {
    // `parts list --format json` gives each part's record (and where it came from): without the
    // `source`, each must be a part file the reader takes again, with no nulls.
    let (code, out, err) = run(&["parts", "list", "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).expect("JSON");
    let dir = tempfile::tempdir().expect("temp dir");
    let parts = v["parts"].as_array().expect("parts");
    assert!(parts.len() >= 16);
    for p in parts {
        let mut record = p.clone();
        record.as_object_mut().expect("an object").remove("source");
        let id = record["id"].as_str().expect("id").to_string();
        let text = serde_json::to_string_pretty(&record).expect("JSON");
        assert!(!text.contains("null"), "{id}: {text}");
        let file = dir.path().join(format!("{id}.json"));
        std::fs::write(&file, text).expect("write");
        let (code, _, err) = run(&["parts", "check", &file.to_string_lossy()]);
        assert_eq!(code, 0, "{id}: {err}");
    }
}
