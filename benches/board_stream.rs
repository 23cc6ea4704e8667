//! The whole `audit` command on a generated board (20,000 stages unless given: `cargo bench
//! --bench board_stream -- 100000`), in JSON, table and Markdown, each format in a fresh
//! process, two ways:
//!
//! - library: this bench runs itself with `--child`, which calls `pinlow::app::run` (what the
//!   binary's `main` calls) with the report going to a sink; it prints the time inside the
//!   process and the peak resident memory;
//! - binary: the release `pinlow audit BOARD --format F` with standard output to /dev/null, wall
//!   time of the whole process and its peak resident memory (from /usr/bin/time when present).
//!
//! `-- N --write PATH` only writes the generated board of N stages (to profile the binary on it).
//!
//! Each is run three times and the best is kept; stages per second and each format's time over
//! the JSON time are printed, with the load average before and after.

mod common;

use std::time::Instant;

use clap::Parser;
use common::{best_and_median, board_json, load_average, peak_rss_kib, run_binary};

const RUNS: usize = 3;
const FORMATS: [&str; 3] = ["json", "table", "markdown"];

fn child(file: &str, format: &str) {
    let cli = pinlow::cli::Cli::parse_from([
        "pinlow", "audit", file, "--format", format, "--color", "never",
    ]);
    let started = Instant::now();
    let code = pinlow::app::run(&cli, None, false, true, &mut std::io::sink());
    let took = started.elapsed();
    match code {
        Ok(_) => println!("{} {}", took.as_secs_f64(), peak_rss_kib()),
        Err(e) => println!("error: {e}"),
    }
}

/// (best seconds, peak KiB) of the library path in fresh processes.
fn library(file: &str, format: &str) -> Result<(f64, u64), String> {
    let me = std::env::current_exe().map_err(|e| e.to_string())?;
    let mut times = Vec::new();
    let mut rss = 0;
    for _ in 0..RUNS {
        let out = std::process::Command::new(&me)
            .args(["--child", file, format])
            .output()
            .map_err(|e| e.to_string())?;
        let text = String::from_utf8_lossy(&out.stdout).to_string();
        let mut it = text.split_whitespace();
        match (
            it.next().and_then(|t| t.parse::<f64>().ok()),
            it.next().and_then(|r| r.parse::<u64>().ok()),
        ) {
            (Some(t), Some(r)) => {
                times.push(t);
                rss = rss.max(r);
            }
            _ => return Err(format!("child: {text}")),
        }
    }
    Ok((best_and_median(times).0, rss))
}

/// (best seconds, peak KiB) of the release binary.
fn binary(file: &str, format: &str) -> Result<(f64, Option<u64>), String> {
    let mut times = Vec::new();
    let mut rss = None;
    for _ in 0..RUNS {
        let (t, r) = run_binary(&["audit", file, "--format", format], &[])?;
        times.push(t);
        rss = rss.max(r);
    }
    Ok((best_and_median(times).0, rss))
}

fn main() -> Result<(), String> {
    let args: Vec<String> = std::env::args().collect();
    if let Some(at) = args.iter().position(|a| a == "--child") {
        match (args.get(at + 1), args.get(at + 2)) {
            (Some(file), Some(format)) => child(file, format),
            _ => eprintln!("--child FILE FORMAT"),
        }
        return Ok(());
    }
    let n: usize = args
        .iter()
        .skip(1)
        .find_map(|a| a.parse().ok())
        .unwrap_or(20_000);
    if let Some(at) = args.iter().position(|a| a == "--write") {
        // Only write the generated board (for a profiler run of the binary on it).
        let path = args.get(at + 1).ok_or("--write PATH")?;
        std::fs::write(path, board_json(n, false)).map_err(|e| e.to_string())?;
        println!("wrote {n} stages to {path}");
        return Ok(());
    }
    let dir = std::env::temp_dir().join(format!("pinlow-bench-stream-{}", std::process::id()));
    std::fs::create_dir_all(&dir).map_err(|e| e.to_string())?;
    let path = dir.join("board.json");
    let text = board_json(n, false);
    std::fs::write(&path, &text).map_err(|e| e.to_string())?;
    let file = path.to_string_lossy().to_string();
    println!(
        "audit of a generated board: {n} stages, {:.1} MB; load average {}",
        text.len() as f64 / 1e6,
        load_average()
    );
    drop(text);
    let mut json = (f64::NAN, f64::NAN);
    for format in FORMATS {
        let (lt, lr) = library(&file, format)?;
        let (bt, br) = binary(&file, format)?;
        if format == "json" {
            json = (lt, bt);
        }
        println!(
            "{format:>8}: library {lt:6.3} s ({:7.0} stages/s, {:.2} x JSON), peak {:6.1} MiB | binary {bt:6.3} s ({:7.0} stages/s, {:.2} x JSON), peak {}",
            n as f64 / lt,
            lt / json.0,
            lr as f64 / 1024.0,
            n as f64 / bt,
            bt / json.1,
            br.map_or("n/a".to_string(), |k| format!("{:.1} MiB", k as f64 / 1024.0)),
        );
    }
    println!("load average after: {}", load_average());
    let _ = std::fs::remove_dir_all(&dir);
    Ok(())
}
