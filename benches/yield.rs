//! Times the yield Monte Carlo: 10 million builds of a relay stage with 1 and 2 threads.
//! Run with `cargo bench --bench yield`; set PINLOW_BENCH_BUILDS to change the count.
//!
//! Each configuration runs once to warm up, then five times. It prints the wall time per build
//! (best and median of the five) and, on Linux, the CPU time per build summed over the process's
//! threads (median), which is the cost a build has on one core whatever else the machine runs.

mod common;

use std::time::Instant;

use common::YIELD_BOARD as BOARD;

use pinlow::analysis::analyse;
use pinlow::analysis::yield_mc::{run_yield, YieldOptions, YieldResult, YieldStage};
use pinlow::board::parse_board;
use pinlow::parts::Library;

const RUNS: usize = 5;

/// CPU time of every thread of this process so far, ns (Linux: /proc/self/task/*/schedstat);
/// `None` elsewhere.
fn process_cpu_ns() -> Option<u64> {
    let mut total = 0u64;
    for entry in std::fs::read_dir("/proc/self/task").ok()? {
        let path = entry.ok()?.path().join("schedstat");
        let text = std::fs::read_to_string(path).ok()?;
        total += text.split_whitespace().next()?.parse::<u64>().ok()?;
    }
    Some(total)
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let builds: u64 = match std::env::var("PINLOW_BENCH_BUILDS") {
        Ok(s) => s.parse()?,
        Err(_) => 10_000_000,
    };
    let lib = Library::builtin()?;
    let board = parse_board("bench", BOARD, &lib)?;
    let stage = board.stages.first().ok_or("the bench board has a stage")?;
    let analysis = analyse(stage);
    let stage = YieldStage::of(stage, &analysis).ok_or("the bench stage is an NPN stage")?;
    let opts = YieldOptions { builds, seed: 42 };

    let mut first: Option<YieldResult> = None;
    for threads in [1usize, 2] {
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()?;
        let warm = YieldOptions {
            builds: builds / 10,
            ..opts
        };
        pool.install(|| run_yield(&stage, &warm));
        let mut wall = Vec::new();
        let mut cpu = Vec::new();
        let mut result = None;
        for _ in 0..RUNS {
            let cpu_start = process_cpu_ns();
            let start = Instant::now();
            let r = pool.install(|| run_yield(&stage, &opts));
            wall.push(start.elapsed().as_secs_f64() * 1e9 / builds as f64);
            if let (Some(a), Some(b)) = (cpu_start, process_cpu_ns()) {
                cpu.push(b.saturating_sub(a) as f64 / builds as f64);
            }
            result = Some(r);
        }
        let result = result.ok_or("no run")?;
        let best = wall.iter().copied().fold(f64::INFINITY, f64::min);
        let cpu_text = if cpu.is_empty() {
            "n/a".to_string()
        } else {
            format!("{:.2}", median(cpu))
        };
        println!(
            "yield, relay stage, {builds} builds, {threads} thread(s): wall {best:.2} ns/build best, {:.2} median ({:.3} s best); CPU {cpu_text} ns/build (all threads, median); pinned-low {:.6}, overdrive p0.1 {:.4}",
            median(wall.clone()),
            best * builds as f64 / 1e9,
            result.pinned_low_fraction,
            result.overdrive_percentiles.p0_1,
        );
        match &first {
            None => first = Some(result),
            Some(r) if *r != result => return Err("1 and 2 threads gave different figures".into()),
            Some(_) => {}
        }
    }
    Ok(())
}
