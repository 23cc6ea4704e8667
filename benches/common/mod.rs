//! What the benches share: the generated board, the machine's load, resident memory, timing a
//! run of the release binary.

#![allow(dead_code)] // each bench takes what it needs

use std::path::Path;
use std::process::{Command, Stdio};
use std::time::Instant;

/// The yield benches' board: a 12 V relay stage on an industrial board (demo part, 2.2 k base
/// resistor, 22 k pull-down).
pub const YIELD_BOARD: &str = r#"{
  "board": "yield bench",
  "stages": [{
    "name": "K1 relay",
    "part": "demo-npn-40v",
    "supply_v": 12,
    "logic_high_v": 3.3,
    "grade": "industrial",
    "load": {"kind": "relay", "coil_ohms": 400},
    "clamp": {"kind": "diode"},
    "pull_down_ohms": 22000,
    "base_resistor_ohms": 2200
  }]
}"#;

/// A board of `n` stages cycling through the drive and load kinds: relay, LEDs, strip and current
/// loads and a motor on the demo NPN part, a strip and a motor on the demo MOSFET. With `sized`
/// the NPN stages leave RB out (the engine sizes it); otherwise each gives its own.
pub fn board_json(n: usize, sized: bool) -> String {
    let mut stages = Vec::with_capacity(n);
    for i in 0..n {
        let rb = if sized {
            String::new()
        } else {
            format!(r#", "base_resistor_ohms": {}"#, 1000 + (i % 50) * 20)
        };
        let stage = match i % 6 {
            0 => format!(
                r#""part": "demo-npn-40v", "load": {{"kind": "relay", "coil_ohms": {}}}, "clamp": {{"kind": "diode"}}{rb}"#,
                300 + i % 200
            ),
            1 => format!(
                r#""part": "demo-npn-40v", "load": {{"kind": "led", "count": 2, "forward_v": 2.0, "current_a": {}}}{rb}"#,
                0.01 + (i % 10) as f64 * 0.001
            ),
            2 => format!(
                r#""part": "demo-npn-40v", "load": {{"kind": "strip", "rated_v": 12, "current_per_m_a": 0.1, "length_m": 0.5}}{rb}"#
            ),
            3 => format!(
                r#""part": "demo-npn-40v", "load": {{"kind": "current", "current_a": {}}}{rb}"#,
                0.02 + (i % 30) as f64 * 0.001
            ),
            4 => format!(
                r#""part": "demo-npn-40v", "load": {{"kind": "motor", "winding_ohms": {}}}, "clamp": {{"kind": "diode"}}{rb}"#,
                200 + i % 100
            ),
            _ => format!(
                r#""part": "demo-nmos-40v", "load": {{"kind": "strip", "rated_v": 12, "current_per_m_a": 0.6, "length_m": {}}}"#,
                0.5 + (i % 10) as f64 * 0.1
            ),
        };
        stages.push(format!(r#"{{"name": "S{i}", {stage}}}"#));
    }
    format!(
        "{{\"defaults\": {{\"supply_v\": 12, \"logic_high_v\": 3.3, \"ambient_c\": [-20, 60]}}, \"stages\": [\n{}\n]}}\n",
        stages.join(",\n")
    )
}

/// Peak resident memory of this process, KiB (Linux; 0 elsewhere).
pub fn peak_rss_kib() -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with("VmHWM:"))
                .and_then(|l| l.split_whitespace().nth(1).and_then(|v| v.parse().ok()))
        })
        .unwrap_or(0)
}

/// The 1, 5 and 15 minute load averages (Linux), since other work shows in wall times.
pub fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .map(|s| s.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "n/a".to_string())
}

/// (best, median) of some timings.
pub fn best_and_median(mut v: Vec<f64>) -> (f64, f64) {
    v.sort_by(f64::total_cmp);
    match (v.first(), v.get(v.len() / 2)) {
        (Some(&b), Some(&m)) => (b, m),
        _ => (f64::NAN, f64::NAN),
    }
}

/// The release binary the benches run (cargo builds it for `cargo bench`).
pub fn binary() -> &'static Path {
    Path::new(env!("CARGO_BIN_EXE_pinlow"))
}

/// One run of the binary with `args`, standard output thrown away: (wall seconds, peak resident
/// memory in KiB when /usr/bin/time is there to read it). Exit codes 0 and 1 are reports; any
/// other is an error.
pub fn run_binary(args: &[&str], env: &[(&str, &str)]) -> Result<(f64, Option<u64>), String> {
    let time = Path::new("/usr/bin/time");
    let mut cmd = if time.exists() {
        let mut c = Command::new(time);
        c.args(["-f", "%M"]).arg(binary());
        c
    } else {
        Command::new(binary())
    };
    cmd.args(args)
        .envs(env.iter().copied())
        .stdout(Stdio::null())
        .stderr(Stdio::piped());
    let start = Instant::now();
    let out = cmd.output().map_err(|e| e.to_string())?;
    let wall = start.elapsed().as_secs_f64();
    let code = out.status.code();
    if !matches!(code, Some(0 | 1)) {
        return Err(format!(
            "pinlow {} exited {code:?}: {}",
            args.join(" "),
            String::from_utf8_lossy(&out.stderr)
        ));
    }
    let rss = time
        .exists()
        .then(|| {
            String::from_utf8_lossy(&out.stderr)
                .lines()
                .last()
                .and_then(|l| l.trim().parse().ok())
        })
        .flatten();
    Ok((wall, rss))
}
