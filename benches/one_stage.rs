//! One stage through the release binary against the process floor (`pinlow --version`): the
//! audit of a one-stage board, `size` from flags, and `pick` over the shipped parts. Each
//! command runs 3 times to warm up, then 31 times; best and median wall time and each over the
//! floor's are printed, with the load average before and after. Run:
//! `cargo bench --bench one_stage`.

mod common;

use common::{best_and_median, load_average, run_binary};

const RUNS: usize = 31;

/// A 12 V relay stage from a 3.3 V pin on the demo part, its RB and pull-down sized.
const BOARD: &str = r#"{
  "board": "one stage",
  "stages": [{
    "name": "K1 relay", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
    "grade": "industrial", "load": {"kind": "relay", "coil_ohms": 400},
    "clamp": {"kind": "diode"}
  }]
}"#;

fn time(args: &[&str]) -> Result<(f64, f64), String> {
    for _ in 0..3 {
        run_binary(args, &[])?;
    }
    let walls = (0..RUNS)
        .map(|_| run_binary(args, &[]).map(|(t, _)| t))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(best_and_median(walls))
}

fn main() -> Result<(), String> {
    let dir = std::env::temp_dir().join(format!("pinlow-one-stage-{}", std::process::id()));
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;
    let board = dir.join("one.json");
    std::fs::write(&board, BOARD).map_err(|e| e.to_string())?;
    let board = board.to_string_lossy().to_string();
    println!("load average {}", load_average());
    let flags = [
        "--supply",
        "12V",
        "--logic-high",
        "3V3",
        "--grade",
        "industrial",
        "--load",
        "relay",
        "--coil",
        "400",
        "--clamp",
        "diode",
    ];
    let mut size = vec!["size", "--part", "demo-npn-40v"];
    size.extend_from_slice(&flags);
    let mut pick = vec!["pick"];
    pick.extend_from_slice(&flags);
    let commands: [(&str, Vec<&str>); 6] = [
        ("floor: --version", vec!["--version"]),
        ("audit BOARD (table)", vec!["audit", &board]),
        (
            "audit BOARD --format json",
            vec!["audit", &board, "--format", "json"],
        ),
        ("size (flags)", size),
        ("pick (flags, table)", pick.clone()),
        ("pick (flags, json)", {
            let mut p = pick;
            p.extend_from_slice(&["--format", "json"]);
            p
        }),
    ];
    let mut floor = (f64::NAN, f64::NAN);
    for (name, args) in &commands {
        let (best, median) = time(args)?;
        if floor.0.is_nan() {
            floor = (best, median);
        }
        println!(
            "{name:<28} best {:6.2} ms ({:.2} x the floor's best), median {:6.2} ms ({:.2} x the floor's median)",
            best * 1e3,
            best / floor.0,
            median * 1e3,
            median / floor.1
        );
    }
    println!("load average after: {}", load_average());
    let _ = std::fs::remove_dir_all(&dir);
    Ok(())
}
