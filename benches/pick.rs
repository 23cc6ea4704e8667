//! Time of one `pick` over a library of 1,000 generated parts (half npn, half nmos, figures
//! varied part by part) for one relay stage, single-threaded. Prints milliseconds per pick for
//! the ranking alone and for the ranking plus the report of the best ten, drawn as JSON.
//! Run: `cargo bench --bench pick`.

use std::sync::Arc;
use std::time::Instant;

use pinlow::board::RawStage;
use pinlow::fields::Origin;
use pinlow::parts::{read_part, Library, PartSource};
use pinlow::pick::{pick, Filter, Query};
use pinlow::report::pick::render_pick;
use pinlow::report::Format;

const PARTS: usize = 1_000;
const RUNS: usize = 30;

/// Generated part `i`: figures spread so that some pass, some are marginal and some fail.
fn part_json(i: usize) -> String {
    let f = (i % 37) as f64 / 36.0;
    if i % 2 == 0 {
        let gain = 30.0 + 270.0 * f;
        format!(
            r#"{{"id": "gen-npn-{i}", "description": "generated", "polarity": "npn", "package": "{pkg}",
            "provenance": "generated for the pick benchmark; not a real part",
            "vceo_max_v": {vceo}, "ic_max_a": {ic},
            "gain_min": [{{"ic_a": 0.01, "hfe": {g1}}}, {{"ic_a": 0.1, "hfe": {g2}}}, {{"ic_a": 0.5, "hfe": {g3}}}],
            "vce_sat_max": [{{"ic_a": 0.01, "ib_a": 0.001, "v": 0.15}}, {{"ic_a": 0.1, "ib_a": 0.01, "v": 0.3}}],
            "vbe_sat": [{{"ic_a": 0.01, "ib_a": 0.001, "min_v": 0.65, "max_v": {vbe}}}],
            "icbo_max_a": 5e-8, "tj_max_c": 150, "r_th_ja_k_per_w": {rth}}}"#,
            pkg = ["TO-92", "SOT-23", "SOT-89"][i % 3],
            vceo = 20 + (i % 5) * 10,
            ic = 0.1 + 0.1 * (i % 8) as f64,
            g1 = gain,
            g2 = gain * 0.8,
            g3 = gain * 0.4,
            vbe = 0.8 + 0.2 * f,
            rth = 100 + (i % 4) * 50,
        )
    } else {
        format!(
            r#"{{"id": "gen-nmos-{i}", "description": "generated", "polarity": "nmos", "package": "{pkg}",
            "provenance": "generated for the pick benchmark; not a real part",
            "vds_max_v": {vds}, "id_max_a": {id}, "vgs_max_v": 12,
            "vgs_th": {{"min_v": {thmin}, "max_v": {thmax}}},
            "rds_on_max": [{{"vgs_v": {v1}, "ohms": {r1}}}, {{"vgs_v": 4.5, "ohms": {r2}}}],
            "tj_max_c": 150, "r_th_ja_k_per_w": {rth}}}"#,
            pkg = ["SOT-23", "TO-252", "TO-220"][i % 3],
            vds = 12 + (i % 6) * 8,
            id = 0.5 + (i % 7) as f64,
            thmin = 0.5 + 0.5 * f,
            thmax = 1.0 + 1.5 * f,
            v1 = 1.8 + 1.2 * f,
            r1 = 0.05 + 0.2 * f,
            r2 = 0.03 + 0.1 * f,
            rth = 60 + (i % 5) * 40,
        )
    }
}

fn median_ms(mut times: Vec<f64>) -> f64 {
    times.sort_by(f64::total_cmp);
    times[times.len() / 2]
}

fn main() {
    let mut lib = Library::default();
    for i in 0..PARTS {
        let label = format!("gen-{i}.json");
        let part = read_part(&label, &part_json(i), PartSource::Builtin("bench"))
            .expect("generated part is valid");
        lib.insert(part);
    }
    assert_eq!(lib.len(), PARTS);
    let own = RawStage {
        name: Some("K1 vent relay".into()),
        supply_v: Some(12.0),
        logic_high_v: Some(3.3),
        ambient_c: Some([-20.0, 60.0]),
        load: serde_json::from_str(r#"{"kind": "relay", "coil_ohms": 400, "inductance_h": 0.2}"#)
            .ok(),
        clamp: serde_json::from_str(r#"{"kind": "diode"}"#).ok(),
        ..RawStage::default()
    };
    let query = Query {
        own,
        defaults: Arc::new(RawStage::default()),
        origin: Origin::Flags,
        index: 0,
        no_pull_down: false,
    };
    let filter = Filter::default();
    let mut rank_only = Vec::with_capacity(RUNS);
    let mut with_report = Vec::with_capacity(RUNS);
    let mut summary = String::new();
    for run in 0..RUNS + 2 {
        let t0 = Instant::now();
        let picked = pick(&query, &lib, &filter).expect("picks");
        let ranked = t0.elapsed();
        let report = pinlow::pipeline::pick_report(&picked, None, Some(10));
        let text = render_pick(&report, Format::Json, false, None);
        let all = t0.elapsed();
        std::hint::black_box(&text);
        if run >= 2 {
            rank_only.push(ranked.as_secs_f64() * 1e3);
            with_report.push(all.as_secs_f64() * 1e3);
        }
        let counts = picked
            .candidates
            .iter()
            .fold((0, 0, 0), |(p, m, f), c| match c.verdict() {
                pinlow::check::Status::Pass => (p + 1, m, f),
                pinlow::check::Status::Marginal => (p, m + 1, f),
                pinlow::check::Status::Fail => (p, m, f + 1),
            });
        summary = format!(
            "{} candidates ({} pass, {} marginal, {} fail), best {}, JSON of the top 10 {} kB",
            picked.candidates.len(),
            counts.0,
            counts.1,
            counts.2,
            picked.candidates[0].part_id(),
            text.len() / 1000
        );
    }
    println!("pick over {PARTS} generated parts, one relay stage, one thread: {summary}");
    println!(
        "  rank every part: {:.1} ms per pick (median of {RUNS}); with the report of the top 10 as JSON: {:.1} ms",
        median_ms(rank_only),
        median_ms(with_report)
    );
}
