//! Throughput of the audit engine on generated boards of 1,000 and 100,000 stages, one core.
//! Prints stages per second for given-RB stages and for sized stages, and the peak resident
//! memory. Run: `cargo bench --bench audit`.

use std::time::Instant;

use pinlow::analysis::analyse;
use pinlow::board::parse_board;
use pinlow::parts::Library;
use pinlow::pipeline::{stage_report, Options};

/// A board of `n` stages cycling through the load kinds; `sized` leaves RB out.
fn board_json(n: usize, sized: bool) -> String {
    let mut stages = Vec::with_capacity(n);
    for i in 0..n {
        let rb = if sized {
            String::new()
        } else {
            format!(r#", "base_resistor_ohms": {}"#, 1000 + (i % 50) * 20)
        };
        let load = match i % 4 {
            0 => format!(
                r#"{{"kind": "relay", "coil_ohms": {}}}, "clamp": {{"kind": "diode"}}"#,
                300 + i % 200
            ),
            1 => format!(
                r#"{{"kind": "led", "count": 2, "forward_v": 2.0, "current_a": {}}}"#,
                0.01 + (i % 10) as f64 * 0.001
            ),
            2 => r#"{"kind": "strip", "rated_v": 12, "current_per_m_a": 0.1, "length_m": 0.5}"#
                .to_string(),
            _ => format!(
                r#"{{"kind": "current", "current_a": {}}}"#,
                0.02 + (i % 30) as f64 * 0.001
            ),
        };
        stages.push(format!(
            r#"{{"name": "S{i}", "part": "demo-npn-40v", "load": {load}{rb}}}"#
        ));
    }
    format!(
        r#"{{"defaults": {{"supply_v": 12, "logic_high_v": 3.3, "ambient_c": [-20, 60]}}, "stages": [{}]}}"#,
        stages.join(",")
    )
}

fn peak_rss_kib() -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("VmHWM:"))
                .and_then(|l| l.split_whitespace().nth(1).and_then(|v| v.parse().ok()))
        })
        .unwrap_or(0)
}

fn main() {
    let lib = Library::builtin().expect("shipped parts");
    for &sized in &[false, true] {
        for &n in &[1_000usize, 100_000] {
            let text = board_json(n, sized);
            let t0 = Instant::now();
            let board = parse_board("bench", &text, &lib).expect("generated board is valid");
            let parse = t0.elapsed();
            let t1 = Instant::now();
            let mut fails = 0usize;
            for s in &board.stages {
                let a = analyse(s);
                fails += usize::from(a.verdict == pinlow::check::Status::Fail);
                std::hint::black_box(&a);
            }
            let engine = t1.elapsed();
            let t2 = Instant::now();
            let mut bytes = 0usize;
            for (i, s) in board.stages.iter().enumerate() {
                let r = stage_report(i + 1, s, &Options::default(), &|_, _| {});
                bytes += serde_json::to_string(&r).map(|t| t.len()).unwrap_or(0);
            }
            let full = t2.elapsed();
            println!(
                "{n:>7} stages, RB {}: parse {:.0} stages/s; engine {:.0} stages/s ({fails} fail); engine + remedy + JSON {:.0} stages/s ({} MB); peak RSS {} MiB",
                if sized { "sized" } else { "given" },
                n as f64 / parse.as_secs_f64(),
                n as f64 / engine.as_secs_f64(),
                n as f64 / full.as_secs_f64(),
                bytes / 1_000_000,
                peak_rss_kib() / 1024
            );
        }
    }
}
