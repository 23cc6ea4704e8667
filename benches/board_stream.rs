//! The whole `audit` command on a generated board of 100,000 stages, in JSON, table and
//! Markdown: wall time and peak resident memory, each format in a fresh process (the bench
//! runs itself with `--child`), the report going to a sink. Run:
//! `cargo bench --bench board_stream` (`-- 20000` for another stage count).

use std::time::Instant;

use clap::Parser;

/// A board of `n` stages cycling through the load kinds, each with its RB (the generator of
/// `benches/audit.rs`).
fn board_json(n: usize) -> String {
    let mut stages = Vec::with_capacity(n);
    for i in 0..n {
        let rb = format!(r#", "base_resistor_ohms": {}"#, 1000 + (i % 50) * 20);
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
        "{{\"defaults\": {{\"supply_v\": 12, \"logic_high_v\": 3.3, \"ambient_c\": [-20, 60]}}, \"stages\": [\n{}\n]}}\n",
        stages.join(",\n")
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

fn child(file: &str, format: &str) {
    let cli = pinlow::cli::Cli::parse_from([
        "pinlow", "audit", file, "--format", format, "--color", "never",
    ]);
    let started = Instant::now();
    let code = pinlow::app::run(&cli, None, false, true, &mut std::io::sink());
    let took = started.elapsed();
    match code {
        Ok(code) => println!(
            "{format:>8}: {:7.2} s, peak RSS {:7} KiB (exit {code})",
            took.as_secs_f64(),
            peak_rss_kib()
        ),
        Err(e) => println!("{format:>8}: error: {e}"),
    }
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    if let Some(at) = args.iter().position(|a| a == "--child") {
        match (args.get(at + 1), args.get(at + 2)) {
            (Some(file), Some(format)) => child(file, format),
            _ => eprintln!("--child FILE FORMAT"),
        }
        return;
    }
    let n: usize = args
        .iter()
        .skip(1)
        .find_map(|a| a.parse().ok())
        .unwrap_or(100_000);
    let dir = std::env::temp_dir().join(format!("pinlow-bench-stream-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let path = dir.join("board.json");
    let text = board_json(n);
    std::fs::write(&path, &text).expect("write the board");
    println!(
        "audit of a generated board: {n} stages, {:.1} MB; each format in its own process",
        text.len() as f64 / 1e6
    );
    drop(text);
    let me = std::env::current_exe().expect("the bench binary");
    for format in ["json", "table", "markdown"] {
        let out = std::process::Command::new(&me)
            .args(["--child", &path.to_string_lossy(), format])
            .output()
            .expect("child runs");
        print!("{}", String::from_utf8_lossy(&out.stdout));
        eprint!("{}", String::from_utf8_lossy(&out.stderr));
    }
    let _ = std::fs::remove_dir_all(&dir);
}
