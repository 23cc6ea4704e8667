//! Tests of the build model.

use super::*;
use crate::analysis::yield_mc::tests::relay_stage;
use crate::drive::npn::corner::gain_factor;
use crate::drive::npn::NpnPart;
use crate::load::copper_at;
use crate::parts::Library;
use crate::quantity::{amps, celsius, ohms};

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-12 * b.abs().max(1e-300)
}

/// The curves are kept here in their own form for speed; they must read the same as the
/// part look-ups the worst-case engine uses.
#[test]
fn curves_read_the_same_as_the_part_lookups() {
    let lib = Library::builtin().expect("shipped parts load");
    let built =
        relay_stage(serde_json::json!({ "base_resistor_ohms": 1000, "pull_down_ohms": null }));
    let parts: Vec<&NpnPart> = lib
        .iter()
        .filter_map(|p| p.as_any().downcast_ref::<NpnPart>())
        .collect();
    assert!(parts.len() >= 8, "the shipped NPN parts");
    for part in parts {
        let id = &part.info.id;
        let model = BuildModel::exact(&YieldStage { part, ..built.y() });
        for i in 0..=300 {
            let ic = 1e-5 * 10f64.powf(f64::from(i) / 60.0); // 10 uA .. 1 A
            let [per_ic, spread, vbe_lo, vbe_hi, vce] = model.ic_terms_exact(ic);
            let g_min = part.gain_min_at(amps(ic));
            let g_max = part
                .gain_max_at(amps(ic))
                .unwrap_or(GAIN_MAX_OVER_MIN_WHEN_UNKNOWN * g_min)
                .max(g_min);
            let (lo, hi) = part.vbe_sat_at(amps(ic));
            assert!(close(per_ic.exp(), g_min / ic), "{id} at {ic}");
            assert!(close(spread.exp(), g_max / g_min), "{id} at {ic}");
            assert!(close(vbe_lo, lo.base()) && close(vbe_hi, hi.base()), "{id}");
            assert!(close(vce, part.vce_sat_max_at(amps(ic)).base()), "{id}");
        }
    }
}

#[test]
fn temperature_and_copper_read_the_same_as_the_engine() {
    for xtb in [0.0, 1.0, 1.3, 1.5, 2.0, 2.5, 5.0] {
        let exact = TemperatureGain::exact(xtb);
        for t in [-55.0, -40.0, 0.0, 25.0, 85.0, 125.0] {
            let want = gain_factor(celsius(t), xtb);
            assert!(close(exact.at(xtb, t), want), "XTB {xtb} at {t} C");
            let table = TemperatureGain::fast(xtb, -55.0, 125.0);
            assert!(
                (table.at(xtb, t) - want).abs() <= 1e-6 * want,
                "XTB {xtb} at {t} C"
            );
        }
    }
    for t in [-40.0, 20.0, 125.0] {
        assert!(close(
            copper(400.0, t),
            copper_at(ohms(400.0), celsius(t)).base()
        ));
    }
}
