//! Times the yield end to end, through the command a user runs: the release binary on a board of
//! one relay stage, `pinlow audit BOARD --format json --yield 10000000`, on one thread (RAYON_NUM_THREADS=1)
//! and on every core. Run with `cargo bench --bench yield_cli`; PINLOW_BENCH_BUILDS changes the
//! count.
//!
//! Each configuration runs once to warm up, then seven times; it prints the wall time of the
//! whole process (best and median) and ns per build per core = wall x threads / builds. The
//! process floor (the same audit without `--yield`) is printed too, and the machine's load
//! average before and after, since other work on the machine shows in wall times.

mod common;

use std::path::Path;
use std::process::{Command, Stdio};
use std::time::Instant;

use common::{best_and_median, load_average, YIELD_BOARD as BOARD};

const RUNS: usize = 7;

/// Wall seconds of one run of the binary; the exit code (1: the stage fails its corner) is not
/// an error here, a missing report is.
fn run(binary: &Path, board: &Path, args: &[&str], threads: Option<usize>) -> Result<f64, String> {
    let mut cmd = Command::new(binary);
    cmd.arg("audit")
        .arg(board)
        .arg("--format")
        .arg("json")
        .args(args)
        .stdout(Stdio::piped())
        .stderr(Stdio::null());
    if let Some(t) = threads {
        cmd.env("RAYON_NUM_THREADS", t.to_string());
    }
    let start = Instant::now();
    let out = cmd.output().map_err(|e| e.to_string())?;
    let wall = start.elapsed().as_secs_f64();
    if out.stdout.is_empty() {
        return Err(format!("no report (exit {:?})", out.status.code()));
    }
    Ok(wall)
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let builds: u64 = match std::env::var("PINLOW_BENCH_BUILDS") {
        Ok(s) => s.parse()?,
        Err(_) => 10_000_000,
    };
    let binary = Path::new(env!("CARGO_BIN_EXE_pinlow"));
    let dir = std::env::temp_dir().join(format!("pinlow-yield-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir)?;
    let board = dir.join("relay.json");
    std::fs::write(&board, BOARD)?;
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    println!(
        "binary {}, load average {}",
        binary.display(),
        load_average()
    );

    let count = builds.to_string();
    let floor: Vec<f64> = (0..RUNS)
        .map(|_| run(binary, &board, &[], None))
        .collect::<Result<_, _>>()?;
    let (fb, fm) = best_and_median(floor);
    println!(
        "process floor (audit, no yield): {:.1} ms best, {:.1} ms median",
        fb * 1e3,
        fm * 1e3
    );
    for threads in [1, cores] {
        run(binary, &board, &["--yield", &count], Some(threads))?;
        let walls: Vec<f64> = (0..RUNS)
            .map(|_| run(binary, &board, &["--yield", &count], Some(threads)))
            .collect::<Result<_, _>>()?;
        let (best, median) = best_and_median(walls);
        let per = |w: f64| w * threads as f64 * 1e9 / builds as f64;
        println!(
            "audit --yield {builds}, {threads} thread(s): wall {:.3} s best, {:.3} s median; {:.2} ns/build/core best, {:.2} median",
            best,
            median,
            per(best),
            per(median)
        );
    }
    println!("load average after: {}", load_average());
    std::fs::remove_dir_all(&dir)?;
    Ok(())
}
