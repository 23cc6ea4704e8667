//! Throughput of the audit engine in the library on generated boards of 1,000 and 100,000 stages
//! (every drive and load kind, `common::board_json`), one core. Prints stages per second for
//! parsing, the engine alone and the full stage report with its composed remedy serialised to
//! JSON, for given-RB stages and for sized stages, and the peak resident memory. Run:
//! `cargo bench --bench audit`.

mod common;

use std::time::Instant;

use common::{board_json, load_average, peak_rss_kib};

use pinlow::analysis::analyse;
use pinlow::board::parse_board;
use pinlow::parts::Library;
use pinlow::pipeline::{stage_report, Options};

fn main() {
    println!("load average {}", load_average());
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
